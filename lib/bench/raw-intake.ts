import { randomUUID } from "node:crypto";

/**
 * The bare storage work of one intake — insert a unit row and move the site's totals — in raw SQL, without
 * Prisma, auth or validation. It is the floor the intake benchmark compares the real route against.
 */
export const RAW_UNIT_INSERT = `INSERT INTO "Unit" ("id","siteId","kind","nominalVoltage","capacityAh","condition","source","state","receivedAt","receivedBy","method",
 "batteryKg","batteryKgLow","batteryKgHigh","leadKg","leadKgLow","leadKgHigh","electrolyteKg","electrolyteKgLow","electrolyteKgHigh",
 "acidKg","acidKgLow","acidKgHigh","polymerKg","otherKg")
 VALUES (?,?,'flooded',12,60,'intact','core-return','received',?,'bench','weighed',18,18,18,11.5,10.8,12.2,4.3,3.6,5,1.6,1.3,1.9,1.3,0.9)`;

export const RAW_TOTALS_UPDATE = `UPDATE "Site" SET "unitCount" = "unitCount" + 1, "batteryKg" = "batteryKg" + 18, "leadKg" = "leadKg" + 11.5,
 "electrolyteKg" = "electrolyteKg" + 4.3, "acidKg" = "acidKg" + 1.6 WHERE "id" = ?`;

export { toPg } from "@/lib/db/raw";

/**
 * On PostgreSQL the floor does both in one statement (one round trip, its own transaction), as the real intake
 * does its five writes: each round trip costs more than the SQL it carries. Arguments: rawUnitArgs, then the site.
 */
export const RAW_INTAKE_ONE_STATEMENT = `WITH "u" AS (${RAW_UNIT_INSERT}) ${RAW_TOTALS_UPDATE}`;

/** Arguments of RAW_UNIT_INSERT; `time` formats the timestamp as the provider's rows hold it. */
export const rawUnitArgs = (siteId: string, time: (d: Date) => string, at = new Date()) => [randomUUID(), siteId, time(at)];
