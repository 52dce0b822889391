import type { TContainerKind } from "./schema";

const PREFIX: Record<TContainerKind, string> = { pallet: "PAL", box: "BOX", tote: "TOTE", drum: "DRUM" };

/**
 * The next free label number for a kind at a site: the highest "…PAL-007" style number in use plus one,
 * keeping that label's prefix and padding (so "YD-PAL-004" is followed by "YD-PAL-005"); "PAL-0001" first.
 */
export function nextLabelNumber({ kind, existing }: { kind: TContainerKind; existing: readonly string[] }): string {
  const pattern = new RegExp(`^(.*\\b${PREFIX[kind]}-)(\\d+)$`, "i");
  let best: { head: string; n: number; width: number } | null = null;
  const taken = new Set(existing.map((l) => l.toUpperCase()));
  for (const label of existing) {
    const m = pattern.exec(label);
    if (!m) continue;
    const n = Number(m[2]);
    if (!best || n > best.n) best = { head: m[1]!, n, width: m[2]!.length };
  }
  const head = best?.head ?? `${PREFIX[kind]}-`;
  const width = best?.width ?? 4;
  let n = (best?.n ?? 0) + 1;
  while (taken.has(`${head}${String(n).padStart(width, "0")}`.toUpperCase())) n++;
  return `${head}${String(n).padStart(width, "0")}`;
}
