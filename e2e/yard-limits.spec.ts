import { expect, test, type Page } from "@playwright/test";
import { screenshotPath, signIn } from "./helpers";

// The demo yard carries an invented site rule (DEMO_YARD_RULE in lib/db/seed.ts): a fire permit of 250 batteries,
// "approaching" from 80 % of it, i.e. 200 units on hand. The lot below is counted so that it lands just past that.
const PERMIT = /Fire permit/;
const WARNING_AT_UNITS = 200;
const KG_A_UNIT = 15;

const permitRule = (page: Page) => page.locator("article[data-rule]").filter({ has: page.getByRole("heading", { name: PERMIT }) });

async function unitsOnHand(page: Page): Promise<number> {
  const text = await permitRule(page).getByTestId("rule-value").innerText();
  return Number(text.replace(/[^0-9.]/g, ""));
}

async function chooseTarget(page: Page, label: string) {
  const value = await page.locator("#scan-target option", { hasText: label }).getAttribute("value");
  await page.getByLabel("Into container").selectOption(value!);
}

test("a yard manager receives a lot from a ticket, stows it, and sees the site rule go to approaching on Limits", async ({ page }) => {
  await signIn(page, "yard");
  await page.getByRole("link", { name: "Quarry Bend Collection Yard" }).click();
  await page.getByRole("link", { name: "Limits", exact: true }).click();
  await expect(page.getByRole("heading", { name: "Limits", level: 1 })).toBeVisible();
  await expect(page.getByRole("note").first()).toContainText("authority having jurisdiction");
  await expect(permitRule(page)).toHaveAttribute("data-status", "ok");
  await expect(permitRule(page).getByText("OK", { exact: true })).toBeVisible();
  const before = await unitsOnHand(page);
  expect(before).toBeLessThan(WARNING_AT_UNITS);
  const count = WARNING_AT_UNITS + 5 - before;

  // Receive the lot from a scale ticket; the net weight is shown as the weights are typed.
  await page.getByRole("link", { name: "Yard", exact: true }).click();
  await expect(page.getByRole("heading", { name: "Yard", level: 1 })).toBeVisible();
  const ticket = `E2E-${Date.now()}`;
  const lot = page.getByRole("form", { name: "Receive a lot" });
  await lot.getByLabel("Ticket number").fill(ticket);
  await lot.getByLabel("Gross (kg)").fill(String(1_000 + count * KG_A_UNIT));
  await lot.getByLabel("Tare (kg)").fill("1000");
  await lot.getByLabel("Units in the lot").fill(String(count));
  await expect(lot.getByTestId("lot-net")).toContainText(`${(count * KG_A_UNIT).toLocaleString("en-US")}.0 kg`);
  await expect(lot.getByTestId("lot-net")).toContainText("15.0 kg a unit");
  await lot.getByRole("button", { name: "Receive lot" }).click();
  await expect(lot.getByRole("status")).toContainText(`Received lot ${ticket}: ${count} units`);
  // No sender was typed: the Yard's list of lots says so with a dash.
  await expect(page.getByRole("table", { name: "Lots received" }).locator(`tr[data-lot="${ticket}"] td`).nth(1)).toHaveText("—");

  // Stow it by scanning its ticket into one pallet, and a loose unit into another: keyboard only.
  await chooseTarget(page, "YD-PAL-002");
  const scan = page.getByRole("textbox", { name: /^Scan/ });
  await scan.fill(ticket);
  await scan.press("Enter");
  await expect(page.getByRole("status").filter({ hasText: `Stowed lot ${ticket} into YD-PAL-002.` })).toBeVisible();
  await expect(scan).toBeFocused();
  const unitId = await page.locator("code[data-unit-id]").first().getAttribute("data-unit-id");
  await chooseTarget(page, "YD-PAL-003");
  await scan.fill(unitId!);
  await scan.press("Enter");
  await expect(page.getByRole("status").filter({ hasText: `Stowed unit ${unitId!.slice(0, 8)} into YD-PAL-003.` })).toBeVisible();
  await expect(page.locator('tr[data-container="YD-PAL-002"]')).toContainText(String(40 + count));
  await page.screenshot({ path: screenshotPath("yard"), fullPage: true });

  // The permit rule is now approaching, with its word and shape, its source and the caution.
  await page.getByRole("link", { name: "Limits", exact: true }).click();
  await expect(permitRule(page)).toHaveAttribute("data-status", "approaching");
  await expect(permitRule(page).getByText("Approaching", { exact: true })).toBeVisible();
  expect(await unitsOnHand(page)).toBe(before + count);
  await expect(permitRule(page)).toContainText("FP-2026-014");
  await expect(permitRule(page).locator(".caution")).toContainText("authority having jurisdiction");
  await expect(page.getByRole("figure", { name: /Battery mass on hand/ }).locator("svg.recharts-surface")).toBeVisible();
  await page.screenshot({ path: screenshotPath("yard-limits"), fullPage: true });

  // The number drills down to the units behind it.
  await permitRule(page).getByTestId("rule-value").getByRole("link").click();
  await expect(page.getByRole("heading", { name: "Units on hand", level: 1 })).toBeVisible();
  await expect(page.getByRole("table", { name: "Lots" })).toContainText(ticket);

  // The organisation roll-up shows the same site.
  await page.goto("/limits");
  await expect(page.getByRole("table", { name: "Limits by site" })).toContainText("Quarry Bend Collection Yard");
});
