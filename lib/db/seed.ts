import { writeFileSync, mkdirSync } from "node:fs";
import path from "node:path";
import { createPerson } from "@/lib/auth/people";
import { newApiKey } from "@/lib/auth/api-keys";
import type { TActor, TRole } from "@/lib/auth/permissions";
import { ZUnitIntake } from "@/lib/intake/schema";
import { DEMO_ORG, DEMO_PEOPLE, DEMO_SITES, DEMO_UNIT_MIX, seededRandom, type TDemoSiteKey } from "@/lib/demo/scenario";
import { db } from "./client";
import { recordIntake } from "./units";
import { recordRefund, recordSale, runForfeits } from "./deposits";
import { addDays, calendarDay } from "@/lib/deposits/calendar-day";
import { addCustomRule } from "./limits";
import { receiveLot } from "./lots";
import { stowIntoContainer, updateContainer } from "./yard";
import { addContainers, createLoad } from "./loads";

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
      await recordIntake(actor, { ...input, ...DEMO_SENDERS[input.source] }, undefined, { at: new Date(now - daysAgo * 86_400_000) });
    }
  }
  await seedYardDemo(systemActor(org.id, siteIds.yard), siteIds.yard, now);
  await seedLoadsDemo(systemActor(org.id, siteIds.yard), siteIds.yard, now);
  await seedDepositsDemo(org.id, siteIds, now);
  return { apiKey: key, siteIds };
}

/**
 * Invented senders for the yard's deliveries (no real company is meant): the fleet and the scrap seller are named
 * on every unit they bring; drop-offs are left without one, as a yard often logs them, so the records show how a
 * missing sender reads. Core returns at the stores come from members of the public and have none.
 */
export const DEMO_SENDERS: Partial<Record<string, { senderName: string; senderAddress: string }>> = {
  fleet: { senderName: "Brackenridge Delivery Fleet (demo)", senderAddress: "14 Motor Pool Way\nQuarry Bend" },
  "purchased-scrap": { senderName: "Dunmore Scrap & Salvage (demo)", senderAddress: "3 Millrace Yard\nAshgrove Flats" },
};
/** The invented garage that sent the demo yard's weighed lot. */
export const DEMO_LOT_SENDER = { senderName: "Ferngate Auto Electrics (demo)", senderAddress: "88 Spindle Street\nQuarry Bend" } as const;

/** The demo loader acts as the system, with admin rights at one site, and is named so in the trail. */
function systemActor(organisationId: string, siteId: string): TActor {
  return { kind: "system", id: "demo", ref: "system:demo", label: "Demo loader", organisationId, roles: new Map<string, TRole>([[siteId, "admin"]]) };
}

/** An invented permit limit at the demo yard: a site rule the Limits screen shows beside the rulebook's. */
export const DEMO_YARD_RULE = {
  title: "Fire permit: at most 250 batteries in the yard",
  metric: "unit-count",
  threshold: 250,
  unit: "count",
  warningPct: 80,
  citation: "Quarry Bend fire permit FP-2026-014, condition 7 (an invented demo permit)",
  caution: "A demo rule: a real permit sets its own limit and wording; keep a copy of it with the site's records.",
} as const;

/** The demo yard's containers in use: two pallets filled (one sealed), one in Bay B, one lot from a scale ticket, and the permit rule. */
async function seedYardDemo(actor: TActor, yardId: string, now: number) {
  const client = db();
  const label = async (labelNumber: string) => client.container.findUniqueOrThrow({ where: { siteId_labelNumber: { siteId: yardId, labelNumber } } });
  const loose = (await client.unit.findMany({ where: { siteId: yardId, containerId: null }, orderBy: { receivedAt: "asc" }, select: { id: true } })).map((u) => u.id);
  const [p1, p2, p3, p4] = await Promise.all(["YD-PAL-001", "YD-PAL-002", "YD-PAL-003", "YD-PAL-004"].map(label));
  const at = (daysAgo: number) => ({ at: new Date(now - daysAgo * 86_400_000) });
  await stowIntoContainer(actor, p1!.id, { unitIds: loose.slice(0, 40) }, at(50));
  await updateContainer(actor, p1!.id, { state: "sealed" }, at(49));
  await stowIntoContainer(actor, p2!.id, { unitIds: loose.slice(40, 80) }, at(25));
  const bayB = await client.bay.findUniqueOrThrow({ where: { siteId_name: { siteId: yardId, name: "Bay B" } } });
  await updateContainer(actor, p3!.id, { bayId: bayB.id }, at(20));
  await stowIntoContainer(actor, p3!.id, { unitIds: loose.slice(80, 110) }, at(10));
  await receiveLot(
    actor,
    { site: yardId, ticketNumber: "QB-2026-0412", ...DEMO_LOT_SENDER, grossKg: 1_980, tareKg: 1_600, unitCount: 19, mixBasis: "count", mix: [{ kind: "flooded", nominalVoltage: 12, count: 15 }, { kind: "agm", nominalVoltage: 12, count: 4 }], containerId: p4!.id },
    at(5),
  );
  await addCustomRule(actor, yardId, { ...DEMO_YARD_RULE });
}

