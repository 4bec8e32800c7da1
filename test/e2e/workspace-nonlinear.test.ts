/**
 * The nonlinear side of the workspace in browser mode (Chromium, real IndexedDB, the engine in a
 * Web Worker): open the demo, edit the nonlinear plant's equations (a syntax error shows its
 * caret and message, the fix clears it), solve the operating point, linearize into a new plant,
 * and run the nonlinear check with its progress bar and the dashed linear overlay, then the
 * parameter sweep of the same sampled controller.
 * Screenshots go to test-output/e2e/workspace-nl-*.png.
 */
import { describe, expect, it } from "vitest";
import { DEMO_PROJECT_NAME } from "../../renderer/db/demoProject";
import { launchBrowser, screenshotPath, watchPageProblems, useServedRenderer } from "./helpers";

const env = useServedRenderer();

describe("nonlinear plant in the workspace", () => {
  it("checks typed equations with a caret, solves the operating point, linearizes, and runs the nonlinear check with progress", async () => {
    const context = await launchBrowser(env.profileDir);
    try {
      const page = context.pages()[0] ?? (await context.newPage());
      const problems = watchPageProblems(page, env.server.url.replace(/\/$/, ""));
      await page.goto(env.server.url);
      await page.getByRole("button", { name: `Open ${DEMO_PROJECT_NAME}` }).click();
      await page.getByTestId("workspace").waitFor();

      await page.getByRole("tab", { name: "Equations" }).click();
      await page.getByTestId("nonlinear-editor").waitFor();
      await expect.poll(() => page.getByTestId("equation-check-status").textContent(), { timeout: 15_000 }).toBe("Equations check out.");

      // A stray operator: the caret sits under it and the message names the column.
      const equation = page.getByTestId("equation-backlog");
      const good = await equation.inputValue();
      const broken = good.replace("arrival_rate - ", "arrival_rate - * ");
      await equation.fill(broken);
      const problem = page.getByTestId("equation-problem").first();
      await problem.waitFor({ timeout: 15_000 });
      const column = broken.indexOf("*") + 1;
      expect(await problem.textContent()).toContain(`Column ${column}`);
      expect(await problem.locator("pre").textContent()).toBe(`${broken}\n${" ".repeat(column - 1)}^`);
      expect(await equation.inputValue()).toBe(broken);
      await problem.scrollIntoViewIfNeeded();
      await page.screenshot({ path: screenshotPath("workspace-nl-syntax-error.png") });

      await equation.fill(good);
      await expect.poll(() => page.getByTestId("equation-check-status").textContent(), { timeout: 15_000 }).toBe("Equations check out.");
      expect(await page.getByTestId("equation-problem").count()).toBe(0);

      // Operating point of the demo: c = u = λ(K+q)/(μq) = 40 at q = 10000 (closed form).
      await page.getByRole("button", { name: "Solve operating point" }).click();
      const report = page.getByTestId("operating-point-result");
      await expect.poll(() => report.textContent(), { timeout: 15_000 }).toMatch(/consumers40/);
      await page.getByTestId("operating-point").scrollIntoViewIfNeeded();
      await page.screenshot({ path: screenshotPath("workspace-nl-operating-point.png") });

      await page.getByRole("button", { name: "Linearize here" }).click();
      await expect.poll(() => page.getByRole("tab", { name: "Plant" }).getAttribute("aria-selected"), { timeout: 15_000 }).toBe("true");
      await expect.poll(() => page.locator("#plant-select").inputValue()).toBe("queue-lin-1");
      await expect.poll(() => page.getByTestId("cell-A-0-1").inputValue()).toBe("-50");
      await page.screenshot({ path: screenshotPath("workspace-nl-linearized.png") });

      // The nonlinear check of the sampled LQR variant: progress, then the overlay.
      await page.getByLabel("Variant", { exact: true }).selectOption("lqr-integral-1s");
      await page.getByRole("tab", { name: "Check" }).click();
      await page.getByRole("button", { name: "Run nonlinear check" }).click();
      await page.getByTestId("nonlinear-overlay").waitFor({ timeout: 30_000 });
      expect(await page.getByTestId("divergence").textContent()).toMatch(/Largest divergence: [\d.e+−-]+ on backlog_out/);
      // The dashed overlay is drawn.
      expect(await page.locator('[data-testid="nonlinear-overlay"] path[stroke-dasharray]').count()).toBeGreaterThan(0);
      await page.screenshot({ path: screenshotPath("workspace-nl-check.png") });

      // The parameter sweep of the same sampled variant: z-plane poles judged by the unit circle.
      await page.getByRole("button", { name: "Run parameter sweep" }).click();
      const summary = page.getByTestId("sweep-summary");
      await summary.waitFor({ timeout: 30_000 });
      expect(await summary.textContent()).toMatch(/Stable at every sample \(25 samples over mu, K, 0 failed\)/);
      expect(await summary.textContent()).toContain("controller sampled at 1 s");
      await summary.scrollIntoViewIfNeeded();
      await page.screenshot({ path: screenshotPath("workspace-nl-sweep-sampled.png") });

      // The shortcuts panel opens with "?".
      await page.locator("body").click({ position: { x: 5, y: 5 } });
      await page.keyboard.press("?");
      await page.getByTestId("shortcuts-help").waitFor();
      await page.screenshot({ path: screenshotPath("workspace-nl-shortcuts.png") });
      await page.keyboard.press("Escape");
      expect(await page.getByTestId("shortcuts-help").count()).toBe(0);
      expect(problems).toEqual([]);
    } finally {
      await context.close();
    }
  });
});
