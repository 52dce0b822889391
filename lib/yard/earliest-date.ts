/** The earlier of two dates, either of which may be missing. */
export function earliestDate(a: Date | null | undefined, b: Date | null | undefined): Date | null {
  if (!a) return b ?? null;
  if (!b) return a;
  return a.getTime() <= b.getTime() ? a : b;
}

/**
 * The date an item (a unit or a lot) has been accumulating since: the accumulation start of the container it
 * is in, or when it was received if that is earlier or it is loose. 40 CFR 273.15(a), 273.35(a) count the year
 * from the date the waste was received, so a move never makes it younger.
 */
export const itemAccumulationDate = ({ receivedAt, containerStart }: { receivedAt: Date; containerStart: Date | null | undefined }): Date =>
  earliestDate(receivedAt, containerStart) as Date;

/**
 * A container's start date after items come in: the earliest of its own and theirs (40 CFR 273.15(c)(1):
 * marked with the earliest date any of its waste was received). An empty container has none.
 */
export function accumulationStartAfter({ current, incoming }: { current: Date | null; incoming: readonly Date[] }): Date | null {
  let start = current;
  for (const d of incoming) start = earliestDate(start, d);
  return start;
}