/** An invented secondary lead smelter and carrier for the demo; no real company is meant. */
export const DEMO_FACILITY = {
  name: "Cinderwell Secondary Lead Works (demo)",
  address: "400 Furnace Road\nAshgrove Flats",
  regulatoryIds: "EPA ID XXD000000001 (invented)",
  tolerancePct: 2,
} as const;
export const DEMO_CARRIER = { name: "Tallow Creek Haulage (demo)", address: "12 Depot Lane\nQuarry Bend", regulatoryIds: "USDOT 0000000 (invented)" } as const;

/**
 * Loads at the demo yard: the facility and carrier, two more pallets sealed from the yard's newest loose units
 * (YD-PAL-005 and YD-PAL-006; the yard's own pallets are left as the Yard demo set them), and a load being
 * planned with YD-PAL-005 on it. YD-PAL-006 stays free for a person (or e2e/loads.spec.ts) to plan a load with.
 */
async function seedLoadsDemo(actor: TActor, yardId: string, now: number) {
  const client = db();
  const org = (await client.site.findUniqueOrThrow({ where: { id: yardId } })).organisationId;
  const facility = await client.facility.create({ data: { organisationId: org, ...DEMO_FACILITY } });
  await client.carrier.create({ data: { organisationId: org, ...DEMO_CARRIER } });
  const bayA = await client.bay.findUnique({ where: { siteId_name: { siteId: yardId, name: "Bay A" } } });
  const loose = (await client.unit.findMany({ where: { siteId: yardId, containerId: null, state: "received" }, orderBy: { receivedAt: "desc" }, take: 30, select: { id: true } })).map((u) => u.id);
  const at = (daysAgo: number) => ({ at: new Date(now - daysAgo * 86_400_000) });
  const sealed: string[] = [];
  for (const [i, labelNumber] of ["YD-PAL-005", "YD-PAL-006"].entries()) {
    const unitIds = loose.slice(i * 15, i * 15 + 15);
    if (unitIds.length === 0) break;
    const pallet = await client.container.create({ data: { siteId: yardId, labelNumber, kind: "pallet", bayId: bayA?.id ?? null } });
    await stowIntoContainer(actor, pallet.id, { unitIds }, at(2));
    await updateContainer(actor, pallet.id, { state: "sealed" }, at(1));
    sealed.push(pallet.id);
  }
  if (sealed.length === 0) return;
  const load = await createLoad(actor, { site: yardId, facilityId: facility.id, vehicle: "", basis: "us-full" }, at(1));
  await addContainers(actor, load.load.id, { containerIds: [sealed[0]!] }, at(1));
}

const DEMO_SALE_PRODUCTS = [
  { product: "Starter 12 V 60 Ah", groupSize: "24F" },
  { product: "Starter 12 V 70 Ah AGM", groupSize: "H6" },
  { product: "Deep cycle 12 V 100 Ah", groupSize: "27" },
  { product: "Powersport 12 V 12 Ah", groupSize: "" },
] as const;

/**
 * Five weeks of invented sales at the two stores under the Washington rule, at an invented $15 core charge a
 * battery (the rule's least is $5): some with the used battery handed in, many refunded inside the window,
 * and one old sale never returned, which the forfeit run at the end books as the demo's one forfeit.
 */
async function seedDepositsDemo(organisationId: string, siteIds: Record<TDemoSiteKey, string>, now: number) {
  const random = seededRandom(20261202);
  const today = calendarDay(new Date(now), "America/Los_Angeles");
  for (const siteKey of ["harbor", "kiln"] as const) {
    const siteId = siteIds[siteKey];
    const actor = systemActor(organisationId, siteId);
    await db().site.update({ where: { id: siteId }, data: { depositRuleId: "us-wa" } });
    const refunds: { saleRef: string; at: Date }[] = [];
    let n = 0;
    for (let ageDays = 36; ageDays >= 1; ageDays--) {
      const salesThatDay = random() < 0.4 ? 1 : 2;
      for (let k = 0; k < salesThatDay; k++) {
        const saleRef = `${siteKey === "harbor" ? "HB" : "KR"}-${String(4100 + ++n)}`;
        const quantity = random() < 0.2 ? 2 : 1;
        const isForfeitDemo = siteKey === "harbor" && n === 1;
        const handedIn = !isForfeitDemo && random() < 0.35 ? quantity : 0;
        const item = DEMO_SALE_PRODUCTS[Math.floor(random() * DEMO_SALE_PRODUCTS.length)]!;
        const soldOn = addDays(today, -ageDays);
        const common = { site: siteId, saleRef, ...item, quantity, soldOn };
        await recordSale(actor, handedIn === quantity ? { kind: "credit", ...common } : { kind: "charge", ...common, chargeCents: 1_500, handedIn }, { at: new Date(now) });
        if (handedIn === quantity) continue;
        // Past the window every charged battery came back, but for the first sale at Harbor Street: the one forfeit.
        const isReturned = ageDays > 30 ? !isForfeitDemo : random() < 0.45;
        const backAfterDays = 1 + Math.floor(random() * 20);
        if (isReturned && backAfterDays < ageDays) {
          for (let b = 0; b < quantity; b++) refunds.push({ saleRef, at: new Date(`${addDays(soldOn, backAfterDays)}T19:00:00.000Z`) });
        }
      }
    }
    for (const r of refunds.sort((a, b) => a.at.getTime() - b.at.getTime())) {
      await recordRefund(actor, { kind: "refund", site: siteId, saleRef: r.saleRef }, { at: r.at });
    }
    await runForfeits(actor, { siteId, at: new Date(now) });
  }
}
