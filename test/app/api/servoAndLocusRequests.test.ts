// The integral, feedforward, compensator and reduced-observer requests, the LQR weight and
// observer speed loci, and root-locus progress: small cases with hand-worked answers (or a
// benchmark solution carried over by a change of coordinates), bad params with field names,
// progress monotonic in [0, 1] and cancellation after the first progress report.
import { describe, expect, it } from "vitest";
import { call, expectMonotonicFractions, failure, recorder } from "./requestHelpers";
import { expectAtMost, expectComplexSetsClose, expectMatrixClose, expectRelativeClose } from "../../helpers/assertions";


const re = (...values: number[]) => values.map((v) => ({ re: v, im: 0 }));
const LAG = { A: [[-1]], B: [[1]], C: [[1]] };
const INTEGRATOR = { A: [[0]], B: [[1]], C: [[1]] };

describe("design.integral", () => {
  it("places the servo poles −2 (plant) and −3 (integrator) of ẋ = −x + u with Kx = 4, Ki = −6", async () => {
    const r = await call("design.integral", { model: LAG, outputs: [0], method: "poles", poles: [-2], integratorPoles: [-3] });
    // Hand-worked: with xᵢ' = r − x and u = −Kx·x − Ki·xᵢ the loop has s² + (1 + Kx)s − Ki = s² + 5s + 6.
    expectMatrixClose(r.Kx, [[4]], 1e-14, "Kx");
    expectMatrixClose(r.Ki, [[-6]], 1e-14, "Ki");
    expectComplexSetsClose(r.closedLoopPoles, re(-2, -3), 1e-13);
    expect(r.servoDcGain.passed).toBe(true);
    expectMatrixClose(r.servoDcGain.fromReference, [[1]], 1e-13, "DC gain r → y"); // integral action: exactly 1
    expect(r.riccati).toBeNull();
    expect(r.integratorNames).toHaveLength(1);
  });

  it("designs the servo LQR of ẋ = u with Kx = 2, Ki = −1 (CAREX example 1 in the coordinates z = −xᵢ)", async () => {
    const r = await call("design.integral", { model: INTEGRATOR, outputs: [0], method: "lqr", Q: [[2]], R: [[1]], integratorWeights: [1] });
    // With z = −xᵢ the augmented plant is the double integrator (z, x) with Q = diag(1, 2), R = 1:
    // Benner, Laub & Mehrmann (1995) CAREX example 1, K = [1, 2] on (z, x) ⇒ Kx = 2, Ki = −1.
    expectMatrixClose(r.K, [[2, -1]], 1e-12, "[Kx Ki]");
    expectComplexSetsClose(r.closedLoopPoles, re(-1, -1), 1e-7); // (s + 1)², a double pole (to √ε)
    expectAtMost(r.riccati!.residual, 1e-12, "Riccati residual");
    expect(r.diagnostics.conditionMeaning).toMatch(/U11/);
    expect(r.servoLoop.B.length).toBe(2);
  });
});

describe("design.feedforward, design.compensator and design.reducedObserver", () => {
  it("gives N = 2 for ẋ = −x + u, y = 2x, K = 3, with the nominal-model warning", async () => {
    const r = await call("design.feedforward", { model: { A: [[-1]], B: [[1]], C: [[2]] }, K: [[3]] });
    // Hand-worked: closed-loop DC gain 2/(1 + 3) = 1/2, so N = 2.
    expectMatrixClose(r.N, [[2]], 1e-15, "N");
    expectMatrixClose(r.closedLoopDcGain, [[0.5]], 1e-15, "G_cl(0)");
    expect(r.diagnostics.warnings).toEqual([r.warning]);
    expect(r.warning).toMatch(/nominal/);
  });

  it("assembles the compensator of ẋ = u with K = 2, L = 3: controller −6/(s + 5), poles −2 and −3", async () => {
    const r = await call("design.compensator", { model: INTEGRATOR, K: [[2]], L: [[3]], form: "predictor" });
    // Hand-worked: x̄' = −5x̄ + r + 3y, u = −2x̄ + r (inputs [r; y]).
    expectMatrixClose(r.controller.A, [[-5]], 1e-15, "A_c");
    expectMatrixClose(r.controller.B, [[1, 3]], 1e-15, "B_c");
    expectMatrixClose(r.controller.C, [[-2]], 1e-15, "C_c");
    expectMatrixClose(r.controller.D, [[1, 0]], 1e-15, "D_c");
    expectComplexSetsClose(r.closedLoopPoles, re(-2, -3), 1e-13); // separation principle (Luenberger 1966)
    expect(r.separation.passed).toBe(true);
    // Loop at the plant input 6/(s(s + 5)): ω_gc² = (−25 + √769)/2, PM = 90° − atan(ω_gc/5);
    // state-feedback loop 2/s: PM = 90°, no gain margin (hand-worked).
    const wgc = Math.sqrt((-25 + Math.sqrt(769)) / 2);
    expectRelativeClose(r.margins!.observerLoop.phaseMarginDeg!, 90 - (Math.atan(wgc / 5) * 180) / Math.PI, 1e-6, "observer-loop PM");
    expectRelativeClose(r.margins!.stateFeedbackLoop.phaseMarginDeg!, 90, 1e-6, "state-feedback PM");
    expect(r.margins!.stateFeedbackLoop.gainMarginDb).toBeNull();
  });

  it("builds the reduced observer of [[0, 1], [−2, −3]] with F = −8 that reconstructs x exactly", async () => {
    const r = await call("design.reducedObserver", { A: [[0, 1], [-2, -3]], B: [[0], [1]], C: [[1, 0]], poles: [-8] });
    expectMatrixClose(r.F, [[-8]], 1e-14, "F");
    // Luenberger (1966): with w = (T x)₂ and q = w − L y, x̂ = M q + N y equals x (any x; x = (1.5, −0.7) here).
    const x = [1.5, -0.7];
    const y = x[0]!;
    const w = r.T[1]![0]! * x[0]! + r.T[1]![1]! * x[1]!;
    const q = w - r.L[0]![0]! * y;
    const estimate = [0, 1].map((i) => r.M[i]![0]! * q + r.N[i]![0]! * y);
    expectMatrixClose([estimate], [x], 1e-14, "x̂");
    // Hand-worked: error dynamics A₂₂ − L A₁₂ = −3 − L·(±1) = −8.
    expectRelativeClose(Math.abs(r.L[0]![0]!), 5, 1e-14, "|L|");
    expectAtMost(r.diagnostics.residual!, 1e-14, "pole error");
  });
});

