"use client";

import { useRef, useState } from "react";
import { TotalsFigures, type TTotalsView } from "@/app/_ui/totals-figures";
import { formatMass, lbToKg, type TUnitSystem } from "@/lib/units";
import { dollars } from "../deposits/money";

type TOption = { id: string; label: string };
type TLatest = { id: string; receivedAt: string; kind: string; nominalVoltage: number; condition: string; batteryKg: number; leadKg: number };
type TIssue = { field: string; message: string };

const VOLTAGES = [2, 6, 8, 12, 24, 36, 48];

type TReturnCheck = {
  sale: { saleRef: string; soldOn: string; product: string; quantity: number; heldCents: number };
  due: { isInsideWindow: boolean; daysSinceSale: number; windowDays: number; lastRefundDay: string; refundCents: number; reason: string };
  options: { kind: string; text: string }[];
  rule: { title: string; citation: string };
  equivalentSize: { isEquivalent: boolean | null; text: string } | null;
  caution: string;
};
type TDepositCheck = { saleRef: string; status: "loading" | "found" | "missing" | "error"; check?: TReturnCheck; message?: string };
const ACTION_LABELS: Record<string, string> = { refund: "Pay the refund", credit: "Handed in at the sale", "accept-free": "Take back free", forfeit: "Take back, record the forfeit" };
const LOOKUP_DELAY_MS = 400;
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
  /** The refund check at the Counter: shown where the person may book deposits at this site. */
  canBookDeposits?: boolean;
}) {
  const system: TUnitSystem = props.site.unitSystem === "lb" ? "lb" : "kg";
  const [kind, setKind] = useState(props.kinds[0]!.id);
  const [voltage, setVoltage] = useState("12");
  const [condition, setCondition] = useState("intact");
  const [source, setSource] = useState("core-return");
  // A delivery from one fleet or business is many units: the sender stays for the next unit, like the source.
  const [senderName, setSenderName] = useState("");
  const [senderAddress, setSenderAddress] = useState("");
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
  const [depositCheck, setDepositCheck] = useState<TDepositCheck | null>(null);
  const [depositAction, setDepositAction] = useState("refund");
  const [depositResult, setDepositResult] = useState<{ text: string; isBooked: boolean } | null>(null);
  const lookupTimer = useRef<ReturnType<typeof setTimeout> | undefined>(undefined);
  const lookupSeq = useRef(0);

  /** Looks the sale up: the window verdict, the refund due and what the rule allows. */
  async function lookUpSale(saleRef: string) {
    clearTimeout(lookupTimer.current);
    const seq = ++lookupSeq.current;
    setDepositCheck({ saleRef, status: "loading" });
    const elements = formRef.current?.elements;
    const value = (name: string) => ((elements?.namedItem(name) as HTMLInputElement | null)?.value ?? "").trim();
    const query = new URLSearchParams({ site: props.site.id, sale: saleRef });
    const weight = Number(value("weight"));
    if (value("weight") !== "" && weight > 0) query.set("weightKg", String(weightUnit === "lb" ? lbToKg(weight) : weight));
    if (value("groupSize")) query.set("groupSize", value("groupSize"));
    const response = await fetch(`/api/v1/deposits/check?${query}`).catch(() => null);
    const body = response ? await response.json().catch(() => ({})) : {};
    if (seq !== lookupSeq.current) return;
    if (response?.ok) {
      setDepositCheck({ saleRef, status: "found", check: body });
      setDepositAction(body.options?.[0]?.kind ?? "accept-free");
    } else if (response?.status === 404) {
      setDepositCheck({ saleRef, status: "missing", message: body.error?.message });
    } else {
      setDepositCheck({ saleRef, status: "error", message: body.error?.message ?? "The deposit check did not answer." });
    }
  }

  function onSaleRefChange(event: React.ChangeEvent<HTMLInputElement>) {
    if (!props.canBookDeposits) return;
    const saleRef = event.target.value.trim();
    clearTimeout(lookupTimer.current);
    lookupSeq.current++;
    setDepositCheck(null);
    if (saleRef) lookupTimer.current = setTimeout(() => void lookUpSale(saleRef), LOOKUP_DELAY_MS);
  }

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
      senderName: senderName.trim() || undefined,
      senderAddress: senderAddress.trim() || undefined,
      containerId: isDamaged ? String(form.get("containerId") ?? "") || undefined : undefined,
      saleRef: String(form.get("saleRef") ?? "").trim() || undefined,
    };
    // A sale reference not yet looked up is checked first (a scanner's Enter included): the clerk sees the refund before saving.
    if (props.canBookDeposits && body.saleRef && (depositCheck?.saleRef !== body.saleRef || depositCheck.status === "loading")) {
      await lookUpSale(body.saleRef);
      return;
    }
    const withDeposit = props.canBookDeposits && depositCheck?.status === "found" && depositCheck.saleRef === body.saleRef;
    setBusy(true);
    setMessage(null);
    setDepositResult(null);
    const response = await fetch(withDeposit ? "/api/v1/deposits/returns" : "/api/v1/units", {
      method: "POST",
      headers: { "content-type": "application/json", "idempotency-key": crypto.randomUUID() },
      body: JSON.stringify(withDeposit ? { unit: body, action: depositAction } : body),
    });
    const result = await response.json().catch(() => ({}));
    setBusy(false);
    if (!response.ok) {
      const all: TIssue[] = result.error?.issues ?? [];
      setIssues(all.map((i) => ({ ...i, field: i.field.replace(/^unit\./, "") })));
      setMessage({ text: result.error?.message ?? "Not saved.", isError: true });
      return;
    }
    setIssues([]);
    const unit = result.unit;
    setSaved({ batteryKg: unit.batteryKg, leadKg: unit.leadKg, acidKg: unit.acidKg, method: unit.method, warnings: result.composition?.warnings ?? [] });
    setTotals(result.siteTotals);
    setLatest((rows) => [{ id: unit.id, receivedAt: unit.receivedAt, kind: unit.kind, nominalVoltage: unit.nominalVoltage, condition: unit.condition, batteryKg: unit.batteryKg, leadKg: unit.leadKg }, ...rows].slice(0, 8));
    // The next unit keeps kind and voltage (and source and sender); everything particular to this unit is cleared.
    for (const name of ["capacityAh", "cca", "groupSize", "weight", "saleRef"]) {
      const input = formRef.current?.elements.namedItem(name) as HTMLInputElement | null;
      if (input) input.value = "";
    }
    setCondition("intact");
    setMessage({ text: `Saved: ${props.kinds.find((k) => k.id === unit.kind)?.label ?? unit.kind}, ${unit.nominalVoltage} V.`, isError: false });
    if (result.deposit) {
      // A return answers 201 only with its deposit booked; a refusal is a 400 above, with nothing written.
      const deposit = result.deposit as { message: string; balanceCents: number };
      setDepositResult({ text: `${deposit.message} Deposits held now: ${dollars(deposit.balanceCents)}.`, isBooked: true });
    } else if (depositCheck?.status === "missing" && depositCheck.saleRef === body.saleRef) {
      setDepositResult({ text: `No sale ${body.saleRef} at this store: the unit is logged with the reference, without a deposit entry.`, isBooked: false });
    }
    setDepositCheck(null);
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
          <input id="saleRef" name="saleRef" autoComplete="off" onChange={onSaleRefChange} {...invalid("saleRef")} />
          {props.canBookDeposits && <p className="hint" style={{ margin: "0.15rem 0 0" }}>Scan the receipt: Enter looks the sale up, Enter again saves.</p>}
          {errorText("saleRef")}
        </div>
        {props.canBookDeposits && depositCheck && (
          <DepositPanel check={depositCheck} action={depositAction} onAction={setDepositAction} actionIssue={issueFor("action")} />
        )}
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
        <div>
          <label htmlFor="senderName">
            Sent by <span className="hint">optional</span>
          </label>
          <input id="senderName" name="senderName" autoComplete="off" value={senderName} onChange={(e) => setSenderName(e.target.value)} {...invalid("senderName")} />
          <p className="hint" style={{ margin: "0.15rem 0 0" }}>A fleet or business: its name. None for a member of the public. Kept for the next unit.</p>
          {errorText("senderName")}
        </div>
        <div>
          <label htmlFor="senderAddress">
            Sender&rsquo;s address <span className="hint">optional</span>
          </label>
          <input id="senderAddress" name="senderAddress" autoComplete="off" value={senderAddress} onChange={(e) => setSenderAddress(e.target.value)} {...invalid("senderAddress")} />
          {errorText("senderAddress")}
        </div>
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
          {depositResult && (
            <p className={depositResult.isBooked ? "notice" : "error-box"} role="status" data-testid="deposit-result">
              {depositResult.text}
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

/** The refund check of a returned battery: the verdict with its reason, what the rule allows, the citation and the caution. */
function DepositPanel({ check, action, onAction, actionIssue }: { check: TDepositCheck; action: string; onAction: (kind: string) => void; actionIssue?: string }) {
  const found = check.check;
  return (
    <div className="wide card" role="region" aria-label="Deposit check" data-testid="deposit-check">
      {check.status === "loading" && <p className="muted" style={{ margin: 0 }}>Looking up sale {check.saleRef}…</p>}
      {check.status === "missing" && (
        <p className="error-box" style={{ margin: 0 }}>
          {check.message ?? `No sale ${check.saleRef} at this store.`} Saving logs the unit with this reference, without a deposit entry.
        </p>
      )}
      {check.status === "error" && (
        <p className="error-box" style={{ margin: 0 }}>
          {check.message} Saving logs the unit without a deposit entry.
        </p>
      )}
      {check.status === "found" && found && (
        <>
          <p style={{ margin: "0 0 0.4rem" }}>
            <span className={`status ${found.due.isInsideWindow ? "ok" : "exceeded"}`}>
              {found.due.isInsideWindow ? "✓ Inside the window" : "✕ Window passed"}
            </span>{" "}
            <strong data-testid="refund-due">{found.due.refundCents > 0 ? `Refund due: ${dollars(found.due.refundCents)}` : "No refund due"}</strong>{" "}
            <span className="small muted">
              sale {found.sale.saleRef}, {found.sale.product}, sold {found.sale.soldOn}; day {found.due.daysSinceSale} of {found.due.windowDays}
            </span>
          </p>
          <p className="small" style={{ margin: "0 0 0.4rem" }}>
            {found.due.reason}
          </p>
          {found.equivalentSize && (
            <p className="small" style={{ margin: "0 0 0.4rem" }}>
              {found.equivalentSize.isEquivalent === false ? "⚠ " : ""}
              {found.equivalentSize.text}
            </p>
          )}
          <fieldset>
            <legend>What to do with the deposit</legend>
            <div className="choice-row">
              {found.options.map((o) => (
                <label key={o.kind}>
                  <input type="radio" name="depositAction" value={o.kind} checked={action === o.kind} onChange={() => onAction(o.kind)} />
                  {ACTION_LABELS[o.kind] ?? o.kind}
                </label>
              ))}
            </div>
            <p className="small" style={{ margin: "0.3rem 0 0" }}>
              {found.options.find((o) => o.kind === action)?.text}
            </p>
            {actionIssue && <p className="field-error">{actionIssue}</p>}
          </fieldset>
          <p className="small muted" style={{ margin: "0.4rem 0" }}>
            {found.rule.title}: {found.rule.citation}
          </p>
          <p className="caution small" style={{ margin: 0 }}>
            {found.caution}
          </p>
        </>
      )}
    </div>
  );
}
