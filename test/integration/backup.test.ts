// Backup and restore round trips (scripts/db-backup.ts): a backup taken from a database with intakes,
// restored over another database with other data, holds exactly what the source held when it was taken.
// On SQLite always; on PostgreSQL (pg_dump / pg_restore) when the suite runs there. Source and target
// are scratch databases, never the worker's own.
import { mkdtempSync, rmSync, writeFileSync } from "node:fs";
import os from "node:os";
import path from "node:path";
import Database from "better-sqlite3";
import { afterAll, describe, expect, test } from "vitest";
import type { TActor } from "@/lib/auth/permissions";
import { createDb, type TDb } from "@/lib/db/client";
import { migrationStatus, type TDatabaseProvider } from "@/lib/db/migrate";
import { changeSiteLevel } from "@/lib/db/totals";
import { writeTrail } from "@/lib/db/trail";
import { backupDatabase, restoreDatabase } from "@/scripts/db-backup";
import { makeOrgWithSite } from "../helpers/factories";
import { migratedScratchDatabase, postgresForTests, testProvider, type TScratchDatabase } from "../helpers/db";

const dirs: string[] = [];
const backupDir = () => {
  const dir = mkdtempSync(path.join(os.tmpdir(), "leadger-backup-test-"));
  dirs.push(dir);
  return dir;
};
afterAll(() => dirs.forEach((dir) => rmSync(dir, { recursive: true, force: true })));

/** `count` intakes at a new store, written as recordIntake writes them: unit, totals, ledger and trail in one transaction. */
async function addIntakes(client: TDb, count: number, seed = 0) {
  const { organisation, site } = await makeOrgWithSite(client);
  const actor: TActor = { kind: "key", id: "backup-test", ref: "key:backup-test", label: "backup test", organisationId: organisation.id, roles: new Map() };
  for (let i = 0; i < count; i++) {
    const n = seed + i;
    // Invented figures with fractional parts, so that the totals are float sums.
    const batteryKg = 12 + (n % 17) * 0.37;
    const leadKg = batteryKg * 0.61;
    const electrolyteKg = batteryKg * 0.23;
    const acidKg = electrolyteKg * 0.37;
    await client.$transaction(async (tx) => {
      const unit = await tx.unit.create({
        data: {
          siteId: site.id,
          kind: "flooded",
          nominalVoltage: 12,
          capacityAh: 45 + n,
          weightKg: batteryKg,
          condition: "intact",
          source: "core-return",
          receivedAt: new Date(Date.UTC(2026, 0, 1 + n)),
          receivedBy: actor.ref,
          method: "weighed",
          batteryKg,
          batteryKgLow: batteryKg,
          batteryKgHigh: batteryKg,
          leadKg,
          leadKgLow: leadKg * 0.9,
          leadKgHigh: leadKg * 1.1,
          electrolyteKg,
          electrolyteKgLow: electrolyteKg * 0.9,
          electrolyteKgHigh: electrolyteKg * 1.1,
          acidKg,
          acidKgLow: acidKg * 0.9,
          acidKgHigh: acidKg * 1.1,
          polymerKg: batteryKg * 0.08,
          otherKg: batteryKg * 0.08,
        },
      });
      const delta = { unitCount: 1, batteryKg, leadKg, electrolyteKg, acidKg };
      await changeSiteLevel(tx, { siteId: site.id, delta, reason: "intake", refId: unit.id, at: unit.receivedAt });
      await writeTrail(tx, actor, { siteId: site.id, action: "unit.received", entity: "unit", entityId: unit.id, after: unit, at: unit.receivedAt });
    });
  }
  return site;
}

/** What a restore must bring back: counts, every site's running totals, the unit sums and the trail itself. */
async function contents(client: TDb) {
  const [units, trailEvents, levelChanges, organisations, unitSums, sites, trail] = await Promise.all([
    client.unit.count(),
    client.trailEvent.count(),
    client.levelChange.count(),
    client.organisation.count(),
    client.unit.aggregate({ _sum: { batteryKg: true, leadKg: true, electrolyteKg: true, acidKg: true } }),
    client.site.findMany({
      orderBy: { id: "asc" },
      select: { id: true, name: true, unitCount: true, batteryKg: true, leadKg: true, electrolyteKg: true, acidKg: true, peakBatteryKg: true, peakYear: true },
    }),
    client.trailEvent.findMany({ orderBy: { id: "asc" }, select: { id: true, action: true, entityId: true, at: true, after: true } }),
  ]);
  return { units, trailEvents, levelChanges, organisations, unitSums: unitSums._sum, sites, trail };
}

