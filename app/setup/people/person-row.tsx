"use client";

import { useRouter } from "next/navigation";
import { useState } from "react";
import styles from "../setup.module.css";

type TPerson = { id: string; name: string; email: string; memberships: { siteId: string; role: string }[] };
type TSite = { id: string; name: string; canWrite: boolean };
type TRoleOption = { id: string; label: string };

const NONE = "";

/** One person: a role select per site the viewer administers (read-only elsewhere), saved together. */
export function PersonRow({ person, sites, roles, isSelf }: { person: TPerson; sites: TSite[]; roles: TRoleOption[]; isSelf: boolean }) {
  const router = useRouter();
  const current = new Map(person.memberships.map((m) => [m.siteId, m.role]));
  const [chosen, setChosen] = useState<Record<string, string>>(() => Object.fromEntries(sites.map((s) => [s.id, current.get(s.id) ?? NONE])));
  const [message, setMessage] = useState<{ text: string; isError: boolean } | null>(null);
  const [busy, setBusy] = useState(false);
  const labelOf = (role: string | undefined) => roles.find((r) => r.id === role)?.label ?? "—";
  const changed = sites.filter((s) => s.canWrite && (chosen[s.id] ?? NONE) !== (current.get(s.id) ?? NONE));
  const canEditAny = !isSelf && sites.some((s) => s.canWrite);

  async function send(url: string, init: RequestInit) {
    const response = await fetch(url, { ...init, headers: { "content-type": "application/json" } });
    if (response.ok) return null;
    const body = await response.json().catch(() => ({}));
    return body.error?.message ?? `Not saved (${response.status}).`;
  }

  async function saveRoles() {
    setBusy(true);
    setMessage(null);
    const errors: string[] = [];
    for (const s of changed) {
      const role = chosen[s.id] ?? NONE;
      const url = `/api/v1/people/${person.id}/memberships`;
      const error = role === NONE ? await send(`${url}?site=${encodeURIComponent(s.id)}`, { method: "DELETE" }) : await send(url, { method: "PUT", body: JSON.stringify({ site: s.id, role }) });
      if (error) errors.push(`${s.name}: ${error}`);
    }
    setBusy(false);
    setMessage(errors.length ? { text: errors.join(" "), isError: true } : { text: "Roles saved.", isError: false });
    router.refresh();
  }

  async function resetPassword(event: React.FormEvent<HTMLFormElement>) {
    event.preventDefault();
    const form = event.currentTarget;
    const password = String(new FormData(form).get("password") ?? "");
    setBusy(true);
    const error = await send(`/api/v1/people/${person.id}`, { method: "PATCH", body: JSON.stringify({ password }) });
    setBusy(false);
    if (!error) form.reset();
    setMessage(error ? { text: error, isError: true } : { text: "New temporary password set; the person was signed out everywhere.", isError: false });
  }

  return (
    <tr>
      <td>{person.name}</td>
      <td>{person.email}</td>
      {sites.map((s) => (
        <td key={s.id}>
          {s.canWrite && !isSelf ? (
            <select
              className={styles.roleSelect}
              aria-label={`Role of ${person.name} at ${s.name}`}
              value={chosen[s.id] ?? NONE}
              onChange={(e) => setChosen({ ...chosen, [s.id]: e.target.value })}
            >
              <option value={NONE}>No role</option>
              {roles.map((r) => (
                <option key={r.id} value={r.id}>
                  {r.label}
                </option>
              ))}
            </select>
          ) : (
            labelOf(current.get(s.id))
          )}
        </td>
      ))}
      <td>
        {isSelf && <span className="muted small">You cannot change your own roles.</span>}
        {canEditAny && (
          <div className="grid" style={{ gap: "0.4rem" }}>
            <button type="button" onClick={saveRoles} disabled={busy || changed.length === 0}>
              Save roles
            </button>
            <details>
              <summary>New temporary password</summary>
              <form className={styles.inline} onSubmit={resetPassword}>
                <div>
                  <label htmlFor={`pw-${person.id}`}>Temporary password</label>
                  <input id={`pw-${person.id}`} name="password" type="text" minLength={10} maxLength={128} autoComplete="off" required />
                </div>
                <button type="submit" disabled={busy}>
                  Set and sign out
                </button>
              </form>
            </details>
          </div>
        )}
        {message && (
          <p role={message.isError ? "alert" : "status"} className={message.isError ? "field-error" : "small"}>
            {message.text}
          </p>
        )}
      </td>
    </tr>
  );
}
