import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { EngineError } from "../../../shared-engine/errors";
import { lqr, lqrWeightSweep } from "../../../shared-engine/design/lqr";
import { loopMargins } from "../../../shared-engine/design/lqrMargins";
import { Matrix } from "ml-matrix";
import { solveDiscreteRiccati } from "../../../shared-engine/design/riccatiDiscrete";
import { expectComplexSetsClose, expectMatrixClose, expectRelativeClose, expectEngineError as expectKind } from "../../helpers/assertions";
import { add, diag, matrixOf, mul, tr } from "./riccatiTestSystems";

const DEG = 180 / Math.PI;

describe("lqr (continuous) and its margin report", () => {
  it("gives K = [1, 2] for the double integrator and reports its exact phase margin", () => {
    // Benner–Laub–Mehrmann (1995) continuous example 1 (from memory): K = [1, 2].
    // L(s) = (1 + 2s)/s²; |L(jω)| = 1 at ω² = 2 + √5 and PM = atan(2ω) (derived by hand).
    const d = lqr([[0, 1], [0, 0]], [[0], [1]], [[1, 0], [0, 2]], [[1]]);
    expectMatrixClose(d.K, [[1, 2]], 1e-14, "K");
    expect(d.sampleTime).toBeNull();
    const m = d.margins!;
    const wc = Math.sqrt(2 + Math.sqrt(5));
    expectRelativeClose(m.gainCrossoverRadPerSec!, wc, 1e-10, "gain crossover");
    expectRelativeClose(m.phaseMarginDeg!, Math.atan(2 * wc) * DEG, 1e-9, "phase margin");
    expect(m.upperGainMargin).toBeNull();
    expect(m.guaranteeApplies).toBe(true);
    expect(m.guaranteeHolds).toBe(true);
  });

  it("reports the lower gain margin √2 − 1 and phase margin atan(√(2 + 2√2)) for the unstable first-order plant", () => {
    // a = b = q = r = 1: K = 1 + √2, L(s) = K/(s − 1); L(0) = −K gives the critical gain 1/K = √2 − 1;
    // |L(jω)| = 1 at ω² = K² − 1 = 2 + 2√2 and PM = atan(ω) (derived by hand).
    const d = lqr([[1]], [[1]], [[1]], [[1]]);
    const m = d.margins!;
    expectRelativeClose(m.lowerGainMargin, Math.SQRT2 - 1, 1e-12, "lower gain margin");
    expectRelativeClose(m.phaseMarginDeg!, Math.atan(Math.sqrt(2 + 2 * Math.SQRT2)) * DEG, 1e-9, "phase margin");
    // |1 + L(jω)| = √(ω² + 2)/√(ω² + 1) > 1, infimum 1 as ω → ∞.
    expectRelativeClose(m.minReturnDifference, 1, 1e-12, "min |1 + L|");
    expect(m.guaranteeHolds).toBe(true);
  });

  it("meets the Safonov–Athans margins (|1+L| ≥ 1, PM ≥ 60°, GM ⊇ [1/2, ∞)) on random single-input plants", () => {
    // Safonov & Athans, IEEE TAC 22(2), 1977: guaranteed margins of LQR with scalar R and N = 0.
    const plant = fc.integer({ min: 1, max: 6 }).chain((n) =>
      fc.record({ A: matrixOf(n, n), B: matrixOf(n, 1), C: matrixOf(n, n, -4, 4), r: fc.integer({ min: 1, max: 16 }) }));
    fc.assert(
      fc.property(plant, ({ A, B, C, r }) => {
        const n = A.length;
        const Q = add(mul(tr(C), C), diag(Array(n).fill(0.25)));
        let d;
        try {
          d = lqr(A, B, Q, [[r / 4]]);
        } catch (error) {
          expect((error as EngineError).kind).toBe("no-stabilizing-solution");
          return;
        }
        const m = d.margins!;
        expect(m.minReturnDifference).toBeGreaterThanOrEqual(1 - 1e-8);
        if (m.phaseMarginDeg !== null) expect(m.phaseMarginDeg).toBeGreaterThanOrEqual(60 - 1e-6);
        expect(m.lowerGainMargin).toBeLessThanOrEqual(0.5 + 1e-8);
        expect(m.upperGainMargin).toBeNull();
        expect(m.guaranteeHolds).toBe(true);
      }),
      { seed: 60601, numRuns: 80 },
    );
  });

  it("flags a lightly damped non-optimal gain as missing the guarantee, with its exact phase margin", () => {
    // L(s) = (1 + 0.2s)/s²: |L| = 1 at ω² = (0.04 + √(0.0016 + 4))/2, PM = atan(0.2ω) (by hand),
    // about 21.8°, and |1 + L| dips below 1 there.
    const A = new Matrix([[0, 1], [0, 0]]), B = new Matrix([[0], [1]]), K = new Matrix([[1, 0.2]]);
    const poles = [{ re: -0.1, im: Math.sqrt(0.99) }, { re: -0.1, im: -Math.sqrt(0.99) }];
    const m = loopMargins(A, B, K, poles, true);
    const wc = Math.sqrt((0.04 + Math.sqrt(0.0016 + 4)) / 2);
    expectRelativeClose(m.phaseMarginDeg!, Math.atan(0.2 * wc) * DEG, 1e-9, "phase margin");
    expect(m.minReturnDifference).toBeLessThan(0.5);
    expect(m.guaranteeHolds).toBe(false);
  });

  it("marks the guarantee as not applicable when a cross weight N is present", () => {
    const d = lqr([[0, 1], [0, 0]], [[0], [1]], [[1, 0], [0, 2]], [[1]], [[0.5], [0]]);
    expect(d.margins!.guaranteeApplies).toBe(false);
  });

  it("gives no margin report for multi-input or discrete designs", () => {
    expect(lqr([[0, 1], [0, 0]], [[1, 0], [0, 1]], [[1, 0], [0, 1]], [[1, 0], [0, 1]]).margins).toBeNull();
    expect(lqr([[1, 0.1], [0, 1]], [[0.005], [0.1]], [[1, 0], [0, 1]], [[1]], null, 0.1).margins).toBeNull();
  });
});

