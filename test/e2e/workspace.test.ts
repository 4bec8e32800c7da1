/**
 * The design workspace in browser mode (Chromium, real IndexedDB, the engine in a Web Worker):
 * open the demo project, paste a matrix, drag a pole and watch the gain change, switch to LQR
 * and raise a weight and watch the step response settle faster. Screenshots go to
 * test-output/e2e/workspace-*.png.
 */
import { describe, expect, it } from "vitest";
import type { Page } from "playwright-core";
import { DEMO_PROJECT_NAME } from "../../renderer/db/demoProject";
import { freshProfileDir, launchBrowser, removeProfileDir, screenshotPath, watchPageProblems, useServedRenderer } from "./helpers";

const env = useServedRenderer();

/** Settling time shown in the summary, in seconds (NaN when absent). */
async function settlingSeconds(page: Page): Promise<number> {
  const text = (await page.getByTestId("metric-settling").textContent()) ?? "";
  return Number.parseFloat(text.replace("−", "-"));
}

async function upToDate(page: Page): Promise<void> {
  await expect.poll(() => page.getByTestId("evaluation-status").textContent(), { timeout: 20_000 }).toMatch(/^Up to date/);
}

async function openDemo(page: Page): Promise<void> {
  await page.goto(env.server.url);
  await page.getByRole("button", { name: `Open ${DEMO_PROJECT_NAME}` }).click();
  await page.getByTestId("workspace").waitFor();
}

