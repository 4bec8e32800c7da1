#!/usr/bin/env node
// UI benchmark (browser mode, Debian Chromium through playwright-core): builds a 12-state plant
// in the design workspace, drags one placed pole N times, and reports medians of the workspace's
// performance measures:
//   lw:engine  request → answer through the Web Worker bridge: new gain, closed-loop poles,
//              a 500-sample step response and a 400-point Bode plot (the workspace's display grids).
//              During the drag these are previews (detail.kind "preview"); the full evaluation
//              (structure, zeros, margins, checks) runs once when the drag ends and is reported apart.
//   lw:frame   result arrival → the second animation frame after it (React commit + paint); the
//              second frame callback runs one whole frame interval after the paint, so this
//              measure never drops below ~16.7 ms at 60 Hz
//   lw:paint   result arrival → just after the paint of the frame that shows it (a message posted
//              from that frame's animation callback): the redraw latency itself
// Usage: npm run bench:ui [-- --moves 40]   (CHROMIUM_PATH overrides /usr/bin/chromium)
import { existsSync, mkdtempSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { fileURLToPath } from "node:url";
import { chromium } from "playwright-core";
import { startStaticServer } from "./static-server.mjs";

const ROOT = fileURLToPath(new URL("..", import.meta.url));
const BUILD = path.join(ROOT, "dist", "renderer");
const args = process.argv.slice(2);
const movesArg = args.indexOf("--moves");
const MOVES = movesArg >= 0 ? Math.max(5, Number(args[movesArg + 1]) || 40) : 40;
const N = 12;

if (!existsSync(path.join(BUILD, "index.html"))) {
  console.error("No renderer build in dist/renderer; run `npx vite build` first (npm run bench:ui does).");
  process.exit(1);
}

// A lightly damped chain of 12 states driven at its end (controllable by construction):
// x_i' = −0.2 x_i + x_{i+1}, x_12' = −0.2 x_12 + u, y = x_1.
const A = Array.from({ length: N }, (_, i) => Array.from({ length: N }, (_, j) => (i === j ? -0.2 : j === i + 1 ? 1 : 0)));
const B = Array.from({ length: N }, (_, i) => [i === N - 1 ? 1 : 0]);
const toText = (m) => m.map((r) => r.join("\t")).join("\n");

const median = (xs) => {
  const s = [...xs].sort((a, b) => a - b);
  return s.length === 0 ? NaN : s.length % 2 ? s[(s.length - 1) / 2] : (s[s.length / 2 - 1] + s[s.length / 2]) / 2;
};

const server = await startStaticServer({ root: BUILD, port: 0 });
const profile = mkdtempSync(path.join(tmpdir(), "loopwright-bench-"));
const context = await chromium.launchPersistentContext(profile, {
  executablePath: process.env.CHROMIUM_PATH ?? "/usr/bin/chromium",
  headless: true,
  args: ["--headless", "--no-sandbox", "--disable-gpu", "--no-first-run", "--disable-background-networking"],
  viewport: { width: 1366, height: 768 },
});
try {
  const page = context.pages()[0] ?? (await context.newPage());
  const upToDate = () => page.getByTestId("evaluation-status").filter({ hasText: /^Up to date/ }).waitFor({ timeout: 30_000 });
  // ?e2e=1 exposes the page's own bridge object, so the bench can record the workspace's preview
  // request during the drag and replay it on an idle page (engine time without UI contention).
  await page.goto(`${server.url}?e2e=1`);
  await page.waitForFunction(() => window.__loopwrightBridge !== undefined);
  await page.evaluate(() => {
    const bridge = window.__loopwrightBridge;
    const original = bridge.request.bind(bridge);
    bridge.request = (method, params, options) => {
      if (method === "project.previewVariant") window.__lwLastPreview = params;
      return original(method, params, options);
    };
  });
  await page.getByLabel("New project").fill("Bench: 12-state chain");
  await page.getByLabel("New project").press("Enter");
  await page.getByRole("button", { name: "Open Bench: 12-state chain" }).click();
  await page.getByTestId("workspace").waitFor();

  await page.getByRole("tab", { name: "Plant" }).click();
  const dims = page.locator(".dimension-row input");
  await dims.nth(0).fill(String(N));
  await dims.nth(3).fill("0");
  await page.getByRole("button", { name: "Apply sizes" }).click();
  for (const [name, m] of [["A", A], ["B", B]]) {
    await page.getByRole("button", { name: `Paste into ${name}` }).click();
    await page.locator(`#paste-plant-${name}`).fill(toText(m));
    await page.getByRole("button", { name: "Use these numbers" }).click();
  }
  await page.getByRole("tab", { name: "Design" }).click();
  await page.getByRole("button", { name: "Start a pole-placement design" }).click();
  await upToDate();

  // Warm-up done; measure only the drag.
  await page.evaluate(() => performance.clearMeasures());
  const handle = page.locator('[data-testid="pole-zero-map"] [aria-label*="pole 1 at"]').first();
  const box = await handle.boundingBox();
  if (!box) throw new Error("the first placed pole is not on the map");
  let x = box.x + box.width / 2;
  const y = box.y + box.height / 2;
  await page.mouse.move(x, y);
  await page.mouse.down();
  const results = () => page.evaluate(() => performance.getEntriesByName("lw:engine").length);
  for (let k = 0; k < MOVES; k++) {
    x += k % 2 === 0 ? -3 : 2; // wander left and back a little: stays a real, stable pole
    const before = await results();
    await page.mouse.move(x, y);
    // This move's result is shown and painted (the hand keeps moving: no wait for the full run).
    await page.waitForFunction(
      (n) => performance.getEntriesByName("lw:engine").length > n && performance.getEntriesByName("lw:frame").length >= performance.getEntriesByName("lw:engine").length,
      before,
    );
  }
  await page.mouse.up();
  await upToDate();
  // The full evaluation that follows the drag (a build without drag previews has none to wait for).
  await page.waitForFunction(() => performance.getEntriesByName("lw:engine").some((e) => e.detail?.kind === "full"), undefined, { timeout: 5_000 }).catch(() => undefined);
  await page.waitForFunction(() => performance.getEntriesByName("lw:frame").length >= performance.getEntriesByName("lw:engine").length);
  const timings = await page.evaluate(() => {
    const engine = performance.getEntriesByName("lw:engine");
    const frame = performance.getEntriesByName("lw:frame");
    const paint = performance.getEntriesByName("lw:paint");
    const live = engine.map((e, i) => ({ e, f: frame[i], p: paint[i] })).filter(({ e }) => e.detail?.kind !== "full");
    return {
      engine: live.map(({ e }) => e.duration),
      frame: live.map(({ f }) => f?.duration ?? NaN).filter((d) => Number.isFinite(d)),
      paint: live.map(({ p }) => p?.duration ?? NaN).filter((d) => Number.isFinite(d)),
      full: engine.filter((e) => e.detail?.kind === "full").map((e) => e.duration),
    };
  });
  const gain = await page.getByTestId("gain-k").textContent();
  // The last drag's preview request, replayed on the idle page: the engine's own time (worker
  // compute plus message passing) with no rendering competing for the main thread.
  const alone = await page.evaluate(async () => {
    const params = window.__lwLastPreview;
    if (!params) return [];
    const out = [];
    for (let k = 0; k < 45; k++) {
      const t0 = performance.now();
      await window.__loopwrightBridge.request("project.previewVariant", params);
      if (k >= 5) out.push(performance.now() - t0); // the first five warm the worker up
    }
    return out;
  });
  console.log(`bench:ui — ${N}-state plant, ${MOVES} pole drags, Chromium headless, ${new Date().toISOString()}`);
  console.log(`  engine alone (the drag's preview request replayed on an idle page, round trip):  median ${median(alone).toFixed(1)} ms over ${alone.length} requests`);
  console.log(`  engine (gain + closed-loop poles + 500-sample step + 400-point Bode, via worker): median ${median(timings.engine).toFixed(1)} ms over ${timings.engine.length} results`);
  console.log(`  frame (result → painted frame):                                                 median ${median(timings.frame).toFixed(1)} ms over ${timings.frame.length} frames`);
  console.log(`  paint (result → its frame painted, no extra frame wait):                         median ${median(timings.paint).toFixed(1)} ms over ${timings.paint.length} frames`);
  console.log(`  full evaluation after the drag (structure, zeros, margins, checks):              median ${median(timings.full).toFixed(1)} ms over ${timings.full.length} results`);
  console.log(`  last gain: ${gain?.slice(0, 80)}…`);
} finally {
  await context.close();
  await server.close();
  rmSync(profile, { recursive: true, force: true });
}
