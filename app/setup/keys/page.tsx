import type { Metadata } from "next";
import { Shell } from "@/app/_ui/shell";
import { can, ROLES } from "@/lib/auth/permissions";
import { listApiKeys } from "@/lib/db/api-keys";
import { visibleSites } from "@/lib/db/sites";
import { SetupNav } from "../setup-nav";
import { setupActor } from "../setup-actor";
import { ROLE_LABELS, roleLabel } from "../role-labels";
import { CreateKeyForm } from "./create-key-form";
import { RevokeKeyButton } from "./revoke-key-button";

export const metadata: Metadata = { title: "Setup · API keys" };
export const dynamic = "force-dynamic";

const when = (iso: string | null) => (iso ? iso.slice(0, 16).replace("T", " ") + " UTC" : "—");

export default async function SetupKeysPage() {
  const actor = await setupActor();
  const [keys, sites] = await Promise.all([listApiKeys(actor), visibleSites(actor, "setup.read")]);
  const writable = sites.filter((s) => can(actor, "setup.write", s.id)).map((s) => ({ id: s.id, name: s.name }));
  return (
    <Shell actor={actor} active="setup">
      <h1>Setup</h1>
      <SetupNav active="keys" />
      <h2>API keys</h2>
      <p className="lede">
        A key lets another system (a till, a scale PC) act at one site with one role. The key is shown once when it is made; Leadger keeps only a fingerprint of
        it. What a key does is in the Trail under the key’s name.
      </p>
      <table className="dense" aria-label="API keys">
        <thead>
          <tr>
            <th>Name</th>
            <th>Site</th>
            <th>Role</th>
            <th>Starts with</th>
            <th>Made by</th>
            <th>Made</th>
            <th>Last used</th>
            <th>State</th>
            <th></th>
          </tr>
        </thead>
        <tbody>
          {keys.map((k) => (
            <tr key={k.id}>
              <td>{k.name}</td>
              <td>{k.siteName}</td>
              <td>{roleLabel(k.role)}</td>
              <td>
                <code>{k.prefix}…</code>
              </td>
              <td>{k.createdBy}</td>
              <td>{when(k.createdAt)}</td>
              <td>{when(k.lastUsedAt)}</td>
              <td>{k.revokedAt ? <span className="status exceeded">✕ Revoked {when(k.revokedAt)}</span> : <span className="status ok">✓ Active</span>}</td>
              <td>{!k.revokedAt && actor.kind === "user" && can(actor, "setup.write", k.siteId) && <RevokeKeyButton id={k.id} name={k.name} />}</td>
            </tr>
          ))}
        </tbody>
      </table>
      {keys.length === 0 && <p className="muted">No keys yet.</p>}
      {actor.kind === "user" && writable.length > 0 && (
        <>
          <h2>Make a key</h2>
          <CreateKeyForm sites={writable} roles={ROLES.map((r) => ({ id: r, label: ROLE_LABELS[r] }))} />
        </>
      )}
    </Shell>
  );
}
