import styles from "@/app/setup/setup.module.css";

const SHOWN = 6;

const isRecord = (v: unknown): v is Record<string, unknown> => typeof v === "object" && v !== null && !Array.isArray(v);

function show(value: unknown): string {
  if (value === null || value === undefined) return "—";
  if (typeof value === "string") return value;
  if (typeof value === "number" || typeof value === "boolean") return String(value);
  return JSON.stringify(value);
}

type TLine = { field: string; before?: unknown; after?: unknown; kind: "changed" | "set" | "removed" };

/** What an event changed, field by field: "field: old → new" for changes, the values alone for a new or removed record. */
export function changeLines(before: unknown, after: unknown): TLine[] {
  if (isRecord(before) && isRecord(after)) {
    const fields = [...new Set([...Object.keys(before), ...Object.keys(after)])];
    return fields.filter((f) => JSON.stringify(before[f]) !== JSON.stringify(after[f])).map((field) => ({ field, before: before[field], after: after[field], kind: "changed" }));
  }
  if (isRecord(after)) return Object.entries(after).map(([field, value]) => ({ field, after: value, kind: "set" }));
  if (isRecord(before)) return Object.entries(before).map(([field, value]) => ({ field, before: value, kind: "removed" }));
  const lines: TLine[] = [];
  if (before !== null && before !== undefined) lines.push({ field: "before", before, kind: "removed" });
  if (after !== null && after !== undefined) lines.push({ field: "after", after, kind: "set" });
  return lines;
}

function Line({ line }: { line: TLine }) {
  return (
    <li>
      <span className={styles.field}>{line.field}</span>{" "}
      {line.kind === "changed" && (
        <>
          <del>{show(line.before)}</del> → <ins>{show(line.after)}</ins>
        </>
      )}
      {line.kind === "set" && <ins>{show(line.after)}</ins>}
      {line.kind === "removed" && <del>{show(line.before)}</del>}
    </li>
  );
}

export function ChangeList({ before, after }: { before: unknown; after: unknown }) {
  const lines = changeLines(before, after);
  if (lines.length === 0) return <span className="muted">—</span>;
  return (
    <>
      <ul className={styles.change}>
        {lines.slice(0, SHOWN).map((l) => (
          <Line key={l.field} line={l} />
        ))}
      </ul>
      {lines.length > SHOWN && (
        <details>
          <summary className="small">{lines.length - SHOWN} more fields</summary>
          <ul className={styles.change}>
            {lines.slice(SHOWN).map((l) => (
              <Line key={l.field} line={l} />
            ))}
          </ul>
        </details>
      )}
    </>
  );
}
