import type { Metadata } from "next";
import { forbidden } from "next/navigation";
import { pageActor } from "@/app/_ui/session";
import { Shell } from "@/app/_ui/shell";
import { canAnywhere } from "@/lib/auth/permissions";
import { GENERAL_CAUTION } from "@/lib/cautions";
import { listCarriers, listFacilities, shipperSetup } from "@/lib/db/facilities";
import { EmergencyPhoneForm, PartyForm } from "./setup-forms";

export const metadata: Metadata = { title: "Receiving facilities and carriers" };
export const dynamic = "force-dynamic";

export default async function FacilitiesSetupPage() {
  const actor = await pageActor();
  if (!canAnywhere(actor, "setup.read") && !canAnywhere(actor, "loads.read")) forbidden();
  const [{ organisation, canEdit }, facilities, carriers] = await Promise.all([shipperSetup(actor), listFacilities(actor), listCarriers(actor)]);
  return (
    <Shell actor={actor}>
      <p className="small muted">Setup</p>
      <h1>Receiving facilities and carriers</h1>
      <p className="lede">
        Where {organisation.name} sends its loads, who carries them, and the number printed on every shipping paper. These records are never deleted: loads and their papers refer to them for years.
      </p>

      <h2>Shipper’s emergency response telephone</h2>
      {canEdit ? (
        <EmergencyPhoneForm current={organisation.emergencyPhone ?? ""} />
      ) : (
        <p>
          {organisation.emergencyPhone ?? <span className="status exceeded"><span aria-hidden="true">✗</span> None set</span>}{" "}
          <span className="hint">An administrator changes it.</span>
        </p>
      )}

      <h2>Receiving facilities</h2>
      <table className="dense" aria-label="Receiving facilities">
        <thead>
          <tr>
            <th>Name</th>
            <th>Address</th>
            <th>Regulatory IDs</th>
            <th className="num">Tolerance</th>
          </tr>
        </thead>
        <tbody>
          {facilities.map((f) => (
            <tr key={f.id}>
              <td>
                {f.name}
                {canEdit && (
                  <details>
                    <summary className="small">Edit</summary>
                    <PartyForm kind="facility" party={f} />
                  </details>
                )}
              </td>
              <td style={{ whiteSpace: "pre-line" }}>{f.address}</td>
              <td>{f.regulatoryIds || "—"}</td>
              <td className="num">{f.tolerancePct} %</td>
            </tr>
          ))}
        </tbody>
      </table>
      {facilities.length === 0 && <p className="muted">None yet.</p>}
      {canEdit && <PartyForm kind="facility" />}

      <h2>Carriers</h2>
      <table className="dense" aria-label="Carriers">
        <thead>
          <tr>
            <th>Name</th>
            <th>Address</th>
            <th>Regulatory IDs</th>
          </tr>
        </thead>
        <tbody>
          {carriers.map((c) => (
            <tr key={c.id}>
              <td>
                {c.name}
                {canEdit && (
                  <details>
                    <summary className="small">Edit</summary>
                    <PartyForm kind="carrier" party={c} />
                  </details>
                )}
              </td>
              <td style={{ whiteSpace: "pre-line" }}>{c.address || "—"}</td>
              <td>{c.regulatoryIds || "—"}</td>
            </tr>
          ))}
        </tbody>
      </table>
      {carriers.length === 0 && <p className="muted">None yet.</p>}
      {canEdit && <PartyForm kind="carrier" />}
      <p className="caution" role="note">
        {GENERAL_CAUTION}
      </p>
    </Shell>
  );
}