async function scratch(provider: TDatabaseProvider): Promise<TScratchDatabase & { db: TDb }> {
  const serverUrl = provider === "postgresql" ? (await postgresForTests()).url : undefined;
  if (provider === "postgresql" && !serverUrl) throw new Error("the suite runs on PostgreSQL, but its server does not answer");
  return migratedScratchDatabase({ provider, serverUrl });
}

const providers: TDatabaseProvider[] = testProvider() === "postgresql" ? ["sqlite", "postgresql"] : ["sqlite"];

describe.each(providers)("backup and restore on %s", (provider) => {
  test("a restore over another database brings back exactly what the backup held", async () => {
    const source = await scratch(provider);
    const target = await scratch(provider);
    try {
      await addIntakes(source.db, 12);
      await addIntakes(source.db, 7, 100);
      const atBackup = await contents(source.db);
      expect(atBackup.units).toBe(19);
      expect(atBackup.trailEvents).toBe(19);

      const file = await backupDatabase({ url: source.url, dir: backupDir(), now: new Date("2026-12-01T10:20:30.456Z") });
      expect(path.basename(file)).toBe(provider === "sqlite" ? "leadger-2026-12-01T10-20-30.456Z.db" : "leadger-2026-12-01T10-20-30.456Z.dump");
      // Written after the backup: must not come back.
      await addIntakes(source.db, 3, 200);
      // The target has data of its own, which the restore replaces.
      await addIntakes(target.db, 5, 300);
      await target.db.$disconnect();

      await restoreDatabase({ url: target.url, file });
      const restored = createDb(target.url);
      try {
        const after = await contents(restored);
        expect(after).toEqual(atBackup);
        expect(after.sites.reduce((sum, s) => sum + s.unitCount, 0)).toBe(19);
        expect((await migrationStatus({ provider, url: target.url })).isUpToDate).toBe(true);
        // The trail stays append-only after a restore: the triggers came back with the tables.
        await expect(restored.$executeRawUnsafe(`UPDATE "TrailEvent" SET "action" = 'edited'`)).rejects.toThrow();
        await expect(restored.$executeRawUnsafe(`DELETE FROM "TrailEvent"`)).rejects.toThrow();
        expect(await restored.trailEvent.count()).toBe(19);
      } finally {
        await restored.$disconnect();
      }
    } finally {
      await source.drop();
      await target.drop();
    }
  });

  test("a missing backup file is refused and the target is left as it was", async () => {
    const target = await scratch(provider);
    try {
      await addIntakes(target.db, 2);
      const file = path.join(backupDir(), provider === "sqlite" ? "missing.db" : "missing.dump");
      await expect(restoreDatabase({ url: target.url, file })).rejects.toThrow(/no backup at/);
      expect(await target.db.unit.count()).toBe(2);
    } finally {
      await target.drop();
    }
  });
});

describe("SQLite restore checks", () => {
  test("refuses a file that is not a Leadger database, and one that is not SQLite", async () => {
    const target = await scratch("sqlite");
    try {
      await addIntakes(target.db, 1);
      const dir = backupDir();
      const foreign = path.join(dir, "foreign.db");
      const other = new Database(foreign);
      other.exec("CREATE TABLE notes (id INTEGER PRIMARY KEY, text TEXT)");
      other.close();
      await expect(restoreDatabase({ url: target.url, file: foreign })).rejects.toThrow(/not a Leadger database/);
      const garbage = path.join(dir, "garbage.db");
      writeFileSync(garbage, "this is not a database file at all, just text");
      await expect(restoreDatabase({ url: target.url, file: garbage })).rejects.toThrow();
      expect(await target.db.unit.count()).toBe(1);
    } finally {
      await target.drop();
    }
  });
});
