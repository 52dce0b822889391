"use client";

import { useRouter } from "next/navigation";
import { useRef, useState } from "react";

type TTarget = { id: string; labelNumber: string; kind: string; isClosed: boolean; unitCount: number };
type TLogLine = { id: number; text: string; isError: boolean };

/**
 * Scan into a container: choose the container being filled, then scan (or type) a unit id, a scale ticket number
 * or another container's label and press Enter. The field keeps focus for the next scan.
 */
export function ScanBox({ targets }: { targets: TTarget[] }) {
  const router = useRouter();
  const [targetId, setTargetId] = useState(targets[0]?.id ?? "");
  const [busy, setBusy] = useState(false);
  const [log, setLog] = useState<TLogLine[]>([]);
  const [error, setError] = useState<string | null>(null);
  const input = useRef<HTMLInputElement>(null);
  const seq = useRef(0);

  async function submit(event: React.FormEvent<HTMLFormElement>) {
    event.preventDefault();
    const code = input.current?.value.trim() ?? "";
    if (!code || !targetId || busy) return;
    setBusy(true);
    const response = await fetch(`/api/v1/containers/${targetId}/units`, { method: "POST", headers: { "content-type": "application/json" }, body: JSON.stringify({ scan: code }) });
    const body = await response.json().catch(() => ({}));
    setBusy(false);
    const target = targets.find((t) => t.id === targetId);
    if (!response.ok) {
      const text = body.error?.issues?.[0]?.message ?? body.error?.message ?? "Not stowed.";
      setError(text);
      setLog((l) => [{ id: ++seq.current, text: `${code}: ${text}`, isError: true }, ...l].slice(0, 8));
    } else {
      setError(null);
      const what = body.items.length === 1 ? body.items[0].label : `${body.items.length} items (${body.moved.unitCount} units)`;
      const from = body.from.length ? ` from ${body.from.join(", ")}` : "";
      setLog((l) => [{ id: ++seq.current, text: `Stowed ${what}${from} into ${target?.labelNumber}.`, isError: false }, ...l].slice(0, 8));
      if (input.current) input.current.value = "";
      router.refresh();
    }
    input.current?.focus();
  }

  if (targets.length === 0) return <p className="muted">No open container at this site: add one below first.</p>;
  return (
    <form className="card grid" style={{ gridTemplateColumns: "minmax(200px, 1fr) minmax(260px, 2fr) auto", alignItems: "end" }} onSubmit={submit} aria-label="Scan into a container" noValidate>
      <div>
        <label htmlFor="scan-target">Into container</label>
        <select id="scan-target" value={targetId} onChange={(e) => setTargetId(e.target.value)}>
          {targets.map((t) => (
            <option key={t.id} value={t.id}>
              {t.labelNumber} ({t.kind}
              {t.isClosed ? ", closed" : ""}, {t.unitCount} in it)
            </option>
          ))}
        </select>
      </div>
      <div>
        <label htmlFor="scan-code">
          Scan <span className="hint">unit id, ticket number or a container label to empty it</span>
        </label>
        <input id="scan-code" ref={input} autoComplete="off" spellCheck={false} aria-invalid={error ? true : undefined} aria-describedby={error ? "scan-error" : undefined} />
      </div>
      <button className="primary" type="submit" disabled={busy}>
        {busy ? "Stowing…" : "Stow"}
      </button>
      <div style={{ gridColumn: "1 / -1" }} aria-live="polite">
        {error && (
          <p className="field-error" id="scan-error" role="alert">
            {error}
          </p>
        )}
        {log.length > 0 && (
          <ul className="small" style={{ margin: "0.2rem 0 0 1.1rem", padding: 0 }} aria-label="Scans">
            {log.map((l) => (
              <li key={l.id} className={l.isError ? "field-error" : undefined} role={l.isError ? undefined : "status"}>
                {l.isError ? "✕ " : "✓ "}
                {l.text}
              </li>
            ))}
          </ul>
        )}
      </div>
    </form>
  );
}
