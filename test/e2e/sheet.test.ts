// The real `loopwright sheet` on the shipped example, printed to PDF by Debian Chromium, then read
// back with poppler (pdftoppm, pdftotext). PNG pages land in test-output/e2e/sheet-*.png for review.
import { execFileSync, spawnSync } from "node:child_process";
import { existsSync, mkdtempSync, readdirSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { fingerprint, loadProjectText, evaluateProject } from "../../shared-engine/project";
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
