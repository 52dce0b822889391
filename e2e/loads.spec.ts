import { expect, test } from "@playwright/test";
import { screenshotPath, signIn } from "./helpers";

// The demo yard has YD-PAL-006 sealed and on no load (lib/db/seed.ts, seedLoadsDemo), a receiving facility
// with the default 2 % tolerance, and the organisation's emergency response telephone number.
const PALLET = "YD-PAL-006";

test("a compliance officer plans a load, completes the checklist, opens the manifest, ships it, and a receipt 3 % light is flagged", async ({ page }) => {
  await signIn(page, "compliance");
  await page.getByRole("link", { name: "Quarry Bend Collection Yard" }).click();
  await page.getByRole("link", { name: "Loads", exact: true }).click();
  await expect(page.getByRole("heading", { name: "Loads", level: 1 })).toBeVisible();

  // Plan: the facility is preselected; the basis is the full shipping paper.
  const plan = page.getByRole("form", { name: "Plan a load" });
  await plan.getByLabel(/Transport basis/).selectOption({ label: "Full hazardous materials shipping paper" });
  await plan.getByRole("button", { name: "Plan load" }).click();
  await expect(page.getByRole("heading", { name: /^Load LD-\d{4}-\d{4}$/ })).toBeVisible();
  await expect(page.getByRole("list", { name: "Where the load is" }).locator('[aria-current="step"]')).toHaveText(/Planning/);

  // Put the sealed pallet on it.
  await page.getByRole("form", { name: "Add sealed containers" }).getByLabel(new RegExp(PALLET)).check();
  await page.getByRole("button", { name: "Add to load" }).click();
  await expect(page.locator(`tr[data-container="${PALLET}"]`)).toBeVisible();
  const summary = page.locator("section[data-estimate-kg]");
  await expect(summary).toHaveAttribute("data-unit-count", "15");
  const estimateKg = Number(await summary.getAttribute("data-estimate-kg"));
  expect(estimateKg).toBeGreaterThan(0);
  // The description on the screen is the regulatory text (49 CFR 172.101; REFERENCES.md, Transport).
  await expect(page.getByRole("table", { name: "Hazardous materials description" })).toContainText("UN2794, Batteries, wet, filled with acid, electric storage, 8, PG III");

  // Until every item is ticked the gate lists what is missing and the button is off.
  const gate = page.getByRole("region", { name: "Ready to ship?" });
  await expect(gate).toContainText("Not ready");
  await expect(gate.getByRole("button", { name: "Mark ready" })).toBeDisabled();
  const items = page.getByRole("list", { name: "Checklist" }).getByRole("checkbox");
  const count = await items.count();
  expect(count).toBeGreaterThanOrEqual(5);
  for (let i = 0; i < count; i++) {
    await items.nth(i).check();
    await expect(items.nth(i)).toBeChecked();
  }
  await expect(gate).toContainText("Complete, nothing blocks it");
  await expect(gate.getByRole("note")).toContainText("authority having jurisdiction");
  await gate.getByRole("button", { name: "Mark ready" }).click();
  await expect(page.getByRole("list", { name: "Where the load is" }).locator('[aria-current="step"]')).toHaveText(/Ready/);

  // The manifest is served as a PDF and recorded as an issued paper with its hash.
  const manifestLink = page.getByRole("link", { name: "Open the manifest (PDF)" });
  const manifest = await page.request.get((await manifestLink.getAttribute("href"))!);
  expect(manifest.status()).toBe(200);
  expect(manifest.headers()["content-type"]).toBe("application/pdf");
  expect((await manifest.body()).subarray(0, 5).toString()).toBe("%PDF-");
  const sha = manifest.headers()["x-document-sha256"]!;
  await page.reload();
  await expect(page.getByRole("table", { name: "Papers of this load" })).toContainText(sha);

  // Departure (not weighed on the way out), then the facility's weight, 3 % under the shipped estimate.
  await page.getByRole("form", { name: "Departure" }).getByRole("button", { name: "Mark departed" }).click();
  await expect(page.getByRole("list", { name: "Where the load is" }).locator('[aria-current="step"]')).toHaveText(/Departed/);
  const receipt = page.getByRole("form", { name: "Receipt" });
  await receipt.getByLabel("Received weight (kg)").fill((estimateKg * 0.97).toFixed(1));
  await receipt.getByRole("button", { name: "Record receipt" }).click();

  const reconciliation = page.getByRole("region", { name: "Reconciliation", exact: true });
  await expect(reconciliation).toHaveAttribute("data-flagged", "true");
  await expect(reconciliation.locator('[data-flag="flagged"]').first()).toHaveText(/▲\s*Flagged/);
  await expect(reconciliation.getByRole("table", { name: "Weights compared" })).toContainText("Shipped estimate");
  await expect(page.getByRole("list", { name: "Where the load is" }).locator('[aria-current="step"]')).toHaveText(/Delivered/);
  await page.screenshot({ path: screenshotPath("loads"), fullPage: true });

  // The list of loads carries the same flag.
  await page.getByRole("link", { name: "← All loads" }).click();
  await expect(page.getByRole("table", { name: "Loads" }).locator('[data-flag="flagged"]')).toHaveCount(1);

  // Papers: the issued manifest with its hash, made again from its snapshot and compared; the load in the records.
  await page.getByRole("link", { name: "Papers", exact: true }).click();
  const row = page.getByRole("table", { name: "Issued papers" }).locator("tr", { hasText: sha });
  await expect(row).toContainText("us-federal");
  await row.getByRole("button", { name: "Make again and compare" }).click();
  await expect(row.getByRole("status")).toContainText("Identical");
  await expect(page.getByRole("table", { name: "Shipment records" })).toContainText("Cinderwell Secondary Lead Works (demo)");

  // Setup shows the facility and the emergency number the manifest carried.
  await page.goto("/setup/facilities");
  await expect(page.getByRole("table", { name: "Receiving facilities" })).toContainText("Cinderwell Secondary Lead Works (demo)");
  await expect(page.getByText("+1-555-0142 (demo number)")).toBeVisible();
});
