import { expect, test } from "@playwright/test";
import { figure, screenshotPath, signIn } from "./helpers";

test("a clerk logs three units at the Counter by keyboard alone and sees the totals move", async ({ page }) => {
  await signIn(page, "clerk");
  await page.getByRole("link", { name: /Harbor Street/ }).click();
  await page.getByRole("link", { name: "Counter", exact: true }).click();
  await expect(page.getByRole("heading", { name: "Counter" })).toBeVisible();

  const unitsBefore = await figure(page, "units");
  const batteryBefore = await figure(page, "battery");

  // The kind list has focus on arrival; from here on, only the keyboard.
  await expect(page.getByLabel("Kind")).toBeFocused();
  await page.keyboard.type("AGM");
  await page.keyboard.press("Tab"); // voltage keeps 12
  await page.keyboard.press("Tab");
  await page.keyboard.type("H6");
  await page.keyboard.press("Tab");
  await page.keyboard.type("70");
  await page.keyboard.press("Tab");
  await page.keyboard.type("760");
  await page.keyboard.press("Tab");
  await page.keyboard.type("45");
  await page.keyboard.press("Enter");
  await expect(page.getByRole("status").filter({ hasText: "Saved: AGM, 12 V." })).toBeVisible();
  await expect.poll(() => figure(page, "units")).toBe(unitsBefore + 1);

  // The next unit keeps kind and voltage; focus is back on the group size field for the scanner.
  await expect(page.getByLabel(/Group size/)).toBeFocused();
  await expect(page.getByLabel("Kind")).toHaveValue("agm");
  await expect(page.getByLabel("Nominal voltage (V)")).toHaveValue("12");
  await page.keyboard.type("H7");
  await page.keyboard.press("Enter");
  await expect.poll(() => figure(page, "units")).toBe(unitsBefore + 2);

  await page.keyboard.type("H8");
  await page.keyboard.press("Tab");
  await page.keyboard.type("95");
  await page.keyboard.press("Enter");
  await expect.poll(() => figure(page, "units")).toBe(unitsBefore + 3);
  expect(await figure(page, "battery")).toBeGreaterThan(batteryBefore);

  await expect(page.getByRole("table").last().locator("tbody tr")).toHaveCount(8);
  await page.screenshot({ path: screenshotPath("counter-three-units"), fullPage: true });

  // The site page agrees with what the Counter showed.
  await page.getByRole("link", { name: "Site", exact: true }).click();
  await expect.poll(() => figure(page, "units")).toBe(unitsBefore + 3);
});

test("a leaking unit shows the handling caution and asks for a closed container", async ({ page }) => {
  await signIn(page, "clerk");
  await page.getByRole("link", { name: /Harbor Street/ }).click();
  await page.getByRole("link", { name: "Counter", exact: true }).click();
  await page.getByLabel("Leaking").check();
  const caution = page.getByRole("region", { name: "Handling caution" });
  await expect(caution).toContainText("acid-resistant gloves");
  await expect(caution).toContainText("eye protection");
  await expect(caution).toContainText("neutralising absorbent");
  // Saving without a container is refused with a field message, and nothing is written.
  const unitsBefore = await figure(page, "units");
  await page.getByRole("button", { name: "Save unit" }).click();
  await expect(page.getByText("a leaking or cracked unit must go into a closed container")).toBeVisible();
  expect(await figure(page, "units")).toBe(unitsBefore);
  await page.getByLabel("Which closed container does it go into?").selectOption({ index: 1 });
  await page.getByRole("button", { name: "Save unit" }).click();
  await expect.poll(() => figure(page, "units")).toBe(unitsBefore + 1);
});
