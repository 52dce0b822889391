"use client";

import { useRouter } from "next/navigation";
import { cloneElement, useState } from "react";
import { dollars, parseDollars, type TIssue } from "./money";

/**
 * Records a sale at the till: the core charge is taken on each new battery that came without a used one;
 * batteries matched by a used one handed in carry no charge. All matched → a credit sale.
 */
export function SaleForm({ siteId, minChargeCents, citation }: { siteId: string; minChargeCents: number | null; citation: string | null }) {
  const router = useRouter();
  const [issues, setIssues] = useState<TIssue[]>([]);
  const [message, setMessage] = useState<{ text: string; isError: boolean } | null>(null);
  const [busy, setBusy] = useState(false);
  const issueFor = (field: string) => issues.find((i) => i.field === field)?.message;

  async function submit(event: React.FormEvent<HTMLFormElement>) {
    event.preventDefault();
    if (busy) return;
    const formElement = event.currentTarget;
    const form = new FormData(formElement);
    const text = (name: string) => String(form.get(name) ?? "").trim();
    const whole = (name: string, fallback?: number) => (text(name) === "" ? fallback : Number(text(name)));
    const quantity = whole("quantity", 1);
    const handedIn = whole("handedIn", 0);
    const chargeCents = parseDollars(text("charge"));
    const isCredit = quantity !== undefined && handedIn === quantity;
    if (!isCredit && chargeCents === null) {
      setIssues([{ field: "chargeCents", message: "core charge must be dollars and cents, like 15.00" }]);
      return;
    }
    const body = {
      kind: isCredit ? "credit" : "charge",
      site: siteId,
      saleRef: text("saleRef"),
      product: text("product"),
      groupSize: text("groupSize"),
      quantity,
      ...(isCredit ? {} : { handedIn, chargeCents }),
      soldOn: text("soldOn") || undefined,
    };
    setBusy(true);
    setMessage(null);
    const response = await fetch("/api/v1/deposits", { method: "POST", headers: { "content-type": "application/json" }, body: JSON.stringify(body) });
    const result = await response.json().catch(() => ({}));
    setBusy(false);
    if (!response.ok) {
      setIssues(result.error?.issues ?? []);
      setMessage({ text: result.error?.message ?? "Not saved.", isError: true });
      return;
    }
    setIssues([]);
    setMessage({
      text: `Sale ${result.sale.saleRef} recorded: ${dollars(result.sale.depositCents)} deposit taken. Deposits held now ${dollars(result.balanceCents)}.`,
      isError: false,
    });
    for (const name of ["saleRef", "product", "groupSize"]) (formElement.elements.namedItem(name) as HTMLInputElement).value = "";
    router.refresh();
  }

  const field = (name: string, label: React.ReactNode, input: React.ReactElement<Record<string, unknown>>, apiField = name) => {
    const issue = issueFor(apiField);
    return (
      <div>
        <label htmlFor={name}>{label}</label>
        {cloneElement(input, { id: name, name, ...(issue ? { "aria-invalid": true, "aria-describedby": `${name}-error` } : {}) })}
        {issue && (
          <p className="field-error" id={`${name}-error`}>
            {issue}
          </p>
        )}
      </div>
    );
  };

  return (
    <form className="card grid" onSubmit={submit} aria-label="Record a sale" noValidate style={{ gridTemplateColumns: "repeat(auto-fit, minmax(150px, 1fr))" }}>
      <h2 style={{ gridColumn: "1 / -1", margin: 0 }}>Record a sale</h2>
      {field("saleRef", "Sale reference", <input autoComplete="off" />)}
      {field("product", "Product", <input autoComplete="off" />)}
      {field("groupSize", <>Group size <span className="hint">optional</span></>, <input autoComplete="off" />)}
      {field("quantity", "Batteries sold", <input inputMode="numeric" defaultValue="1" />)}
      {field("handedIn", <>Used ones handed in <span className="hint">no charge on those</span></>, <input inputMode="numeric" defaultValue="0" />)}
      {field(
        "charge",
        <>Core charge a battery ($) {minChargeCents !== null && <span className="hint">at least {dollars(minChargeCents)}</span>}</>,
        <input inputMode="decimal" defaultValue={minChargeCents !== null ? (minChargeCents / 100).toFixed(2) : ""} />,
        "chargeCents",
      )}
      {field("soldOn", <>Date sold <span className="hint">blank: now</span></>, <input type="date" />)}
      <div style={{ gridColumn: "1 / -1" }} className="row">
        <button className="primary" type="submit" disabled={busy}>
          {busy ? "Saving…" : "Record sale"}
        </button>
        {citation && <span className="small muted">Least charge: {citation}</span>}
      </div>
      <div style={{ gridColumn: "1 / -1" }} aria-live="polite">
        {message && (
          <p className={message.isError ? "error-box" : "notice"} role={message.isError ? "alert" : "status"} style={{ margin: 0 }}>
            {message.text}
          </p>
        )}
      </div>
    </form>
  );
}
