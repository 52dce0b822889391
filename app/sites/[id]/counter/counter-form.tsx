"use client";

import { useRef, useState } from "react";
import { TotalsFigures, type TTotalsView } from "@/app/_ui/totals-figures";
import { formatMass, lbToKg, type TUnitSystem } from "@/lib/units";

type TOption = { id: string; label: string };
type TLatest = { id: string; receivedAt: string; kind: string; nominalVoltage: number; condition: string; batteryKg: number; leadKg: number };
type TIssue = { field: string; message: string };

const VOLTAGES = [2, 6, 8, 12, 24, 36, 48];
const NEEDS_CLOSED = new Set(["leaking", "cracked"]);

export function CounterForm(props: {
  site: { id: string; name: string; unitSystem: string };
  kinds: TOption[];
  conditions: TOption[];
  sources: TOption[];
  closedContainers: { id: string; labelNumber: string; kind: string; unitCount: number }[];
  handling: { title: string; steps: string[]; citation: string };
  initialTotals: TTotalsView;
  initialLatest: TLatest[];
}) {
  const system: TUnitSystem = props.site.unitSystem === "lb" ? "lb" : "kg";
  const [kind, setKind] = useState(props.kinds[0]!.id);
  const [voltage, setVoltage] = useState("12");
  const [condition, setCondition] = useState("intact");
  const [source, setSource] = useState("core-return");
  const [weightUnit, setWeightUnit] = useState<TUnitSystem>(system);
  const [issues, setIssues] = useState<TIssue[]>([]);
  const [message, setMessage] = useState<{ text: string; isError: boolean } | null>(null);
  const [busy, setBusy] = useState(false);
  const [totals, setTotals] = useState(props.initialTotals);
  const [latest, setLatest] = useState(props.initialLatest);
  const [saved, setSaved] = useState<{ batteryKg: number; leadKg: number; acidKg: number; method: string; warnings: string[] } | null>(null);
  const formRef = useRef<HTMLFormElement>(null);
  const firstVarying = useRef<HTMLInputElement>(null);
  const isDamaged = NEEDS_CLOSED.has(condition);

  const issueFor = (field: string) => issues.find((i) => i.field === field)?.message;

  async function submit(event: React.FormEvent<HTMLFormElement>) {
    event.preventDefault();
    if (busy) return;
    const form = new FormData(event.currentTarget);
    const number = (name: string) => {
      const raw = String(form.get(name) ?? "").trim();
      return raw === "" ? undefined : Number(raw);
    };
    const weight = number("weight");
    const body = {
      site: props.site.id,
      kind,
      nominalVoltage: Number(voltage),
      capacityAh: number("capacityAh"),
      cca: number("cca"),
      groupSize: String(form.get("groupSize") ?? "").trim() || undefined,
      weightKg: weight === undefined ? undefined : weightUnit === "lb" ? lbToKg(weight) : weight,
      condition,
      source,
      containerId: isDamaged ? String(form.get("containerId") ?? "") || undefined : undefined,
      saleRef: String(form.get("saleRef") ?? "").trim() || undefined,
    };
    setBusy(true);
    setMessage(null);
    const response = await fetch("/api/v1/units", {
      method: "POST",
      headers: { "content-type": "application/json", "idempotency-key": crypto.randomUUID() },
      body: JSON.stringify(body),
    });
    const result = await response.json().catch(() => ({}));
    setBusy(false);
    if (!response.ok) {
      setIssues(result.error?.issues ?? []);
      setMessage({ text: result.error?.message ?? "Not saved.", isError: true });
      return;
    }
    setIssues([]);
    const unit = result.unit;
    setSaved({ batteryKg: unit.batteryKg, leadKg: unit.leadKg, acidKg: unit.acidKg, method: unit.method, warnings: result.composition?.warnings ?? [] });
    setTotals(result.siteTotals);
    setLatest((rows) => [{ id: unit.id, receivedAt: unit.receivedAt, kind: unit.kind, nominalVoltage: unit.nominalVoltage, condition: unit.condition, batteryKg: unit.batteryKg, leadKg: unit.leadKg }, ...rows].slice(0, 8));
    // The next unit keeps kind and voltage (and source); everything particular to this unit is cleared.
    for (const name of ["capacityAh", "cca", "groupSize", "weight", "saleRef"]) {
      const input = formRef.current?.elements.namedItem(name) as HTMLInputElement | null;
      if (input) input.value = "";
    }
    setCondition("intact");
    setMessage({ text: `Saved: ${props.kinds.find((k) => k.id === unit.kind)?.label ?? unit.kind}, ${unit.nominalVoltage} V.`, isError: false });
    firstVarying.current?.focus();
  }

  function onKeyDown(event: React.KeyboardEvent<HTMLFormElement>) {
    // Enter saves from any field, selects and radios included (browsers only do that for text inputs).
    const target = event.target as HTMLElement;
    if (event.key === "Enter" && target.tagName !== "BUTTON" && target.tagName !== "TEXTAREA") {
      event.preventDefault();
      formRef.current?.requestSubmit();
    }
  }

  const invalid = (field: string) => (issueFor(field) ? { "aria-invalid": true as const, "aria-describedby": `${field}-error` } : {});
  const errorText = (field: string) =>
    issueFor(field) ? (
      <p className="field-error" id={`${field}-error`}>
        {issueFor(field)}
      </p>
    ) : null;

  return (
    <div className="grid two" style={{ alignItems: "start" }}>
      <form ref={formRef} className="counter-form card" onSubmit={submit} onKeyDown={onKeyDown} aria-label="Log a unit" noValidate>
        <div>
          <label htmlFor="kind">Kind</label>
          <select id="kind" name="kind" value={kind} onChange={(e) => setKind(e.target.value)} autoFocus {...invalid("kind")}>
            {props.kinds.map((k) => (
              <option key={k.id} value={k.id}>
                {k.label}
              </option>
            ))}
          </select>
          {errorText("kind")}
        </div>
        <div>
          <label htmlFor="nominalVoltage">Nominal voltage (V)</label>
          <input id="nominalVoltage" name="nominalVoltage" inputMode="numeric" list="voltages" value={voltage} onChange={(e) => setVoltage(e.target.value)} {...invalid("nominalVoltage")} />
          <datalist id="voltages">
            {VOLTAGES.map((v) => (
              <option key={v} value={v} />
            ))}
          </datalist>
          {errorText("nominalVoltage")}
        </div>
        <div className="wide">
          <label htmlFor="groupSize">
            Group size or label text <span className="hint">optional; a scanner fills it</span>
          </label>
          <input id="groupSize" name="groupSize" ref={firstVarying} autoComplete="off" {...invalid("groupSize")} />
          {errorText("groupSize")}
        </div>
        <div>
          <label htmlFor="capacityAh">
            Capacity (Ah, 20 h) <span className="hint">optional</span>
          </label>
          <input id="capacityAh" name="capacityAh" inputMode="decimal" {...invalid("capacityAh")} />
          {errorText("capacityAh")}
        </div>
        <div>
          <label htmlFor="cca">
            CCA <span className="hint">optional</span>
          </label>
          <input id="cca" name="cca" inputMode="numeric" {...invalid("cca")} />
          {errorText("cca")}
        </div>
        <div>
          <label htmlFor="weight">
            Weight <span className="hint">optional</span>
          </label>
          <div className="row" style={{ gap: "0.4rem", flexWrap: "nowrap" }}>
            <input id="weight" name="weight" inputMode="decimal" {...invalid("weightKg")} />
            <select aria-label="Weight unit" value={weightUnit} onChange={(e) => setWeightUnit(e.target.value as TUnitSystem)} style={{ width: "5rem" }}>
              <option value="kg">kg</option>
              <option value="lb">lb</option>
            </select>
          </div>
          {errorText("weightKg")}
        </div>
        <div>
          <label htmlFor="saleRef">
            Sale reference <span className="hint">optional</span>
          </label>
          <input id="saleRef" name="saleRef" autoComplete="off" />
        </div>
        <fieldset className="wide">
          <legend>Condition</legend>
          <div className="choice-row">
            {props.conditions.map((c) => (
              <label key={c.id}>
                <input type="radio" name="condition" value={c.id} checked={condition === c.id} onChange={() => setCondition(c.id)} />
                {c.label}
              </label>
            ))}
          </div>
        </fieldset>
        {isDamaged && (
          <div className="wide caution danger" role="region" aria-label="Handling caution">
            <strong>{props.handling.title}</strong>
            <ul style={{ margin: "0.3rem 0 0.5rem 1.1rem", padding: 0 }}>
              {props.handling.steps.map((s) => (
                <li key={s}>{s}</li>
              ))}
            </ul>
            <label htmlFor="containerId">Which closed container does it go into?</label>
            <select id="containerId" name="containerId" defaultValue="" {...invalid("containerId")}>
              <option value="" disabled>
                Choose a closed container
              </option>
              {props.closedContainers.map((c) => (
                <option key={c.id} value={c.id}>
                  {c.labelNumber} ({c.kind}, {c.unitCount} in it)
                </option>
              ))}
            </select>
            {props.closedContainers.length === 0 && <p className="small">No open closed container here: ask the yard to set one up before you take it in.</p>}
            {errorText("containerId")}
            <p className="small muted" style={{ marginBottom: 0 }}>
              {props.handling.citation}. Local rules and licensed practice come first.
            </p>
          </div>
        )}
        <fieldset className="wide">
          <legend>Source</legend>
          <div className="choice-row">
            {props.sources.map((s) => (
              <label key={s.id}>
                <input type="radio" name="source" value={s.id} checked={source === s.id} onChange={() => setSource(s.id)} />
                {s.label}
              </label>
            ))}
          </div>
        </fieldset>
        <div className="actions">
          <button className="primary" type="submit" disabled={busy}>
            {busy ? "Saving…" : "Save unit"}
          </button>
          <span className="muted small">
            <span className="kbd">Enter</span> saves
          </span>
        </div>
        <div className="wide" aria-live="polite">
          {message && (
            <p className={message.isError ? "error-box" : "notice"} role={message.isError ? "alert" : "status"}>
              {message.text}
            </p>
          )}
        </div>
      </form>
      <section aria-label="This site now">
        <h2 style={{ marginTop: 0 }}>{props.site.name} now</h2>
        <TotalsFigures totals={totals} system={system} />
        {saved && (
          <p className="small" data-testid="last-estimate">
            Last unit: {formatMass(saved.batteryKg, system)} battery, {formatMass(saved.leadKg, system)} lead, {formatMass(saved.acidKg, system)} acid ({saved.method}).
            {saved.warnings.map((w) => (
              <span key={w} className="status approaching" style={{ marginLeft: 6 }}>
                ⚠ {w}
              </span>
            ))}
          </p>
        )}
        <h2>Just logged</h2>
        <table className="dense">
          <thead>
            <tr>
              <th>Time</th>
              <th>Kind</th>
              <th className="num">V</th>
              <th>Condition</th>
              <th className="num">Battery</th>
            </tr>
          </thead>
          <tbody>
            {latest.map((u) => (
              <tr key={u.id}>
                <td>{u.receivedAt.slice(11, 16)}</td>
                <td>{u.kind}</td>
                <td className="num">{u.nominalVoltage}</td>
                <td>{u.condition}</td>
                <td className="num">{formatMass(u.batteryKg, system)}</td>
              </tr>
            ))}
          </tbody>
        </table>
      </section>
    </div>
  );
}
