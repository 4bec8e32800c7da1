// The Structure view's wording: damping / natural frequency / time constant per mode, the
// sentences for modes the inputs cannot move, non-minimum-phase zeros, the coupling and Hankel
// thresholds, and the bridge-driven controller (latest wins) on the demo's linear plant.
import { describe, expect, it } from "vitest";
import type { GramiansResult } from "../../../../shared-engine/api/contract";
import {
  couplingSentence,
  SHARED_MODE_FRACTION,
  createStructureController,
  describeMode,
  gramianSummary,
  isNonMinimumPhase,
  STRONG_COUPLING_RATIO,
  structureModelOf,
  WEAK_COUPLING_RATIO,
  WEAK_HANKEL_FRACTION,
} from "../../../../renderer/state/workspace/structureReport";
import { DEMO_DOCUMENT } from "../../../../renderer/db/demoProject";
import { expectRelativeClose } from "../../../helpers/assertions";
import { inProcessBridge, waitFor } from "./nonlinearTestSupport";

const diag = (): GramiansResult["diagnostics"] => ({ residual: null, condition: null, conditionMeaning: null, warnings: [] });

describe("describeMode", () => {
  it("gives ζ = 1, ωn = 2 rad/s and τ = 0.5 s for the real pole −2", () => {
    const m = describeMode({ re: -2, im: 0 }, null, null);
    // Hand-worked: s = −2 ⇒ ζ = −Re s/|s| = 1, ωn = |s| = 2, τ = 1/|Re s| = 0.5.
    expect([m.damping, m.naturalFrequencyRadPerSec, m.timeConstantSec, m.stability]).toEqual([1, 2, 0.5, "stable"]);
  });

  it("gives ζ = 1/√5, ωn = √5 rad/s and τ = 1 s for the pair −1 ± 2j", () => {
    const m = describeMode({ re: -1, im: 2 }, null, null);
    // Hand-worked: |s| = √5.
    expectRelativeClose(m.damping!, 1 / Math.sqrt(5), 1e-15, "ζ");
    expectRelativeClose(m.naturalFrequencyRadPerSec, Math.sqrt(5), 1e-15, "ωn");
    expect(m.timeConstantSec).toBe(1);
  });

  it("reads a sampled pole through s = ln z / T: z = e^(−0.1) at T = 0.1 s has τ = 1 s", () => {
    const m = describeMode({ re: Math.exp(-0.1), im: 0 }, 0.1, null);
    expectRelativeClose(m.timeConstantSec!, 1, 1e-12, "τ");
    expect(m.damping).toBeCloseTo(1, 14);
  });

  it("says a stable mode the inputs cannot move must already be stable, and an unstable one makes the plant unstabilizable", () => {
    const stable = describeMode({ re: -0.05, im: 0 }, null, { uncontrollableModes: [{ re: -0.05, im: 0 }], unobservableModes: [] });
    expect(stable.controllable).toBe(false);
    expect(stable.sentences[0]).toBe("The mode at −0.05 cannot be moved by any input: it must already be stable, and it is (it decays by itself).");
    const unstable = describeMode({ re: 0.3, im: 0 }, null, { uncontrollableModes: [{ re: 0.3, im: 0 }], unobservableModes: [{ re: 0.3, im: 0 }] });
    expect(unstable.sentences).toEqual([
      "The mode at 0.3 cannot be moved by any input and it is unstable: no state feedback can stabilize this plant.",
      "The outputs do not see the mode at 0.3 and it is unstable: no observer can track it.",
    ]);
  });

  it("matches a complex mode to the structure report's conjugate", () => {
    const m = describeMode({ re: -1, im: 2 }, null, { uncontrollableModes: [{ re: -1, im: -2 }], unobservableModes: [] });
    expect(m.controllable).toBe(false);
  });
});

