import { expect, test } from "@playwright/test";
import { DEMO_SITES } from "../lib/demo/scenario";
import { screenshotPath, signIn } from "./helpers";

test("a clerk has no Setup or Trail in the bar, and their addresses answer with the forbidden page", async ({ page }) => {
  await signIn(page, "clerk");
  const bar = page.getByRole("banner");
  await expect(bar.getByRole("link", { name: "Setup" })).toHaveCount(0);
  await expect(bar.getByRole("link", { name: "Trail" })).toHaveCount(0);
  for (const address of ["/setup", "/setup/people", "/setup/keys", "/trail"]) {
    const response = await page.goto(address);
    expect(response?.status(), address).toBe(403);
    await expect(page.getByRole("heading", { name: "Not open to your role" })).toBeVisible();
  }
});

test("a compliance officer sees every site of the organisation, reads Setup without changing it, and reads the Trail", async ({ page }) => {
  await signIn(page, "compliance");
  const sites = page.getByRole("table").first();
  for (const s of DEMO_SITES) await expect(sites.getByRole("link", { name: s.name })).toBeVisible();

  await page.getByRole("banner").getByRole("link", { name: "Setup", exact: true }).click();
  await expect(page.getByRole("heading", { name: "Setup", level: 1 })).toBeVisible();
  for (const s of DEMO_SITES) await expect(page.getByRole("heading", { name: s.name, level: 2 })).toBeVisible();
  await expect(page.getByRole("button", { name: "Save site" })).toHaveCount(0);
  await expect(page.getByLabel(`Settings of ${DEMO_SITES[0].name}`)).toContainText("Consumer-product exemption");
  await page.screenshot({ path: screenshotPath("accounts"), fullPage: true });

  await page.getByRole("link", { name: "People" }).click();
  await expect(page.getByRole("table", { name: "People" })).toContainText("clerk@quarrybend.example");
  await expect(page.getByRole("button", { name: "Add person" })).toHaveCount(0);

  await page.getByRole("banner").getByRole("link", { name: "Trail", exact: true }).click();
  await expect(page.getByRole("heading", { name: "Trail", level: 1 })).toBeVisible();
  await expect(page.getByRole("table", { name: "Trail entries" }).locator("tbody tr").first()).toBeVisible();
  // The site filter offers every site, and no organisation-level events (those are for administrators).
  const siteFilter = page.getByLabel("Site");
  for (const s of DEMO_SITES) await expect(siteFilter.locator("option", { hasText: s.name })).toHaveCount(1);
  await expect(siteFilter.locator("option", { hasText: "Organisation" })).toHaveCount(0);
});

test("an administrator makes an API key, sees it once, and revoking it stops it at once", async ({ page }) => {
  await signIn(page, "admin");
  await expect(page.getByRole("banner").getByRole("link", { name: "Setup", exact: true })).toBeVisible();
  await page.goto("/setup/keys");
  await page.waitForLoadState("networkidle"); // the forms are client components: wait until they are live
  await page.getByLabel(/^Name/).fill("E2E scale PC");
  await page.getByLabel("Site").selectOption({ label: DEMO_SITES[2].name });
  await page.getByLabel("Role").selectOption("yard");
  await page.getByRole("button", { name: "Make key" }).click();
  const shown = page.getByTestId("new-api-key");
  await expect(shown).toHaveText(/^ldg_/);
  const key = (await shown.innerText()).trim();

  const row = page.getByRole("row").filter({ hasText: "E2E scale PC" });
  await expect(row).toContainText("Active");
  const used = await page.request.get("/api/v1/units", { headers: { authorization: `Bearer ${key}` } });
  expect(used.status()).toBe(200);

  // Seen once: after a reload only the first characters are left.
  await page.reload();
  await expect(page.getByTestId("new-api-key")).toHaveCount(0);
  await expect(page.getByRole("row").filter({ hasText: "E2E scale PC" })).toContainText(key.slice(0, 12));
  expect(await page.content()).not.toContain(key);

  page.once("dialog", (dialog) => void dialog.accept());
  await page.getByRole("button", { name: "Revoke E2E scale PC" }).click();
  await expect(page.getByRole("row").filter({ hasText: "E2E scale PC" })).toContainText("Revoked");
  const after = await page.request.get("/api/v1/units", { headers: { authorization: `Bearer ${key}` } });
  expect(after.status()).toBe(401);

  await page.goto("/trail?action=api-key.revoked");
  await expect(page.getByRole("table", { name: "Trail entries" })).toContainText("E2E scale PC");
});

