import fc from "fast-check";
import { Matrix, solve } from "ml-matrix";
import { describe, expect, it } from "vitest";
import { EngineError } from "../../../shared-engine/errors";
import { assembleCompensator } from "../../../shared-engine/design/compensator";
import { referenceFeedforward } from "../../../shared-engine/design/feedforward";
import { designIntegralLqr } from "../../../shared-engine/design/integralAction";
import { kalmanContinuous, kalmanDiscrete } from "../../../shared-engine/design/kalman";
import { lqr } from "../../../shared-engine/design/lqr";
import { eigenvalues, type Complex } from "../../../shared-engine/linalg";
import { createStateSpace, discretize, type StateSpace } from "../../../shared-engine/model";
import { expectAtMost, expectComplexSetsClose, expectMatrixClose, expectRelativeClose, expectEngineError as expectKind } from "../../helpers/assertions";
import { matrixOf } from "./riccatiTestSystems";

/** SISO D + C(sI − A)⁻¹B at s = jω (continuous) or z = e^{jωT}, via the real 2n×2n system. */
function evaluateSiso(sys: StateSpace, s: Complex): Complex {
  const n = sys.A.rows;
  const big = new Matrix(2 * n, 2 * n);
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < n; j++) {
      const a = (i === j ? s.re : 0) - sys.A.get(i, j);
      big.set(i, j, a);
      big.set(n + i, n + j, a);
    }
    big.set(i, n + i, -s.im);
    big.set(n + i, i, s.im);
  }
  const rhs = new Matrix(2 * n, 1);
  for (let i = 0; i < n; i++) rhs.set(i, 0, sys.B.get(i, 0));
  const x = solve(big, rhs);
  let re = sys.D.get(0, 0);
  let im = 0;
  for (let i = 0; i < n; i++) {
    re += sys.C.get(0, i) * x.get(i, 0);
    im += sys.C.get(0, i) * x.get(n + i, 0);
  }
  return { re, im };
}

function dcGain(sys: StateSpace, from: "input" | "disturbance"): Matrix {
  const n = sys.A.rows;
  const M = sys.sampleTime === null ? sys.A.clone().mul(-1) : Matrix.eye(n, n).sub(sys.A);
  return sys.C.mmul(solve(M, from === "input" ? sys.B : sys.F)).add(from === "input" ? sys.D : sys.E);
}

describe("assembleCompensator: hand-worked cases", () => {
  it("builds the continuous controller −6/(s + 5) and the loop 6/(s(s + 5)) for ẋ = u, K = 2, L = 3", () => {
    // x̂' = u + 3(y − x̂), u = −2x̂ + r ⇒ x̂' = −5x̂ + r + 3y (hand-worked).
    const g = createStateSpace({ A: [[0]], B: [[1]], C: [[1]] });
    const c = assembleCompensator({ model: g, K: [[2]], L: [[3]], observerForm: "predictor" });
    expectMatrixClose(c.controller.A, [[-5]], 1e-15, "A_c");
    expectMatrixClose(c.controller.B, [[1, 3]], 1e-15, "B_c");
    expectMatrixClose(c.controller.C, [[-2]], 1e-15, "C_c");
    expectMatrixClose(c.controller.D, [[1, 0]], 1e-15, "D_c");
    expectComplexSetsClose(c.closedLoopPoles, [{ re: -2, im: 0 }, { re: -3, im: 0 }], 1e-12, "eig(A − BK) ∪ eig(A − LC)");
    for (const w of [0.3, 1, 7]) {
      const got = evaluateSiso(c.loopAtPlantInput, { re: 0, im: w });
      // 6/(jω(jω + 5)) = 6/(−ω² + 5jω)
      const den = { re: -w * w, im: 5 * w };
      const mag2 = den.re * den.re + den.im * den.im;
      expectRelativeClose(got.re, (6 * den.re) / mag2, 1e-12, `Re L(j${w})`);
      expectRelativeClose(got.im, (-6 * den.im) / mag2, 1e-12, `Im L(j${w})`);
    }
    expect(c.separation.passed).toBe(true);
    expect(c.servoLoop).toBe(c.closedLoop);
  });

  it("builds the sampled current-estimate controller by hand for x[k+1] = x + u, K = 0.5, M = 0.6", () => {
    // x̂ = x̄ + 0.6(y − x̄), u = −0.5x̂ + r, x̄⁺ = x̂ + u ⇒ A_c = 0.2, B_c = [1, 0.3], C_c = −0.2,
    // D_c = [1, −0.3] (hand-worked); observer pole 1 − 0.6 = 0.4, regulator pole 0.5.
    const g = createStateSpace({ A: [[1]], B: [[1]], C: [[1]], sampleTime: 0.1 });
    const c = assembleCompensator({ model: g, K: [[0.5]], L: [[0.6]], M: [[0.6]], observerForm: "current" });
    expectMatrixClose(c.controller.A, [[0.2]], 1e-15, "A_c");
    expectMatrixClose(c.controller.B, [[1, 0.3]], 1e-15, "B_c");
    expectMatrixClose(c.controller.C, [[-0.2]], 1e-15, "C_c");
    expectMatrixClose(c.controller.D, [[1, -0.3]], 1e-15, "D_c");
    expectComplexSetsClose(c.closedLoopPoles, [{ re: 0.5, im: 0 }, { re: 0.4, im: 0 }], 1e-12, "closed-loop poles");
    expect(c.warnings.some((w) => /differs from the given L/.test(w))).toBe(false);
  });

  it("uses the reference feedforward gain so the nominal DC gain from r to y is 1", () => {
    const g = createStateSpace({ A: [[0, 1], [-2, -1]], B: [[0], [1]], C: [[1, 0]] });
    const K = lqr(g.A, g.B, [[4, 0], [0, 1]], [[1]]).K;
    const L = kalmanContinuous(g.A, g.C, null, [[1, 0], [0, 1]], [[0.1]]).L;
    const { N } = referenceFeedforward(g, K);
    const c = assembleCompensator({ model: g, K, L, observerForm: "predictor", integratedOutputs: [], referenceGain: N });
    expectRelativeClose(dcGain(c.servoLoop, "input").get(0, 0), 1, 1e-12, "DC gain r → y");
  });
});

