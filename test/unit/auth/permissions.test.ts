import { describe, expect, test } from "vitest";
import { ACTIONS, can, sitesWhere, type TAction, type TActor, type TRole } from "@/lib/auth/permissions";
import { clientAddress, clientIpHeader, clientIpOf } from "@/lib/auth/client-ip";

const actor = (roles: [string, TRole][]): TActor => ({ kind: "user", id: "u", ref: "user:u", label: "U", organisationId: "o", roles: new Map(roles) });

// The role matrix is the project's own policy (DESIGN.md §2 journeys), not a published rule.
const EXPECTED: Record<TRole, TAction[]> = {
  clerk: ["units.read", "units.create", "yard.read", "limits.read", "deposits.read", "deposits.write", "sales.import"],
  yard: ["units.read", "units.create", "yard.read", "yard.write", "limits.read", "annual.read", "loads.read", "deposits.read"],
  compliance: ["units.read", "yard.read", "limits.read", "annual.read", "loads.read", "loads.write", "papers.issue", "deposits.read", "trail.read", "setup.read"],
  admin: [...ACTIONS],
};

describe("can(actor, action, site)", () => {
  test.each(Object.entries(EXPECTED) as [TRole, TAction[]][])("%s at its own site has exactly its grants", (role, granted) => {
    const a = actor([["s1", role]]);
    for (const action of ACTIONS) expect(can(a, action, "s1"), `${role} ${action}`).toBe(granted.includes(action));
  });

  test("no role at a site means nothing there, even for an admin elsewhere", () => {
    const a = actor([["s1", "admin"]]);
    for (const action of ACTIONS) expect(can(a, action, "s2")).toBe(false);
  });

  test("roles differ per site and sitesWhere scopes lists by action", () => {
    const a = actor([["store", "clerk"], ["yard", "yard"]]);
    expect(can(a, "yard.write", "yard")).toBe(true);
    expect(can(a, "yard.write", "store")).toBe(false);
    expect(sitesWhere(a, "units.read").sort()).toEqual(["store", "yard"]);
    expect(sitesWhere(a, "yard.write")).toEqual(["yard"]);
    expect(sitesWhere(a, "trail.read")).toEqual([]);
  });
});

describe("clientAddress", () => {
  const trusted = new Set(["10.0.0.5"]);
  test.each([
    ["a direct client is its socket address, whatever it claims", "203.0.113.9", "198.51.100.1", "203.0.113.9"],
    ["an IPv4-mapped peer is shown as IPv4", "::ffff:127.0.0.1", undefined, "127.0.0.1"],
    ["behind a trusted proxy, the nearest untrusted hop", "10.0.0.5", "198.51.100.7", "198.51.100.7"],
    ["a forged hop before the real one is ignored", "10.0.0.5", "1.2.3.4, 198.51.100.7", "198.51.100.7"],
    ["chained trusted proxies are skipped", "10.0.0.5", "198.51.100.7, 10.0.0.5", "198.51.100.7"],
  ])("%s", (_name, peer, forwardedFor, expected) => {
    expect(clientAddress({ peer, forwardedFor, trusted })).toBe(expected);
  });
});

describe("the stamped client address", () => {
  test("lives in a header named once per process, which a client cannot guess", () => {
    const name = clientIpHeader();
    expect(name).toMatch(/^x-leadger-client-ip-[0-9a-f]{24}$/);
    expect(clientIpHeader()).toBe(name);
    expect(clientIpOf(new Headers({ [name]: "203.0.113.9" }))).toBe("203.0.113.9");
  });

  test("a guessed or forwarded header is not an address", () => {
    const forged = new Headers({ "x-leadger-client-ip": "198.51.100.1", "x-forwarded-for": "198.51.100.2", "x-real-ip": "198.51.100.3" });
    expect(clientIpOf(forged)).toBe("unknown");
  });
});
