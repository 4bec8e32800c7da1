import { afterAll, beforeAll, describe, expect, it } from "vitest";
import type { BrowserContext, Page } from "playwright-core";
import type { StaticServer } from "../../scripts/static-server.mjs";
import { DEMO_PROJECT_NAME } from "../../renderer/db/demoProject";
import { sampleProject } from "../app/db/sampleProject";
import { freshProfileDir, launchBrowser, removeProfileDir, screenshotPath, serveRendererBuild, watchPageProblems } from "./helpers";

let server: StaticServer;
let profileDir: string;
let context: BrowserContext;
let page: Page;
let problems: string[];

beforeAll(async () => {
  server = await serveRendererBuild();
  profileDir = freshProfileDir();
  context = await launchBrowser(profileDir);
  page = context.pages()[0] ?? (await context.newPage());
  problems = watchPageProblems(page, server.url.replace(/\/$/, ""));
  await page.goto(server.url);
  await page.getByTestId("project-count").filter({ hasText: /project/ }).waitFor();
});

afterAll(async () => {
  await context?.close();
  await server?.close();
  if (profileDir) removeProfileDir(profileDir);
});

async function importText(name: string, text: string): Promise<void> {
  await page.getByTestId("import-file").setInputFiles({ name, mimeType: "application/json", buffer: Buffer.from(text, "utf8") });
  await page.getByTestId("import-outcome").waitFor();
}

describe("side-by-side comparison in browser mode", () => {
  it("rejects an invalid project file with its field paths and adds no project", async () => {
    const before = await page.getByTestId("project-count").textContent();
    const bad = sampleProject("Broken");
    (bad.plants[0]!.model as { B: unknown }).B = [[0]];
    await importText("broken.loopwright.json", JSON.stringify(bad));
    const outcome = page.getByTestId("import-outcome");
    await expect.poll(() => outcome.textContent()).toMatch(/broken\.loopwright\.json was not imported/);
    expect(await outcome.locator("code").allTextContents()).toContain("plants[0].model.B");
    expect(await page.getByTestId("project-count").textContent()).toBe(before);
  });

  it("imports a project, compares its two variants with marked better values, pass/fail, plots and the parameter diff", async () => {
    await importText("spring-table.loopwright.json", JSON.stringify(sampleProject("Spring table comparison")));
    await page.locator(".project-name", { hasText: "Spring table comparison" }).waitFor();
    await page.getByRole("link", { name: "Compare and history of Spring table comparison" }).click();
    await page.getByTestId("compare-table").waitFor();
    await expect.poll(() => page.getByTestId("evaluation-status").textContent()).toBe("Designed from revision 1");

    const overshootRow = page.locator('[data-row="overshootPct"]');
    // The pole-placement variant overshoots less (about 1.5 % vs 11.8 %, engine output checked in
    // test/app/renderer/compare), so its cell carries the mark.
    expect(await overshootRow.locator("td.cell-best").count()).toBe(1);
    expect(await overshootRow.locator("td").nth(1).getAttribute("class")).toContain("cell-best");
    expect(await overshootRow.locator(".verdict").allTextContents()).toEqual(["fail", "pass"]);
    expect(await page.locator("figure svg").count()).toBeGreaterThanOrEqual(3);
    const diffPaths = await page.getByTestId("spec-diff").locator("tbody th").allTextContents();
    expect(diffPaths).toContain("stateFeedback.method");

    await page.screenshot({ path: screenshotPath("compare-view.png"), fullPage: true });
    await page.locator(".compare-plots").screenshot({ path: screenshotPath("compare-plots.png") });
    await page.getByTestId("compare-table").screenshot({ path: screenshotPath("compare-table.png") });
  });

  it("duplicates a variant, edits a requirement, and restores an earlier revision as a new one", async () => {
    await page.getByRole("link", { name: "Variants & requirements" }).click();
    await page.locator('[data-variant-id="poles-fast"]').getByRole("button", { name: "Duplicate" }).click();
    await page.locator('[data-variant-id="poles-fast-copy"]').waitFor();
    await expect.poll(() => page.getByTestId("revision-label").textContent()).toBe("revision 2");

    await page.getByRole("button", { name: "Add requirement" }).click();
    await page.locator(".requirement-form select").selectOption("peakInput");
    await page.locator(".requirement-form input").nth(1).fill("5");
    await page.getByRole("button", { name: "Save requirement" }).click();
    await expect.poll(() => page.getByTestId("revision-label").textContent()).toBe("revision 3");
    await page.screenshot({ path: screenshotPath("compare-variants.png"), fullPage: true });

    await page.getByRole("link", { name: "History" }).click();
    await page.getByTestId("history-table").waitFor();
    expect(await page.getByTestId("history-table").locator("tbody tr").count()).toBe(3);
    await page.locator('[data-revision="1"]').getByRole("button", { name: "Restore" }).click();
    await expect.poll(() => page.getByTestId("revision-label").textContent()).toBe("revision 4");
    expect(await page.getByTestId("history-table").locator("tbody tr").count()).toBe(4);
    await page.locator('[data-revision="3"]').getByRole("button", { name: "Inspect" }).click();
    await page.getByRole("region", { name: "Revision 3 (read-only)" }).waitFor();
    await page.screenshot({ path: screenshotPath("compare-history.png"), fullPage: true });
    expect(problems).toEqual([]);
  });

  it("draws the loop at the plant input of all four demo variants on the comparison's Bode plot", async () => {
    await page.goto(server.url);
    await page.getByTestId("project-count").filter({ hasText: /project/ }).waitFor();
    await page.getByRole("link", { name: `Compare and history of ${DEMO_PROJECT_NAME}` }).click();
    await page.getByTestId("compare-table").waitFor();
    await expect.poll(() => page.getByTestId("evaluation-status").textContent(), { timeout: 60_000 }).toBe("Designed from revision 1");
    // The loops come from a second, display-only evaluation after the table.
    const caption = page.getByTestId("bode-caption");
    await expect.poll(() => caption.textContent(), { timeout: 60_000 }).toMatch(/^4 of 4 compared loops/);
    expect(await caption.textContent()).toMatch(/sampled loop stops below its Nyquist frequency/);
    const bode = page.locator("figure.lw-plot").filter({ has: page.locator(".lw-plot-title", { hasText: "Loop at the plant input" }) });
    expect(await bode.locator(".lw-legend > g").count()).toBe(4);
    expect(await bode.locator(".lw-panel-magnitude .lw-series-line").count()).toBe(4);
    expect(await page.getByTestId("bode-missing").count()).toBe(0);
    await page.screenshot({ path: screenshotPath("compare-demo.png"), fullPage: true });
    await page.locator(".compare-bode").screenshot({ path: screenshotPath("compare-demo-bode.png") });
    expect(problems).toEqual([]);
  });
});
