import type { Metadata } from "next";
import Link from "next/link";
import { forbidden } from "next/navigation";
import { pageActor } from "@/app/_ui/session";
import { Shell } from "@/app/_ui/shell";
import styles from "@/app/setup/setup.module.css";
import { AppError } from "@/lib/errors";
import { visibleSites } from "@/lib/db/sites";
import { ORGANISATION_SCOPE, queryTrail, trailFilterOptions, trailScope, ZTrailQuery, type TTrailEventView } from "@/lib/db/trail-query";
import { ChangeList } from "./change-list";

export const metadata: Metadata = { title: "Trail" };
export const dynamic = "force-dynamic";

const FILTERS = ["site", "actor", "action", "entity", "entityId", "from", "to"] as const;

type TSearch = Record<string, string | string[] | undefined>;

function hrefWith(base: string, params: Record<string, string | undefined>) {
  const q = new URLSearchParams(Object.entries(params).filter((e): e is [string, string] => Boolean(e[1])));
  const text = q.toString();
  return text ? `${base}?${text}` : base;
}

const whoKind = (ref: string) => (ref.startsWith("key:") ? "API key" : ref.startsWith("user:") ? "person" : "system");

export default async function TrailPage({ searchParams }: { searchParams: Promise<TSearch> }) {
  const actor = await pageActor();
  const scope = trailScope(actor);
  if (scope.siteIds.length === 0) forbidden();
  const raw = Object.fromEntries(Object.entries(await searchParams).map(([k, v]) => [k, Array.isArray(v) ? v[0] : v]));
  const filters = Object.fromEntries(FILTERS.map((f) => [f, raw[f] ?? ""])) as Record<(typeof FILTERS)[number], string>;

  let events: TTrailEventView[] = [];
  let nextCursor: string | null = null;
  let problem: string | null = null;
  const parsed = ZTrailQuery.safeParse({ ...filters, cursor: raw.cursor, limit: raw.limit, format: "json" });
  if (!parsed.success) problem = parsed.error.issues.map((i) => i.message).join("; ");
  else {
    try {
      ({ events, nextCursor } = await queryTrail(actor, parsed.data));
    } catch (error) {
      if (!(error instanceof AppError)) throw error;
      problem = error.issues.length ? error.issues.map((i) => i.message).join("; ") : error.message;
    }
  }
  const [options, sites] = await Promise.all([trailFilterOptions(actor), visibleSites(actor, "trail.read")]);
  const csvHref = hrefWith("/api/v1/trail", { ...filters, format: "csv" });
  const isFiltered = FILTERS.some((f) => filters[f]);

  return (
    <Shell actor={actor} active="trail">
      <h1>Trail</h1>
      <p className="lede">Who did what, when, to which record — newest first. Entries are never changed or removed.</p>
      <form className={`card ${styles.filters}`} method="get" action="/trail" aria-label="Filter the trail">
        <div>
          <label htmlFor="f-site">Site</label>
          <select id="f-site" name="site" defaultValue={filters.site}>
            <option value="">All your sites</option>
            {sites.map((s) => (
              <option key={s.id} value={s.id}>
                {s.name}
              </option>
            ))}
            {scope.hasOrganisation && <option value={ORGANISATION_SCOPE}>Organisation (people, facilities)</option>}
          </select>
        </div>
        <div>
          <label htmlFor="f-actor">Person or key</label>
          <select id="f-actor" name="actor" defaultValue={filters.actor}>
            <option value="">Anyone</option>
            {options.actors.map((a) => (
              <option key={a.ref} value={a.ref}>
                {a.label} ({whoKind(a.ref)})
              </option>
            ))}
          </select>
        </div>
        <div>
          <label htmlFor="f-action">Action</label>
          <select id="f-action" name="action" defaultValue={filters.action}>
            <option value="">Any action</option>
            {options.actions.map((a) => (
              <option key={a} value={a}>
                {a}
              </option>
            ))}
          </select>
        </div>
        <div>
          <label htmlFor="f-entity">Record</label>
          <select id="f-entity" name="entity" defaultValue={filters.entity}>
            <option value="">Any record</option>
            {options.entities.map((e) => (
              <option key={e} value={e}>
                {e}
              </option>
            ))}
          </select>
        </div>
        <div>
          <label htmlFor="f-entity-id">Record id</label>
          <input id="f-entity-id" name="entityId" defaultValue={filters.entityId} />
        </div>
        <div>
          <label htmlFor="f-from">From (UTC day)</label>
          <input id="f-from" name="from" type="date" defaultValue={filters.from} />
        </div>
        <div>
          <label htmlFor="f-to">To (UTC day, included)</label>
          <input id="f-to" name="to" type="date" defaultValue={filters.to} />
        </div>
        <div className={styles.inline}>
          <button className="primary" type="submit">
            Show
          </button>
          {isFiltered && <Link href="/trail">Clear</Link>}
          <a href={csvHref} download>
            Download CSV
          </a>
        </div>
      </form>

      {problem && (
        <p role="alert" className="error-box">
          {problem}
        </p>
      )}
      <table className="dense" aria-label="Trail entries">
        <thead>
          <tr>
            <th>When (UTC)</th>
            <th>Site</th>
            <th>Who</th>
            <th>Action</th>
            <th>Record</th>
            <th>What changed</th>
          </tr>
        </thead>
        <tbody>
          {events.map((e) => (
            <tr key={e.id}>
              <td className={styles.when}>
                <time dateTime={e.at}>
                  {e.at.slice(0, 10)}
                  <br />
                  {e.at.slice(11, 19)}
                </time>
              </td>
              <td>{e.siteName ?? (e.siteId ? "—" : <span className="status info">Organisation</span>)}</td>
              <td>
                {e.actorLabel}
                <br />
                <span className="muted small">{whoKind(e.actor)}</span>
              </td>
              <td>{e.action}</td>
              <td>
                {e.entity}
                <br />
                <Link className="small" href={hrefWith("/trail", { entity: e.entity, entityId: e.entityId })} title="This record's whole history">
                  <code>{e.entityId.length > 14 ? `${e.entityId.slice(0, 12)}…` : e.entityId}</code>
                </Link>
              </td>
              <td>
                <ChangeList before={e.before} after={e.after} />
              </td>
            </tr>
          ))}
        </tbody>
      </table>
      {!problem && events.length === 0 && <p className="muted">Nothing matches these filters.</p>}
      <nav className={styles.pager} aria-label="Pages">
        {raw.cursor && <Link href={hrefWith("/trail", filters)}>Newest</Link>}
        {nextCursor && <Link href={hrefWith("/trail", { ...filters, cursor: nextCursor })}>Older entries</Link>}
      </nav>
    </Shell>
  );
}
