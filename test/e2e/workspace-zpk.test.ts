/**
 * The plant editor's zeros-poles-gain grid in browser mode (Chromium, real IndexedDB, the engine
 * in a Web Worker): switch the demo's hand-linearized plant to a 2 × 2 grid of zeros, poles and
 * gains, type entries, rename an output and give it a unit, reload, and find both again.
 * Screenshots go to test-output/e2e/ and, for review, to /tmp/ws-shots when that folder can be
 * made.
 */
import { copyFileSync, mkdirSync } from "node:fs";
import { describe, expect, it } from "vitest";
import type { Page } from "playwright-core";
import { DEMO_PROJECT_NAME } from "../../renderer/db/demoProject";
import { freshProfileDir, launchBrowser, removeProfileDir, screenshotPath, useServedRenderer, watchPageProblems } from "./helpers";

const env = useServedRenderer();

async function openLinearPlant(page: Page): Promise<void> {
  await page.goto(env.server.url);
  await page.getByRole("button", { name: `Open ${DEMO_PROJECT_NAME}` }).click();
  await page.getByTestId("workspace").waitFor();
  await page.getByRole("tab", { name: "Plant" }).click();
  // The demo's variants use its nonlinear plant; the hand-linearized one is free to reshape.
  await page.locator("#plant-select").selectOption("queue-linear");
}

async function enter(page: Page, label: string, text: string): Promise<void> {
  const field = page.getByLabel(label, { exact: true });
  await field.fill(text);
  await field.press("Enter");
}

async function shot(page: Page, name: string): Promise<void> {
  const file = screenshotPath(name);
  await page.screenshot({ path: file });
  try {
    mkdirSync("/tmp/ws-shots", { recursive: true });
    copyFileSync(file, `/tmp/ws-shots/${name}`);
  } catch {
    // Review copies only; the test output folder keeps the screenshot.
  }
}

describe("zeros-poles-gain grid in browser mode", () => {
  it("enters a 2 × 2 plant, renames an output with a unit, and keeps both across a reload", async () => {
    // Its own profile: reshaping the demo's linear plant must not leak into other tests.
    const profile = freshProfileDir();
    const context = await launchBrowser(profile);
    try {
      const page = context.pages()[0] ?? (await context.newPage());
      const problems = watchPageProblems(page, env.server.url.replace(/\/$/, ""));
      await openLinearPlant(page);
      await page.getByRole("radio", { name: "Zeros, poles and gain" }).check();
      await page.getByLabel("Poles", { exact: true }).waitFor();
      const size = page.locator("form.dimension-row");
      await size.getByLabel("Outputs").fill("2");
      await size.getByLabel("Inputs").fill("2");
      await size.getByRole("button", { name: "Apply sizes" }).click();
      const grid = page.getByTestId("zpk-grid");
      await grid.waitFor();
      // The single entry moved to (y1, u1), keeping the state-space plant's input and output names; new pairs start uncoupled.
      expect(await page.getByLabel("Poles requested_consumers → backlog", { exact: true }).inputValue()).toBe("-1");
      expect(await page.getByLabel("Gain u2 → backlog", { exact: true }).inputValue()).toBe("0");

      // G21 = 1.5(s + 3)/(s² + 2s + 5), G22 = −0.8.
      await enter(page, "Poles requested_consumers → y2", "-1±2i");
      await enter(page, "Zeros requested_consumers → y2", "-3");
      await enter(page, "Gain requested_consumers → y2", "1.5");
      await enter(page, "Gain u2 → y2", "-0.8");
      await expect.poll(() => page.getByLabel("Poles requested_consumers → y2", { exact: true }).inputValue()).toBe("-1+2i, -1-2i");

      // A pole without its conjugate is kept, marked and explained; the model keeps the last valid list.
      const lone = page.getByLabel("Poles u2 → backlog", { exact: true });
      await lone.fill("-2+1i");
      await lone.press("Enter");
      await expect.poll(() => lone.getAttribute("aria-invalid")).toBe("true");
      await page.getByRole("alert").filter({ hasText: "has no conjugate partner -2-1i" }).first().waitFor();
      await lone.fill("-2±1i");
      await lone.press("Enter");
      await expect.poll(() => lone.getAttribute("aria-invalid")).toBe(null);

      // Rename the second output and give it a unit: the grid's row header and labels follow.
      await enter(page, "Name of output 2", "humidity");
      await page.getByLabel("Gain u2 → humidity", { exact: true }).waitFor();
      await enter(page, "Unit of humidity", "%RH");
      await expect.poll(() => grid.locator("tbody th").nth(1).textContent()).toBe("humidity (%RH)");
      // A duplicate name is refused with the reason and the typed text kept.
      const first = page.getByLabel("Name of output 1", { exact: true });
      await first.fill("humidity");
      await first.press("Enter");
      await page.locator(".signal-row .error-text").filter({ hasText: "Another output is already named “humidity”." }).waitFor();
      await expect.poll(() => first.getAttribute("aria-invalid")).toBe("true");
      expect(await first.inputValue()).toBe("humidity");
      await enter(page, "Name of output 1", "temperature");
      await page.getByLabel("Gain requested_consumers → temperature", { exact: true }).waitFor();

      await expect.poll(() => page.getByTestId("save-status").textContent(), { timeout: 10_000 }).toMatch(/^Saved/);
      await grid.scrollIntoViewIfNeeded();
      await shot(page, "workspace-zpk-grid.png");

      await page.reload();
      await openLinearPlant(page);
      await page.getByTestId("zpk-grid").waitFor();
      expect(await page.getByLabel("Poles requested_consumers → humidity", { exact: true }).inputValue()).toBe("-1+2i, -1-2i");
      expect(await page.getByLabel("Zeros requested_consumers → humidity", { exact: true }).inputValue()).toBe("-3");
      expect(await page.getByLabel("Gain requested_consumers → humidity", { exact: true }).inputValue()).toBe("1.5");
      expect(await page.getByLabel("Gain u2 → humidity", { exact: true }).inputValue()).toBe("-0.8");
      expect(await page.getByLabel("Poles u2 → temperature", { exact: true }).inputValue()).toBe("-2+1i, -2-1i");
      expect(await page.getByLabel("Name of output 2", { exact: true }).inputValue()).toBe("humidity");
      expect(await page.getByLabel("Unit of humidity", { exact: true }).inputValue()).toBe("%RH");
      await page.getByTestId("zpk-grid").scrollIntoViewIfNeeded();
      await shot(page, "workspace-zpk-reloaded.png");
      expect(problems).toEqual([]);
    } finally {
      await context.close();
      removeProfileDir(profile);
    }
  });
});
