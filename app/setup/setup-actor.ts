import "server-only";
import { forbidden } from "next/navigation";
import { pageActor } from "@/app/_ui/session";
import { canAnywhere } from "@/lib/auth/permissions";

/** Setup is organisation-level: it opens for anyone whose role at some site reads the setup (compliance, admin). */
export async function setupActor() {
  const actor = await pageActor();
  if (!canAnywhere(actor, "setup.read")) forbidden();
  return actor;
}
