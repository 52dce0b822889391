import type { TRole } from "@/lib/auth/permissions";

/** The roles in plain words (DESIGN.md §2). */
export const ROLE_LABELS: Record<TRole, string> = {
  clerk: "Counter clerk",
  yard: "Yard manager",
  compliance: "Compliance officer",
  admin: "Administrator",
};

export const roleLabel = (role: string) => ROLE_LABELS[role as TRole] ?? role;
