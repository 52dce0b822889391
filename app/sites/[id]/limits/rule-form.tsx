"use client";

import { useRouter } from "next/navigation";
import { useState } from "react";

type TIssue = { field: string; message: string };
const METRICS = [
  { id: "battery-kg", label: "Battery mass", units: ["kg", "lb"] },
  { id: "lead-kg", label: "Lead", units: ["kg", "lb"] },
  { id: "acid-kg", label: "Sulfuric acid", units: ["kg", "lb"] },
  { id: "unit-count", label: "Unit count", units: ["count"] },
  { id: "container-age-days", label: "Container age", units: ["days"] },
];

/** An administrator adds a site's own rule: a permit or fire-code limit, always with its source. */
export function RuleForm({ siteId }: { siteId: string }) {
  const router = useRouter();
  const [metric, setMetric] = useState(METRICS[0]!.id);
  const [issues, setIssues] = useState<TIssue[]>([]);
  const [message, setMessage] = useState<{ text: string; isError: boolean } | null>(null);
  const [busy, setBusy] = useState(false);
  const units = METRICS.find((m) => m.id === metric)!.units;
  const issue = (field: string) => issues.find((i) => i.field === field)?.message;
  const invalid = (field: string) => (issue(field) ? { "aria-invalid": true as const, "aria-describedby": `rule-${field}-error` } : {});
  const error = (field: string) => (issue(field) ? <p className="field-error" id={`rule-${field}-error`}>{issue(field)}</p> : null);

  async function submit(event: React.FormEvent<HTMLFormElement>) {
    event.preventDefault();
    const form = new FormData(event.currentTarget);
    const text = (name: string) => String(form.get(name) ?? "").trim();
    setBusy(true);
    const response = await fetch(`/api/v1/sites/${siteId}/rules`, {
      method: "POST",
      headers: { "content-type": "application/json" },
      body: JSON.stringify({
        title: text("title"),
        metric,
        threshold: text("threshold") === "" ? undefined : Number(text("threshold")),
        unit: text("unit"),
        warningPct: text("warningPct") === "" ? undefined : Number(text("warningPct")),
        citation: text("citation"),
        caution: text("caution"),
      }),
    });
    const body = await response.json().catch(() => ({}));
    setBusy(false);
    if (!response.ok) {
      setIssues(body.error?.issues ?? []);
      setMessage({ text: body.error?.message ?? "Not saved.", isError: true });
      return;
    }
    setIssues([]);
    setMessage({ text: `Added: ${body.rule.title}.`, isError: false });
    (event.target as HTMLFormElement).reset();
    router.refresh();
  }

  return (
    <form className="card grid" style={{ gridTemplateColumns: "repeat(auto-fit, minmax(200px, 1fr))", gap: "0.7rem 1rem" }} onSubmit={submit} aria-label="Add a site rule" noValidate>
      <div style={{ gridColumn: "1 / -1" }}>
        <label htmlFor="rule-title">Title</label>
        <input id="rule-title" name="title" {...invalid("title")} />
        {error("title")}
      </div>
      <div>
        <label htmlFor="rule-metric">Watches</label>
        <select id="rule-metric" value={metric} onChange={(e) => setMetric(e.target.value)}>
          {METRICS.map((m) => (
            <option key={m.id} value={m.id}>
              {m.label}
            </option>
          ))}
        </select>
      </div>
      <div>
        <label htmlFor="rule-threshold">Limit</label>
        <input id="rule-threshold" name="threshold" inputMode="decimal" {...invalid("threshold")} />
        {error("threshold")}
      </div>
      <div>
        <label htmlFor="rule-unit">Unit</label>
        <select id="rule-unit" name="unit" key={metric} {...invalid("unit")}>
          {units.map((u) => (
            <option key={u}>{u}</option>
          ))}
        </select>
        {error("unit")}
      </div>
      <div>
        <label htmlFor="rule-warning">Warning from (%)</label>
        <input id="rule-warning" name="warningPct" inputMode="decimal" defaultValue="80" {...invalid("warningPct")} />
        {error("warningPct")}
      </div>
      <div style={{ gridColumn: "1 / -1" }}>
        <label htmlFor="rule-citation">
          Source <span className="hint">the permit, code section or document the limit comes from</span>
        </label>
        <input id="rule-citation" name="citation" {...invalid("citation")} />
        {error("citation")}
      </div>
      <div style={{ gridColumn: "1 / -1" }}>
        <label htmlFor="rule-caution">
          Caution <span className="hint">optional</span>
        </label>
        <input id="rule-caution" name="caution" {...invalid("caution")} />
        {error("caution")}
      </div>
      <div className="row" style={{ gridColumn: "1 / -1" }}>
        <button type="submit" disabled={busy}>
          {busy ? "Saving…" : "Add rule"}
        </button>
        <span aria-live="polite">{message && <span className={message.isError ? "field-error" : "small"} role={message.isError ? "alert" : "status"}>{message.text}</span>}</span>
      </div>
    </form>
  );
}
