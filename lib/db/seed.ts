import { writeFileSync, mkdirSync } from "node:fs";
import path from "node:path";
import { createPerson } from "@/lib/auth/people";
import { newApiKey } from "@/lib/auth/api-keys";
import type { TActor, TRole } from "@/lib/auth/permissions";
import { ZUnitIntake } from "@/lib/intake/schema";
import { DEMO_ORG, DEMO_PEOPLE, DEMO_SITES, DEMO_UNIT_MIX, seededRandom, type TDemoSiteKey } from "@/lib/demo/scenario";
import { db } from "./client";
import { recordIntake } from "./units";

export const DEMO_KEY_FILE = path.resolve(process.env.LEADGER_DATA_DIR ?? "data", "demo-api-key");

export async function isDatabaseEmpty(): Promise<boolean> {
  return (await db().organisation.count()) === 0;
}

/** Loads the demo scenario into an empty database; refuses to touch one that has data. */
export async function seedDemo({ unitsPerStore = 120, unitsAtYard = 160 } = {}): Promise<{ apiKey: string; siteIds: Record<TDemoSiteKey, string> }> {
  if (!(await isDatabaseEmpty())) throw new Error("The database already has data; the demo loads only into an empty one.");
  const client = db();
  const org = await client.organisation.create({ data: DEMO_ORG });
  const siteIds = {} as Record<TDemoSiteKey, string>;
  for (const s of DEMO_SITES) {
    const site = await client.site.create({
      data: { organisationId: org.id, name: s.name, kind: s.kind, address: s.address, unitSystem: s.unitSystem, jurisdiction: "US-WA", rulebookId: "us-federal" },
    });
    siteIds[s.key] = site.id;
  }

  for (const person of DEMO_PEOPLE) {
    const user = await createPerson({ email: person.email, name: person.name, password: person.password, organisationId: org.id });
    for (const key of person.sites) await client.membership.create({ data: { userId: user.id, siteId: siteIds[key], role: person.role } });
  }

  const { key, prefix, hash } = newApiKey();
  await client.apiKey.create({
    data: { organisationId: org.id, siteId: siteIds.harbor, role: "clerk", name: "Demo point-of-sale", prefix, hash, createdBy: "system:demo" },
  });
  mkdirSync(path.dirname(DEMO_KEY_FILE), { recursive: true });
  writeFileSync(DEMO_KEY_FILE, key + "\n", { mode: 0o600 });

  // Closed containers for damaged units, and the yard's bays and open containers.
  const yardBay = await client.bay.create({ data: { siteId: siteIds.yard, name: "Bay A" } });
  await client.bay.create({ data: { siteId: siteIds.yard, name: "Bay B" } });
  for (const [siteKey, label] of [["harbor", "HB-DRUM-1"], ["kiln", "KR-DRUM-1"], ["yard", "YD-TOTE-1"]] as const) {
    await client.container.create({ data: { siteId: siteIds[siteKey], labelNumber: label, kind: siteKey === "yard" ? "tote" : "drum", isClosed: true, bayId: siteKey === "yard" ? yardBay.id : null } });
  }
  for (let i = 1; i <= 4; i++) {
    await client.container.create({ data: { siteId: siteIds.yard, labelNumber: `YD-PAL-${String(i).padStart(3, "0")}`, kind: "pallet", bayId: yardBay.id } });
  }

  const random = seededRandom(20261201);
  const pick = <T,>(list: readonly T[]): T | undefined => (list.length ? list[Math.floor(random() * list.length)] : undefined);
  const totalWeight = DEMO_UNIT_MIX.reduce((s, m) => s + m.weight, 0);
  const now = Date.now();
  for (const [siteKey, count] of [["harbor", unitsPerStore], ["kiln", unitsPerStore], ["yard", unitsAtYard]] as const) {
    const actor = systemActor(org.id, siteIds[siteKey]);
    for (let i = 0; i < count; i++) {
      let r = random() * totalWeight;
      const mix = DEMO_UNIT_MIX.find((m) => (r -= m.weight) < 0) ?? DEMO_UNIT_MIX[0];
      const daysAgo = (count - i) * (75 / count) + random();
      const isWeighed = siteKey === "yard" || random() < 0.3;
      const capacityAh = pick(mix.capacityAh);
      const input = ZUnitIntake.parse({
        site: siteIds[siteKey],
        kind: mix.kind,
        nominalVoltage: mix.nominalVoltage,
        capacityAh,
        groupSize: pick(mix.groupSize),
        weightKg: isWeighed && capacityAh ? Math.round((capacityAh * mix.nominalVoltage) / 33 * (0.9 + random() * 0.2) * 10) / 10 : undefined,
        condition: "intact",
        source: siteKey === "yard" ? pick(["fleet", "drop-off", "purchased-scrap"]) : "core-return",
      });
      await recordIntake(actor, input, undefined, { at: new Date(now - daysAgo * 86_400_000) });
    }
  }
  return { apiKey: key, siteIds };
}

/** The demo loader acts as the system, with admin rights at one site, and is named so in the trail. */
function systemActor(organisationId: string, siteId: string): TActor {
  return { kind: "system", id: "demo", ref: "system:demo", label: "Demo loader", organisationId, roles: new Map<string, TRole>([[siteId, "admin"]]) };
}
