import { expect, type Page } from "@playwright/test";
import { DEMO_PEOPLE } from "../lib/demo/scenario";

export type TDemoRole = (typeof DEMO_PEOPLE)[number]["role"];

export async function signIn(page: Page, role: TDemoRole) {
  const person = DEMO_PEOPLE.find((p) => p.role === role)!;
  await page.goto("/sign-in");
  await page.getByLabel("Email").fill(person.email);
  await page.getByLabel("Password").fill(person.password);
  await page.getByRole("button", { name: "Sign in" }).click();
  await expect(page.getByRole("heading", { name: "Your sites" })).toBeVisible();
}

/** Reads a figure such as "Units" from the on-hand totals as a number. */
export async function figure(page: Page, id: string): Promise<number> {
  const text = await page.locator(`[data-figure="${id}"] dd`).first().innerText();
  return Number(text.replace(/[^0-9.]/g, ""));
}

export const screenshotPath = (name: string) => `test-results/screenshots/${name}.png`;
