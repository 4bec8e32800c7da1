/**
 * Structure and responses in browser mode (Chromium, the engine in a Web Worker): open the demo,
 * read the modes and the coupling table on the Structure tab, paste a CSV input sequence on the
 * Responses tab and see the simulated response, release the loop from typed state offsets.
 * Screenshots: test-output/e2e/workspace-responses-*.png.
 */
import { describe, expect, it } from "vitest";
import { DEMO_PROJECT_NAME } from "../../renderer/db/demoProject";
import { launchBrowser, screenshotPath, watchPageProblems, useServedRenderer } from "./helpers";

const env = useServedRenderer();

describe("structure and responses in browser mode", () => {
  it("shows the modes and coupling table, then simulates a pasted CSV sequence and an initial offset", async () => {
    const context = await launchBrowser(env.profileDir);
    try {
      const page = context.pages()[0] ?? (await context.newPage());
      const problems = watchPageProblems(page, env.server.url.replace(/\/$/, ""));
      await page.goto(env.server.url);
      await page.getByRole("button", { name: `Open ${DEMO_PROJECT_NAME}` }).click();
      await page.getByTestId("workspace").waitFor();
      await expect.poll(() => page.getByTestId("evaluation-status").textContent(), { timeout: 30_000 }).toMatch(/^Up to date/);

      await page.getByRole("tab", { name: "Structure" }).click();
      await page.getByTestId("coupling-table").waitFor({ timeout: 20_000 });
      // The demo queue linearizes to two real modes (backlog and consumers).
      await expect.poll(() => page.getByTestId("mode-table").locator("tbody tr").count()).toBe(2);
      expect(await page.getByTestId("coupling-table").locator("thead th").allTextContents()).toEqual(["Mode", "backlog", "consumers", "Dominant"]);
      expect(await page.getByTestId("coupling-sentence").textContent()).toMatch(/drive one another|no state drives another/);
      expect(await page.getByTestId("hankel-values").textContent()).toMatch(/^Hankel singular values: /);
      await page.getByTestId("structure-details").scrollIntoViewIfNeeded();
      await page.screenshot({ path: screenshotPath("workspace-responses-structure.png") });

      await page.getByRole("tab", { name: "Responses" }).click();
      await page.getByRole("radio", { name: "Input sequence" }).check();
      const csv = ["time;r", ...Array.from({ length: 61 }, (_, k) => `${k};${k >= 5 && k < 30 ? 2 : 0}`)].join("\n");
      // A bad cell first: the message names its row and column.
      await page.getByTestId("sequence-text").fill("time,r\n0,0\n1,x\n");
      await expect.poll(() => page.getByTestId("sequence-status").textContent()).toBe("✗ Row 3, column 2 (r): “x” is not a number.");
      await page.getByTestId("sequence-text").fill(csv);
      await expect.poll(() => page.getByTestId("sequence-status").textContent()).toMatch(/^61 samples from 0 s to 60 s/);
      await page.getByTestId("sequence-simulate").click();
      await page.getByTestId("response-plot").waitFor({ timeout: 20_000 });
      expect(await page.getByTestId("response-plot").textContent()).toMatch(/Input sequence \(closed loop, 61 samples\)/);
      expect(await page.getByTestId("response-plot").locator("svg path").count()).toBeGreaterThan(2);
      await page.getByTestId("responses-panel").screenshot({ path: screenshotPath("workspace-responses-sequence.png") });

      await page.getByRole("radio", { name: "Initial offsets" }).check();
      await page.getByLabel("Initial offset of backlog").fill("100");
      await page.getByTestId("initial-simulate").click();
      await expect.poll(() => page.getByTestId("response-plot").textContent(), { timeout: 20_000 }).toMatch(/Initial-condition response \(closed loop\)/);
      await page.getByTestId("responses-panel").screenshot({ path: screenshotPath("workspace-responses-initial.png") });
      await page.screenshot({ path: screenshotPath("workspace-responses-window.png") });
      expect(problems).toEqual([]);
    } finally {
      await context.close();
    }
  });
});
