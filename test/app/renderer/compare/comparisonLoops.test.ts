import { describe, expect, it, vi } from "vitest";
import { dispatch } from "../../../../shared-engine/api/dispatcher";
import type { DesignRunResult, EngineBridge, ProjectFile, RequestOptions, VariantResult } from "../../../../shared-engine/api/contract";
import { createMemoryDocumentStore } from "../../../../renderer/db";
import { DEMO_DOCUMENT } from "../../../../renderer/db/demoProject";
import { buildComparisonTable, type ComparedVariant } from "../../../../renderer/state/compare/compareTable";
import { planComparisonLoops } from "../../../../renderer/state/compare/comparisonLoops";
import { nyquistLimit } from "../../../../renderer/state/workspace/designHelpers";
import { createProjectToolsStore, type ProjectToolsStore } from "../../../../renderer/state/compare/projectToolsStore";
import { bodeRange } from "../../../../renderer/state/workspace/designHelpers";
import { expectAtMost, expectRelativeClose } from "../../../helpers/assertions";
import { inProcessBridge } from "../io/inProcessBridge";

const DEMO_IDS = ["lqr-integral-1s", "poles-continuous", "lqr-integral-robust", "lqr-kalman"];

async function openStore(document: ProjectFile, bridge: EngineBridge = inProcessBridge): Promise<ProjectToolsStore> {
  const documents = createMemoryDocumentStore();
  await documents.save("p1", structuredClone(document), { baseRevision: 0, message: "created" });
  const store = createProjectToolsStore({ projectId: "p1", documents, bridge });
  await store.start();
  return store;
}

/** The table as the comparison built it before the loops existed: from the document's own evaluation. */
function tableOf(document: ProjectFile, results: Readonly<Record<string, VariantResult>>, ids: readonly string[]) {
  const compared: ComparedVariant[] = document.variants
    .map((v, index) => ({ v, index }))
    .filter(({ v }) => ids.includes(v.id))
    .map(({ v, index }) => ({ variantId: v.id, name: v.name ?? v.id, styleIndex: index, result: results[v.id] ?? null }));
  return buildComparisonTable(compared, document.requirements ?? []);
}

/** Frequency and magnitude where the phase of a displayed loop first crosses −180° (log-frequency interpolation). */
function phaseCrossing(bode: NonNullable<VariantResult["bode"]>): { frequency: number; magnitudeDb: number } | null {
  const { frequency: w, magnitudeDb: mag, phaseDeg: ph } = bode;
  for (let k = 0; k + 1 < w.length; k++) {
    const a = ph[k]! + 180;
    const b = ph[k + 1]! + 180;
    if (a === 0 || a * b < 0) {
      const t = a / (a - b);
      const lw = Math.log(w[k]!) + t * (Math.log(w[k + 1]!) - Math.log(w[k]!));
      return { frequency: Math.exp(lw), magnitudeDb: mag[k]! + t * (mag[k + 1]! - mag[k]!) };
    }
  }
  return null;
}

