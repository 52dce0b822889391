import { expect, test } from "@playwright/test";
import { screenshotPath, signIn } from "./helpers";

// Who sent a unit or a lot goes on the shipment records: 40 CFR 273.39 (REFERENCES.md, Storage) asks, for each
// shipment received, the origin's name and address. The names below are invented. Everything here happens at the
// two stores, so the yard's on-hand count (e2e/yard-limits.spec.ts) is left as the demo set it.

test("a sender typed at the Counter and on a lot shows on the shipment records; a counter return without one reads as from the public", async ({ page }) => {
  const tag = Date.now().toString(36);
  await signIn(page, "admin");

  // Counter: a fleet unit with its sender, saved with Enter from the address field.
  await page.getByRole("link", { name: /Harbor Street/ }).click();
  await page.getByRole("link", { name: "Counter", exact: true }).click();
  const counter = page.getByRole("form", { name: "Log a unit" });
  await counter.getByLabel("Fleet").check();
  await counter.getByLabel("Sent by").fill(`E2E fleet ${tag}`);
  await counter.getByLabel(/Sender.s address/).fill("5 Test Yard Road, Quarry Bend");
  await counter.getByLabel(/Sender.s address/).press("Enter");
  await expect(page.getByRole("status").filter({ hasText: /^Saved:/ })).toBeVisible();
  // The sender stays for the next unit of the same delivery, like the source.
  await expect(counter.getByLabel("Sent by")).toHaveValue(`E2E fleet ${tag}`);

  await page.getByRole("link", { name: "Papers", exact: true }).click();
  const records = page.getByRole("table", { name: "Shipment records" });
  const fleetRow = records.locator("tr", { hasText: `E2E fleet ${tag}` });
  await expect(fleetRow).toHaveCount(1);
  await expect(fleetRow).toContainText("5 Test Yard Road, Quarry Bend");
  await expect(records).toContainText("members of the public: no sender, the project's reading");
  await expect(page.getByTestId("records-note").first()).toContainText("not a ruling");
  await expect(page.getByRole("note").filter({ hasText: "authority having jurisdiction" }).first()).toBeVisible();

  // A lot from a scale ticket at the other store, with the sender as the ticket names it.
  await page.goto("/");
  await page.getByRole("link", { name: /Kiln Road/ }).click();
  await page.getByRole("link", { name: "Yard", exact: true }).click();
  const lot = page.getByRole("form", { name: "Receive a lot" });
  const ticket = `E2E-S-${tag}`;
  await lot.getByLabel("Ticket number").fill(ticket);
  await lot.getByLabel("Sent by").fill(`E2E garage ${tag}`);
  await lot.getByLabel(/Sender.s address/).fill("8 Test Street, Quarry Bend");
  await lot.getByLabel(/^Gross/).fill("1300");
  await lot.getByLabel(/^Tare/).fill("1000");
  await lot.getByLabel("Units in the lot").fill("10");
  await lot.getByLabel(/^Note/).fill(`E2E note ${tag}: two cases cracked`);
  await lot.getByRole("button", { name: "Receive lot" }).click();
  await expect(lot.getByRole("status")).toContainText(`Received lot ${ticket}: 10 units`);
  // The Yard's list of lots shows who sent it and the note.
  const received = page.getByRole("table", { name: "Lots received" }).locator(`tr[data-lot="${ticket}"]`);
  await expect(received).toContainText(`E2E garage ${tag}`);
  await expect(received).toContainText("8 Test Street, Quarry Bend");
  await expect(received).toContainText(`E2E note ${tag}: two cases cracked`);

  await page.getByRole("link", { name: "Papers", exact: true }).click();
  const lotRow = page.getByRole("table", { name: "Shipment records" }).locator("tr", { hasText: `scale ticket ${ticket}` });
  await expect(lotRow).toContainText(`E2E garage ${tag}`);
  await expect(lotRow).toContainText("8 Test Street, Quarry Bend");
  await page.screenshot({ path: screenshotPath("records-with-senders"), fullPage: true });
});
