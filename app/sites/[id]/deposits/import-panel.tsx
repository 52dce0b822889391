"use client";

import { useRouter } from "next/navigation";
import { useRef, useState } from "react";
import { dollars, type TIssue } from "./money";

type TResult = {
  isPreview: boolean;
  isImported: boolean;
  lines: number;
  rows: number;
  newSales: number;
  skipped: number;
  chargeCount: number;
  creditCount: number;
  chargedCents: number;
  balanceCents: number;
  errorCount: number;
  ignoredColumns: string[];
};

type TProgress = { uploadPct: number; phase: "receiving" | "checking" | "importing" | null; rows: number; bytes: number };

const SHOWN_ISSUES = 200;

/**
 * Sends the till's sales file: first a check (nothing written), then the import. The browser reports the
 * upload (XMLHttpRequest upload progress); the server answers in NDJSON lines with the rows it has read
 * and stored, and ends with the result.
 */
export function ImportPanel({ siteId }: { siteId: string }) {
  const router = useRouter();
  const fileRef = useRef<HTMLInputElement>(null);
  const [busy, setBusy] = useState(false);
  const [progress, setProgress] = useState<TProgress | null>(null);
  const [result, setResult] = useState<TResult | null>(null);
  const [issues, setIssues] = useState<TIssue[]>([]);
  const [message, setMessage] = useState<{ text: string; isError: boolean } | null>(null);
  const [checkedName, setCheckedName] = useState<string | null>(null);

  function send(isPreview: boolean) {
    const file = fileRef.current?.files?.[0];
    if (!file) {
      setMessage({ text: "Choose the sales file first (CSV).", isError: true });
      return;
    }
    setBusy(true);
    setMessage(null);
    setResult(null);
    setIssues([]);
    setProgress({ uploadPct: 0, phase: null, rows: 0, bytes: 0 });
    const xhr = new XMLHttpRequest();
    xhr.open("POST", `/api/v1/imports/sales?site=${encodeURIComponent(siteId)}${isPreview ? "&preview=1" : ""}`);
    xhr.setRequestHeader("content-type", "text/csv");
    xhr.setRequestHeader("accept", "application/x-ndjson");
    let seen = 0;
    let last: { status: number; body: { error?: { message: string; issues: TIssue[] }; result?: TResult } & Partial<TResult> } | null = null;
    const readLines = () => {
      const text = xhr.responseText;
      const end = text.lastIndexOf("\n");
      if (end < seen) return;
      for (const line of text.slice(seen, end).split("\n")) {
        if (!line.trim()) continue;
        const item = JSON.parse(line);
        if (item.type === "progress") setProgress((p) => ({ uploadPct: p?.uploadPct ?? 100, phase: item.phase, rows: item.rows, bytes: item.bytes }));
        else if (item.type === "result") last = item;
      }
      seen = end + 1;
    };
    xhr.upload.onprogress = (e) => {
      if (e.lengthComputable) setProgress((p) => ({ phase: p?.phase ?? null, rows: p?.rows ?? 0, bytes: p?.bytes ?? 0, uploadPct: Math.round((e.loaded / e.total) * 100) }));
    };
    xhr.onprogress = readLines;
    xhr.onerror = () => {
      setBusy(false);
      setMessage({ text: "The upload failed; nothing was imported. Try again.", isError: true });
    };
    xhr.onload = () => {
      setBusy(false);
      if (xhr.status !== 200) {
        const body = JSON.parse(xhr.responseText || "{}");
        setMessage({ text: body.error?.message ?? "The file was not accepted.", isError: true });
        return;
      }
      readLines();
      const outcome = last as typeof last;
      if (!outcome) return setMessage({ text: "The answer was cut off; check the Deposits list before sending again.", isError: true });
      if (outcome.status >= 400) {
        setIssues(outcome.body.error?.issues ?? []);
        setResult(outcome.body.result ?? null);
        setMessage({ text: outcome.body.error?.message ?? "Not imported.", isError: true });
        setCheckedName(null);
        return;
      }
      const r = outcome.body as TResult;
      setResult(r);
      if (r.isPreview) {
        setCheckedName(file.name);
        setMessage({ text: `The file is clean: ${r.rows.toLocaleString("en-US")} sales lines, ${r.newSales.toLocaleString("en-US")} new, ${r.skipped.toLocaleString("en-US")} already here. Import it when ready.`, isError: false });
      } else {
        setCheckedName(null);
        setMessage({
          text: `Imported ${r.newSales.toLocaleString("en-US")} sales (${r.skipped.toLocaleString("en-US")} already here, skipped): ${dollars(r.chargedCents)} in deposits. Deposits held now ${dollars(r.balanceCents)}.`,
          isError: false,
        });
        router.refresh();
      }
    };
    xhr.send(file);
  }

  const serverText = (p: TProgress) =>
    p.phase === "receiving"
      ? ` · ${(p.bytes / 1048576).toFixed(1)} MB received`
      : p.phase === "checking"
        ? ` · ${p.rows.toLocaleString("en-US")} lines checked`
        : p.phase === "importing"
          ? ` · ${p.rows.toLocaleString("en-US")} lines checked and stored`
          : "";
  return (
    <section className="card grid" aria-label="Import sales from the till">
      <h2 style={{ margin: 0 }}>Import sales from the till</h2>
      <p className="small muted" style={{ margin: 0 }}>
        A CSV file with the columns <code>date, sale_id, product, group_size, quantity, deposit</code> (deposit in dollars for the whole line;
        0.00 when used batteries were handed in). All or nothing: a file with any bad line imports nothing. Sale ids already here are skipped.
      </p>
      <div>
        <label htmlFor="salesFile">Sales file</label>
        <input id="salesFile" ref={fileRef} type="file" accept=".csv,text/csv" onChange={() => setCheckedName(null)} />
      </div>
      <div className="row">
        <button type="button" onClick={() => send(true)} disabled={busy}>
          Check the file
        </button>
        <button type="button" onClick={() => send(false)} disabled={busy}>
          {checkedName ? `Import ${checkedName}` : "Import"}
        </button>
      </div>
      {progress && (
        <div aria-live="polite">
          <div className="bar" role="progressbar" aria-label="Upload" aria-valuemin={0} aria-valuemax={100} aria-valuenow={progress.uploadPct}>
            <span style={{ width: `${progress.uploadPct}%` }} />
          </div>
          <p className="small" style={{ margin: "0.3rem 0 0" }} data-testid="import-progress">
            Uploaded {progress.uploadPct} %{serverText(progress)}
          </p>
        </div>
      )}
      <div aria-live="polite">
        {message && (
          <p className={message.isError ? "error-box" : "notice"} role={message.isError ? "alert" : "status"} style={{ margin: 0 }}>
            {message.text}
          </p>
        )}
      </div>
      {result && !result.errorCount && (
        <dl className="figures" aria-label="Import figures">
          <div>
            <dt>Lines</dt>
            <dd>{result.rows.toLocaleString("en-US")}</dd>
          </div>
          <div>
            <dt>{result.isPreview ? "New" : "Imported"}</dt>
            <dd>{result.newSales.toLocaleString("en-US")}</dd>
          </div>
          <div>
            <dt>Already here</dt>
            <dd>{result.skipped.toLocaleString("en-US")}</dd>
          </div>
        </dl>
      )}
      {issues.length > 0 && (
        <table className="dense" aria-label="Problems in the file">
          <thead>
            <tr>
              <th className="num">Line</th>
              <th>Column</th>
              <th>Problem</th>
            </tr>
          </thead>
          <tbody>
            {issues.slice(0, SHOWN_ISSUES).map((i, k) => (
              <tr key={k}>
                <td className="num">{i.line || "—"}</td>
                <td>{i.field}</td>
                <td>{i.message}</td>
              </tr>
            ))}
          </tbody>
          {issues.length > SHOWN_ISSUES && (
            <tfoot>
              <tr>
                <td colSpan={3}>and {(issues.length - SHOWN_ISSUES).toLocaleString("en-US")} more</td>
              </tr>
            </tfoot>
          )}
        </table>
      )}
    </section>
  );
}
