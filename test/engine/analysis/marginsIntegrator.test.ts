// Margins of loops that carry integrators (integral action): L(jω) is unbounded at ω = 0, so
// ω = 0 is never a phase crossover there (common practice: a type-1 or higher loop's Nyquist
// plot leaves towards infinity as ω → 0 and has no gain margin at DC). Regression: for larger
// observer- and integrator-carrying loops the solve at s = 0 returned a huge finite value whose
// arbitrary sign read as a phase crossover with a gain margin near −300 dB.
import { describe, expect, it } from "vitest";
import { Matrix } from "ml-matrix";
import { evaluateVariant, type PlantSpec, type VariantSpec } from "../../../shared-engine/project";
import { loopMargins } from "../../../shared-engine/analysis/margins";
import { stateSpaceFromMatrices } from "../../../shared-engine/model";
import { seededMatrix } from "../../helpers/assertions";

function randomStablePlant(n: number, m: number, p: number, seed: number): PlantSpec {
  const A = new Matrix(seededMatrix(n, n, seed)).mul(2 / Math.sqrt(n)).sub(Matrix.eye(n).mul(1.5));
  return {
    id: "p",
    model: {
      type: "state-space",
      A: A.to2DArray(),
      B: new Matrix(seededMatrix(n, m, seed + 1)).mul(2).to2DArray(),
      C: new Matrix(seededMatrix(p, n, seed + 2)).mul(2).to2DArray(),
      D: Matrix.zeros(p, m).to2DArray(),
      sampleTime: null,
    },
  } as PlantSpec;
}

describe("margins of loops with integrators", () => {
  it.each([[10, 3], [10, 10], [30, 10]])("report no gain margin at ω = 0 for a %d-state two-input LQR with integral action and a Kalman filter (seed %d)", (n, seed) => {
    // seeds where the unfixed routine reported gain margins of −290 to −330 dB at ω = 0
    const plant = randomStablePlant(n, 2, 2, seed);
    const variant: VariantSpec = {
      id: "v",
      plant: "p",
      stateFeedback: { method: "lqr", Q: Matrix.eye(n).to2DArray(), R: Matrix.eye(2).to2DArray() },
      integralAction: { outputs: [0, 1], weights: [1, 1] },
      observer: { method: "kalman", processNoise: Matrix.eye(2).to2DArray(), measurementNoise: Matrix.eye(2).to2DArray() },
      margins: { at: "plant-input" },
    } as VariantSpec;
    const r = evaluateVariant(plant, variant);
    expect(r.error).toBeUndefined();
    const margins = r.margins!;
    // The integrator of the broken channel stays in the loop: nothing finite at DC to measure.
    for (const g of [margins.gainDb, margins.stateFeedbackLoop?.gainDb]) {
      if (g !== null && g !== undefined) expect(Math.abs(g), `gain margin ${g} dB`).toBeLessThan(100);
    }
    expect(margins.phaseDeg).toBeGreaterThan(0);
    expect(margins.stateFeedbackLoop).toBeDefined();
  });

  it("gives an unbounded delay margin, not Infinity, when the only gain crossover is at ω = 0 (L = 1/(s + 1) and its sampled twin)", () => {
    // Hand-derived: |L(jω)| = 1/√(1 + ω²) equals 1 only at ω = 0, where ∠L = 0, so the phase
    // margin is 180° there; a delay e^{−jωτ} does not change L(0), so no delay destabilises the
    // loop. Sampled twin: L(z) = 0.5/(z − 0.5) has |L(1)| = 1 and |L(e^{jωT})| < 1 for ω > 0.
    const continuous = loopMargins(stateSpaceFromMatrices({ A: [[-1]], B: [[1]], C: [[1]], D: [[0]] }));
    expect(continuous.gainCrossoversRadPerSec).toEqual([0]);
    expect(continuous.phaseMarginDeg).toBeCloseTo(180, 12);
    expect(continuous.delayMarginSec).toBeNull();
    const sampled = loopMargins(stateSpaceFromMatrices({ A: [[0.5]], B: [[1]], C: [[0.5]], D: [[0]], sampleTime: 1 }));
    expect(sampled.gainCrossoversRadPerSec).toEqual([0]);
    expect(sampled.delayMarginSec).toBeNull();
    expect(sampled.delayMarginSamples).toBeNull();
  });

  it("still reports the DC phase crossover of a loop without a pole at 0 (L(0) = −2: gain margin −6.02 dB)", () => {
    // L(s) = −2/(s + 1): L(0) = −2 is real and negative; hand-derived gain margin 20·log10(1/2).
    const m = loopMargins(stateSpaceFromMatrices({ A: [[-1]], B: [[1]], C: [[-2]], D: [[0]] }));
    expect(m.phaseCrossoversRadPerSec).toContain(0);
    expect(m.gainMargins.find((g) => g.frequencyRadPerSec === 0)!.gainDb).toBeCloseTo(20 * Math.log10(0.5), 12);
  });
});