describe("loops on the comparison's Bode plot", () => {
  it("draws the loop at the plant input of each of the demo's four variants, on one range that covers every variant's own", async () => {
    const store = await openStore(DEMO_DOCUMENT);
    await vi.waitFor(() => expect(store.getState().loops.status).toBe("done"), { timeout: 30_000 });
    const { loops, evaluation, selected } = store.getState();
    expect(selected).toEqual(DEMO_IDS);
    expect(Object.keys(loops.results).sort()).toEqual([...DEMO_IDS].sort());
    expect(loops.missing).toEqual([]);
    expect(loops.revision).toBe(evaluation.revision);
    const [lo, hi] = loops.range!;
    for (const id of DEMO_IDS) {
      const variant = DEMO_DOCUMENT.variants.find((v) => v.id === id)!;
      const bode = loops.results[id]!.bode!;
      expect(bode.loop).toBe("plant-input");
      // The shared range covers this variant's own range (its Bode request, else its automatic one).
      const [ownLo, ownHi] = bodeRange(variant, evaluation.results[id]!);
      expect(lo).toBeLessThanOrEqual(ownLo);
      expect(hi).toBeGreaterThanOrEqual(Math.min(ownHi, nyquistLimit(variant.discretize?.sampleTime ?? null)));
      expectRelativeClose(bode.frequency[0]!, lo, 1e-12, `${id}: first frequency`);
      if (!variant.discretize) expectRelativeClose(bode.frequency[bode.frequency.length - 1]!, hi, 1e-12, `${id}: last frequency`);
    }
    // The one variant that asked for a Bode response asked for 0.001…2 rad/s; the plot covers it.
    expect(lo).toBeLessThanOrEqual(0.001);
    expect(hi).toBeGreaterThanOrEqual(2);
    // The sampled variant (T = 1 s) stops just below its Nyquist frequency π/T, the continuous ones go on.
    const sampled = loops.results["lqr-integral-1s"]!.bode!.frequency;
    expect(sampled[sampled.length - 1]!).toBeLessThan(Math.PI);
    expect(sampled[sampled.length - 1]!).toBeGreaterThan(0.99 * Math.PI);
    expect(hi).toBeGreaterThan(Math.PI);
    store.dispose();
  });

  it("leaves the comparison table exactly as the document's own evaluation gives it", async () => {
    const store = await openStore(DEMO_DOCUMENT);
    await vi.waitFor(() => expect(store.getState().loops.status).toBe("done"), { timeout: 30_000 });
    const { evaluation, selected } = store.getState();
    const direct = (await dispatch("project.evaluate", { project: structuredClone(DEMO_DOCUMENT) })) as DesignRunResult;
    const before: Record<string, VariantResult> = {};
    for (const r of direct.variants) before[r.id] = r;
    expect(evaluation.results).toEqual(before);
    expect(tableOf(DEMO_DOCUMENT, evaluation.results, selected)).toEqual(tableOf(DEMO_DOCUMENT, before, selected));
    store.dispose();
  });

  it("the gain margin read off the displayed Kalman-filter loop agrees with the engine's margin in the table", async () => {
    const store = await openStore(DEMO_DOCUMENT);
    await vi.waitFor(() => expect(store.getState().loops.status).toBe("done"), { timeout: 30_000 });
    const { loops, evaluation } = store.getState();
    const crossing = phaseCrossing(loops.results["lqr-kalman"]!.bode!)!;
    // The engine's margin (loopMargins, itself checked against scipy in test/engine) from the
    // document's own evaluation; the read-off interpolates linearly between points of a
    // 400-point log grid (0.0125 decade apart on the demo's 5 decades), hence 1e-3 dB and 1e-4 relative.
    const margins = evaluation.results["lqr-kalman"]!.margins!;
    expectAtMost(Math.abs(-crossing.magnitudeDb - margins.gainDb!), 1e-3, "gain margin read off the plot − engine's (dB)");
    expectRelativeClose(crossing.frequency, margins.phaseCrossover!, 1e-4, "phase crossover read off the plot");
    expect(loops.results["lqr-kalman"]!.margins!.gainDb).toBe(margins.gainDb);
    store.dispose();
  });

  it("draws hand-derived loops for a continuous and a sampled design, each up to its own limit, and names the variant without a loop", async () => {
    // Plant x' = −x + u. Continuous: the pole moved to −3 needs K = 2, so L(s) = 2/(s + 1):
    // |L| = 1 at ω = √3 with phase −60°, a phase margin of 120° (derived by hand).
    // Sampled (zero-order hold, T = 0.5 s): a = e^(−T), b = 1 − a; the pole moved to p = e^(−3T)
    // needs K = (a − p)/b, so L(z) = (a − p)/(z − a), which reaches −180° at z = −1 (ω = π/T)
    // with |L| = (a − p)/(1 + a): gain margin 20·log10((1 + a)/(a − p)) dB (derived by hand).
    const T = 0.5;
    const a = Math.exp(-T);
    const p = Math.exp(-3 * T);
    const project: ProjectFile = {
      format: "loopwright-project",
      version: 1,
      name: "First-order loops",
      plants: [{ id: "lag", model: { type: "state-space", A: [[-1]], B: [[1]], C: [[1]], D: [[0]], sampleTime: null } }],
      variants: [
        { id: "continuous", plant: "lag", stateFeedback: { method: "poles", poles: [-3] }, margins: { at: "plant-input" } },
        { id: "sampled", plant: "lag", discretize: { sampleTime: T, method: "zoh" }, stateFeedback: { method: "poles", poles: [p] }, margins: { at: "plant-input" } },
        { id: "open", plant: "lag", step: { times: [0, 1, 2] } },
      ],
    };
    const store = await openStore(project);
    await vi.waitFor(() => expect(store.getState().loops.status).toBe("done"), { timeout: 30_000 });
    const { loops } = store.getState();
    expect(Object.keys(loops.results).sort()).toEqual(["continuous", "sampled"]);
    expect(loops.missing).toEqual([{ variantId: "open", reason: expect.stringMatching(/no state-feedback design/) }]);

    const hand = {
      continuous: (w: number) => ({ re: 2 / (1 + w * w), im: (-2 * w) / (1 + w * w) }),
      sampled: (w: number) => {
        // (a − p)/(e^(jωT) − a)
        const re = Math.cos(w * T) - a;
        const im = Math.sin(w * T);
        const d = re * re + im * im;
        return { re: ((a - p) * re) / d, im: (-(a - p) * im) / d };
      },
    };
    for (const id of ["continuous", "sampled"] as const) {
      const bode = loops.results[id]!.bode!;
      bode.frequency.forEach((w, k) => {
        const L = hand[id](w);
        expectRelativeClose(bode.magnitudeDb[k]!, 20 * Math.log10(Math.hypot(L.re, L.im)), 1e-9, `${id}: |L| at ${w} rad/s`, 1);
        const phase = (Math.atan2(L.im, L.re) * 180) / Math.PI;
        const wrapped = ((((bode.phaseDeg[k]! - phase) % 360) + 540) % 360) - 180;
        expectAtMost(Math.abs(wrapped), 1e-7, `${id}: phase error at ${w} rad/s (deg)`);
      });
    }
    const continuous = loops.results["continuous"]!;
    expectRelativeClose(continuous.margins!.phaseDeg!, 120, 1e-8, "phase margin of 2/(s + 1)");
    expectRelativeClose(continuous.margins!.gainCrossover!, Math.sqrt(3), 1e-8, "gain crossover of 2/(s + 1)");
    const sampled = loops.results["sampled"]!;
    expectRelativeClose(sampled.margins!.gainDb!, 20 * Math.log10((1 + a) / (a - p)), 1e-8, "gain margin of (a − p)/(z − a)");
    // Mixed on one plot: the sampled loop stops below π/T, the continuous one goes past it.
    const ws = sampled.bode!.frequency;
    expect(ws[ws.length - 1]!).toBeLessThan(Math.PI / T);
    expect(continuous.bode!.frequency[continuous.bode!.frequency.length - 1]!).toBeGreaterThan(Math.PI / T);
    expect(loops.range![1]).toBe(continuous.bode!.frequency[continuous.bode!.frequency.length - 1]);
    store.dispose();
  });

  it("plans nothing to evaluate for variants without a loop, and strips the runs the plot does not need", () => {
    const results: Record<string, VariantResult> = {
      a: { id: "a", name: "a", checks: [], warnings: [], error: { kind: "singular", message: "the plant is not controllable", details: {} } },
      b: { id: "b", name: "b", checks: [], warnings: [] },
    };
    const document: ProjectFile = {
      ...structuredClone(DEMO_DOCUMENT),
      variants: [
        { id: "a", plant: "queue-linear", stateFeedback: { method: "poles", poles: [-1, -2] } },
        { id: "b", plant: "queue-linear" },
      ],
      signOffs: [{ variant: "a", role: "prepared", name: "X", date: "2026-01-01", fingerprint: "f" }],
    };
    const plan = planComparisonLoops(document, ["a", "b"], results);
    expect(plan.project).toBeNull();
    expect(plan.missing.map((m) => m.variantId)).toEqual(["a", "b"]);
    expect(plan.missing[0]!.reason).toMatch(/design failed \(the plant is not controllable\)/);

    const demo = DEMO_DOCUMENT;
    const ok: Record<string, VariantResult> = {};
    for (const v of demo.variants) ok[v.id] = { id: v.id, name: v.id, checks: [], warnings: [] };
    const full = planComparisonLoops({ ...demo, signOffs: [{ variant: "lqr-kalman", role: "prepared", name: "X", date: "2026-01-01", fingerprint: "f" }] }, DEMO_IDS, ok);
    expect(full.sent).toEqual(DEMO_IDS);
    expect(full.project!.requirements).toEqual([]);
    expect(full.project!.signOffs).toBeUndefined();
    for (const v of full.project!.variants) {
      expect(v.step).toBeUndefined();
      expect(v.nonlinearCheck).toBeUndefined();
      expect(v.robustness).toBeUndefined();
      expect(v.margins).toEqual({ at: "plant-input" });
      expect(v.bode!.frequencies.length).toBeGreaterThan(100);
    }
  });

  it("ignores and cancels a loop evaluation made stale by a new selection or a new revision", async () => {
    const pending: { project: ProjectFile; signal: RequestOptions["signal"]; release: () => void }[] = [];
    let calls = 0;
    const gated: EngineBridge = {
      request: (method, params, options) => {
        calls += 1;
        // The first request of each evaluation round is the document's own (the table); the loop
        // evaluations (requirements stripped) wait until the test releases them.
        const project = (params as { project: ProjectFile }).project;
        if (method !== "project.evaluate" || project.requirements?.length !== 0) return inProcessBridge.request(method, params, options);
        return new Promise((resolve, reject) => {
          pending.push({ project, signal: options?.signal, release: () => inProcessBridge.request(method, params).then(resolve, reject) });
        });
      },
    };
    const store = await openStore(DEMO_DOCUMENT, gated);
    await vi.waitFor(() => expect(pending).toHaveLength(1), { timeout: 30_000 });
    // The table is there before the loops.
    expect(store.getState().evaluation.status).toBe("done");
    expect(store.getState().loops.status).toBe("running");

    store.toggleSelected("lqr-kalman");
    expect(pending).toHaveLength(2);
    expect(pending[0]!.signal!.aborted).toBe(true);
    expect(pending[1]!.project.variants.map((v) => v.id)).toEqual(DEMO_IDS.slice(0, 3));
    pending[0]!.release();
    await new Promise((resolve) => setTimeout(resolve, 50));
    expect(store.getState().loops.status).toBe("running");
    pending[1]!.release();
    await vi.waitFor(() => expect(store.getState().loops.status).toBe("done"), { timeout: 30_000 });
    expect(store.getState().loops.selected).toEqual(DEMO_IDS.slice(0, 3));
    expect(Object.keys(store.getState().loops.results).sort()).toEqual(DEMO_IDS.slice(0, 3).sort());

    // A new revision: its own evaluation replaces the loops, and the pending loop run is cancelled.
    store.toggleSelected("lqr-kalman");
    expect(pending).toHaveLength(3);
    const saved = store.apply((d) => ({ ...d, name: "Renamed" }), "renamed");
    expect(await saved).toBe(true);
    expect(pending[2]!.signal!.aborted).toBe(true);
    pending[2]!.release();
    await vi.waitFor(() => expect(pending).toHaveLength(4), { timeout: 30_000 });
    expect(store.getState().loops).toMatchObject({ status: "running", revision: 2 });
    pending[3]!.release();
    await vi.waitFor(() => expect(store.getState().loops.status).toBe("done"), { timeout: 30_000 });
    expect(store.getState().loops).toMatchObject({ revision: 2, selected: DEMO_IDS });
    expect(calls).toBe(6);
    store.dispose();
  });
});
