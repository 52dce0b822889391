"use client";

import { useRouter } from "next/navigation";
import { ErrorBox, useApi } from "./api-client";

type TOption = { id: string; label: string };

/** Plans a new load: a receiving facility (required), a carrier and vehicle, and optionally the transport basis. */
export function PlanLoadForm({ siteId, facilities, carriers, bases }: { siteId: string; facilities: TOption[]; carriers: TOption[]; bases: TOption[] }) {
  const router = useRouter();
  const { busy, error, send, issueFor } = useApi();
  async function submit(event: React.FormEvent<HTMLFormElement>) {
    event.preventDefault();
    const form = new FormData(event.currentTarget);
    const text = (name: string) => String(form.get(name) ?? "").trim();
    const result = (await send("/api/v1/loads", {
      body: { site: siteId, facilityId: text("facilityId"), carrierId: text("carrierId") || undefined, vehicle: text("vehicle"), basis: text("basis") || undefined },
    })) as { load?: { id: string } } | null;
    if (result?.load) router.push(`/sites/${siteId}/loads/${result.load.id}`);
  }
  if (facilities.length === 0) {
    return <p className="caution">No receiving facility is set up yet. An administrator adds one under Setup → Receiving facilities and carriers.</p>;
  }
  return (
    <form className="card" onSubmit={submit} aria-label="Plan a load" noValidate>
      <div className="row" style={{ alignItems: "end" }}>
        <div style={{ flex: "2 1 240px" }}>
          <label htmlFor="facilityId">Receiving facility</label>
          <select id="facilityId" name="facilityId" defaultValue={facilities[0]!.id} aria-invalid={issueFor("facilityId") ? true : undefined}>
            {facilities.map((f) => (
              <option key={f.id} value={f.id}>
                {f.label}
              </option>
            ))}
          </select>
        </div>
        <div style={{ flex: "1 1 200px" }}>
          <label htmlFor="carrierId">
            Carrier <span className="hint">optional</span>
          </label>
          <select id="carrierId" name="carrierId" defaultValue="">
            <option value="">(not named yet)</option>
            {carriers.map((c) => (
              <option key={c.id} value={c.id}>
                {c.label}
              </option>
            ))}
          </select>
        </div>
        <div style={{ flex: "1 1 160px" }}>
          <label htmlFor="vehicle">
            Vehicle <span className="hint">optional</span>
          </label>
          <input id="vehicle" name="vehicle" autoComplete="off" />
        </div>
        <div style={{ flex: "2 1 240px" }}>
          <label htmlFor="basis">
            Transport basis <span className="hint">can be chosen later</span>
          </label>
          <select id="basis" name="basis" defaultValue="">
            <option value="">(choose later)</option>
            {bases.map((b) => (
              <option key={b.id} value={b.id}>
                {b.label}
              </option>
            ))}
          </select>
        </div>
        <button type="submit" className="primary" disabled={busy}>
          Plan load
        </button>
      </div>
      <ErrorBox error={error} />
    </form>
  );
}
