"use client";

import { useActionState } from "react";
import { ErrorBox, useApi } from "@/app/sites/[id]/loads/api-client";
import { saveEmergencyPhone, type TPhoneState } from "./actions";

export function EmergencyPhoneForm({ current }: { current: string }) {
  const [state, action, pending] = useActionState<TPhoneState, FormData>(saveEmergencyPhone, { ok: true, message: "" });
  return (
    <form action={action} className="row" aria-label="Emergency response telephone" style={{ alignItems: "end" }}>
      <div style={{ flex: "1 1 280px" }}>
        <label htmlFor="emergencyPhone">
          Emergency response telephone number <span className="hint">monitored at all times while a load is in transport (49 CFR 172.604(a))</span>
        </label>
        <input id="emergencyPhone" name="emergencyPhone" defaultValue={current} autoComplete="off" aria-invalid={state.issue ? true : undefined} aria-describedby={state.issue ? "emergencyPhone-error" : undefined} />
        {state.issue && (
          <p className="field-error" id="emergencyPhone-error">
            {state.issue}
          </p>
        )}
      </div>
      <button type="submit" disabled={pending}>
        Save number
      </button>
      {state.message && (
        <p role="status" className={state.ok ? "notice" : "error-box"}>
          {state.message}
        </p>
      )}
    </form>
  );
}

type TParty = { id?: string; name: string; address: string; regulatoryIds: string; tolerancePct?: number };

/** Adds (no id) or edits a receiving facility or a carrier through the API. */
export function PartyForm({ kind, party }: { kind: "facility" | "carrier"; party?: TParty }) {
  const { busy, error, send, issueFor } = useApi();
  const isFacility = kind === "facility";
  const prefix = `${kind}-${party?.id ?? "new"}`;
  const path = isFacility ? "/api/v1/facilities" : "/api/v1/carriers";
  return (
    <form
      aria-label={party ? `Edit ${party.name}` : isFacility ? "Add a receiving facility" : "Add a carrier"}
      className="card"
      onSubmit={async (e) => {
        e.preventDefault();
        const target = e.currentTarget;
        const form = new FormData(target);
        const text = (name: string) => String(form.get(name) ?? "").trim();
        const body: Record<string, unknown> = { name: text("name"), address: text("address"), regulatoryIds: text("regulatoryIds") };
        if (isFacility && text("tolerancePct") !== "") body.tolerancePct = Number(text("tolerancePct"));
        const ok = await send(party?.id ? `${path}/${party.id}` : path, { method: party?.id ? "PATCH" : "POST", body });
        if (ok && !party) target.reset();
      }}
      noValidate
    >
      <div className="grid two">
        <div>
          <label htmlFor={`${prefix}-name`}>Name</label>
          <input id={`${prefix}-name`} name="name" defaultValue={party?.name ?? ""} aria-invalid={issueFor("name") ? true : undefined} />
          {issueFor("name") && <p className="field-error">{issueFor("name")}</p>}
        </div>
        <div>
          <label htmlFor={`${prefix}-ids`}>
            Regulatory IDs <span className="hint">e.g. EPA ID, USDOT number</span>
          </label>
          <input id={`${prefix}-ids`} name="regulatoryIds" defaultValue={party?.regulatoryIds ?? ""} />
        </div>
        <div>
          <label htmlFor={`${prefix}-address`}>
            Address <span className="hint">one line each</span>
          </label>
          <textarea id={`${prefix}-address`} name="address" rows={2} defaultValue={party?.address ?? ""} aria-invalid={issueFor("address") ? true : undefined} />
          {issueFor("address") && <p className="field-error">{issueFor("address")}</p>}
        </div>
        {isFacility && (
          <div>
            <label htmlFor={`${prefix}-tolerance`}>
              Weighing tolerance (%) <span className="hint">shipped vs received; 2 % unless agreed otherwise</span>
            </label>
            <input id={`${prefix}-tolerance`} name="tolerancePct" inputMode="decimal" defaultValue={party?.tolerancePct ?? 2} aria-invalid={issueFor("tolerancePct") ? true : undefined} />
            {issueFor("tolerancePct") && <p className="field-error">{issueFor("tolerancePct")}</p>}
          </div>
        )}
      </div>
      <p>
        <button type="submit" disabled={busy}>
          {party ? "Save changes" : isFacility ? "Add facility" : "Add carrier"}
        </button>
      </p>
      <ErrorBox error={error} />
    </form>
  );
}
