import { expect, test, type Page } from "@playwright/test";
import { screenshotPath, signIn } from "./helpers";

/** A money figure of the Deposits screen ("$1,234.50") in cents. */
async function cents(page: Page, id: string): Promise<number> {
  const text = await page.locator(`[data-figure="${id}"] dd`).first().innerText();
  const [whole, fraction = "0"] = text.replace(/[^0-9.-]/g, "").split(".");
  return Number(whole) * 100 + Number(fraction.padEnd(2, "0"));
}

const dollars = (c: number) => `$${Math.floor(c / 100).toLocaleString("en-US")}.${String(c % 100).padStart(2, "0")}`;

test("a clerk sells with a core charge, takes the battery back inside the window at the Counter and sees the refund and the new balance", async ({ page }) => {
  await signIn(page, "clerk");
  await page.getByRole("link", { name: /Harbor Street/ }).click();
  await page.getByRole("link", { name: "Deposits", exact: true }).click();
  await expect(page.getByRole("heading", { name: "Deposits", level: 1 })).toBeVisible();
  // The demo store follows the Washington rule, with its citation and the caution.
  const rule = page.getByRole("region", { name: "Deposit rule" });
  await expect(rule).toContainText("RCW 70A.205.515");
  await expect(rule).toContainText(/confirm with the authority having jurisdiction/i);
  await expect(page.getByTestId("posted-notice")).toContainText("8.5 × 11 in");
  const before = await cents(page, "balance");

  // Sell one battery without a used one in exchange: a $15.00 core charge.
  const saleRef = `E2E-${Date.now()}`;
  const sale = page.getByRole("form", { name: "Record a sale" });
  await sale.getByLabel("Sale reference").fill(saleRef);
  await sale.getByLabel("Product").fill("Starter 12 V 60 Ah");
  await sale.getByLabel(/Group size/).fill("24F");
  await sale.getByLabel("Batteries sold").fill("1");
  await sale.getByLabel(/Core charge a battery/).fill("15.00");
  await sale.getByRole("button", { name: "Record sale" }).click();
  await expect(page.getByRole("status").filter({ hasText: `Sale ${saleRef} recorded: $15.00 deposit taken.` })).toBeVisible();
  await expect.poll(() => cents(page, "balance")).toBe(before + 1_500);

  // The used battery comes back the same day: the clerk scans the receipt at the Counter.
  await page.getByRole("link", { name: "Counter", exact: true }).click();
  await expect(page.getByRole("heading", { name: "Counter" })).toBeVisible();
  const saleField = page.getByLabel(/Sale reference/);
  await saleField.fill(saleRef);
  await saleField.press("Enter"); // the first Enter looks the sale up
  const check = page.getByRole("region", { name: "Deposit check" });
  await expect(check).toContainText("Inside the window");
  await expect(check.getByTestId("refund-due")).toHaveText("Refund due: $15.00");
  await expect(check).toContainText("day 0 of 30");
  await expect(check).toContainText("RCW 70A.205.515");
  await expect(check).toContainText(/confirm with the authority having jurisdiction/i);
  await expect(check.getByLabel("Pay the refund")).toBeChecked();
  await saleField.press("Enter"); // the second saves the unit and books the refund

  const result = page.getByTestId("deposit-result");
  await expect(result).toContainText(`Refund $15.00 paid on sale ${saleRef}.`);
  await expect(result).toContainText(`Deposits held now: ${dollars(before)}.`);
  await expect(page.getByRole("status").filter({ hasText: "Saved: Flooded" })).toBeVisible();
  await page.screenshot({ path: screenshotPath("deposits"), fullPage: true });

  // The same sale cannot be refunded twice.
  await saleField.fill(saleRef);
  await saleField.press("Enter");
  await expect(check).toContainText("have already been returned");
  await expect(check.getByTestId("refund-due")).toHaveText("No refund due");

  // The Deposits screen shows the balance back where it was and the refund in the ledger.
  await page.getByRole("link", { name: "Deposits", exact: true }).click();
  await expect.poll(() => cents(page, "balance")).toBe(before);
  const latest = page.getByRole("table", { name: "Latest deposit entries" });
  await expect(latest.locator("tr", { hasText: saleRef })).toHaveCount(2);
  await expect(latest.locator("tr", { hasText: saleRef }).first()).toContainText("Refund paid");
  await expect(page.getByRole("img", { name: /Batteries sold and returned by month/ })).toBeVisible();
  await page.screenshot({ path: screenshotPath("deposits-screen"), fullPage: true });
});

test("a clerk checks and imports a sales file from the till, with progress, and a bad file imports nothing", async ({ page }) => {
  await signIn(page, "clerk");
  await page.getByRole("link", { name: /Harbor Street/ }).click();
  await page.getByRole("link", { name: "Deposits", exact: true }).click();
  const before = await cents(page, "balance");
  const tag = Date.now();
  const lines = Array.from({ length: 300 }, (_, i) => `2026-01-${String(1 + (i % 28)).padStart(2, "0")},POS-${tag}-${i},Starter 12 V,24F,1,15.00`);
  const good = Buffer.from(["date,sale_id,product,group_size,quantity,deposit", ...lines].join("\n") + "\n");
  const panel = page.getByRole("region", { name: "Import sales from the till" });

  await panel.getByLabel("Sales file").setInputFiles({ name: "till.csv", mimeType: "text/csv", buffer: good });
  await panel.getByRole("button", { name: "Check the file" }).click();
  await expect(panel.getByRole("status")).toContainText("The file is clean: 300 sales lines, 300 new, 0 already here.");
  await expect(panel.getByTestId("import-progress")).toContainText("Uploaded 100 %");
  await panel.getByRole("button", { name: "Import till.csv" }).click();
  await expect(panel.getByRole("status")).toContainText("Imported 300 sales (0 already here, skipped): $4,500.00 in deposits.");
  await expect.poll(() => cents(page, "balance")).toBe(before + 300 * 1_500);

  const bad = Buffer.from(`date,sale_id,product,group_size,quantity,deposit\n2026-01-02,BAD-${tag}-1,Starter,24F,1,15.00\n02/01/2026,BAD-${tag}-2,Starter,24F,0,15.00\n`);
  await panel.getByLabel("Sales file").setInputFiles({ name: "bad.csv", mimeType: "text/csv", buffer: bad });
  await panel.getByRole("button", { name: "Import", exact: true }).click();
  await expect(panel.getByRole("alert")).toContainText("nothing was imported");
  const problems = panel.getByRole("table", { name: "Problems in the file" });
  await expect(problems).toContainText("date must be YYYY-MM-DD");
  await expect(problems).toContainText("quantity must be a whole number from 1 to 100");
  await expect(problems.locator("tbody tr").first()).toContainText("3");
  expect(await cents(page, "balance")).toBe(before + 300 * 1_500);
});
