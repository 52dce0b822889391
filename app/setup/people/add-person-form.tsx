"use client";

import { useRouter } from "next/navigation";
import { useState } from "react";
import styles from "../setup.module.css";

type TSite = { id: string; name: string };
type TRoleOption = { id: string; label: string };
type TIssue = { field: string; message: string };

/** 16 characters from 31 easy-to-read ones (about 79 bits) from the browser's CSPRNG; bytes ≥ 248 are skipped so no character is likelier. */
function temporaryPassword(): string {
  const alphabet = "abcdefghjkmnpqrstuvwxyz23456789";
  let chars = "";
  while (chars.length < 16) {
    for (const b of crypto.getRandomValues(new Uint8Array(32))) if (b < 248 && chars.length < 16) chars += alphabet[b % alphabet.length];
  }
  return `${chars.slice(0, 4)}-${chars.slice(4, 8)}-${chars.slice(8, 12)}-${chars.slice(12, 16)}`;
}

export function AddPersonForm({ sites, roles }: { sites: TSite[]; roles: TRoleOption[] }) {
  const router = useRouter();
  const [issues, setIssues] = useState<TIssue[]>([]);
  const [message, setMessage] = useState<{ text: string; isError: boolean } | null>(null);
  const [busy, setBusy] = useState(false);
  const [password, setPassword] = useState("");
  const issue = (field: string) => issues.find((i) => i.field === field || i.field.startsWith(`${field}.`))?.message;

  async function submit(event: React.FormEvent<HTMLFormElement>) {
    event.preventDefault();
    const formElement = event.currentTarget;
    const form = new FormData(formElement);
    const memberships = sites.map((s) => ({ site: s.id, role: String(form.get(`role-${s.id}`) ?? "") })).filter((m) => m.role);
    const body = { email: String(form.get("email") ?? ""), name: String(form.get("name") ?? ""), password, memberships };
    setBusy(true);
    setMessage(null);
    const response = await fetch("/api/v1/people", { method: "POST", headers: { "content-type": "application/json" }, body: JSON.stringify(body) });
    const result = await response.json().catch(() => ({}));
    setBusy(false);
    if (!response.ok) {
      setIssues(result.error?.issues ?? []);
      setMessage({ text: result.error?.message ?? "Not added.", isError: true });
      return;
    }
    setIssues([]);
    setMessage({ text: `${result.person.name} added. Give them the temporary password in person; it is not shown again.`, isError: false });
    formElement.reset();
    setPassword("");
    router.refresh();
  }

  const errorFor = (field: string) => issue(field) && <p className="field-error">{issue(field)}</p>;

  return (
    <form className={`card ${styles.form}`} onSubmit={submit} noValidate aria-label="Add a person">
      <div>
        <label htmlFor="new-email">Email</label>
        <input id="new-email" name="email" type="email" autoComplete="off" required aria-invalid={issue("email") ? true : undefined} />
        {errorFor("email")}
      </div>
      <div>
        <label htmlFor="new-name">Name</label>
        <input id="new-name" name="name" autoComplete="off" required aria-invalid={issue("name") ? true : undefined} />
        {errorFor("name")}
      </div>
      <div>
        <label htmlFor="new-password">
          Temporary password <span className="hint">at least 10 characters</span>
        </label>
        <div className={styles.inline}>
          <input id="new-password" name="password" type="text" autoComplete="off" value={password} onChange={(e) => setPassword(e.target.value)} required aria-invalid={issue("password") ? true : undefined} />
          <button type="button" onClick={() => setPassword(temporaryPassword())}>
            Make one up
          </button>
        </div>
        {errorFor("password")}
      </div>
      <fieldset className={styles.wide}>
        <legend>Roles</legend>
        <div className={styles.form}>
          {sites.map((s) => (
            <div key={s.id}>
              <label htmlFor={`new-role-${s.id}`}>{s.name}</label>
              <select id={`new-role-${s.id}`} name={`role-${s.id}`} defaultValue="">
                <option value="">No role</option>
                {roles.map((r) => (
                  <option key={r.id} value={r.id}>
                    {r.label}
                  </option>
                ))}
              </select>
            </div>
          ))}
        </div>
        {errorFor("memberships")}
      </fieldset>
      <div className={styles.actions}>
        <button className="primary" type="submit" disabled={busy}>
          {busy ? "Adding…" : "Add person"}
        </button>
        {message && (
          <p role={message.isError ? "alert" : "status"} className={message.isError ? "error-box" : "notice"} style={{ margin: 0 }}>
            {message.text}
          </p>
        )}
      </div>
    </form>
  );
}