describe("analysis.lqrWeightLocus and analysis.observerSpeedLocus", () => {
  it("traces the scalar LQR pole −√(1 + 1/ρ) over ρ ∈ [0.01, 100] with monotonic progress", async () => {
    const { context, fractions } = recorder();
    const r = await call("analysis.lqrWeightLocus", { A: [[1]], B: [[1]], Q: [[1]], R0: [[1]], rhoRange: [0.01, 100], points: 21 }, context);
    // Hand-worked scalar CARE 2X − X²/ρ + 1 = 0: closed-loop pole −√(1 + 1/ρ).
    expect(r.rho[0]).toBe(0.01);
    expect(r.rho[r.rho.length - 1]).toBe(100);
    expect(r.rho.length).toBeGreaterThanOrEqual(21);
    r.rho.forEach((rho, k) => expectRelativeClose(r.branches[0]![k]!.re, -Math.sqrt(1 + 1 / rho), 1e-12, `pole at ρ = ${rho}`));
    expect(r.symmetricRootLocus).toBe(true);
    expectMonotonicFractions(fractions, 2);
  });

  it("follows the Butterworth pattern ρ^(−1/4)·e^(±3πj/4) for the double integrator with Q = diag(1, 0)", async () => {
    const r = await call("analysis.lqrWeightLocus", { A: [[0, 1], [0, 0]], B: [[0], [1]], Q: [[1, 0], [0, 0]], R0: [[1]], rhoRange: [0.1, 10], points: 11 });
    // Symmetric root locus 1 + 1/(ρ s⁴) = 0 (hand-worked): stable roots ρ^(−1/4)(−1 ± j)/√2.
    r.rho.forEach((rho, k) => {
      const radius = Math.pow(rho, -0.25);
      expectComplexSetsClose([r.branches[0]![k]!, r.branches[1]![k]!], [{ re: -radius / Math.SQRT2, im: radius / Math.SQRT2 }, { re: -radius / Math.SQRT2, im: -radius / Math.SQRT2 }], 1e-10, `ρ = ${rho}`);
    });
  });

  it("stops the weight locus with kind cancelled after the first progress report", async () => {
    const { context, fractions } = recorder(1);
    const e = await failure("analysis.lqrWeightLocus", { A: [[1]], B: [[1]], Q: [[1]], R0: [[1]], rhoRange: [0.01, 100] }, context);
    expect(e.kind).toBe("cancelled");
    expect(fractions).toHaveLength(1);
  });

  it("scales the observer poles −10, −11 by f with ‖L(f)‖ from the hand-worked gain", async () => {
    const { context, fractions } = recorder();
    const r = await call("analysis.observerSpeedLocus", { A: [[0, 1], [-2, -3]], C: [[1, 0]], poles: [-10, -11], factorRange: [0.5, 3], points: 11 }, context);
    r.factors.forEach((f, k) => {
      expectComplexSetsClose([r.branches[0]![k]!, r.branches[1]![k]!], re(-10 * f, -11 * f), 1e-12, `f = ${f}`);
      // s² + (3 + l₁)s + (2 + 3l₁ + l₂) = s² + 21f·s + 110f² (hand-worked).
      const l1 = 21 * f - 3;
      const l2 = 110 * f * f - 2 - 3 * l1;
      expectRelativeClose(r.gainNorms[k]!, Math.hypot(l1, l2), 1e-12, `‖L‖ at f = ${f}`);
    });
    expect(r.factors[0]).toBe(0.5);
    expect(r.factors[r.factors.length - 1]).toBe(3);
    expectMonotonicFractions(fractions, 2);
  });

  it("stops the observer speed locus with kind cancelled after the first progress report", async () => {
    const { context } = recorder(1);
    const e = await failure("analysis.observerSpeedLocus", { A: [[0, 1], [-2, -3]], C: [[1, 0]], poles: [-10, -11], factorRange: [0.5, 3] }, context);
    expect(e.kind).toBe("cancelled");
  });
});

