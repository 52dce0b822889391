import type { Metadata } from "next";
import { Shell } from "@/app/_ui/shell";
import { can, canAnywhere, ROLES } from "@/lib/auth/permissions";
import { listPeople } from "@/lib/db/people";
import { visibleSites } from "@/lib/db/sites";
import { SetupNav } from "../setup-nav";
import { setupActor } from "../setup-actor";
import { ROLE_LABELS } from "../role-labels";
import { AddPersonForm } from "./add-person-form";
import { PersonRow } from "./person-row";

export const metadata: Metadata = { title: "Setup · People" };
export const dynamic = "force-dynamic";

export default async function SetupPeoplePage() {
  const actor = await setupActor();
  const [people, sites] = await Promise.all([listPeople(actor), visibleSites(actor, "setup.read")]);
  const siteViews = sites.map((s) => ({ id: s.id, name: s.name, canWrite: can(actor, "setup.write", s.id) }));
  const roles = ROLES.map((r) => ({ id: r, label: ROLE_LABELS[r] }));
  const canAdd = actor.kind === "user" && canAnywhere(actor, "setup.write");
  return (
    <Shell actor={actor} active="setup">
      <h1>Setup</h1>
      <SetupNav active="people" />
      <h2>People and their roles</h2>
      <p className="lede">
        A person has one role at each site they work at. Roles take effect on the person’s next click. Nobody changes their own role, and every site keeps at least
        one administrator.
      </p>
      <table className="dense" aria-label="People">
        <thead>
          <tr>
            <th>Name</th>
            <th>Email</th>
            {siteViews.map((s) => (
              <th key={s.id}>{s.name}</th>
            ))}
            <th>Change</th>
          </tr>
        </thead>
        <tbody>
          {people.map((p) => (
            <PersonRow key={p.id} person={p} sites={siteViews} roles={roles} isSelf={actor.kind === "user" && actor.id === p.id} />
          ))}
        </tbody>
      </table>
      {people.length === 0 && <p className="muted">Nobody yet.</p>}
      {canAdd && (
        <>
          <h2>Add a person</h2>
          <AddPersonForm sites={siteViews.filter((s) => s.canWrite)} roles={roles} />
        </>
      )}
    </Shell>
  );
}
