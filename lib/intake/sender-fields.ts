import { z } from "zod";

/** The same lengths as a receiving facility's name and address (lib/db/facilities.ts). */
export const SENDER_LIMITS = { nameChars: 120, addressChars: 400 } as const;

/**
 * Who sent a unit or a lot, for the shipment records: 40 CFR 273.39 asks, for each shipment received, the name
 * and address of the one it came from. Both optional: a core return from a member of the public has no sender
 * (a household is not a handler: the project's reading). Blank text counts as not given.
 */
export const senderFields = {
  senderName: z
    .string({ error: "the sender's name must be text" })
    .trim()
    .max(SENDER_LIMITS.nameChars, `the sender's name must be at most ${SENDER_LIMITS.nameChars} characters`)
    .transform((v) => v || undefined)
    .optional(),
  senderAddress: z
    .string({ error: "the sender's address must be text" })
    .trim()
    .max(SENDER_LIMITS.addressChars, `the sender's address must be at most ${SENDER_LIMITS.addressChars} characters`)
    .transform((v) => v || undefined)
    .optional(),
};

/** An address with no name cannot say who sent the shipment: the name is asked for. */
export function checkSender(v: { senderName?: string; senderAddress?: string }, ctx: z.RefinementCtx): void {
  if (v.senderAddress && !v.senderName) ctx.addIssue({ code: "custom", path: ["senderName"], message: "give the sender's name with the address" });
}
