import { z } from "zod";
import { canAnywhere, sitesWhere, type TActor } from "@/lib/auth/permissions";
import { toCsv, type TCsvColumn } from "@/lib/deposits/to-csv";
import { AppError } from "@/lib/errors";
import { db } from "./client";
import { siteFor } from "./sites";

/**
 * Reading the trail. An actor sees the events of the sites where their role allows `trail.read`, and the
 * organisation-level events (people, facilities, carriers: siteId null) only if they administer some site.
 * The scope is applied here, inside the data layer, whatever filters the caller sends.
 */

/** The site filter's value for organisation-level events only. */
export const ORGANISATION_SCOPE = "organisation";

const DAY = /^\d{4}-\d{2}-\d{2}$/;
const INSTANT = /^\d{4}-\d{2}-\d{2}T\d{2}:\d{2}(:\d{2}(\.\d{1,3})?)?(Z|[+-]\d{2}:\d{2})$/;

/** A date (UTC day) or an instant; a day as the end of a range includes that whole day. */
const ZWhen = (label: string) =>
  z
    .string()
    .trim()
    .refine((v) => (DAY.test(v) || INSTANT.test(v)) && !Number.isNaN(Date.parse(DAY.test(v) ? `${v}T00:00:00Z` : v)), `${label} must be a date (2026-03-01) or a date and time (2026-03-01T14:00:00Z)`);

/** An empty field of a GET form means "no filter". */
const blankToUndefined = (v: unknown) => (typeof v === "string" && v.trim() === "" ? undefined : v);

const optionalText = (max: number) =>
  z
    .string()
    .trim()
    .max(max)
    .optional()
    .transform((v) => v || undefined);

export const ZTrailQuery = z
  .object({
    site: optionalText(60),
    /** "user:<id>" or "key:<id>", as written to the trail. */
    actor: optionalText(80),
    action: optionalText(80),
    entity: optionalText(60),
    entityId: optionalText(80),
    from: z.preprocess(blankToUndefined, ZWhen("from").optional()),
    to: z.preprocess(blankToUndefined, ZWhen("to").optional()),
    cursor: optionalText(200),
    limit: z.coerce.number({ error: "limit must be a whole number" }).int("limit must be a whole number").min(1, "limit must be 1 to 200").max(200, "limit must be 1 to 200").default(50),
    format: z.enum(["json", "csv"], { error: "format must be json or csv" }).default("json"),
  })
  .superRefine((q, ctx) => {
    if (q.from && q.to && rangeStart(q.from) >= rangeEnd(q.to)) ctx.addIssue({ code: "custom", path: ["to"], message: "to must be after from" });
  });
export type TTrailQuery = z.output<typeof ZTrailQuery>;
export type TTrailQueryInput = z.input<typeof ZTrailQuery>;

const rangeStart = (v: string) => new Date(DAY.test(v) ? `${v}T00:00:00Z` : v);
/** Exclusive end: the day after a date, one millisecond after an instant. */
const rangeEnd = (v: string) => (DAY.test(v) ? new Date(Date.parse(`${v}T00:00:00Z`) + 86_400_000) : new Date(Date.parse(v) + 1));

export type TTrailEventView = {
  id: string;
  at: string;
  siteId: string | null;
  siteName: string | null;
  actor: string;
  actorLabel: string;
  action: string;
  entity: string;
  entityId: string;
  before: unknown;
  after: unknown;
};

type TCursor = { at: Date; id: string };
const encodeCursor = ({ at, id }: TCursor) => Buffer.from(`${at.toISOString()}|${id}`, "utf8").toString("base64url");
function decodeCursor(cursor: string): TCursor {
  const [at, id, extra] = Buffer.from(cursor, "base64url").toString("utf8").split("|");
  const date = new Date(at ?? "");
  if (!id || extra !== undefined || Number.isNaN(date.getTime())) {
    throw new AppError("invalid_input", "Some fields need fixing.", [{ field: "cursor", message: "this page link is not valid; start again from the newest events" }]);
  }
  return { at: date, id };
}

const parseJson = (text: string | null): unknown => {
  if (text === null) return null;
  try {
    return JSON.parse(text);
  } catch {
    return text;
  }
};

/** Whether the actor may read the trail at all, and what of it. */
export function trailScope(actor: TActor) {
  return { siteIds: sitesWhere(actor, "trail.read"), hasOrganisation: canAnywhere(actor, "setup.write") };
}

/** The where clause: the actor's scope, narrowed by the filters. Refuses a site filter outside the scope. */
async function whereOf(actor: TActor, q: TTrailQuery) {
  const scope = trailScope(actor);
  // A named site is looked up first, so another organisation's site is a 404 whatever the role.
  if (q.site && q.site !== ORGANISATION_SCOPE) await siteFor(actor, q.site, "trail.read");
  if (scope.siteIds.length === 0) throw new AppError("forbidden", "Your role does not open the trail.");
  let places: { siteId: string | null | { in: string[] } }[];
  if (q.site === ORGANISATION_SCOPE) {
    if (!scope.hasOrganisation) throw new AppError("forbidden", "Organisation-level events are shown to administrators only.");
    places = [{ siteId: null }];
  } else if (q.site) {
    places = [{ siteId: q.site }];
  } else {
    places = [{ siteId: { in: scope.siteIds } }, ...(scope.hasOrganisation ? [{ siteId: null }] : [])];
  }
  const at: { gte?: Date; lt?: Date } = {};
  if (q.from) at.gte = rangeStart(q.from);
  if (q.to) at.lt = rangeEnd(q.to);
  return {
    organisationId: actor.organisationId,
    OR: places,
    ...(q.actor ? { actor: q.actor } : {}),
    ...(q.action ? { action: q.action } : {}),
    ...(q.entity ? { entity: q.entity } : {}),
    ...(q.entityId ? { entityId: q.entityId } : {}),
    ...(q.from || q.to ? { at } : {}),
  };
}

