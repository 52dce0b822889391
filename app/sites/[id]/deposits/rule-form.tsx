"use client";

import { useRouter } from "next/navigation";
import { useState } from "react";
import { parseDollars, type TIssue } from "./money";

type TRuleChoice = { id: string; title: string; citation: string; refundWindowDays: number };
type TCurrent = {
  source: "built-in" | "custom" | "jurisdiction";
  id: string;
  title: string;
  citation: string;
  refundWindowDays: number;
  minChargeCents: number | null;
  isReceiptRequired: boolean;
  takeBackDuty: { text: string; mustAcceptAtLeastSold: boolean } | null;
  perPersonPerDayLimit?: number;
  postedNotice?: { text: string };
} | null;

/** An administrator chooses the store's deposit rule: a built-in one, its jurisdiction's, or one of their own with its citation. */
export function RuleForm({ siteId, rules, current }: { siteId: string; rules: TRuleChoice[]; current: TCurrent }) {
  const router = useRouter();
  const initial = current === null || current.source === "jurisdiction" ? "" : current.source === "custom" ? "custom" : current.id;
  const [choice, setChoice] = useState(initial);
  const [issues, setIssues] = useState<TIssue[]>([]);
  const [message, setMessage] = useState<{ text: string; isError: boolean } | null>(null);
  const [busy, setBusy] = useState(false);
  const custom = current?.source === "custom" ? current : null;
  const issueFor = (field: string) => issues.find((i) => i.field === field || i.field.startsWith(`${field}.`))?.message;

  async function submit(event: React.FormEvent<HTMLFormElement>) {
    event.preventDefault();
    const form = new FormData(event.currentTarget);
    const text = (name: string) => String(form.get(name) ?? "").trim();
    let body: Record<string, unknown>;
    if (choice === "custom") {
      const minCharge = text("minCharge");
      const minChargeCents = minCharge === "" ? null : parseDollars(minCharge);
      if (minCharge !== "" && minChargeCents === null) {
        setIssues([{ field: "custom.minChargeCents", message: "least charge must be dollars and cents, like 5.00" }]);
        return;
      }
      const duty = text("duty");
      const limit = text("limit");
      const notice = text("notice");
      body = {
        site: siteId,
        custom: {
          title: text("title"),
          citation: text("citation"),
          refundWindowDays: Number(text("window")),
          minChargeCents,
          isReceiptRequired: form.get("receipt") === "on",
          takeBackDuty: duty ? { text: duty, mustAcceptAtLeastSold: form.get("atLeastSold") === "on" } : null,
          ...(limit ? { perPersonPerDayLimit: Number(limit) } : {}),
          ...(notice ? { postedNotice: { text: notice } } : {}),
        },
      };
    } else {
      body = { site: siteId, ruleId: choice || null };
    }
    setBusy(true);
    const response = await fetch("/api/v1/deposits/rule", { method: "PUT", headers: { "content-type": "application/json" }, body: JSON.stringify(body) });
    const result = await response.json().catch(() => ({}));
    setBusy(false);
    if (!response.ok) {
      setIssues(result.error?.issues ?? []);
      setMessage({ text: result.error?.message ?? "Not saved.", isError: true });
      return;
    }
    setIssues([]);
    setMessage({ text: result.rule ? `The store now follows: ${result.rule.title} (${result.rule.citation}).` : "The store has no deposit rule now.", isError: false });
    router.refresh();
  }

  const input = (name: string, label: string, apiField: string, props: React.InputHTMLAttributes<HTMLInputElement> = {}) => {
    const issue = issueFor(`custom.${apiField}`);
    return (
      <div>
        <label htmlFor={`rule-${name}`}>{label}</label>
        <input id={`rule-${name}`} name={name} {...props} {...(issue ? { "aria-invalid": true, "aria-describedby": `rule-${name}-error` } : {})} />
        {issue && (
          <p className="field-error" id={`rule-${name}-error`}>
            {issue}
          </p>
        )}
      </div>
    );
  };

  return (
    <form className="card grid" onSubmit={submit} aria-label="Deposit rule of this store" noValidate>
      <div>
        <label htmlFor="rule-choice">Rule</label>
        <select id="rule-choice" value={choice} onChange={(e) => setChoice(e.target.value)}>
          <option value="">The rule of the store&apos;s jurisdiction</option>
          {rules.map((r) => (
            <option key={r.id} value={r.id}>
              {r.title} — {r.refundWindowDays} days ({r.citation})
            </option>
          ))}
          <option value="custom">A rule of our own…</option>
        </select>
      </div>
      {choice === "custom" && (
        <div className="grid" style={{ gridTemplateColumns: "repeat(auto-fit, minmax(220px, 1fr))" }}>
          {input("title", "Title", "title", { defaultValue: custom?.title ?? "" })}
          {input("citation", "Citation (law, permit or policy it comes from)", "citation", { defaultValue: custom?.citation ?? "" })}
          {input("window", "Refund window (days)", "refundWindowDays", { inputMode: "numeric", defaultValue: String(custom?.refundWindowDays ?? 30) })}
          {input("minCharge", "Least core charge ($, blank: none)", "minChargeCents", {
            inputMode: "decimal",
            defaultValue: custom?.minChargeCents != null ? (custom.minChargeCents / 100).toFixed(2) : "",
          })}
          {input("duty", "Take-back duty (blank: none)", "takeBackDuty", { defaultValue: custom?.takeBackDuty?.text ?? "" })}
          {input("limit", "Limit a person a day (blank: none)", "perPersonPerDayLimit", { inputMode: "numeric", defaultValue: custom?.perPersonPerDayLimit ? String(custom.perPersonPerDayLimit) : "" })}
          {input("notice", "Notice to post (blank: none)", "postedNotice", { defaultValue: custom?.postedNotice?.text ?? "" })}
          <fieldset>
            <legend>Conditions</legend>
            <label style={{ fontWeight: 500 }}>
              <input type="checkbox" name="receipt" defaultChecked={custom?.isReceiptRequired ?? false} style={{ width: "auto" }} /> Refund only with the receipt
            </label>
            <label style={{ fontWeight: 500 }}>
              <input type="checkbox" name="atLeastSold" defaultChecked={custom?.takeBackDuty?.mustAcceptAtLeastSold ?? false} style={{ width: "auto" }} /> Accept at least as many
              as sold
            </label>
          </fieldset>
        </div>
      )}
      <div className="row">
        <button type="submit" disabled={busy}>
          {busy ? "Saving…" : "Save rule"}
        </button>
        <span className="small muted">Applies to returns from now on; entries already booked stay as they are.</span>
      </div>
      <div aria-live="polite">
        {message && (
          <p className={message.isError ? "error-box" : "notice"} role={message.isError ? "alert" : "status"} style={{ margin: 0 }}>
            {message.text}
          </p>
        )}
      </div>
    </form>
  );
}