describe("design workspace in browser mode", () => {
  it("opens the demo with its design, takes a pasted matrix, moves a dragged pole's gain, and speeds up an LQR design", async () => {
    const context = await launchBrowser(env.profileDir);
    try {
      const page = context.pages()[0] ?? (await context.newPage());
      const problems = watchPageProblems(page, env.server.url.replace(/\/$/, ""));
      await openDemo(page);
      // The demo document is the shipped example: its pole-placement variant is a real design.
      await page.getByLabel("Variant", { exact: true }).selectOption("poles-continuous");
      await upToDate(page);
      await expect.poll(() => page.getByTestId("gain-k").textContent()).toMatch(/^\[/);
      await page.screenshot({ path: screenshotPath("workspace-open.png") });

      // Paste A from a spreadsheet selection (tabs and new lines) into its first cell.
      await page.getByRole("tab", { name: "Plant" }).click();
      // The demo's variants use its nonlinear plant; the hand-linearized one has matrices.
      await page.locator("#plant-select").selectOption("queue-linear");
      const firstCell = page.getByTestId("cell-A-0-0");
      await firstCell.focus();
      await page.evaluate(() => {
        const target = document.activeElement as HTMLElement;
        const data = new DataTransfer();
        data.setData("text/plain", "0\t-40\n0\t-0.05\n");
        target.dispatchEvent(new ClipboardEvent("paste", { clipboardData: data, bubbles: true, cancelable: true }));
      });
      await expect.poll(() => page.getByTestId("cell-A-0-1").inputValue()).toBe("-40");
      await expect.poll(() => page.getByTestId("save-status").textContent(), { timeout: 10_000 }).toMatch(/^Saved \(revision [2-9]/);
      await page.screenshot({ path: screenshotPath("workspace-plant-paste.png") });

      // Drag the first placed pole to the left on the pole-zero map: the gain changes.
      await page.getByRole("tab", { name: "Design" }).click();
      const gainBefore = await page.getByTestId("gain-k").textContent();
      const handle = page.locator('[data-testid="pole-zero-map"] [aria-label*="pole 1 at"]').first();
      const box = (await handle.boundingBox())!;
      await page.mouse.move(box.x + box.width / 2, box.y + box.height / 2);
      await page.mouse.down();
      for (let k = 1; k <= 8; k++) await page.mouse.move(box.x + box.width / 2 - 6 * k, box.y + box.height / 2, { steps: 2 });
      await page.mouse.up();
      await upToDate(page);
      await expect.poll(() => page.getByTestId("gain-k").textContent()).not.toBe(gainBefore);
      await page.screenshot({ path: screenshotPath("workspace-pole-drag.png") });

      // Switch to LQR and raise the backlog weight by two decades: the response settles faster.
      await page.getByRole("radio", { name: "LQR weights" }).check();
      await upToDate(page);
      const field = page.getByTestId("weight-Q-0");
      await field.fill("0.000001");
      await field.press("Enter");
      await upToDate(page);
      await expect.poll(() => settlingSeconds(page)).toBeGreaterThan(0);
      const slow = await settlingSeconds(page);
      await field.fill("0.0001");
      await field.press("Enter");
      await upToDate(page);
      await expect.poll(() => settlingSeconds(page)).toBeLessThan(slow);
      await page.screenshot({ path: screenshotPath("workspace-lqr.png") });

      // A typo is kept, marked, and explained; the design keeps the last valid weight.
      await field.fill("1e-4x");
      await field.press("Enter");
      await expect.poll(() => field.getAttribute("aria-invalid")).toBe("true");
      expect(await field.inputValue()).toBe("1e-4x");

      await page.getByRole("tab", { name: "Structure" }).click();
      await page.getByText("Controllable:").first().waitFor();
      await page.screenshot({ path: screenshotPath("workspace-structure.png") });
      expect(problems).toEqual([]);
    } finally {
      await context.close();
    }
  });

  it("enters a transfer function of two inputs and two outputs in a grid, kept across a reload", async () => {
    // Its own profile: reshaping the demo's plant would leave the shared profile's demo invalid.
    const profile = freshProfileDir();
    const context = await launchBrowser(profile);
    try {
      const page = context.pages()[0] ?? (await context.newPage());
      const problems = watchPageProblems(page, env.server.url.replace(/\/$/, ""));
      await openDemo(page);
      await page.getByRole("tab", { name: "Plant" }).click();
      await page.locator("#plant-select").selectOption("queue-linear");
      await page.getByRole("radio", { name: "Transfer function" }).check();
      await page.getByLabel("Numerator", { exact: true }).waitFor();
      const size = page.locator("form.dimension-row");
      await size.getByLabel("Outputs").fill("2");
      await size.getByLabel("Inputs").fill("2");
      await size.getByRole("button", { name: "Apply sizes" }).click();
      await page.getByTestId("tf-grid").waitFor();
      // The SISO entry moved to (y1, u1), keeping the state-space plant's input and output names; new pairs start as 0 over 1.
      expect(await page.getByLabel("Denominator requested_consumers → backlog").inputValue()).toBe("1 1");
      expect(await page.getByLabel("Numerator u2 → backlog").inputValue()).toBe("0");
      const num = page.getByLabel("Numerator requested_consumers → y2");
      await num.fill("0.5");
      await num.press("Enter");
      const den = page.getByLabel("Denominator requested_consumers → y2");
      await den.fill("1 0 4");
      await den.press("Enter");
      // A bad denominator is kept, marked and explained; the model keeps the last valid one.
      const bad = page.getByLabel("Denominator u2 → y2");
      await bad.fill("0 1");
      await bad.press("Enter");
      await expect.poll(() => bad.getAttribute("aria-invalid")).toBe("true");
      await page.getByRole("alert").filter({ hasText: "leading denominator coefficient" }).first().waitFor();
      await bad.fill("1 2");
      await bad.press("Enter");
      await expect.poll(() => bad.getAttribute("aria-invalid")).toBe(null);
      await expect.poll(() => page.getByTestId("save-status").textContent(), { timeout: 10_000 }).toMatch(/^Saved/);
      await page.getByTestId("tf-grid").scrollIntoViewIfNeeded();
      await page.screenshot({ path: screenshotPath("workspace-tf-grid.png") });

      await page.reload();
      await openDemo(page);
      await page.getByRole("tab", { name: "Plant" }).click();
      await page.locator("#plant-select").selectOption("queue-linear");
      await page.getByTestId("tf-grid").waitFor();
      expect(await page.getByLabel("Denominator requested_consumers → y2").inputValue()).toBe("1 0 4");
      expect(await page.getByLabel("Numerator requested_consumers → y2").inputValue()).toBe("0.5");
      expect(await page.getByLabel("Denominator u2 → y2").inputValue()).toBe("1 2");
      expect(problems).toEqual([]);
    } finally {
      await context.close();
      removeProfileDir(profile);
    }
  });

  it("reads well in the dark theme", async () => {
    const context = await launchBrowser(env.profileDir, { colorScheme: "dark" });
    try {
      const page = context.pages()[0] ?? (await context.newPage());
      await openDemo(page);
      await page.getByLabel("Variant", { exact: true }).selectOption("lqr-kalman");
      await upToDate(page);
      await page.screenshot({ path: screenshotPath("workspace-dark.png") });
    } finally {
      await context.close();
    }
  });
});
