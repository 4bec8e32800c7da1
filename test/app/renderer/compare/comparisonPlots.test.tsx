import { renderToStaticMarkup } from "react-dom/server";
import { describe, expect, it, vi } from "vitest";
import type { ProjectFile, VariantResult } from "../../../../shared-engine/api/contract";
import { createMemoryDocumentStore } from "../../../../renderer/db";
import { DEMO_DOCUMENT } from "../../../../renderer/db/demoProject";
import type { ComparedVariant } from "../../../../renderer/state/compare/compareTable";
import { createProjectToolsStore } from "../../../../renderer/state/compare/projectToolsStore";
import { comparisonSteps, poleMapsByDomain, poleZoomFor, resultSampleTime } from "../../../../renderer/views/compare/comparisonPlots";
import { CompareView } from "../../../../renderer/views/compare/CompareView";
import { inProcessBridge } from "../io/inProcessBridge";

const DEMO_SAMPLED = "lqr-integral-1s";
const DEMO_CONTINUOUS = ["poles-continuous", "lqr-integral-robust", "lqr-kalman"];

async function demoStore(document: ProjectFile = DEMO_DOCUMENT) {
  const documents = createMemoryDocumentStore();
  await documents.save("p1", structuredClone(document), { baseRevision: 0, message: "created" });
  const store = createProjectToolsStore({ projectId: "p1", documents, bridge: inProcessBridge });
  await store.start();
  await vi.waitFor(() => expect(store.getState().loops.status).toBe("done"), { timeout: 30_000 });
  return store;
}

function comparedOf(document: ProjectFile, results: Readonly<Record<string, VariantResult>>): ComparedVariant[] {
  return document.variants.map((v, index) => ({ variantId: v.id, name: v.name ?? v.id, styleIndex: index, result: results[v.id] ?? null }));
}

/** A designed result with only what the grouping reads (made-up poles; domains as named). */
function fakeResult(id: string, sampleTime: number | null): VariantResult {
  return {
    id, name: id, warnings: [], checks: [],
    closedLoopPoles: sampleTime === null ? [{ re: -1, im: 0 }] : [{ re: 0.5, im: 0 }],
    ...(sampleTime === null ? {} : { discrete: { A: [[0.5]], B: [[1]], C: [[1]], D: [[0]], sampleTime, method: "zoh" as const } }),
  } as unknown as VariantResult;
}