describe("lqr (discrete)", () => {
  it("uses the discrete Riccati equation when a sample time is given", () => {
    const A = [[1, 0.1], [0, 1]], B = [[0.005], [0.1]], Q = [[1, 0], [0, 1]], R = [[1]];
    const d = lqr(A, B, Q, R, null, 0.1);
    const s = solveDiscreteRiccati(A, B, Q, R);
    expectMatrixClose(d.K, s.K, 1e-15, "K");
    expect(d.sampleTime).toBe(0.1);
    for (const p of d.closedLoopPoles) expect(Math.hypot(p.re, p.im)).toBeLessThan(1);
  });

  it("rejects a sample time that is not a positive finite number", () => {
    for (const t of [0, -1, NaN, Infinity]) expectKind(() => lqr([[1]], [[1]], [[1]], [[1]], null, t), "invalid-argument", /sampleTime/);
  });
});

describe("lqrWeightSweep", () => {
  it("follows the scalar closed form: closed-loop pole −√(1 + 1/ρ) for a = b = q = 1", () => {
    // From the scalar closed form X = ρ(1 + √(1 + 1/ρ)) (derived by hand).
    const rhos = [1e-4, 0.01, 1, 100, 1e4];
    const sweep = lqrWeightSweep([[1]], [[1]], [[1]], [[1]], rhos);
    sweep.forEach(({ rho, closedLoopPoles, K }, i) => {
      expect(rho).toBe(rhos[i]);
      expectComplexSetsClose(closedLoopPoles, [{ re: -Math.sqrt(1 + 1 / rho), im: 0 }], 1e-12);
      expectRelativeClose(K[0]![0]!, 1 + Math.sqrt(1 + 1 / rho), 1e-12, "K");
    });
  });

  it("puts the double integrator's poles on the Butterworth pattern ρ^(−1/4)·e^(±j135°)", () => {
    // Symmetric root locus of G(s) = 1/s² with Q = CᵀC, C = [1 0]: s⁴ + 1/ρ = 0 (textbook result,
    // e.g. Bryson & Ho 1975 §5.5, from memory).
    for (const { rho, closedLoopPoles } of lqrWeightSweep([[0, 1], [0, 0]], [[0], [1]], [[1, 0], [0, 0]], [[1]], [0.01, 1, 16])) {
      const r = rho ** -0.25;
      expectComplexSetsClose(closedLoopPoles, [{ re: -r / Math.SQRT2, im: r / Math.SQRT2 }, { re: -r / Math.SQRT2, im: -r / Math.SQRT2 }], 1e-10);
    }
  });

  it("rejects an empty list and non-positive weight factors", () => {
    expectKind(() => lqrWeightSweep([[1]], [[1]], [[1]], [[1]], []), "empty");
    expectKind(() => lqrWeightSweep([[1]], [[1]], [[1]], [[1]], [1, 0]), "invalid-argument", /rhoValues\[1\]/);
    expectKind(() => lqrWeightSweep([[1]], [[1]], [[1]], [[1]], [NaN]), "invalid-argument");
  });

  it("names the weight factor at which a solve fails", () => {
    try {
      lqrWeightSweep([[1, 0], [0, -1]], [[0], [1]], [[1, 0], [0, 1]], [[1]], [2]);
      expect.fail("expected a failure");
    } catch (error) {
      expect((error as EngineError).kind).toBe("no-stabilizing-solution");
      expect((error as EngineError).details.rho).toBe(2);
    }
  });
});