async function siteNames(organisationId: string): Promise<Map<string, string>> {
  const sites = await db().site.findMany({ where: { organisationId }, select: { id: true, name: true } });
  return new Map(sites.map((s) => [s.id, s.name]));
}

type TTrailRow = { id: string; at: Date; siteId: string | null; actor: string; actorLabel: string; action: string; entity: string; entityId: string; before: string | null; after: string | null };

/** One page, newest first, from `cursor` on; `nextCursor` is null on the last page. */
async function page(where: Awaited<ReturnType<typeof whereOf>>, cursor: TCursor | undefined, limit: number): Promise<{ rows: TTrailRow[]; next: TCursor | null }> {
  // (at, id) descending, so that events with the same time still page without gaps or repeats.
  const after = cursor ? { OR: [{ at: { lt: cursor.at } }, { at: cursor.at, id: { lt: cursor.id } }] } : {};
  const rows = await db().trailEvent.findMany({
    where: cursor ? { AND: [where, after] } : where,
    orderBy: [{ at: "desc" }, { id: "desc" }],
    take: limit + 1,
  });
  const hasMore = rows.length > limit;
  const shown = hasMore ? rows.slice(0, limit) : rows;
  const last = shown.at(-1);
  return { rows: shown, next: hasMore && last ? { at: last.at, id: last.id } : null };
}

const viewOf = (row: TTrailRow, names: Map<string, string>): TTrailEventView => ({
  id: row.id,
  at: row.at.toISOString(),
  siteId: row.siteId,
  siteName: row.siteId ? (names.get(row.siteId) ?? null) : null,
  actor: row.actor,
  actorLabel: row.actorLabel,
  action: row.action,
  entity: row.entity,
  entityId: row.entityId,
  before: parseJson(row.before),
  after: parseJson(row.after),
});

export async function queryTrail(actor: TActor, q: TTrailQuery): Promise<{ events: TTrailEventView[]; nextCursor: string | null }> {
  const where = await whereOf(actor, q);
  const { rows, next } = await page(where, q.cursor ? decodeCursor(q.cursor) : undefined, q.limit);
  const names = await siteNames(actor.organisationId);
  return { events: rows.map((r) => viewOf(r, names)), nextCursor: next ? encodeCursor(next) : null };
}

/** What the filters can offer: the actions, record kinds and people/keys that occur in the actor's scope. */
export async function trailFilterOptions(actor: TActor) {
  const where = await whereOf(actor, ZTrailQuery.parse({}));
  const [actions, entities, actors] = await Promise.all([
    db().trailEvent.groupBy({ by: ["action"], where, orderBy: { action: "asc" } }),
    db().trailEvent.groupBy({ by: ["entity"], where, orderBy: { entity: "asc" } }),
    db().trailEvent.groupBy({ by: ["actor", "actorLabel"], where, orderBy: { actorLabel: "asc" } }),
  ]);
  const seen = new Set<string>();
  return {
    actions: actions.map((a) => a.action),
    entities: entities.map((e) => e.entity),
    actors: actors.filter((a) => !seen.has(a.actor) && seen.add(a.actor)).map((a) => ({ ref: a.actor, label: a.actorLabel })),
  };
}

const CSV_COLUMNS: TCsvColumn<TTrailEventView>[] = [
  { header: "at (UTC)", value: (e) => e.at },
  { header: "site", value: (e) => e.siteName ?? (e.siteId ? e.siteId : "organisation") },
  { header: "site id", value: (e) => e.siteId },
  { header: "by", value: (e) => e.actorLabel },
  { header: "by ref", value: (e) => e.actor },
  { header: "action", value: (e) => e.action },
  { header: "record", value: (e) => e.entity },
  { header: "record id", value: (e) => e.entityId },
  { header: "before", value: (e) => (e.before === null ? null : JSON.stringify(e.before)) },
  { header: "after", value: (e) => (e.after === null ? null : JSON.stringify(e.after)) },
];

const CSV_PAGE = 500;

/**
 * The same events as `queryTrail` with the same filters, all pages, as RFC 4180 CSV (CRLF, quoted as needed,
 * text guarded against spreadsheet formulas), streamed a page at a time so a long trail never sits in memory.
 * The scope and filters are checked before the first byte, so a refusal is still a proper error response.
 */
export async function trailCsv(actor: TActor, q: TTrailQuery): Promise<ReadableStream<Uint8Array>> {
  const where = await whereOf(actor, q);
  const names = await siteNames(actor.organisationId);
  const encoder = new TextEncoder();
  let cursor: TCursor | undefined = q.cursor ? decodeCursor(q.cursor) : undefined;
  let isFirst = true;
  return new ReadableStream<Uint8Array>({
    async pull(controller) {
      const { rows, next } = await page(where, cursor, CSV_PAGE);
      const csv = toCsv(rows.map((r) => viewOf(r, names)), CSV_COLUMNS);
      // toCsv writes the header line each time; keep it on the first chunk only.
      controller.enqueue(encoder.encode(isFirst ? csv : csv.slice(csv.indexOf("\r\n") + 2)));
      isFirst = false;
      if (next) cursor = next;
      else controller.close();
    },
  });
}
