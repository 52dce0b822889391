"use client";

import { useRouter } from "next/navigation";
import { useState } from "react";
import { formatMass, lbToKg, type TUnitSystem } from "@/lib/units";

type TOption = { id: string; label: string };
type TIssue = { field: string; message: string };
type TRow = { key: number; kind: string; voltage: string; count: string };

const UNIT_KG = { min: 1, max: 80 };
const num = (s: string) => (s.trim() === "" ? Number.NaN : Number(s));

/**
 * A lot from a scale ticket. Gross, tare and net are shown live in the site's unit; the mix is given by count
 * (a single row can be left blank: it takes the whole count).
 */
export function LotForm({ siteId, unitSystem, kinds, containers }: { siteId: string; unitSystem: string; kinds: TOption[]; containers: { id: string; labelNumber: string }[] }) {
  const router = useRouter();
  const [unit, setUnit] = useState<TUnitSystem>(unitSystem === "lb" ? "lb" : "kg");
  const [gross, setGross] = useState("");
  const [tare, setTare] = useState("");
  const [count, setCount] = useState("");
  const [rows, setRows] = useState<TRow[]>([{ key: 1, kind: kinds[0]?.id ?? "flooded", voltage: "12", count: "" }]);
  const [issues, setIssues] = useState<TIssue[]>([]);
  const [message, setMessage] = useState<{ text: string; isError: boolean } | null>(null);
  const [busy, setBusy] = useState(false);

  const toKg = (v: number) => (unit === "lb" ? lbToKg(v) : v);
  const grossKg = toKg(num(gross));
  const tareKg = toKg(num(tare));
  const netKg = Math.round((grossKg - tareKg) * 1000) / 1000;
  const units = num(count);
  const perUnitKg = netKg / units;
  const hasWeights = Number.isFinite(netKg);
  const liveProblem = !hasWeights
    ? null
    : netKg < 0
      ? "tare is more than gross"
      : Number.isFinite(perUnitKg) && (perUnitKg < UNIT_KG.min || perUnitKg > UNIT_KG.max)
        ? `${perUnitKg.toFixed(1)} kg a unit is outside 1–80 kg`
        : null;

  const issue = (field: string) => issues.find((i) => i.field === field || i.field.startsWith(`${field}.`))?.message;
  const invalid = (field: string) => (issue(field) ? { "aria-invalid": true as const, "aria-describedby": `lot-${field}-error` } : {});
  const error = (field: string) => (issue(field) ? <p className="field-error" id={`lot-${field}-error`}>{issue(field)}</p> : null);
  const setRow = (key: number, change: Partial<TRow>) => setRows((rs) => rs.map((r) => (r.key === key ? { ...r, ...change } : r)));

  async function submit(event: React.FormEvent<HTMLFormElement>) {
    event.preventDefault();
    if (busy) return;
    const form = new FormData(event.currentTarget);
    const single = rows.length === 1 && rows[0]!.count.trim() === "";
    const body = {
      site: siteId,
      ticketNumber: String(form.get("ticketNumber") ?? "").trim(),
      senderName: String(form.get("senderName") ?? "").trim() || undefined,
      senderAddress: String(form.get("senderAddress") ?? "").trim() || undefined,
      grossKg: Number.isFinite(grossKg) ? grossKg : undefined,
      tareKg: Number.isFinite(tareKg) ? tareKg : undefined,
      unitCount: Number.isFinite(units) ? units : undefined,
      mixBasis: "count",
      mix: rows.map((r) => ({ kind: r.kind, nominalVoltage: Number(r.voltage), count: single ? units : Number.isFinite(num(r.count)) ? num(r.count) : undefined })),
      containerId: String(form.get("containerId") ?? "") || undefined,
      note: String(form.get("note") ?? "").trim() || undefined,
    };
    setBusy(true);
    const response = await fetch("/api/v1/lots", { method: "POST", headers: { "content-type": "application/json" }, body: JSON.stringify(body) });
    const result = await response.json().catch(() => ({}));
    setBusy(false);
    if (!response.ok) {
      setIssues(result.error?.issues ?? []);
      setMessage({ text: result.error?.message ?? "Not saved.", isError: true });
      return;
    }
    setIssues([]);
    const lead = result.composition.leadKg;
    setMessage({
      text: `Received lot ${result.lot.ticketNumber}: ${result.lot.unitCount} units, ${formatMass(result.lot.netKg, unit)} net, lead about ${formatMass(lead.value, unit)} (${formatMass(lead.low, unit)}–${formatMass(lead.high, unit)})${result.lot.containerId ? ", stowed" : ""}.`,
      isError: false,
    });
    setGross("");
    setTare("");
    setCount("");
    setRows([{ key: Date.now(), kind: rows[0]!.kind, voltage: "12", count: "" }]);
    (event.target as HTMLFormElement).reset();
    router.refresh();
  }

  return (
    <form className="card grid" style={{ gridTemplateColumns: "repeat(auto-fit, minmax(170px, 1fr))", gap: "0.7rem 1rem" }} onSubmit={submit} aria-label="Receive a lot" noValidate>
      <div>
        <label htmlFor="lot-ticket">Ticket number</label>
        <input id="lot-ticket" name="ticketNumber" autoComplete="off" {...invalid("ticketNumber")} />
        {error("ticketNumber")}
      </div>
      <div>
        <label htmlFor="lot-sender">
          Sent by <span className="hint">optional</span>
        </label>
        <input id="lot-sender" name="senderName" autoComplete="off" {...invalid("senderName")} />
        {error("senderName")}
      </div>
      <div style={{ gridColumn: "span 2" }}>
        <label htmlFor="lot-sender-address">
          Sender&rsquo;s address <span className="hint">optional</span>
        </label>
        <input id="lot-sender-address" name="senderAddress" autoComplete="off" {...invalid("senderAddress")} />
        {error("senderAddress")}
      </div>
      <div>
        <label htmlFor="lot-gross">Gross ({unit})</label>
        <input id="lot-gross" inputMode="decimal" value={gross} onChange={(e) => setGross(e.target.value)} {...invalid("grossKg")} />
        {error("grossKg")}
      </div>
      <div>
        <label htmlFor="lot-tare">Tare ({unit})</label>
        <input id="lot-tare" inputMode="decimal" value={tare} onChange={(e) => setTare(e.target.value)} {...invalid("tareKg")} />
        {error("tareKg")}
      </div>
      <div>
        <label htmlFor="lot-weight-unit">Scale reads in</label>
        <select id="lot-weight-unit" value={unit} onChange={(e) => setUnit(e.target.value as TUnitSystem)}>
          <option value="kg">kg</option>
          <option value="lb">lb</option>
        </select>
      </div>
      <div>
        <label htmlFor="lot-count">Units in the lot</label>
        <input id="lot-count" inputMode="numeric" value={count} onChange={(e) => setCount(e.target.value)} {...invalid("unitCount")} />
        {error("unitCount")}
      </div>
      <div aria-live="polite" data-testid="lot-net">
        <span className="hint">Net (gross − tare)</span>
        <div style={{ fontSize: "1.3rem", fontWeight: 600, fontVariantNumeric: "tabular-nums" }}>{hasWeights ? formatMass(netKg, unit) : "—"}</div>
        <div className="small">
          {hasWeights && Number.isFinite(perUnitKg) && perUnitKg > 0 ? `${formatMass(perUnitKg, "kg")} a unit` : "\u00a0"}
          {liveProblem && (
            <span className="status approaching" style={{ marginLeft: 6 }}>
              <span aria-hidden="true">▲</span> {liveProblem}
            </span>
          )}
        </div>
      </div>
      <fieldset style={{ gridColumn: "1 / -1" }}>
        <legend>Mix of kinds, by count</legend>
        {rows.map((r, i) => (
          <div key={r.key} className="row" style={{ gap: "0.6rem", marginBottom: "0.4rem", flexWrap: "nowrap" }}>
            <div style={{ flex: 2 }}>
              <label htmlFor={`mix-kind-${r.key}`}>Kind {rows.length > 1 ? i + 1 : ""}</label>
              <select id={`mix-kind-${r.key}`} value={r.kind} onChange={(e) => setRow(r.key, { kind: e.target.value })}>
                {kinds.map((k) => (
                  <option key={k.id} value={k.id}>
                    {k.label}
                  </option>
                ))}
              </select>
            </div>
            <div style={{ flex: 1 }}>
              <label htmlFor={`mix-voltage-${r.key}`}>Voltage (V)</label>
              <input id={`mix-voltage-${r.key}`} inputMode="numeric" value={r.voltage} onChange={(e) => setRow(r.key, { voltage: e.target.value })} />
            </div>
            <div style={{ flex: 1 }}>
              <label htmlFor={`mix-count-${r.key}`}>
                Count {rows.length === 1 && <span className="hint">blank: all</span>}
              </label>
              <input id={`mix-count-${r.key}`} inputMode="numeric" value={r.count} onChange={(e) => setRow(r.key, { count: e.target.value })} />
            </div>
            {rows.length > 1 && (
              <button type="button" onClick={() => setRows((rs) => rs.filter((x) => x.key !== r.key))} aria-label={`Remove kind ${i + 1}`} style={{ alignSelf: "end" }}>
                Remove
              </button>
            )}
          </div>
        ))}
        <button type="button" onClick={() => setRows((rs) => [...rs, { key: Date.now(), kind: kinds[0]?.id ?? "flooded", voltage: "12", count: "" }])}>
          Add a kind
        </button>
        {error("mix")}
      </fieldset>
      <div style={{ gridColumn: "span 2" }}>
        <label htmlFor="lot-container">Stow into</label>
        <select id="lot-container" name="containerId" defaultValue="" {...invalid("containerId")}>
          <option value="">Not yet (leave loose)</option>
          {containers.map((c) => (
            <option key={c.id} value={c.id}>
              {c.labelNumber}
            </option>
          ))}
        </select>
        {error("containerId")}
      </div>
      <div style={{ gridColumn: "1 / -1" }}>
        <label htmlFor="lot-note">
          Note <span className="hint">optional</span>
        </label>
        <input id="lot-note" name="note" autoComplete="off" {...invalid("note")} />
        {error("note")}
      </div>
      <div className="row" style={{ gridColumn: "1 / -1" }}>
        <button type="submit" disabled={busy}>
          {busy ? "Saving…" : "Receive lot"}
        </button>
      </div>
      <div style={{ gridColumn: "1 / -1" }} aria-live="polite">
        {message && (
          <p className={message.isError ? "error-box" : "notice"} role={message.isError ? "alert" : "status"}>
            {message.text}
          </p>
        )}
      </div>
    </form>
  );
}
