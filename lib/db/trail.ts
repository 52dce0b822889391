import type { TActor } from "@/lib/auth/permissions";
import type { TDb, TTx } from "./client";

export type TTrailEntry = {
  siteId: string | null;
  action: string;
  entity: string;
  entityId: string;
  before?: unknown;
  after?: unknown;
  at?: Date;
};

const json = (value: unknown) => (value === undefined || value === null ? null : JSON.stringify(value));

/**
 * Appends one trail event inside the caller's transaction: the change and its record commit together or not at
 * all. Returns the query unawaited, so it also fits a batch `$transaction([...])`.
 */
export function writeTrail(tx: TTx | TDb, actor: TActor, entry: TTrailEntry) {
  return tx.trailEvent.create({
    data: {
      organisationId: actor.organisationId,
      siteId: entry.siteId,
      at: entry.at ?? new Date(),
      actor: actor.ref,
      actorLabel: actor.label,
      action: entry.action,
      entity: entry.entity,
      entityId: entry.entityId,
      before: json(entry.before),
      after: json(entry.after),
    },
    select: { id: true },
  });
}