test("an administrator adds a person with a temporary password, changes their role, and edits a site; the trail shows both", async ({ page, browser }) => {
  await signIn(page, "admin");
  await page.goto("/setup");
  await page.waitForLoadState("networkidle"); // the forms are client components: wait until they are live

  const kiln = page.getByRole("form", { name: `Settings of ${DEMO_SITES[1].name}` });
  await kiln.getByLabel(/^Regulatory IDs/).fill("EPA ID WAD-E2E-0001");
  await kiln.getByRole("button", { name: "Save site" }).click();
  await expect(kiln.getByRole("status")).toHaveText("Saved.");

  await page.goto("/setup/people");
  await page.waitForLoadState("networkidle"); // the forms are client components: wait until they are live
  await expect(page.getByRole("row").filter({ hasText: "admin@quarrybend.example" })).toContainText("You cannot change your own roles.");
  const email = `new.${Date.now()}@quarrybend.example`;
  const form = page.getByRole("form", { name: "Add a person" });
  await form.getByLabel("Email").fill(email);
  await form.getByLabel("Name").fill("Noor Newhire");
  await form.getByRole("button", { name: "Make one up" }).click();
  const password = await form.getByLabel(/^Temporary password/).inputValue();
  expect(password).toMatch(/^[a-z2-9]{4}(-[a-z2-9]{4}){3}$/);
  await form.getByLabel(DEMO_SITES[0].name).selectOption("clerk");
  await form.getByRole("button", { name: "Add person" }).click();
  await expect(form.getByRole("status")).toContainText("Noor Newhire added");

  const row = page.getByRole("row").filter({ hasText: email });
  await row.getByLabel(`Role of Noor Newhire at ${DEMO_SITES[0].name}`).selectOption("yard");
  await row.getByRole("button", { name: "Save roles" }).click();
  await expect(row.getByRole("status")).toHaveText("Roles saved.");

  // The new person signs in with the temporary password and works with the new role.
  const other = await browser.newContext();
  const newcomer = await other.newPage();
  await newcomer.goto("/sign-in");
  await newcomer.waitForLoadState("networkidle");
  await newcomer.getByLabel("Email").fill(email);
  await newcomer.getByLabel("Password").fill(password);
  await newcomer.getByRole("button", { name: "Sign in" }).click();
  await expect(newcomer.getByRole("table").first()).toContainText("yard");
  await other.close();

  await page.goto("/trail");
  const entries = page.getByRole("table", { name: "Trail entries" });
  await expect(entries).toContainText("membership.changed");
  await expect(entries).toContainText("site.updated");
  await expect(entries.getByRole("row").filter({ hasText: "site.updated" }).first()).toContainText("EPA ID WAD-E2E-0001");
});

test("signing out ends the session: protected pages go to sign-in and the old cookie no longer works", async ({ page, context }) => {
  await signIn(page, "admin");
  const session = (await context.cookies()).find((c) => c.name.endsWith("session_token"));
  expect(session?.httpOnly).toBe(true);
  expect(session?.secure).toBe(true);
  await page.getByRole("button", { name: "Sign out" }).click();
  await expect(page).toHaveURL(/\/sign-in$/);
  for (const address of ["/", "/setup", "/trail"]) {
    await page.goto(address);
    await expect(page, address).toHaveURL(/\/sign-in$/);
  }
  const replay = await page.request.get("/api/v1/units", { headers: { cookie: `${session!.name}=${session!.value}` } });
  expect(replay.status()).toBe(401);
});
