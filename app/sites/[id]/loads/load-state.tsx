import styles from "./loads.module.css";

export const LOAD_STEPS = [
  { id: "planning", label: "Planning" },
  { id: "ready", label: "Ready" },
  { id: "departed", label: "Departed" },
  { id: "delivered", label: "Delivered" },
  { id: "reconciled", label: "Reconciled" },
] as const;

export const stateWord = (state: string) => LOAD_STEPS.find((s) => s.id === state)?.label ?? state;

/** A load's life as steps: done ones ticked, the current one marked (as text and aria-current, not colour alone). */
export function LoadSteps({ state }: { state: string }) {
  const at = LOAD_STEPS.findIndex((s) => s.id === state);
  return (
    <ol className={styles.steps} aria-label="Where the load is">
      {LOAD_STEPS.map((s, i) => (
        <li key={s.id} data-done={i < at ? "true" : undefined} aria-current={i === at ? "step" : undefined}>
          {s.label}
          {i === at && <span className="sr-only"> (now)</span>}
        </li>
      ))}
    </ol>
  );
}

/** The reconciliation flag: a word and an icon, never colour alone. */
export function WeightFlag({ isFlagged }: { isFlagged: boolean | null }) {
  if (isFlagged === null) return <span className="muted">—</span>;
  return isFlagged ? (
    <span className={`status exceeded ${styles.flag}`} data-flag="flagged">
      <span aria-hidden="true">▲</span> Flagged
    </span>
  ) : (
    <span className={`status ok ${styles.flag}`} data-flag="within">
      <span aria-hidden="true">✓</span> Within tolerance
    </span>
  );
}
