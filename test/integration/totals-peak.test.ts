import { beforeAll, expect, test } from "vitest";
import { testDb } from "../helpers/db";
import { makeOrgWithSite } from "../helpers/factories";
import { changeSiteLevel, yearPeakKg } from "@/lib/db/totals";
import type { TDb } from "@/lib/db/client";

let db: TDb;
beforeAll(async () => {
  db = await testDb();
});

const delta = (batteryKg: number) => ({ unitCount: Math.sign(batteryKg), batteryKg, leadKg: batteryKg * 0.6, electrolyteKg: batteryKg * 0.2, acidKg: batteryKg * 0.07 });

// 40 CFR 273.9: once 5 000 kg is reached in a calendar year the category holds to year end, then resets.
test("the year's peak survives a decrease and restarts from what is on hand in a new year", async () => {
  const { site } = await makeOrgWithSite(db);
  const step = (kg: number, at: string) => db.$transaction((tx) => changeSiteLevel(tx, { siteId: site.id, delta: delta(kg), reason: "test", at: new Date(at) }));
  await step(3000, "2026-03-01T10:00:00Z");
  await step(2000, "2026-04-01T10:00:00Z"); // 5 000 kg on hand
  await step(-1500, "2026-05-01T10:00:00Z"); // departure: 3 500 kg
  let row = await db.site.findUniqueOrThrow({ where: { id: site.id } });
  expect(row.batteryKg).toBeCloseTo(3500, 9);
  expect(yearPeakKg(row, 2026)).toBeCloseTo(5000, 9);
  await step(-1000, "2027-01-02T10:00:00Z"); // the first change of 2027 is a decrease from 3 500 kg
  row = await db.site.findUniqueOrThrow({ where: { id: site.id } });
  expect(yearPeakKg(row, 2027)).toBeCloseTo(3500, 9);
  const ledger = await db.levelChange.count({ where: { siteId: site.id } });
  expect(ledger).toBe(4);
});
