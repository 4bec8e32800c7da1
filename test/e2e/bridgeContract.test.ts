import { afterAll, beforeAll, describe, expect, it } from "vitest";
import type { BrowserContext, Page } from "playwright-core";
import { dispatch } from "../../shared-engine/api/dispatcher";
import { toErrorPayload } from "../../shared-engine/errors";
import type {} from "../../renderer/bridge/e2eHook"; // declares window.__loopwrightBridge
import type { StaticServer } from "../../scripts/static-server.mjs";
import { CONTRACT_CASES } from "../contract/cases";
import { expectComplexSetsClose, expectDeepClose, EPS } from "../helpers/assertions";
import { freshProfileDir, launchBrowser, removeProfileDir, serveRendererBuild, watchPageProblems } from "./helpers";

type Outcome = { ok: true; result: unknown } | { ok: false; error: { name: string; kind: string; message: string; details: unknown } };

async function inNode(method: string, params: unknown): Promise<Outcome> {
  try {
    // Round-trip through JSON: what crosses any bridge is plain data.
    return { ok: true, result: JSON.parse(JSON.stringify(await dispatch(method, params))) };
  } catch (error) {
    const payload = toErrorPayload(error);
    return { ok: false, error: { name: "EngineError", ...payload } };
  }
}

async function inPage(page: Page, method: string, params: unknown): Promise<Outcome> {
  return page.evaluate(
    async ([m, p]) => {
      const bridge = window.__loopwrightBridge;
      if (!bridge) throw new Error("the ?e2e=1 bridge hook is missing");
      try {
        const result = await bridge.request(m as "engine.info", p as Record<string, never>);
        return { ok: true as const, result: JSON.parse(JSON.stringify(result)) as unknown };
      } catch (error) {
        const e = error as { name: string; kind: string; message: string; details: unknown };
        return { ok: false as const, error: { name: e.name, kind: e.kind, message: e.message, details: e.details } };
      }
    },
    [method, params] as const,
  );
}

/** Paths of the frequencies at which a peak (|S|, |T|, |S − ½|) was located by a search. */
const PEAK_FREQUENCY = /(?:Peak|diskMargin)\.frequencyRadPerSec$/;

/** A deep copy of `value` with the peak frequencies set to 0, and those frequencies by path. */
function withoutPeakFrequencies(value: unknown): [unknown, Record<string, number>] {
  const peaks: Record<string, number> = {};
  const strip = (v: unknown, path: string): unknown => {
    if (Array.isArray(v)) return v.map((x, i) => strip(x, `${path}[${i}]`));
    if (v !== null && typeof v === "object") {
      return Object.fromEntries(Object.entries(v).map(([k, x]) => {
        const p = `${path}.${k}`;
        if (typeof x === "number" && PEAK_FREQUENCY.test(p)) {
          peaks[p] = x;
          return [k, 0];
        }
        return [k, strip(x, p)];
      }));
    }
    return v;
  };
  return [strip(value, "$"), peaks];
}

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
  await page.goto(`${server.url}?e2e=1`);
  await page.waitForFunction(() => window.__loopwrightBridge !== undefined);
});

afterAll(async () => {
  await context?.close();
  await server?.close();
  if (profileDir) removeProfileDir(profileDir);
});

describe("bridge contract through the browser-mode Web Worker", () => {
  it.each(CONTRACT_CASES.map((c) => [c.name, c] as const))("%s gives the same outcome in the page as dispatch() in Node", async (_name, testCase) => {
    const [page_, node] = [await inPage(page, testCase.method, testCase.params), await inNode(testCase.method, testCase.params)];
    // Same engine code, two JavaScript engines: Node's V8 and Chromium's V8 are different
    // versions whose Math functions may differ in the last bit, so numbers match to 1e-12
    // relative; everything else (kinds, messages, shapes, nulls) must be identical. The one
    // exception is where a maximum lies: at a smooth peak f(ω*(1 + δ)) − f(ω*) ∝ δ², so the
    // maximiser is determined only to about √ε relative (common practice), and last-bit
    // differences move it by ~1e-9 while the peak value still agrees to 1e-12.
    const [pageRest, pagePeaks] = withoutPeakFrequencies(page_);
    const [nodeRest, nodePeaks] = withoutPeakFrequencies(node);
    expectDeepClose(pageRest, nodeRest, 1e-12);
    expectDeepClose(pagePeaks, nodePeaks, 1e-7);
    expect(page_.ok).toBe(testCase.expected.ok);
    if (!page_.ok && !testCase.expected.ok) expect(page_.error.kind).toBe(testCase.expected.kind);
    if (page_.ok && testCase.expectedEigenvalues) {
      const { eigenvalues } = page_.result as { eigenvalues: { re: number; im: number }[] };
      // Tolerance: a backward-stable eigensolver on these well-conditioned, O(1)-sized examples
      // (common practice: a small multiple of n·eps relative to the eigenvalue's size).
      expectComplexSetsClose(eigenvalues, testCase.expectedEigenvalues, 100 * EPS);
    }
  });

  it("caused no page errors, console errors or remote requests", () => {
    expect(problems).toEqual([]);
  });

  it("exposes the test hook only when the page is opened with ?e2e=1", async () => {
    const other = await context.newPage();
    try {
      await other.goto(server.url);
      await other.getByRole("heading", { name: "Projects" }).waitFor();
      expect(await other.evaluate(() => typeof window.__loopwrightBridge)).toBe("undefined");
    } finally {
      await other.close();
    }
  });
});