describe("assembleCompensator: integral action with an observer", () => {
  // Two-state plant with a disturbance through F and a direct feedthrough on y2 (test data
  // made up for the loop algebra, common practice).
  const plant = createStateSpace({
    A: [[0, 1], [-1, -0.4]], B: [[0, 0], [1, 0.5]], C: [[1, 0], [0, 1]], D: [[0, 0], [0, 0.3]], F: [[0], [1]], E: [[0.2], [0]],
  });

  const cases: { name: string; model: StateSpace; form: "predictor" | "current" }[] = [
    { name: "continuous", model: plant, form: "predictor" },
    { name: "sampled, predictor form", model: discretize(plant, 0.05), form: "predictor" },
    { name: "sampled, current-estimate form", model: discretize(plant, 0.05), form: "current" },
  ];
  for (const { name, model, form } of cases) {
    it(`gives DC gain 1 from r and 0 from a constant disturbance on the integrated outputs (${name})`, () => {
      const design = designIntegralLqr(model, [0, 1], Matrix.eye(2, 2), Matrix.eye(2, 2), [2, 2]);
      const G = model.F;
      const kf: { L: Matrix; M?: Matrix; observerPoles: Complex[] } = model.sampleTime === null
        ? kalmanContinuous(model.A, model.C, G, [[1]], Matrix.eye(2, 2).mul(0.01))
        : kalmanDiscrete(model.A, model.C, G, [[1]], Matrix.eye(2, 2).mul(0.01), form);
      const c = assembleCompensator({ model, K: design.Kx, Ki: design.Ki, L: kf.L, M: kf.M, observerForm: form, integratedOutputs: [0, 1] });
      // Internal model principle: integrators of the error give zero steady-state error to
      // constant references and disturbances whatever the observer (Francis & Wonham 1976).
      const Gr = dcGain(c.servoLoop, "input");
      const Gw = dcGain(c.servoLoop, "disturbance");
      expectMatrixClose([Gr.getRow(0), Gr.getRow(1)], [[1, 0], [0, 1]], 1e-9, "DC gain r → y");
      expectMatrixClose([Gw.getRow(0), Gw.getRow(1)], [[0], [0]], 1e-9, "DC gain w → y", 1);
      expect(c.separation.passed).toBe(true);
      expectComplexSetsClose(c.closedLoopPoles, [...design.closedLoopPoles, ...kf.observerPoles], 1e-7, "separation");
      expect(c.servoLoop.C.rows).toBe(2 + 2);
      expect(c.controller.names.inputs).toEqual(["r_y1", "r_y2", "y1", "y2"]);
    });
  }
});

