"use client";

import { useEffect, useState } from "react";
import { formatMass, lbToKg, type TUnitSystem } from "@/lib/units";
import { ErrorBox, useApi, type TApiError } from "../api-client";
import styles from "../loads.module.css";

type TOption = { id: string; label: string };
/** A form's last row: its submit button, then the last attempt's error across the form's width. */
function SubmitRow({ label, busy, error, isPrimary = false }: { label: string; busy: boolean; error: TApiError | null; isPrimary?: boolean }) {
  return (
    <>
      <div>
        <button type="submit" className={isPrimary ? "primary" : undefined} disabled={busy}>
          {label}
        </button>
      </div>
      <div className={styles.wide}>
        <ErrorBox error={error} />
      </div>
    </>
  );
}

const toKg = (value: string, system: TUnitSystem) => (value.trim() === "" ? undefined : system === "lb" ? lbToKg(Number(value)) : Number(value));

/** Ticks sealed containers of the site and puts them on the load in one request. */
export function AddContainers({ loadId, containers, system }: { loadId: string; containers: { id: string; labelNumber: string; kind: string; unitCount: number; batteryKg: number; bay: string }[]; system: TUnitSystem }) {
  const { busy, error, send } = useApi();
  const [chosen, setChosen] = useState<string[]>([]);
  if (containers.length === 0) return <p className="muted">No sealed container at this site is free. Seal one in the Yard first.</p>;
  return (
    <form
      aria-label="Add sealed containers"
      onSubmit={async (e) => {
        e.preventDefault();
        if (await send(`/api/v1/loads/${loadId}/containers`, { body: { containerIds: chosen } })) setChosen([]);
      }}
    >
      <fieldset>
        <legend>Sealed containers at this site</legend>
        <div className="choice-row">
          {containers.map((c) => (
            <label key={c.id}>
              <input type="checkbox" checked={chosen.includes(c.id)} onChange={(e) => setChosen((list) => (e.target.checked ? [...list, c.id] : list.filter((x) => x !== c.id)))} />
              {c.labelNumber}
              <span className="hint">
                {c.kind}, {c.unitCount} units, {formatMass(c.batteryKg, system)}
                {c.bay ? `, ${c.bay}` : ""}
              </span>
            </label>
          ))}
        </div>
      </fieldset>
      <p>
        <button type="submit" disabled={busy || chosen.length === 0}>
          Add to load
        </button>
      </p>
      <ErrorBox error={error} />
    </form>
  );
}

export function RemoveContainer({ loadId, containerId, labelNumber }: { loadId: string; containerId: string; labelNumber: string }) {
  const { busy, error, send } = useApi();
  return (
    <>
      <button type="button" disabled={busy} onClick={() => send(`/api/v1/loads/${loadId}/containers/${containerId}`, { method: "DELETE" })} aria-label={`Take ${labelNumber} off the load`} style={{ padding: "0.15rem 0.5rem", fontSize: "0.8rem" }}>
        Take off
      </button>
      <ErrorBox error={error} />
    </>
  );
}

/** Facility, carrier and vehicle, while planning. */
export function LoadDetailsForm({ loadId, facilityId, carrierId, vehicle, facilities, carriers }: { loadId: string; facilityId: string; carrierId: string | null; vehicle: string; facilities: TOption[]; carriers: TOption[] }) {
  const { busy, error, send } = useApi();
  return (
    <form
      className={styles.forms}
      aria-label="Load details"
      onSubmit={async (e) => {
        e.preventDefault();
        const form = new FormData(e.currentTarget);
        await send(`/api/v1/loads/${loadId}`, { method: "PATCH", body: { facilityId: String(form.get("facilityId")), carrierId: String(form.get("carrierId")) || null, vehicle: String(form.get("vehicle") ?? "").trim() } });
      }}
    >
      <div>
        <label htmlFor="facilityId">Receiving facility</label>
        <select id="facilityId" name="facilityId" defaultValue={facilityId}>
          {facilities.map((f) => (
            <option key={f.id} value={f.id}>
              {f.label}
            </option>
          ))}
        </select>
      </div>
      <div>
        <label htmlFor="carrierId">Carrier</label>
        <select id="carrierId" name="carrierId" defaultValue={carrierId ?? ""}>
          <option value="">(not named yet)</option>
          {carriers.map((c) => (
            <option key={c.id} value={c.id}>
              {c.label}
            </option>
          ))}
        </select>
      </div>
      <div>
        <label htmlFor="vehicle">Vehicle</label>
        <input id="vehicle" name="vehicle" defaultValue={vehicle} autoComplete="off" />
      </div>
      <SubmitRow label="Save details" busy={busy} error={error} />
    </form>
  );
}

