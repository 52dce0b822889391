import { randomUUID } from "node:crypto";
import { z } from "zod";
import { canAnywhere, type TAction, type TActor } from "@/lib/auth/permissions";
import { AppError } from "@/lib/errors";
import { db } from "./client";
import { writeTrail } from "./trail";

/**
 * Receiving facilities, carriers and the shipper's emergency response telephone number belong to the
 * organisation, not to one site: an action on them is allowed where the actor's role allows it at any site
 * of the organisation (an administrator of one site is an administrator of the organisation's setup).
 * Nothing here is ever deleted: loads and their papers keep pointing at these records for years.
 */

const name = z.string({ error: "name is required" }).trim().min(1, "name is required").max(120, "name must be at most 120 characters");
const address = z.string({ error: "address must be text" }).trim().max(400, "address must be at most 400 characters");
const regulatoryIds = z.string({ error: "regulatory IDs must be text" }).trim().max(200, "regulatory IDs must be at most 200 characters");
/** How far the facility's scale may differ from the shipped weight before a load is flagged; 2 % unless agreed otherwise. */
const tolerancePct = z.number({ error: "tolerance must be a number of percent" }).min(0, "tolerance must be between 0 and 20 %").max(20, "tolerance must be between 0 and 20 %");

export const ZFacilityCreate = z.object({
  name,
  address: address.min(1, "the facility's address is required: it goes on the shipping paper and the records (40 CFR 273.39)"),
  regulatoryIds: regulatoryIds.default(""),
  tolerancePct: tolerancePct.default(2),
});
export type TFacilityCreate = z.output<typeof ZFacilityCreate>;

export const ZFacilityPatch = z
  .object({ name: name.optional(), address: address.min(1, "the facility's address is required").optional(), regulatoryIds: regulatoryIds.optional(), tolerancePct: tolerancePct.optional() })
  .refine((v) => Object.values(v).some((x) => x !== undefined), { message: "send at least one of: name, address, regulatoryIds, tolerancePct", path: ["name"] });
export type TFacilityPatch = z.output<typeof ZFacilityPatch>;

export const ZCarrierCreate = z.object({ name, address: address.default(""), regulatoryIds: regulatoryIds.default("") });
export type TCarrierCreate = z.output<typeof ZCarrierCreate>;

export const ZCarrierPatch = z
  .object({ name: name.optional(), address: address.optional(), regulatoryIds: regulatoryIds.optional() })
  .refine((v) => Object.values(v).some((x) => x !== undefined), { message: "send at least one of: name, address, regulatoryIds", path: ["name"] });
export type TCarrierPatch = z.output<typeof ZCarrierPatch>;

/** 49 CFR 172.604(a): a number monitored at all times while the load is in transport. Empty clears it. */
export const ZEmergencyPhone = z.object({
  emergencyPhone: z
    .string({ error: "the emergency response telephone number must be text" })
    .trim()
    .max(60, "the number must be at most 60 characters")
    .refine((v) => v === "" || /\d{3,}/.test(v.replace(/[\s().-]/g, "")), "give a telephone number with its digits, e.g. +1 555 0142"),
});

function allow(actor: TActor, action: TAction) {
  if (!canAnywhere(actor, action)) throw new AppError("forbidden", "Your role does not allow that.");
}

/** Facilities and carriers are listed to whoever may plan or read loads, or read the setup. */
function allowRead(actor: TActor) {
  if (!canAnywhere(actor, "setup.read") && !canAnywhere(actor, "loads.read")) throw new AppError("forbidden", "Your role does not allow that.");
}

export async function listFacilities(actor: TActor) {
  allowRead(actor);
  return db().facility.findMany({ where: { organisationId: actor.organisationId }, orderBy: { name: "asc" } });
}

export async function listCarriers(actor: TActor) {
  allowRead(actor);
  return db().carrier.findMany({ where: { organisationId: actor.organisationId }, orderBy: { name: "asc" } });
}

/** A facility of the actor's organisation, or "not found" (another organisation's is never confirmed). */
export async function facilityFor(actor: TActor, id: string) {
  const facility = await db().facility.findUnique({ where: { id } });
  if (!facility || facility.organisationId !== actor.organisationId) throw new AppError("not_found", "No such receiving facility.");
  return facility;
}

export async function carrierFor(actor: TActor, id: string) {
  const carrier = await db().carrier.findUnique({ where: { id } });
  if (!carrier || carrier.organisationId !== actor.organisationId) throw new AppError("not_found", "No such carrier.");
  return carrier;
}

export async function getFacility(actor: TActor, id: string) {
  allowRead(actor);
  return facilityFor(actor, id);
}

export async function getCarrier(actor: TActor, id: string) {
  allowRead(actor);
  return carrierFor(actor, id);
}

export async function createFacility(actor: TActor, input: TFacilityCreate) {
  allow(actor, "setup.write");
  return db().$transaction(async (tx) => {
    const facility = await tx.facility.create({ data: { id: randomUUID(), organisationId: actor.organisationId, ...input } });
    await writeTrail(tx, actor, { siteId: null, action: "facility.created", entity: "facility", entityId: facility.id, after: facility });
    return facility;
  });
}

export async function updateFacility(actor: TActor, id: string, patch: TFacilityPatch) {
  const before = await facilityFor(actor, id);
  allow(actor, "setup.write");
  return db().$transaction(async (tx) => {
    const after = await tx.facility.update({ where: { id: before.id }, data: patch });
    await writeTrail(tx, actor, { siteId: null, action: "facility.updated", entity: "facility", entityId: id, before, after });
    return after;
  });
}

export async function createCarrier(actor: TActor, input: TCarrierCreate) {
  allow(actor, "setup.write");
  return db().$transaction(async (tx) => {
    const carrier = await tx.carrier.create({ data: { id: randomUUID(), organisationId: actor.organisationId, ...input } });
    await writeTrail(tx, actor, { siteId: null, action: "carrier.created", entity: "carrier", entityId: carrier.id, after: carrier });
    return carrier;
  });
}

export async function updateCarrier(actor: TActor, id: string, patch: TCarrierPatch) {
  const before = await carrierFor(actor, id);
  allow(actor, "setup.write");
  return db().$transaction(async (tx) => {
    const after = await tx.carrier.update({ where: { id: before.id }, data: patch });
    await writeTrail(tx, actor, { siteId: null, action: "carrier.updated", entity: "carrier", entityId: id, before, after });
    return after;
  });
}

export async function shipperSetup(actor: TActor) {
  allowRead(actor);
  const org = await db().organisation.findUniqueOrThrow({ where: { id: actor.organisationId }, select: { id: true, name: true, emergencyPhone: true } });
  return { organisation: org, canEdit: canAnywhere(actor, "setup.write") };
}

/** Sets (or clears, with "") the organisation's emergency response telephone number printed on its shipping papers. */
export async function updateEmergencyPhone(actor: TActor, { emergencyPhone }: z.output<typeof ZEmergencyPhone>) {
  allow(actor, "setup.write");
  return db().$transaction(async (tx) => {
    const before = await tx.organisation.findUniqueOrThrow({ where: { id: actor.organisationId }, select: { emergencyPhone: true } });
    const after = await tx.organisation.update({ where: { id: actor.organisationId }, data: { emergencyPhone: emergencyPhone || null }, select: { id: true, name: true, emergencyPhone: true } });
    await writeTrail(tx, actor, { siteId: null, action: "organisation.emergency-phone", entity: "organisation", entityId: actor.organisationId, before, after: { emergencyPhone: after.emergencyPhone } });
    return after;
  });
}
