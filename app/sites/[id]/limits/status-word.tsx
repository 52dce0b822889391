import type { TLimitStatus } from "@/lib/limits/rule-status";

/** Every status has a word and a shape, never colour alone (DESIGN.md §9). */
export const STATUS_TEXT: Record<TLimitStatus, { word: string; icon: string }> = {
  ok: { word: "OK", icon: "✓" },
  approaching: { word: "Approaching", icon: "▲" },
  exceeded: { word: "Exceeded", icon: "✕" },
};

export function StatusWord({ status, prefix }: { status: TLimitStatus; prefix?: string }) {
  const { word, icon } = STATUS_TEXT[status];
  return (
    <span className={`status ${status}`} data-status={status}>
      <span aria-hidden="true">{icon}</span>
      {prefix && <span>{prefix}</span>}
      <span>{word}</span>
    </span>
  );
}