describe("pole-zero maps of the comparison, one per time domain", () => {
  it("puts the demo's three continuous variants on an s-plane map and its variant sampled at 1 s on a z-plane map of its own", async () => {
    const store = await demoStore();
    const { results } = store.getState().evaluation;
    const groups = poleMapsByDomain(comparedOf(DEMO_DOCUMENT, results));
    expect(groups.map((g) => g.sampleTime)).toEqual([null, 1]);
    expect(groups[0]!.variantIds).toEqual(DEMO_CONTINUOUS);
    expect(groups[1]!.variantIds).toEqual([DEMO_SAMPLED]);
    expect(groups[0]!.title).toBe("Closed-loop poles × and zeros ○, s-plane (continuous)");
    expect(groups[1]!.title).toBe("Closed-loop poles × and zeros ○, z-plane (sampled, T = 1 s)");
    // Each variant keeps its palette slot (its place in the project) on whichever map it lands.
    expect(groups[0]!.series.map((s) => s.styleIndex)).toEqual([1, 2, 3]);
    expect(groups[1]!.series.map((s) => s.styleIndex)).toEqual([0]);
    // The sampled loop's poles are z-plane points: inside the unit circle (a stable sampled
    // loop), and its zero is the plant's sampled zero near z = −1 (engine output, not mapped).
    for (const p of groups[1]!.series[0]!.poles) expect(Math.hypot(p.re, p.im)).toBeLessThan(1);
    const zeros = groups[1]!.series[0]!.zeros!;
    expect(zeros).toHaveLength(1);
    expect(zeros[0]!.re).toBeGreaterThan(-1);
    expect(zeros[0]!.re).toBeLessThan(-0.9);
    for (const s of groups[0]!.series) for (const p of s.poles) expect(p.re).toBeLessThan(0);
    expect(resultSampleTime(results[DEMO_SAMPLED])).toBe(1);
    store.dispose();
  });

  it("zooms beside the z-plane map on the demo's sampled poles, which crowd near z = 1, and not beside the s-plane map", async () => {
    const store = await demoStore();
    const groups = poleMapsByDomain(comparedOf(DEMO_DOCUMENT, store.getState().evaluation.results));
    expect(poleZoomFor(groups[0]!, 500, 400)).toBeNull();
    const zoom = poleZoomFor(groups[1]!, 500, 400)!;
    const poles = groups[1]!.series[0]!.poles;
    for (const p of poles) {
      expect(p.re).toBeGreaterThan(zoom.window.x[0]);
      expect(p.re).toBeLessThan(zoom.window.x[1]);
      expect(p.im).toBeGreaterThan(zoom.window.y[0]);
      expect(p.im).toBeLessThan(zoom.window.y[1]);
    }
    expect(zoom.title).toMatch(/^Zoom ×\d+, z-plane \(sampled, T = 1 s\): 3 of 3 poles$/);
    const r = Math.max(...poles.map((p) => Math.hypot(p.re, p.im)));
    expect(zoom.caption[0]).toBe(`Pole nearest the unit circle: |z| = ${Number(r.toPrecision(4))}, 1 − |z| = ${Number((1 - r).toPrecision(4))}.`);
    const html = renderToStaticMarkup(<CompareView state={store.getState()} store={store} />);
    expect(html).toContain('data-testid="pole-zoom-z"');
    expect(html).not.toContain('data-testid="pole-zoom-s"');
    expect(html).toContain('data-testid="zoom-outline"');
    store.dispose();
  });

  it("makes one z-plane map per distinct sample period, continuous map first, periods increasing", () => {
    const compared: ComparedVariant[] = [
      { variantId: "a", name: "A", styleIndex: 0, result: fakeResult("a", 0.5) },
      { variantId: "b", name: "B", styleIndex: 1, result: fakeResult("b", null) },
      { variantId: "c", name: "C", styleIndex: 2, result: fakeResult("c", 0.1) },
      // The same period as A after a JSON round trip of an arithmetic result.
      { variantId: "d", name: "D", styleIndex: 3, result: fakeResult("d", 0.5 * (1 + 1e-15)) },
      { variantId: "e", name: "E (not designed)", styleIndex: 4, result: null },
    ];
    const groups = poleMapsByDomain(compared);
    expect(groups.map((g) => [g.key.startsWith("z") ? "z" : "s", g.sampleTime, g.variantIds])).toEqual([
      ["s", null, ["b"]],
      ["z", 0.1, ["c"]],
      ["z", 0.5, ["a", "d"]],
    ]);
  });

  it("renders the maps in the plots grid: the s-plane map with its damping guides, the z-plane map with its unit circle", async () => {
    const store = await demoStore();
    const html = renderToStaticMarkup(<CompareView state={store.getState()} store={store} />);
    // Each map's markup: from its wrapper to the next map, the last one up to the step plot.
    const maps = html.split('class="compare-step"')[0]!.split('class="compare-poles"').slice(1);
    expect(maps).toHaveLength(2);
    const [sMap, zMap] = maps as [string, string];
    expect(sMap).toContain('data-testid="pole-map-s"');
    expect(sMap).toContain("s-plane (continuous)");
    expect(sMap).toContain("Real part (1/s)");
    expect(sMap).toContain("lw-guide lw-guide-zeta");
    expect(sMap).not.toContain("lw-guide-unit");
    expect(zMap).toContain('data-testid="pole-map-z" data-sample-time="1"');
    expect(zMap).toContain("z-plane (sampled, T = 1 s)");
    expect(zMap).toContain("Real part of z");
    expect(zMap).toContain("lw-guide-unit");
    // Legends: the continuous variants on the s-plane map only, the sampled one on the z-plane map only.
    const names = Object.fromEntries(DEMO_DOCUMENT.variants.map((v) => [v.id, v.name!]));
    for (const id of DEMO_CONTINUOUS) {
      expect(sMap).toContain(`>${names[id]}</text>`);
      expect(zMap).not.toContain(`>${names[id]}</text>`);
    }
    expect(zMap).toContain(`>${names[DEMO_SAMPLED]}</text>`);
    expect(sMap).not.toContain(`>${names[DEMO_SAMPLED]}</text>`);
    // Step plot: both domains on one time axis, the sampled one named in the note under it. Its
    // step lists times 0, 5, …, 60, 70, …, 400 s with T = 1 s (skips samples): markers only, said so.
    expect(html).toContain('data-testid="step-caption"');
    expect(html).toMatch(/Sampled: LQR with integral action, sampled at 1 s \(nonlinear check\) \(T = 1 s\) lists only some of the sample instants \(the step grid skips samples\): outputs and control input are drawn as markers at those instants, not joined/);
    const stepPlot = html.split('class="compare-step"')[1]!;
    expect(stepPlot).toContain("T = 1 s, data at the listed instants: markers only (the samples between are not listed)");
    expect(stepPlot).toContain('class="lw-sample-markers"');
    expect(stepPlot).not.toContain("lw-series-stairs");
    store.dispose();
  });

  it("names no sampled variant under the step plot when every compared variant is continuous", () => {
    const compared: ComparedVariant[] = ["a", "b"].map((id, k) => {
      const result = fakeResult(id, null);
      (result as { step?: unknown }).step = { time: [0, 1], output: [[0, 1]], outputNames: ["y"] };
      return { variantId: id, name: id, styleIndex: k, result };
    });
    const steps = comparisonSteps(compared);
    expect(steps.series).toHaveLength(2);
    expect(steps.note).toBe("");
  });
});