describe("assembleCompensator: separation principle (property)", () => {
  it("closed-loop poles equal eig(A − BK) ∪ eig(A − LC) for random controllable and observable plants", () => {
    const problem = fc.record({ n: fc.integer({ min: 1, max: 4 }), m: fc.integer({ min: 1, max: 2 }), p: fc.integer({ min: 1, max: 2 }) })
      .chain(({ n, m, p }) => fc.record({
        A: matrixOf(n, n), B: matrixOf(n, m), C: matrixOf(p, n), D: matrixOf(p, m, -1, 1),
        kind: fc.constantFrom("continuous", "predictor", "current"),
      }));
    let checked = 0;
    fc.assert(
      fc.property(problem, ({ A, B, C, D, kind }) => {
        const cont = createStateSpace({ A, B, C, D });
        const g = kind === "continuous" ? cont : discretize(cont, 0.1);
        const n = A.length;
        let K: Matrix, L: Matrix, M: Matrix | undefined;
        try {
          K = lqr(g.A, g.B, Matrix.eye(n, n), Matrix.eye(B[0]!.length, B[0]!.length), null, g.sampleTime).K;
          if (kind === "continuous") L = kalmanContinuous(g.A, g.C, null, Matrix.eye(n, n), Matrix.eye(C.length, C.length)).L;
          else {
            const kf = kalmanDiscrete(g.A, g.C, null, Matrix.eye(n, n), Matrix.eye(C.length, C.length), kind === "current" ? "current" : "predictor");
            L = kf.L;
            M = kf.M;
          }
        } catch (error) {
          if (error instanceof EngineError && error.kind === "no-stabilizing-solution") return true; // unstabilizable draw
          throw error;
        }
        let c;
        try {
          c = assembleCompensator({ model: g, K, L, M, observerForm: kind === "current" ? "current" : "predictor" });
        } catch (error) {
          // D·D_c = I can make a draw's loop ill-posed; that is reported, not a wrong answer.
          if (error instanceof EngineError && error.kind === "singular") return true;
          throw error;
        }
        checked++;
        const Lp = kind === "current" ? g.A.mmul(M!) : L;
        const expected = [...eigenvalues(g.A.clone().sub(g.B.mmul(K))), ...eigenvalues(g.A.clone().sub(Lp.mmul(g.C)))];
        expectComplexSetsClose(c.closedLoopPoles, expected, 1e-6, "closed-loop poles");
        expect(c.separation.passed).toBe(true);
        // The loop broken at input 1 closes back to the same poles: eig(A_L − B_L(1 + D_L)⁻¹C_L).
        const Lin = c.loopAtPlantInput;
        const closed = Lin.A.clone().sub(Lin.B.mmul(Lin.C).mul(1 / (1 + Lin.D.get(0, 0))));
        expectComplexSetsClose(eigenvalues(closed), expected, 1e-6, "poles of the closed input loop");
        return true;
      }),
      { seed: 314159, numRuns: 60 },
    );
    expect(checked).toBeGreaterThan(40);
  });
});