/** The transport basis: one of the bases the site's rulebook offers; choosing another clears the checklist. */
export function BasisChoice({ loadId, current, bases, canEdit }: { loadId: string; current: string | null; bases: { id: string; title: string; citation: string }[]; canEdit: boolean }) {
  const { busy, error, send } = useApi();
  const [basis, setBasis] = useState(current ?? "");
  return (
    <form
      aria-label="Transport basis"
      onSubmit={(e) => {
        e.preventDefault();
        void send(`/api/v1/loads/${loadId}`, { method: "PATCH", body: { basis } });
      }}
    >
      <fieldset disabled={!canEdit}>
        <legend>Shipped under</legend>
        <div className="choice-row">
          {bases.map((b) => (
            <label key={b.id}>
              <input type="radio" name="basis" value={b.id} checked={basis === b.id} onChange={() => setBasis(b.id)} />
              {b.title} <span className="hint">({b.citation})</span>
            </label>
          ))}
        </div>
      </fieldset>
      {canEdit && (
        <p>
          <button type="submit" disabled={busy || !basis || basis === current}>
            Use this basis
          </button>{" "}
          {current && basis !== current && <span className="hint">Choosing another basis clears the ticks: its checklist is confirmed afresh.</span>}
        </p>
      )}
      <ErrorBox error={error} />
    </form>
  );
}

/** The basis checklist: each tick is saved as it is made, and the gate below follows. */
export function Checklist({ loadId, items, canEdit }: { loadId: string; items: { id: string; text: string; citation: string; isConfirmed: boolean }[]; canEdit: boolean }) {
  const { busy, error, send } = useApi();
  const [ticks, setTicks] = useState<Record<string, boolean>>(() => Object.fromEntries(items.map((i) => [i.id, i.isConfirmed])));
  async function tick(id: string, isConfirmed: boolean) {
    setTicks((t) => ({ ...t, [id]: isConfirmed }));
    // A tick the server refused is taken back, so the box never shows what was not saved.
    if (!(await send(`/api/v1/loads/${loadId}`, { method: "PATCH", body: { checklist: { [id]: isConfirmed } } }))) setTicks((t) => ({ ...t, [id]: !isConfirmed }));
  }
  return (
    <div>
      <ul className={styles.checklist} aria-label="Checklist">
        {items.map((item) => (
          <li key={item.id} data-item={item.id}>
            <input
              type="checkbox"
              id={`item-${item.id}`}
              checked={ticks[item.id] === true}
              disabled={!canEdit || busy}
              onChange={(e) => void tick(item.id, e.target.checked)}
            />
            <label htmlFor={`item-${item.id}`}>
              {item.text}
              <span className={styles.cite}>{item.citation}</span>
            </label>
          </li>
        ))}
      </ul>
      <ErrorBox error={error} />
    </div>
  );
}

/** Ready (through the gate) or back to planning. */
export function StateButton({ loadId, to, label, isPrimary = false, disabled = false }: { loadId: string; to: "ready" | "planning"; label: string; isPrimary?: boolean; disabled?: boolean }) {
  const { busy, error, send } = useApi();
  return (
    <div>
      <button type="button" className={isPrimary ? "primary" : undefined} disabled={busy || disabled} onClick={() => send(`/api/v1/loads/${loadId}`, { method: "PATCH", body: { state: to } })}>
        {label}
      </button>
      <ErrorBox error={error} />
    </div>
  );
}

const localNow = () => {
  const d = new Date();
  d.setMinutes(d.getMinutes() - d.getTimezoneOffset());
  return d.toISOString().slice(0, 16);
};

/** Departure: the time it left and, if weighed, the departure scale weight. */
export function DepartForm({ loadId, system }: { loadId: string; system: TUnitSystem }) {
  const { busy, error, send, issueFor } = useApi();
  // The browser's own clock and time zone, set after hydration (the server renders in UTC).
  const [opened, setOpened] = useState("");
  const [when, setWhen] = useState("");
  useEffect(() => {
    const now = localNow();
    setOpened(now);
    setWhen(now);
  }, []);
  return (
    <form
      className={styles.forms}
      aria-label="Departure"
      onSubmit={async (e) => {
        e.preventDefault();
        const form = new FormData(e.currentTarget);
        // Left at the time the form opened with (to the minute): the server takes the moment it is saved.
        const departedAt = when && when !== opened ? new Date(when).toISOString() : undefined;
        await send(`/api/v1/loads/${loadId}/depart`, { body: { departedAt, departureScaleKg: toKg(String(form.get("scale") ?? ""), system) } });
      }}
    >
      <div>
        <label htmlFor="departure-scale">
          Departure scale weight ({system}) <span className="hint">optional</span>
        </label>
        <input id="departure-scale" name="scale" inputMode="decimal" aria-invalid={issueFor("departureScaleKg") ? true : undefined} />
      </div>
      <div>
        <label htmlFor="departedAt">Departed at</label>
        <input id="departedAt" name="departedAt" type="datetime-local" value={when} onChange={(e) => setWhen(e.target.value)} aria-invalid={issueFor("departedAt") ? true : undefined} />
      </div>
      <SubmitRow label="Mark departed" busy={busy} error={error} isPrimary />
    </form>
  );
}