describe("analysis.rootLocus progress", () => {
  const loop = { A: [[0, 1, 0], [0, 0, 1], [0, -2, -3]], B: [[0], [0], [1]], C: [[1, 0, 0]] };

  it("reports progress from the tracing, monotonic in [0, 1]", async () => {
    const { context, fractions } = recorder();
    await call("analysis.rootLocus", { model: loop }, context);
    expectMonotonicFractions(fractions, 2);
    expect(fractions.filter((f) => f > 0 && f < 1).length).toBeGreaterThan(3);
  });

  it("stops with kind cancelled when cancellation follows the first progress report", async () => {
    const { context } = recorder(2); // the first report (0) comes before tracing starts
    const e = await failure("analysis.rootLocus", { model: loop }, context);
    expect(e.kind).toBe("cancelled");
  });
});

describe("servo, feedforward, compensator and locus parameter checks", () => {
  const cases: [string, string, unknown, string, string][] = [
    ["a missing method", "design.integral", { model: LAG, outputs: [0] }, "invalid-argument", "method"],
    ["missing outputs", "design.integral", { model: LAG, method: "poles", poles: [-1], integratorPoles: [-2] }, "invalid-argument", "outputs"],
    ["an output index out of range", "design.integral", { model: LAG, outputs: [1], method: "poles", poles: [-1], integratorPoles: [-2] }, "invalid-argument", "outputs"],
    ["too few plant poles", "design.integral", { model: LAG, outputs: [0], method: "poles", poles: [], integratorPoles: [-2] }, "empty", "poles"],
    ["a wrong number of integrator poles", "design.integral", { model: LAG, outputs: [0], method: "poles", poles: [-1], integratorPoles: [-2, -3] }, "invalid-argument", "integratorPoles"],
    ["a Q of the integrator size", "design.integral", { model: LAG, outputs: [0], method: "lqr", Q: [[1, 0], [0, 1]], R: [[1]], integratorWeights: [1] }, "shape-mismatch", "Q"],
    ["a zero integrator weight", "design.integral", { model: LAG, outputs: [0], method: "lqr", Q: [[1]], R: [[1]], integratorWeights: [0] }, "invalid-argument", "integratorWeights"],
    ["a K of the wrong size", "design.feedforward", { model: LAG, K: [[1, 2]] }, "shape-mismatch", "K"],
    ["a missing observer form", "design.compensator", { model: LAG, K: [[1]], L: [[1]] }, "invalid-argument", "form"],
    ["a current form on a continuous plant", "design.compensator", { model: LAG, K: [[1]], L: [[1]], M: [[1]], form: "current" }, "invalid-argument", "form"],
    ["an L of the wrong size", "design.compensator", { model: LAG, K: [[1]], L: [[1, 1]], form: "predictor" }, "shape-mismatch", "L"],
    ["a text pole", "design.reducedObserver", { A: [[0, 1], [-2, -3]], B: [[0], [1]], C: [[1, 0]], poles: ["fast"] }, "invalid-argument", "poles"],
    ["a decreasing ρ range", "analysis.lqrWeightLocus", { A: [[1]], B: [[1]], Q: [[1]], R0: [[1]], rhoRange: [10, 1] }, "invalid-argument", "rhoRange"],
    ["a non-positive ρ", "analysis.lqrWeightLocus", { A: [[1]], B: [[1]], Q: [[1]], R0: [[1]], rhoRange: [0, 1] }, "invalid-argument", "rhoRange"],
    ["an R0 of the wrong size", "analysis.lqrWeightLocus", { A: [[1]], B: [[1]], Q: [[1]], R0: [[1, 0], [0, 1]], rhoRange: [1, 10] }, "shape-mismatch", "R0"],
    ["too many points", "analysis.lqrWeightLocus", { A: [[1]], B: [[1]], Q: [[1]], R0: [[1]], rhoRange: [1, 10], points: 1e6 }, "invalid-argument", "points"],
    ["a factor range of one number", "analysis.observerSpeedLocus", { A: [[0]], C: [[1]], poles: [-1], factorRange: [1] }, "invalid-argument", "factorRange"],
  ];
  it.each(cases)("rejects %s (%s) with a specific kind naming the field", async (_what, method, params, kind, field) => {
    const e = await failure(method, params);
    expect(e.kind).toBe(kind);
    expect(e.details.field).toBe(field);
  });
});
