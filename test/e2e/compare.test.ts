import { describe, expect, it } from "vitest";
import { DEMO_PROJECT_NAME } from "../../renderer/db/demoProject";
import { sampleProject } from "../app/db/sampleProject";
import { screenshotPath, useOpenedApp } from "./helpers";

const app = useOpenedApp();

async function importText(name: string, text: string): Promise<void> {
  await app.page.getByTestId("import-file").setInputFiles({ name, mimeType: "application/json", buffer: Buffer.from(text, "utf8") });
  await app.page.getByTestId("import-outcome").waitFor();
}

describe("side-by-side comparison in browser mode", () => {
  it("rejects an invalid project file with its field paths and adds no project", async () => {
    const before = await app.page.getByTestId("project-count").textContent();
    const bad = sampleProject("Broken");
    (bad.plants[0]!.model as { B: unknown }).B = [[0]];
    await importText("broken.loopwright.json", JSON.stringify(bad));
    const outcome = app.page.getByTestId("import-outcome");
    await expect.poll(() => outcome.textContent()).toMatch(/broken\.loopwright\.json was not imported/);
    expect(await outcome.locator("code").allTextContents()).toContain("plants[0].model.B");
    expect(await app.page.getByTestId("project-count").textContent()).toBe(before);
  });

  it("imports a project, compares its two variants with marked better values, pass/fail, plots and the parameter diff", async () => {
    await importText("spring-table.loopwright.json", JSON.stringify(sampleProject("Spring table comparison")));
    await app.page.locator(".project-name", { hasText: "Spring table comparison" }).waitFor();
    await app.page.getByRole("link", { name: "Compare and history of Spring table comparison" }).click();
    await app.page.getByTestId("compare-table").waitFor();
    await expect.poll(() => app.page.getByTestId("evaluation-status").textContent()).toBe("Designed from revision 1");

    const overshootRow = app.page.locator('[data-row="overshootPct"]');
    // The pole-placement variant overshoots less (about 1.5 % vs 11.8 %, engine output checked in
    // test/app/renderer/compare), so its cell carries the mark.
    expect(await overshootRow.locator("td.cell-best").count()).toBe(1);
    expect(await overshootRow.locator("td").nth(1).getAttribute("class")).toContain("cell-best");
    expect(await overshootRow.locator(".verdict").allTextContents()).toEqual(["fail", "pass"]);
    expect(await app.page.locator("figure svg").count()).toBeGreaterThanOrEqual(3);
    const diffPaths = await app.page.getByTestId("spec-diff").locator("tbody th").allTextContents();
    expect(diffPaths).toContain("stateFeedback.method");

    await app.page.screenshot({ path: screenshotPath("compare-view.png"), fullPage: true });
    await app.page.locator(".compare-plots").screenshot({ path: screenshotPath("compare-plots.png") });
    await app.page.getByTestId("compare-table").screenshot({ path: screenshotPath("compare-table.png") });
  });

  it("duplicates a variant, edits a requirement, and restores an earlier revision as a new one", async () => {
    await app.page.getByRole("link", { name: "Variants & requirements" }).click();
    await app.page.locator('[data-variant-id="poles-fast"]').getByRole("button", { name: "Duplicate" }).click();
    await app.page.locator('[data-variant-id="poles-fast-copy"]').waitFor();
    await expect.poll(() => app.page.getByTestId("revision-label").textContent()).toBe("revision 2");

    await app.page.getByRole("button", { name: "Add requirement" }).click();
    await app.page.locator(".requirement-form select").selectOption("peakInput");
    await app.page.locator(".requirement-form input").nth(1).fill("5");
    await app.page.getByRole("button", { name: "Save requirement" }).click();
    await expect.poll(() => app.page.getByTestId("revision-label").textContent()).toBe("revision 3");
    await app.page.screenshot({ path: screenshotPath("compare-variants.png"), fullPage: true });

    await app.page.getByRole("link", { name: "History" }).click();
    await app.page.getByTestId("history-table").waitFor();
    expect(await app.page.getByTestId("history-table").locator("tbody tr").count()).toBe(3);
    await app.page.locator('[data-revision="1"]').getByRole("button", { name: "Restore" }).click();
    await expect.poll(() => app.page.getByTestId("revision-label").textContent()).toBe("revision 4");
    expect(await app.page.getByTestId("history-table").locator("tbody tr").count()).toBe(4);
    await app.page.locator('[data-revision="3"]').getByRole("button", { name: "Inspect" }).click();
    await app.page.getByRole("region", { name: "Revision 3 (read-only)" }).waitFor();
    await app.page.screenshot({ path: screenshotPath("compare-history.png"), fullPage: true });
    expect(app.problems).toEqual([]);
  });

  it("draws the loop at the plant input of all four demo variants on the comparison's Bode plot", async () => {
    await app.page.goto(app.server.url);
    await app.page.getByTestId("project-count").filter({ hasText: /project/ }).waitFor();
    await app.page.getByRole("link", { name: `Compare and history of ${DEMO_PROJECT_NAME}` }).click();
    await app.page.getByTestId("compare-table").waitFor();
    await expect.poll(() => app.page.getByTestId("evaluation-status").textContent(), { timeout: 60_000 }).toBe("Designed from revision 1");
    // The loops come from a second, display-only evaluation after the table.
    const caption = app.page.getByTestId("bode-caption");
    await expect.poll(() => caption.textContent(), { timeout: 60_000 }).toMatch(/^4 of 4 compared loops/);
    expect(await caption.textContent()).toMatch(/sampled loop stops below its Nyquist frequency/);
    const bode = app.page.locator("figure.lw-plot").filter({ has: app.page.locator(".lw-plot-title", { hasText: "Loop at the plant input" }) });
    expect(await bode.locator(".lw-legend > g").count()).toBe(4);
    expect(await bode.locator(".lw-panel-magnitude .lw-series-line").count()).toBe(4);
    expect(await app.page.getByTestId("bode-missing").count()).toBe(0);
    await app.page.screenshot({ path: screenshotPath("compare-demo.png"), fullPage: true });
    await app.page.locator(".compare-bode").screenshot({ path: screenshotPath("compare-demo-bode.png") });
    expect(app.problems).toEqual([]);
  });

  it("draws the demo's poles on one map per time domain, keeps its four loops' margin labels apart, and redesigns a revision saved in another window", async () => {
    await app.page.goto(app.server.url);
    await app.page.getByTestId("project-count").filter({ hasText: /project/ }).waitFor();
    await app.page.getByRole("link", { name: `Compare and history of ${DEMO_PROJECT_NAME}` }).click();
    await expect.poll(() => app.page.getByTestId("evaluation-status").textContent(), { timeout: 60_000 }).toBe("Designed from revision 1");
    await expect.poll(() => app.page.getByTestId("bode-caption").textContent(), { timeout: 60_000 }).toMatch(/^4 of 4 compared loops/);

    // Three continuous variants on the s-plane map, the one sampled at T = 1 s on a z-plane map.
    const sMap = app.page.getByTestId("pole-map-s");
    const zMap = app.page.getByTestId("pole-map-z");
    expect(await sMap.locator(".lw-plot-title").textContent()).toMatch(/s-plane \(continuous\)$/);
    expect(await sMap.locator(".lw-legend > g").count()).toBe(3);
    expect(await sMap.locator(".lw-guide-unit").count()).toBe(0);
    expect(await zMap.count()).toBe(1);
    expect(await zMap.locator(".lw-plot-title").textContent()).toMatch(/z-plane \(sampled, T = 1 s\)$/);
    expect(await zMap.locator(".lw-legend > g").count()).toBe(1);
    expect(await zMap.locator(".lw-guide-unit").count()).toBe(1);
    // The sampled poles crowd near z = 1: a zoom map beside it, its window outlined on the full map.
    expect(await zMap.getByTestId("zoom-outline").count()).toBe(1);
    expect(await app.page.getByTestId("pole-zoom-z").locator(".lw-plot-title").textContent()).toMatch(/^Zoom ×\d+, z-plane \(sampled, T = 1 s\): 3 of 3 poles$/);
    expect(await app.page.getByTestId("step-caption").textContent()).toMatch(/^Sampled: LQR with integral action, sampled at 1 s/);

    // Margin labels as the browser laid out their text: inside their panel, no two intersecting.
    const geometry = await app.page.locator(".compare-bode svg.lw-plot-svg").evaluate((svg) => {
      const box = (e: Element) => { const b = (e as SVGGraphicsElement).getBBox(); return { x: b.x, y: b.y, width: b.width, height: b.height }; };
      return ["magnitude", "phase"].map((key) => ({
        panel: box(svg.querySelector(`.lw-panel-${key} clipPath rect`)!),
        labels: [...svg.querySelectorAll(`.lw-panel-${key} .lw-margin-label`)].map(box),
        marks: svg.querySelectorAll(`.lw-panel-${key} .lw-margin`).length,
      }));
    });
    expect(geometry.reduce((n, g) => n + g.labels.length, 0)).toBeGreaterThanOrEqual(4);
    for (const { panel, labels, marks } of geometry) {
      expect(labels.length, "every margin mark keeps its label").toBe(marks);
      for (const [i, a] of labels.entries()) {
        expect(a.x >= panel.x - 0.5 && a.x + a.width <= panel.x + panel.width + 0.5 && a.y >= panel.y - 0.5 && a.y + a.height <= panel.y + panel.height + 0.5, `label ${i} inside its panel`).toBe(true);
        for (const b of labels.slice(i + 1)) {
          expect(a.x < b.x + b.width && b.x < a.x + a.width && a.y < b.y + b.height && b.y < a.y + a.height, "two margin labels intersect").toBe(false);
        }
      }
    }
    await app.page.locator(".compare-plots").screenshot({ path: screenshotPath("compare-demo-domains.png") });

    // Another window saves revision 2: this one shows it and redesigns it without being asked.
    const other = await app.context.newPage();
    await other.goto(app.page.url().replace(/\/compare$/, "/variants"));
    await other.locator('[data-variant-id="poles-continuous"]').getByRole("button", { name: "Make baseline" }).click();
    await expect.poll(() => other.getByTestId("revision-label").textContent()).toBe("revision 2");
    await other.close();
    await expect.poll(() => app.page.getByTestId("revision-label").textContent()).toBe("revision 2");
    expect(await app.page.getByTestId("tools-notice").textContent()).toMatch(/Revision 2 was saved in another window/);
    await expect.poll(() => app.page.getByTestId("evaluation-status").textContent(), { timeout: 60_000 }).toBe("Designed from revision 2");
    await expect.poll(() => app.page.getByTestId("bode-caption").textContent(), { timeout: 60_000 }).toMatch(/^4 of 4 compared loops/);
    expect(await app.page.getByTestId("redesign").count()).toBe(0);
    await app.page.screenshot({ path: screenshotPath("compare-demo-refreshed.png"), fullPage: true });
    expect(app.problems).toEqual([]);
  });
});