describe("wording thresholds", () => {
  it("calls a zero non-minimum phase in the right half plane (continuous) or outside the unit circle (sampled)", () => {
    expect(isNonMinimumPhase({ re: 1, im: 0 }, null)).toBe(true);
    expect(isNonMinimumPhase({ re: -1, im: 5 }, null)).toBe(false);
    expect(isNonMinimumPhase({ re: 1.5, im: 0 }, 0.1)).toBe(true);
    expect(isNonMinimumPhase({ re: 0.5, im: 0.5 }, 0.1)).toBe(false);
  });

  it("words the off-diagonal ratio of A by the documented thresholds", () => {
    expect([STRONG_COUPLING_RATIO, WEAK_COUPLING_RATIO]).toEqual([0.5, 0.1]);
    expect(couplingSentence(0)).toMatch(/^A is diagonal: no state drives another/);
    expect(couplingSentence(0.05)).toMatch(/^The states barely drive one another: only 5 %/);
    expect(couplingSentence(0.1)).toMatch(/^The states drive one another moderately/);
    expect(couplingSentence(0.5)).toMatch(/^The states drive one another moderately/);
    expect(couplingSentence(0.51)).toMatch(/^The states drive one another strongly: 51 %/);
  });

  it("does not call modes shared when each belongs to one state, however large A's off-diagonal part", () => {
    // A triangular A such as the demo queue's [[−1/30, −50], [0, −0.05]]: the off-diagonal part
    // dominates A, yet each mode's participation sits in one state (eigenvectors of a triangular
    // matrix with distinct eigenvalues; participation 100 % / 0 %, worked by hand).
    expect(couplingSentence(0.9999, 0)).toMatch(/strongly.*Each mode belongs mainly to one state/);
    expect(couplingSentence(0.3, 0.45)).toMatch(/Some modes are shared between states .*45 %/);
    expect(SHARED_MODE_FRACTION).toBe(0.2);
  });

  it("counts Hankel singular values below 1e-3 of the largest as weak and names weakly controllable states", () => {
    expect(WEAK_HANKEL_FRACTION).toBe(1e-3);
    const g: GramiansResult = {
      controllability: [[1, 0, 0], [0, 0.5, 0], [0, 0, 1e-5]],
      observability: [[1, 0, 0], [0, 1, 0], [0, 0, 1]],
      residuals: { controllability: 0, observability: 0 },
      hankelSingularValues: [2, 0.01, 1.9e-3],
      diagnostics: diag(),
    };
    const s = gramianSummary(g, ["a", "b", "c"]);
    expect(s.weakCount).toBe(1);
    expect(s.sentences[0]).toMatch(/^1 of 3 Hankel singular values are below 0\.001 of the largest \(2\).*order 2/);
    expect(s.sentences[1]).toBe("Weakly controllable: c (Gramian diagonal below 0.001 of the largest).");
    const none = gramianSummary({ ...g, controllability: g.observability, hankelSingularValues: [2, 0.01, 2.1e-3] }, ["a", "b", "c"]);
    expect(none.weakCount).toBe(0);
    expect(none.sentences).toHaveLength(1);
  });
});

describe("structure controller through the in-process bridge", () => {
  const queue = DEMO_DOCUMENT.plants.find((p) => p.id === "queue-linear")!;

  it("describes the demo's linear queue: two stable real modes, states driven strongly through A[0][1] = −50 yet modes unshared, with Hankel values", async () => {
    const source = structureModelOf(queue, null);
    if (!("model" in source)) throw new Error(source.reason);
    const c = createStructureController(inProcessBridge());
    await c.load(source.model);
    const r = c.getState().report!;
    expect(c.getState().status).toBe("done");
    // The demo's A = [[−1/30, −50], [0, −0.05]] (assets/examples/queue-backlog): triangular, so its poles are the diagonal.
    expect(r.modes.map((m) => m.eigenvalue.re).sort((a, b) => a - b)).toEqual([-0.05, -1 / 30].map((v) => expect.closeTo(v, 12)));
    expect(r.modes.every((m) => m.controllable && m.observable)).toBe(true);
    expect(r.coupling!.states).toEqual(["backlog", "consumers"]);
    expect(r.coupling!.sentence).toMatch(/drive one another strongly.*Each mode belongs mainly to one state/);
    expect(r.coupling!.rows).toHaveLength(2);
    r.coupling!.rows.forEach((row) => expectRelativeClose(row.participationPct.reduce((a, b) => a + b, 0), 100, 1e-12, "participation sum"));
    expect(r.gramians!.hankelSingularValues).toHaveLength(2);
    c.dispose();
  });

  it("reports an uncontrollable stable mode in words, a right-half-plane zero, and no Gramians for an unstable plant", async () => {
    const c = createStructureController(inProcessBridge());
    // A = diag(−0.05, −1), B = [0; 1]: the mode at −0.05 gets no input (hand-worked).
    await c.load({ A: [[-0.05, 0], [0, -1]], B: [[0], [1]], C: [[1, 1]] });
    const r = c.getState().report!;
    expect(r.modes.flatMap((m) => m.sentences)).toContain("The mode at −0.05 cannot be moved by any input: it must already be stable, and it is (it decays by itself).");
    // (s − 1)/((s + 1)(s + 2)) in companion form: zero at s = 1 (hand-worked), poles at −1, −2.
    await c.load({ A: [[0, 1], [-2, -3]], B: [[0], [1]], C: [[-1, 1]] });
    const z = c.getState().report!;
    expect(z.zeros.map((x) => x.label)).toEqual(["1"]);
    expect(z.zerosSentence).toMatch(/^Non-minimum phase: the zero\(s\) 1 lie in the right half plane/);
    await c.load({ A: [[0.5]], B: [[1]], C: [[1]] });
    expect(c.getState().report!.gramians).toBeNull();
    expect(c.getState().report!.gramiansNote).toMatch(/stable models only/);
  });

  it("keeps only the latest load when two overlap", async () => {
    const bridge = inProcessBridge(5);
    const c = createStructureController(bridge);
    const first = c.load({ A: [[-1]], B: [[1]], C: [[1]] });
    const second = c.load({ A: [[-3]], B: [[1]], C: [[1]] });
    await Promise.all([first, second]);
    await waitFor(() => c.getState().status === "done");
    expect(c.getState().report!.modes[0]!.eigenvalue.re).toBe(-3);
    expect(bridge.calls.filter((x) => x.method === "analysis.poles")[0]!.aborted()).toBe(true);
  });
});