/** The receiving facility's scale weight and date of receipt. */
export function ReceiveForm({ loadId, system }: { loadId: string; system: TUnitSystem }) {
  const { busy, error, send, issueFor } = useApi();
  const [day, setDay] = useState("");
  useEffect(() => setDay(localNow().slice(0, 10)), []);
  return (
    <form
      className={styles.forms}
      aria-label="Receipt"
      onSubmit={async (e) => {
        e.preventDefault();
        const form = new FormData(e.currentTarget);
        await send(`/api/v1/loads/${loadId}/receive`, { body: { receivedKg: toKg(String(form.get("received") ?? ""), system), receivedAt: String(form.get("receivedAt") ?? "") } });
      }}
    >
      <div>
        <label htmlFor="received-weight">Received weight ({system})</label>
        <input id="received-weight" name="received" inputMode="decimal" required aria-invalid={issueFor("receivedKg") ? true : undefined} />
      </div>
      <div>
        <label htmlFor="receivedAt">Date received</label>
        <input id="receivedAt" name="receivedAt" type="date" value={day} onChange={(e) => setDay(e.target.value)} required aria-invalid={issueFor("receivedAt") ? true : undefined} />
      </div>
      <SubmitRow label="Record receipt" busy={busy} error={error} isPrimary />
    </form>
  );
}

export function ReconcileForm({ loadId, isFlagged }: { loadId: string; isFlagged: boolean }) {
  const { busy, error, send } = useApi();
  return (
    <form
      className={styles.forms}
      aria-label="Reconcile"
      onSubmit={async (e) => {
        e.preventDefault();
        await send(`/api/v1/loads/${loadId}/reconcile`, { body: { note: String(new FormData(e.currentTarget).get("note") ?? "").trim() } });
      }}
    >
      <div className={styles.wide}>
        <label htmlFor="reconcile-note">
          Note {isFlagged ? <span className="hint">needed: say why the difference is accepted</span> : <span className="hint">optional</span>}
        </label>
        <input id="reconcile-note" name="note" autoComplete="off" />
      </div>
      <SubmitRow label="Reconcile" busy={busy} error={error} isPrimary />
    </form>
  );
}

/** A correction: a new trail event beside the recorded value, never an overwrite. */
export function CorrectionForm({ loadId, fields, system }: { loadId: string; fields: TOption[]; system: TUnitSystem }) {
  const { busy, error, send } = useApi();
  const [field, setField] = useState(fields[0]?.id ?? "receivedKg");
  const isDate = field === "receivedAt";
  return (
    <form
      className={styles.forms}
      aria-label="Correction"
      onSubmit={async (e) => {
        e.preventDefault();
        const form = new FormData(e.currentTarget);
        const raw = String(form.get("value") ?? "");
        if (await send(`/api/v1/loads/${loadId}/corrections`, { body: { field, value: isDate ? raw : toKg(raw, system), note: String(form.get("note") ?? "").trim() } })) e.currentTarget?.reset();
      }}
    >
      <div>
        <label htmlFor="correction-field">What to correct</label>
        <select id="correction-field" value={field} onChange={(e) => setField(e.target.value)}>
          {fields.map((f) => (
            <option key={f.id} value={f.id}>
              {f.label}
            </option>
          ))}
        </select>
      </div>
      <div>
        <label htmlFor="correction-value">Corrected value{isDate ? "" : ` (${system})`}</label>
        <input id="correction-value" name="value" type={isDate ? "date" : "text"} inputMode={isDate ? undefined : "decimal"} key={field} />
      </div>
      <div>
        <label htmlFor="correction-note">Why</label>
        <input id="correction-note" name="note" autoComplete="off" />
      </div>
      <SubmitRow label="Record correction" busy={busy} error={error} />
    </form>
  );
}