describe("assembleCompensator: Doyle's 1978 example", () => {
  // J. C. Doyle, "Guaranteed margins for LQG regulators", IEEE TAC 23(4), 1978 (from memory):
  // A = [[1, 1], [0, 1]], B = [0; 1], C = [1 0]; LQR weight q·[1 1]ᵀ[1 1], R = 1; Kalman
  // process noise σ through [1; 1], measurement noise 1. As q = σ grow the LQG loop's margins
  // vanish while the LQR loop keeps |PM| ≥ 60° (Safonov & Athans 1977).
  const g = createStateSpace({ A: [[1, 1], [0, 1]], B: [[0], [1]], C: [[1, 0]] });
  const designAt = (q: number) => {
    const K = lqr(g.A, g.B, [[q, q], [q, q]], [[1]]).K;
    const L = kalmanContinuous(g.A, g.C, [[1], [1]], [[q]], [[1]]).L;
    return assembleCompensator({ model: g, K, L, observerForm: "predictor" });
  };

  it("reproduces Doyle's closed-form gains K = (2 + √(4 + q))[1 1] and L = (2 + √(4 + σ))[1; 1]", () => {
    // Closed forms from the same paper (from memory); checked against the Riccati solvers.
    const q = 100;
    const K = lqr(g.A, g.B, [[q, q], [q, q]], [[1]]).K;
    const L = kalmanContinuous(g.A, g.C, [[1], [1]], [[q]], [[1]]).L;
    const f = 2 + Math.sqrt(4 + q);
    expectMatrixClose(K, [[f, f]], 1e-12, "K");
    expectMatrixClose(L, [[f], [f]], 1e-12, "L");
  });

  it("shows the observer-based phase margin falling below 10° while the state-feedback loop keeps 60°", () => {
    const phase: number[] = [];
    const gain: number[] = [];
    for (const q of [1, 100, 10000]) {
      const c = designAt(q);
      expect(c.separation.passed).toBe(true);
      const obs = c.margins!.observerLoop;
      const sf = c.margins!.stateFeedbackLoop;
      expect(Math.abs(sf.phaseMarginDeg!)).toBeGreaterThanOrEqual(60);
      phase.push(Math.abs(obs.phaseMarginDeg!));
      gain.push(Math.abs(obs.gainMarginDb!));
      expect(c.warnings.some((w) => /observer-based loop keeps only \d+° of phase margin; the state-feedback loop had \d+°/.test(w))).toBe(true);
    }
    expect(phase[1]!).toBeLessThan(10);
    expect(phase[0]!).toBeGreaterThan(phase[1]!);
    expect(phase[1]!).toBeGreaterThan(phase[2]!);
    expect(gain[0]!).toBeGreaterThan(gain[1]!);
    expect(gain[1]!).toBeGreaterThan(gain[2]!);
    expectAtMost(gain[2]!, 0.01, "gain margin (dB) at q = σ = 10⁴");
  });

  it("gives no margin warning when the observer is much faster than a well-damped regulator", () => {
    // Stable plant, modest LQR and a fast observer: the loops stay close (common practice).
    const h = createStateSpace({ A: [[0, 1], [-1, -1]], B: [[0], [1]], C: [[1, 0]] });
    const K = lqr(h.A, h.B, [[1, 0], [0, 0]], [[1]]).K;
    const L = kalmanContinuous(h.A, h.C, null, [[1e-4, 0], [0, 1e-4]], [[1]]).L;
    const c = assembleCompensator({ model: h, K, L, observerForm: "predictor" });
    expect(c.margins).toBeDefined();
    expect(c.warnings.filter((w) => /Doyle/.test(w))).toEqual([]);
  });
});

describe("assembleCompensator: argument checks", () => {
  const g = createStateSpace({ A: [[0]], B: [[1]], C: [[1]] });
  it("rejects the current form on a continuous plant and without M", () => {
    expectKind(() => assembleCompensator({ model: g, K: [[1]], L: [[1]], observerForm: "current" }), "invalid-argument", /sampled plants/);
    const d = createStateSpace({ A: [[1]], B: [[1]], C: [[1]], sampleTime: 1 });
    expectKind(() => assembleCompensator({ model: d, K: [[1]], L: [[1]], observerForm: "current" }), "invalid-argument", /needs the current-estimate gain M/);
  });
  it("rejects gains of the wrong shape and integral action without Ki", () => {
    expectKind(() => assembleCompensator({ model: g, K: [[1, 2]], L: [[1]], observerForm: "predictor" }), "shape-mismatch", /K must be 1×1/);
    expectKind(() => assembleCompensator({ model: g, K: [[1]], L: [[1], [2]], observerForm: "predictor" }), "shape-mismatch", /L must be 1×1/);
    expectKind(() => assembleCompensator({ model: g, K: [[1]], L: [[1]], observerForm: "predictor", integratedOutputs: [0] }), "invalid-argument", /Ki is required/);
    expectKind(() => assembleCompensator({ model: g, K: [[1]], L: [[1]], Ki: [[1]], observerForm: "predictor", integratedOutputs: [3] }), "invalid-argument", /integratedOutputs\[0\]/);
  });
  it("reports an ill-posed algebraic loop", () => {
    // y = x + u and the current-estimate controller with K·M·D = 1: I − KMD is singular.
    const d = createStateSpace({ A: [[0.5]], B: [[1]], C: [[1]], D: [[1]], sampleTime: 1 });
    expectKind(() => assembleCompensator({ model: d, K: [[1]], L: [[0.5]], M: [[1]], observerForm: "current" }), "singular", /not well posed/);
  });
});
