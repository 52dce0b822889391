"use server";

import { revalidatePath } from "next/cache";
import { pageActor } from "@/app/_ui/session";
import { ZEmergencyPhone, updateEmergencyPhone } from "@/lib/db/facilities";
import { AppError, fieldIssues } from "@/lib/errors";

export type TPhoneState = { ok: boolean; message: string; issue?: string };

/** Saves the organisation's emergency response telephone number (administrators; the trail records it). */
export async function saveEmergencyPhone(_previous: TPhoneState, form: FormData): Promise<TPhoneState> {
  const actor = await pageActor();
  const parsed = ZEmergencyPhone.safeParse({ emergencyPhone: String(form.get("emergencyPhone") ?? "") });
  if (!parsed.success) return { ok: false, message: "Not saved.", issue: fieldIssues(parsed.error.issues)[0]?.message };
  try {
    const org = await updateEmergencyPhone(actor, parsed.data);
    revalidatePath("/setup/facilities");
    return { ok: true, message: org.emergencyPhone ? `Saved: ${org.emergencyPhone}.` : "Cleared: no number is set." };
  } catch (error) {
    if (error instanceof AppError) return { ok: false, message: error.message };
    throw error;
  }
}
