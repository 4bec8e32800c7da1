// The real `loopwright sheet` on the shipped example, printed to PDF by Debian Chromium, then read
// back with poppler (pdftoppm, pdftotext). PNG pages land in test-output/e2e/sheet-*.png for review.
import { execFileSync, spawnSync } from "node:child_process";
import { existsSync, mkdtempSync, readdirSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { fingerprint, loadProjectText, evaluateProject, type VariantResult } from "../../shared-engine/project";
import { ENGINE_VERSION } from "../../shared-engine/version";
import { readFileSync } from "node:fs";
import { REPO_ROOT, SCREENSHOT_DIR, screenshotPath } from "./helpers";

const EXAMPLE = path.join(REPO_ROOT, "assets", "examples", "queue-backlog.loopwright.json");
const VARIANT = "poles-continuous";
const CHROMIUM = process.env.CHROMIUM_PATH ?? "/usr/bin/chromium";

describe("loopwright sheet to PDF", () => {
  let dir = "";
  let pdf = "";
  let text = "";
  let pages = 0;

  beforeAll(() => {
    // The command line as a user runs it: the bin entry over the bundles `npm run build:node` makes.
    execFileSync("node", ["scripts/build-node.mjs"], { cwd: REPO_ROOT, stdio: "inherit" });
    dir = mkdtempSync(path.join(tmpdir(), "loopwright-sheet-e2e-"));
    pdf = path.join(dir, "sheet.pdf");
    const run = spawnSync("node", ["bin/loopwright.mjs", "sheet", EXAMPLE, "--variant", VARIANT, "--out", pdf, "--browser", CHROMIUM, "--revision", "e2e", "--date", "2025-01-31"], {
      cwd: REPO_ROOT,
      encoding: "utf8",
      timeout: 100_000,
    });
    if (run.status !== 0) throw new Error(`loopwright sheet exited ${run.status}: ${run.stderr}`);
    text = execFileSync("pdftotext", ["-layout", pdf, "-"], { encoding: "utf8" });
    for (const f of existsSync(SCREENSHOT_DIR) ? readdirSync(SCREENSHOT_DIR) : []) if (/^sheet-\d+\.png$/.test(f)) rmSync(path.join(SCREENSHOT_DIR, f));
    execFileSync("pdftoppm", ["-png", "-r", "60", pdf, screenshotPath("sheet")]);
    pages = readdirSync(SCREENSHOT_DIR).filter((f) => /^sheet-\d+\.png$/.test(f)).length;
  });

  afterAll(() => {
    if (dir) rmSync(dir, { recursive: true, force: true });
  });

  it("has at least two A4 pages, each rendered to a PNG", () => {
    expect(pages).toBeGreaterThanOrEqual(2);
    const info = execFileSync("pdfinfo", [pdf], { encoding: "utf8" });
    expect(Number(/Pages:\s+(\d+)/.exec(info)![1])).toBe(pages);
    expect(info).toMatch(/A4/);
  });

  it("prints the running header and page numbers on every page", () => {
    const pageTexts = text.split("\f").filter((t) => t.trim().length > 0);
    expect(pageTexts.length).toBe(pages);
    pageTexts.forEach((t, i) => {
      expect(t, `page ${i + 1}`).toContain("Queue backlog regulator");
      expect(t, `page ${i + 1}`).toContain(`variant ${VARIANT} · revision e2e · 2025-01-31`);
      expect(t, `page ${i + 1}`).toContain(`Page ${i + 1} of ${pages}`);
    });
  });

  it("contains the gains, the closed-loop poles and the fingerprint", () => {
    const projectText = readFileSync(EXAMPLE, "utf8");
    const loaded = loadProjectText(projectText);
    const result = evaluateProject(loaded, { variant: VARIANT }).variants[0]!;
    // The sheet must show every gain entry in full precision (the pipeline's own numbers, run here).
    const flat = text.replace(/\s+/g, " ");
    for (const row of result.gain!.K) for (const k of row) expect(flat).toContain(String(k).replace("-", "−"));
    // The requested poles −0.08 ± 0.06j (from the example file) are where pole placement put them.
    expect(flat).toMatch(/-0\.08 \+ 0\.06j/);
    expect(flat).toMatch(/-0\.08 − 0\.06j/);
    // ζ = 0.08/0.1 = 0.8 and ωn = 0.1 rad/s for −0.08 ± 0.06j (hand calculation).
    expect(flat).toMatch(/State-feedback loop[\s\S]*0\.8 0\.1 12\.5/);
    const variant = loaded.project.variants.find((v) => v.id === VARIANT)!;
    const plant = loaded.project.plants.find((p) => p.id === variant.plant)!;
    expect(flat).toContain(fingerprint(plant, variant, ENGINE_VERSION));
    expect(flat).toMatch(/Simulation is not validation/);
  });
});

/** Prints one variant of a shipped example with the real command line; pages as sheet-<variant>-<n>.png. */
function printVariant(file: string, variant: string): { dir: string; pdf: string; pages: string[]; pngs: string[]; result: VariantResult } {
  const example = path.join(REPO_ROOT, "assets", "examples", file);
  const dir = mkdtempSync(path.join(tmpdir(), "loopwright-sheet-e2e-"));
  const pdf = path.join(dir, `${variant}.pdf`);
  const run = spawnSync("node", ["bin/loopwright.mjs", "sheet", example, "--variant", variant, "--out", pdf, "--browser", CHROMIUM, "--revision", "e2e", "--date", "2025-01-31"], {
    cwd: REPO_ROOT,
    encoding: "utf8",
    timeout: 100_000,
  });
  if (run.status !== 0) throw new Error(`loopwright sheet exited ${run.status}: ${run.stderr}`);
  const pages = execFileSync("pdftotext", ["-layout", pdf, "-"], { encoding: "utf8" }).split("\f").filter((t) => t.trim().length > 0);
  const pattern = new RegExp(`^sheet-${variant}-\\d+\\.png$`);
  for (const f of existsSync(SCREENSHOT_DIR) ? readdirSync(SCREENSHOT_DIR) : []) if (pattern.test(f)) rmSync(path.join(SCREENSHOT_DIR, f));
  execFileSync("pdftoppm", ["-png", "-r", "60", pdf, screenshotPath(`sheet-${variant}`)]);
  const pngs = readdirSync(SCREENSHOT_DIR).filter((f) => pattern.test(f));
  const result = evaluateProject(loadProjectText(readFileSync(example, "utf8")), { variant }).variants[0]!;
  return { dir, pdf, pages, pngs, result };
}

const pageOf = (pages: readonly string[], text: string | RegExp): number => pages.findIndex((p) => (typeof text === "string" ? p.includes(text) : text.test(p)));

describe("loopwright sheet to PDF: nonlinear check (queue lqr-integral-1s) and disturbance rejection (rack lqr-integral)", () => {
  let queue: ReturnType<typeof printVariant>;
  let rack: ReturnType<typeof printVariant>;

  beforeAll(() => {
    // The bundles are built by the first describe's beforeAll (same file, run in order).
    queue = printVariant("queue-backlog.loopwright.json", "lqr-integral-1s");
    rack = printVariant("rack-temperature.loopwright.json", "lqr-integral");
  });

  afterAll(() => {
    for (const s of [queue, rack]) if (s) rmSync(s.dir, { recursive: true, force: true });
  });

  it("prints each sheet on a handful of A4 pages, every page numbered and rendered to a PNG", () => {
    for (const [s, variant] of [[queue, "lqr-integral-1s"], [rack, "lqr-integral"]] as const) {
      const info = execFileSync("pdfinfo", [s.pdf], { encoding: "utf8" });
      const count = Number(/Pages:\s+(\d+)/.exec(info)![1]);
      expect(count, variant).toBeGreaterThanOrEqual(4);
      expect(count, variant).toBeLessThanOrEqual(9);
      expect(s.pages.length, variant).toBe(count);
      expect(s.pngs.length, variant).toBe(count);
      s.pages.forEach((t, i) => {
        expect(t, `${variant} page ${i + 1}`).toContain(`variant ${variant} · revision e2e · 2025-01-31`);
        expect(t, `${variant} page ${i + 1}`).toContain(`Page ${i + 1} of ${count}`);
      });
    }
  });

  it("prints the equations, operating point, linearization, limits and the nonlinear check of the queue", () => {
    const flat = queue.pages.join(" ").replace(/\s+/g, " ");
    expect(flat).toContain("arrival_rate - consumers*mu*backlog/(K + backlog)");
    expect(flat).toContain("(requested_consumers - consumers)/tau");
    // c = λ(K + q)/(μ q) = 2000·12000/(60·10000) = 40 consumers (hand-derived equilibrium).
    expect(flat).toMatch(/consumers state 40 consumers solved/);
    // A[0][0] = −cμK/(K + q)² = −1/30 (hand-derived Jacobian).
    expect(flat).toContain("−0.03333333333333333");
    expect(flat).toMatch(/actuator requested_consumers 1 120 2 consumers\/s/);
    expect(flat).toMatch(/\d+ Nonlinear check/);
    expect(flat).toContain("Nonlinear plant (solid) and linear prediction (dashed)");
    expect(flat).toMatch(/nonlinear-agrees\)? .*PASS/);
    const d = queue.result.nonlinear!.largestDivergence!;
    expect(flat).toContain(`Largest divergence ${Number(d.size.toPrecision(4))} on backlog_out`);
  });

  it("keeps the nonlinear figure and the operating-point table each on one page", () => {
    const title = pageOf(queue.pages, "Nonlinear plant (solid) and linear prediction (dashed)");
    expect(title).toBeGreaterThanOrEqual(0);
    expect(queue.pages[title]).toMatch(/Input \(consumers\)/);
    const op = pageOf(queue.pages, /Signal\s+Kind\s+Value\s+Unit\s+Obtained/);
    expect(queue.pages[op]).toMatch(/backlog_out\s+output\s+10000/);
  });

  it("prints the disturbance rejection plot and metrics of the rack", () => {
    const flat = rack.pages.join(" ").replace(/\s+/g, " ");
    const d = rack.result.disturbanceStep!;
    expect(flat).toMatch(/\d+ Disturbance rejection/);
    expect(flat).toContain("Response to a step of 1 in heat_load");
    expect(flat).toContain(`Peak deviation ${Number(d.peakDeviation.toPrecision(4))} K on air_temperature`);
    expect(flat).toContain(`${Number(d.settlingTime!.toPrecision(4))} s`);
    expect(flat).toContain("settled within the simulated horizon");
    const title = pageOf(rack.pages, "Response to a step of 1 in heat_load");
    expect(rack.pages[title]).toMatch(/Control input \(%\)/);
  });
});
