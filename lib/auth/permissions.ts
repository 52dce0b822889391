/** The four roles a person (or an API key) can hold at a site. */
export const ROLES = ["clerk", "yard", "compliance", "admin"] as const;
export type TRole = (typeof ROLES)[number];

export const isRole = (value: string): value is TRole => (ROLES as readonly string[]).includes(value);

/** Every action the service checks. Reads and writes are separate so a role can see without changing. */
export const ACTIONS = [
  "units.read",
  "units.create",
  "yard.read",
  "yard.write",
  "limits.read",
  "annual.read",
  "loads.read",
  "loads.write",
  "papers.issue",
  "deposits.read",
  "deposits.write",
  "sales.import",
  "trail.read",
  "setup.read",
  "setup.write",
] as const;
export type TAction = (typeof ACTIONS)[number];

const READ_ALL: TAction[] = ["units.read", "yard.read", "limits.read", "annual.read", "loads.read", "deposits.read"];

const GRANTS: Record<TRole, ReadonlySet<TAction>> = {
  clerk: new Set<TAction>(["units.read", "units.create", "yard.read", "limits.read", "deposits.read", "deposits.write", "sales.import"]),
  yard: new Set<TAction>([...READ_ALL, "units.create", "yard.write"]),
  compliance: new Set<TAction>([...READ_ALL, "loads.write", "papers.issue", "trail.read", "setup.read"]),
  admin: new Set<TAction>(ACTIONS),
};

/** Who is asking: a signed-in person with roles per site, or an API key bound to one site and role. */
export type TActor = {
  kind: "user" | "key" | "system";
  id: string;
  /** e.g. "user:abc" or "key:xyz", written to the trail. */
  ref: string;
  label: string;
  organisationId: string;
  roles: ReadonlyMap<string, TRole>;
};

export const roleAt = (actor: TActor, siteId: string): TRole | undefined => actor.roles.get(siteId);

/** The one permission check: role × site × action. A site the actor has no role at is always refused. */
export function can(actor: TActor, action: TAction, siteId: string): boolean {
  const role = actor.roles.get(siteId);
  return role !== undefined && GRANTS[role].has(action);
}

/** The sites at which the actor may perform an action: the scope of every list query. */
export function sitesWhere(actor: TActor, action: TAction): string[] {
  return [...actor.roles].filter(([, role]) => GRANTS[role].has(action)).map(([siteId]) => siteId);
}

/** Screens or API families open to a role somewhere: used to hide navigation, never to authorise. */
export function canAnywhere(actor: TActor, action: TAction): boolean {
  return sitesWhere(actor, action).length > 0;
}
