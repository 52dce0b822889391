"use client";

import { useRouter } from "next/navigation";
import { useState } from "react";
import styles from "../setup.module.css";

type TIssue = { field: string; message: string };

export function CreateKeyForm({ sites, roles }: { sites: { id: string; name: string }[]; roles: { id: string; label: string }[] }) {
  const router = useRouter();
  const [issues, setIssues] = useState<TIssue[]>([]);
  const [error, setError] = useState<string | null>(null);
  const [made, setMade] = useState<{ name: string; key: string } | null>(null);
  const [busy, setBusy] = useState(false);
  const issue = (field: string) => issues.find((i) => i.field === field)?.message;

  async function submit(event: React.FormEvent<HTMLFormElement>) {
    event.preventDefault();
    const formElement = event.currentTarget;
    const form = new FormData(formElement);
    const body = { site: String(form.get("site") ?? ""), role: String(form.get("role") ?? ""), name: String(form.get("name") ?? "") };
    setBusy(true);
    setError(null);
    setMade(null);
    const response = await fetch("/api/v1/api-keys", { method: "POST", headers: { "content-type": "application/json" }, body: JSON.stringify(body) });
    const result = await response.json().catch(() => ({}));
    setBusy(false);
    if (!response.ok) {
      setIssues(result.error?.issues ?? []);
      setError(result.error?.message ?? "Not made.");
      return;
    }
    setIssues([]);
    setMade({ name: result.apiKey.name, key: result.key });
    formElement.reset();
    router.refresh();
  }

  return (
    <>
      <form className={`card ${styles.form}`} onSubmit={submit} noValidate aria-label="Make a key">
        <div>
          <label htmlFor="key-name">
            Name <span className="hint">where it is used, e.g. “Till 2”</span>
          </label>
          <input id="key-name" name="name" maxLength={80} required aria-invalid={issue("name") ? true : undefined} />
          {issue("name") && <p className="field-error">{issue("name")}</p>}
        </div>
        <div>
          <label htmlFor="key-site">Site</label>
          <select id="key-site" name="site">
            {sites.map((s) => (
              <option key={s.id} value={s.id}>
                {s.name}
              </option>
            ))}
          </select>
        </div>
        <div>
          <label htmlFor="key-role">Role</label>
          <select id="key-role" name="role" defaultValue="clerk">
            {roles.map((r) => (
              <option key={r.id} value={r.id}>
                {r.label}
              </option>
            ))}
          </select>
          {issue("role") && <p className="field-error">{issue("role")}</p>}
        </div>
        <div className={styles.actions}>
          <button className="primary" type="submit" disabled={busy}>
            {busy ? "Making…" : "Make key"}
          </button>
          {error && (
            <p role="alert" className="error-box" style={{ margin: 0 }}>
              {error}
            </p>
          )}
        </div>
      </form>
      {made && (
        <div className="caution" role="status" aria-label="New key">
          <strong>Copy the key for “{made.name}” now: it is not shown again.</strong>
          <p className={styles.secret} data-testid="new-api-key">
            {made.key}
          </p>
          <p className="small">Send it as the header <code>Authorization: Bearer …</code>. If it is lost, revoke it and make a new one.</p>
        </div>
      )}
    </>
  );
}
