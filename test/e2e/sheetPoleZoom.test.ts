// The design sheet's zoom panel for a slow sampled loop, in browser mode (Chromium, real
// IndexedDB, the engine in a Web Worker), with a profile of its own: import the queue example
// with a variant sampled at 0.1 s that sweeps μ and K, open its sheet in print-only mode, print
// it to PDF with page.pdf, and read it back with poppler. The pages (PNG, 110 dpi) and the two
// zoom figures land in /tmp/inset-shots for review.
import { execFileSync } from "node:child_process";
import { mkdirSync, readFileSync, readdirSync, rmSync, writeFileSync } from "node:fs";
import path from "node:path";
import { describe, expect, it } from "vitest";
import { SHEET_FAILED_TITLE_PREFIX, SHEET_READY_TITLE_PREFIX } from "../../renderer/sheet/sheetPrinting";
import { REPO_ROOT, launchBrowser, useServedRenderer, watchPageProblems } from "./helpers";

const SHOTS = "/tmp/inset-shots";
const T = 0.1;

/** The queue example plus "sampled-robust": lqr-integral-1s sampled at T with lqr-integral-robust's sweep (μ, K ±20 %, 5 × 5 grid). */
function projectText(): string {
  const project = JSON.parse(readFileSync(path.join(REPO_ROOT, "assets", "examples", "queue-backlog.loopwright.json"), "utf8")) as { name: string; variants: Record<string, unknown>[] };
  const base = project.variants.find((v) => v.id === "lqr-integral-1s")!;
  const robust = project.variants.find((v) => v.id === "lqr-integral-robust")!;
  const variant: Record<string, unknown> = { ...structuredClone(base), id: "sampled-robust", name: `LQR with integral action sampled at ${T} s, μ and K swept ±20 %`, baseline: false, discretize: { sampleTime: T, method: "zoh" }, robustness: robust.robustness };
  delete variant.nonlinearCheck;
  project.variants.push(variant);
  project.name = "Queue backlog, slow sampled sweep";
  return JSON.stringify(project);
}

const env = useServedRenderer();

describe("design sheet zoom panel of a slow sampled loop, printed", () => {
  it("shows a zoom on the pole cloud and on the closed-loop poles, legible on the printed pages", async () => {
    rmSync(SHOTS, { recursive: true, force: true });
    mkdirSync(SHOTS, { recursive: true });
    const context = await launchBrowser(env.profileDir);
    try {
      const page = context.pages()[0] ?? (await context.newPage());
      const origin = env.server.url.replace(/\/$/, "");
      const problems = watchPageProblems(page, origin);
      await page.goto(env.server.url);
      await page.getByTestId("project-count").filter({ hasText: /project/ }).waitFor();
      await page.getByTestId("import-file").setInputFiles({ name: "slow-sampled.loopwright.json", mimeType: "application/json", buffer: Buffer.from(projectText(), "utf8") });
      const row = page.locator("tr[data-project-id]", { has: page.locator(".project-name", { hasText: "Queue backlog, slow sampled sweep" }) });
      await row.waitFor({ timeout: 15_000 });
      const projectId = (await row.getAttribute("data-project-id"))!;

      // Print-only mode, as the desktop app's hidden print window loads it.
      await page.goto(`${env.server.url}?sheet-print=A4#/sheet/${encodeURIComponent(projectId)}/sampled-robust`);
      await expect.poll(() => page.title(), { timeout: 60_000 }).toMatch(new RegExp(`^(${SHEET_READY_TITLE_PREFIX}|${SHEET_FAILED_TITLE_PREFIX})`));
      expect(await page.title()).toBe(`${SHEET_READY_TITLE_PREFIX}Queue backlog, slow sampled sweep`);

      const zooms = page.getByTestId("pole-zoom");
      expect(await zooms.count()).toBe(2);
      expect(await page.getByTestId("zoom-outline").count()).toBe(2);
      const titles = await zooms.locator(".lw-plot-title").allTextContents();
      expect(titles[0]).toMatch(/^Zoom ×\d+ on the closed-loop poles \(\d+ of \d+ poles\)$/);
      expect(titles[1]).toMatch(/^Zoom ×\d+ on the pole cloud \(\d+ of \d+ poles\)$/);
      // The cloud sits within 0.01 of z = 1: the zoom is more than 50-fold.
      expect(Number(/×(\d+)/.exec(titles[1]!)![1])).toBeGreaterThan(50);
      await zooms.nth(0).screenshot({ path: path.join(SHOTS, "zoom-closed-loop.png") });
      await zooms.nth(1).screenshot({ path: path.join(SHOTS, "zoom-pole-cloud.png") });

      await page.emulateMedia({ media: "print" });
      const pdf = await page.pdf({ preferCSSPageSize: true, printBackground: true });
      const pdfPath = path.join(SHOTS, "sheet.pdf");
      writeFileSync(pdfPath, pdf);
      execFileSync("pdftoppm", ["-png", "-r", "110", pdfPath, path.join(SHOTS, "page")]);
      const pngs = readdirSync(SHOTS).filter((f) => /^page-\d+\.png$/.test(f));
      const pages = execFileSync("pdftotext", ["-layout", pdfPath, "-"], { encoding: "utf8" }).split("\f").filter((t) => t.trim().length > 0);
      expect(pngs.length).toBe(pages.length);
      expect(execFileSync("pdfinfo", [pdfPath], { encoding: "utf8" })).toMatch(/A4/);

      // Each zoom figure is whole on one page: its title, axis titles and both caption lines together.
      for (const subject of ["the closed-loop poles", "the pole cloud"]) {
        const at = pages.findIndex((p) => p.includes(`on ${subject} (`));
        expect(at, subject).toBeGreaterThanOrEqual(0);
        const text = pages[at]!.replace(/\s+/g, " ");
        expect(text, subject).toMatch(/Pole nearest the unit circle: \|z\| = 0\.99\d*, 1 − \|z\| = [\d.e−-]+\./);
        expect(text, subject).toContain("The unit circle crosses this window; the dashed box above marks the window.");
        expect(text, subject).toContain("Real part of z");
        expect(text, subject).toContain("Imaginary part of z");
      }
      expect(pages.join(" ")).not.toMatch(/NaN/);
      expect(problems).toEqual([]);
    } finally {
      await context.close();
    }
  });
});
