// proxy.ts, the CSRF guard in front of every route, called as Next calls it. The same cases through the
// running server are in test/security/server.test.ts.
import { NextRequest } from "next/server";
import { describe, expect, test } from "vitest";
import { proxy } from "@/proxy";

const HOST = "localhost:3000";

function verdict(method: string, headers: Record<string, string>): "passed" | number | "threw" {
  try {
    const response = proxy(new NextRequest(`http://${HOST}/api/v1/units`, { method, headers: { host: HOST, ...headers } }));
    return response.headers.get("x-middleware-next") === "1" ? "passed" : response.status;
  } catch {
    return "threw";
  }
}

const cookie = "__Secure-better-auth.session_token=abc.def";

describe("CSRF guard", () => {
  test.each([
    ["POST with a session cookie and no Origin", "POST", { cookie }, 403],
    ["PATCH with a session cookie and no Origin", "PATCH", { cookie }, 403],
    ["DELETE with a session cookie and no Origin", "DELETE", { cookie }, 403],
    ["PUT with a session cookie and a foreign Origin", "PUT", { cookie, origin: "https://evil.example" }, 403],
    ["POST with a session cookie and a look-alike Origin", "POST", { cookie, origin: "http://localhost.evil.example:3000" }, 403],
    ["POST with a session cookie and our Origin on another port", "POST", { cookie, origin: "http://localhost:3001" }, 403],
    ["POST with a session cookie and our Origin", "POST", { cookie, origin: `http://${HOST}` }, "passed"],
    ["POST with an API key and no cookie, no Origin", "POST", { authorization: "Bearer ldg_x" }, "passed"],
    ["GET with a session cookie and no Origin (reads change nothing)", "GET", { cookie }, "passed"],
  ] as const)("%s", (_label, method, headers, expected) => {
    expect(verdict(method, headers)).toBe(expected);
  });

  test("the refusal says why, in the API's error shape", async () => {
    const response = proxy(new NextRequest(`http://${HOST}/api/v1/units`, { method: "POST", headers: { host: HOST, cookie } }));
    expect(await response.json()).toEqual({ error: { code: "forbidden", message: expect.stringContaining("Origin missing or foreign"), issues: [] } });
  });

  test("Origin: null (sandboxed frames, privacy redirects) is never let through", () => {
    // Today proxy.ts throws on it (new URL("null")), which Next answers with a 500: refused, but not with the
    // 403 the other cases get. Reported to the owner of proxy.ts; this test holds the security property.
    expect(verdict("POST", { cookie, origin: "null" })).not.toBe("passed");
  });
});
