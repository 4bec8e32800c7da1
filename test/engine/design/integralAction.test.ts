import fc from "fast-check";
import { Matrix, solve } from "ml-matrix";
import { describe, expect, it } from "vitest";
import { EngineError } from "../../../shared-engine/errors";
import { augmentWithIntegrators, designIntegralLqr, designIntegralPoles } from "../../../shared-engine/design/integralAction";
import { createStateSpace, discretize, type StateSpace } from "../../../shared-engine/model";
import { expectAtMost, expectComplexSetsClose, expectMatrixClose, expectRelativeClose, expectEngineError as expectKind } from "../../helpers/assertions";
import { matrixOf } from "./riccatiTestSystems";

/** DC gain of a loop computed here from its definition (0 = Ax + Bu continuous, x = Ax + Bu sampled). */
function dcGain(sys: StateSpace, from: "input" | "disturbance"): Matrix {
  const n = sys.A.rows;
  const B = from === "input" ? sys.B : sys.F;
  const D = from === "input" ? sys.D : sys.E;
  const M = sys.sampleTime === null ? sys.A.clone().mul(-1) : Matrix.eye(n, n).sub(sys.A);
  return sys.C.mmul(solve(M, B)).add(D);
}

/** Rows `rows` of the DC gain, every column. */
const rowsOf = (G: Matrix, rows: number[]): number[][] => rows.map((i) => G.getRow(i));

// Three-state, two-input plant with a disturbance (hand-made test data, common practice:
// stable but lightly damped, non-zero D on y2 so the −D rows of the augmentation matter).
const mimoSpec = {
  A: [[0, 1, 0], [-2, -0.5, 1], [0, 0, -3]],
  B: [[0, 0], [1, 0], [0.5, 2]],
  C: [[1, 0, 0], [0, 1, 0], [0, 0, 1]],
  D: [[0, 0], [0, 0.2], [0, 0]],
  F: [[0], [1], [0.5]],
  E: [[0], [0], [0.1]],
};

describe("augmentWithIntegrators", () => {
  it("appends integrators of the tracking error with the continuous and sampled structures", () => {
    const g = createStateSpace(mimoSpec);
    const a = augmentWithIntegrators(g, [0, 2]);
    expect(a.A.rows).toBe(5);
    expect(a.A.getRow(3)).toEqual([-1, -0, -0, 0, 0]);
    expect(a.A.getRow(4)).toEqual([-0, -0, -1, 0, 0]);
    expect(a.B.getRow(4)).toEqual([-0, -0]);
    expect(a.F.getRow(4)).toEqual([-0.1]);
    expect(a.referenceInput.to2DArray()).toEqual([[0, 0], [0, 0], [0, 0], [1, 0], [0, 1]]);
    expect(a.integratorNames).toEqual(["int_y1", "int_y3"]);

    const T = 0.1;
    const s = augmentWithIntegrators(discretize(g, T), [1]);
    // accumulator xᵢ[k+1] = xᵢ[k] + T(r − y2): row −T·C₂, diagonal 1, input row −T·D₂
    expectRelativeClose(s.A.get(3, 3), 1, 0, "accumulator diagonal");
    expectMatrixClose([s.B.getRow(3)], [[0, -T * 0.2]], 1e-15, "−T·D row");
    expectRelativeClose(s.referenceInput.get(3, 0), T, 1e-15, "reference enters scaled by T");
  });

  it("names the channel when the plant has a zero at s = 0 on it", () => {
    // G(s) = s/(s + 1) = 1 − 1/(s + 1): realised as A = −1, B = 1, C = −1, D = 1 (hand-worked)
    const g = createStateSpace({ A: [[-1]], B: [[1]], C: [[-1]], D: [[1]] });
    expectKind(() => augmentWithIntegrators(g, [0]), "not-controllable", /zero at s = 0 from u1 to y1, so an integrator on y1 cannot be stabilised/);
    // The zero-order-hold discretization keeps the zero at z = 1.
    expectKind(() => augmentWithIntegrators(discretize(g, 0.2), [0]), "not-controllable", /zero at z = 1 from u1 to y1/);
  });

  it("rejects a mode at the origin that no input moves", () => {
    const g = createStateSpace({ A: [[0, 0], [0, -1]], B: [[0], [1]], C: [[1, 1]] });
    expectKind(() => augmentWithIntegrators(g, [0]), "not-controllable", /mode at s = 0 that no input moves/);
  });

  it("rejects more integrated outputs than inputs, repeated or out-of-range indices, and an empty list", () => {
    const g = createStateSpace({ A: [[-1, 0], [0, -2]], B: [[1], [1]], C: [[1, 0], [0, 1]] });
    expectKind(() => augmentWithIntegrators(g, [0, 1]), "invalid-argument", /needs at least 2 inputs, but the plant has 1/);
    expectKind(() => augmentWithIntegrators(createStateSpace(mimoSpec), [0, 0]), "invalid-argument", /twice/);
    expectKind(() => augmentWithIntegrators(g, [2]), "invalid-argument", /outputs\[0\] is 2/);
    expectKind(() => augmentWithIntegrators(g, []), "empty");
  });

  it("reports jointly dependent channels when each one alone is fine", () => {
    // y1 = y2 = x1: two identical outputs cannot be held at independent references.
    const g = createStateSpace({ A: [[-1, 0], [0, -2]], B: [[1, 0], [0, 1]], C: [[1, 0], [1, 0]] });
    expectKind(() => augmentWithIntegrators(g, [0, 1]), "not-controllable", /transmission zero at s = 0 from the inputs \(u1, u2\) to \(y1, y2\)/);
  });
});

describe("designIntegralLqr", () => {
  it("reproduces the closed-form integrator-plant gains Kx = √5, Ki = −2", () => {
    // ẋ = u, y = x, q = 1 on x, weight 4 on ∫(r − y): with z = (xᵢ, −x) this is the double
    // integrator LQR with Q = diag(4, 1), whose gain is [√w, √(q + 2√w)] (textbook closed
    // form, from memory), so u = √w·xᵢ − √(q + 2√w)·x.
    const d = designIntegralLqr(createStateSpace({ A: [[0]], B: [[1]], C: [[1]] }), [0], [[1]], [[1]], [4]);
    expectRelativeClose(d.Kx.get(0, 0), Math.sqrt(5), 1e-12, "Kx");
    expectRelativeClose(d.Ki.get(0, 0), -2, 1e-12, "Ki");
    expectAtMost(d.riccati!.residual, 1e-12, "Riccati residual");
    expect(d.servoDcGain.passed).toBe(true);
  });

  it("gives unit DC gain from r and zero from a constant disturbance on the integrated outputs (continuous)", () => {
    const g = createStateSpace(mimoSpec);
    const d = designIntegralLqr(g, [0, 2], Matrix.eye(3, 3), [[1, 0], [0, 2]], [10, 5]);
    expect(d.K.columns).toBe(5);
    expect(d.closedLoopPoles.every((p) => p.re < 0)).toBe(true);
    // Zero steady-state error to constant r and w: the defining property of integral action
    // (internal model principle; Francis & Wonham 1976).
    expectMatrixClose(rowsOf(dcGain(d.servoLoop, "input"), [0, 2]), [[1, 0], [0, 1]], 1e-10, "DC gain r → y_s");
    expectMatrixClose(rowsOf(dcGain(d.servoLoop, "disturbance"), [0, 2]), [[0], [0]], 1e-10, "DC gain w → y_s");
    expect(d.servoLoop.C.rows).toBe(3 + 2);
    expect(d.servoLoop.names.inputs).toEqual(["r_y1", "r_y3"]);
    expectAtMost(d.servoDcGain.maxError, d.servoDcGain.tolerance, "reported DC gain error");
  });

  it("gives unit DC gain from r and zero from a constant disturbance on the integrated outputs (sampled)", () => {
    const g = discretize(createStateSpace(mimoSpec), 0.05);
    const d = designIntegralLqr(g, [1, 2], Matrix.eye(3, 3), Matrix.eye(2, 2), [1, 1]);
    expect(d.closedLoopPoles.every((p) => Math.hypot(p.re, p.im) < 1)).toBe(true);
    expectMatrixClose(rowsOf(dcGain(d.servoLoop, "input"), [1, 2]), [[1, 0], [0, 1]], 1e-9, "DC gain r → y_s at z = 1");
    expectMatrixClose(rowsOf(dcGain(d.servoLoop, "disturbance"), [1, 2]), [[0], [0]], 1e-9, "DC gain w → y_s at z = 1");
  });

  it("rejects a Q sized for the augmented system, a missing weight and a non-positive weight", () => {
    const g = createStateSpace({ A: [[0]], B: [[1]], C: [[1]] });
    expectKind(() => designIntegralLqr(g, [0], Matrix.eye(2, 2), [[1]], [1]), "shape-mismatch", /Q must be 1×1/);
    expectKind(() => designIntegralLqr(g, [0], [[1]], [[1]], []), "shape-mismatch", /integratorWeights/);
    expectKind(() => designIntegralLqr(g, [0], [[1]], [[1]], [0]), "invalid-argument", /positive/);
  });

  it("hands out copies: changing Kx leaves K and the servo loop unchanged", () => {
    const d = designIntegralLqr(createStateSpace({ A: [[0]], B: [[1]], C: [[1]] }), [0], [[1]], [[1]], [4]);
    const before = d.K.get(0, 0);
    d.Kx.set(0, 0, 1e6);
    d.augmented.A.set(0, 0, 99);
    expect(d.K.get(0, 0)).toBe(before);
    expect(d.servoLoop.A.get(0, 0)).toBeCloseTo(-before, 14);
  });

  it("holds zero steady-state error for random controllable plants (property)", () => {
    const plant = fc.record({ n: fc.integer({ min: 1, max: 4 }), m: fc.integer({ min: 1, max: 2 }), p: fc.integer({ min: 1, max: 3 }) })
      .chain(({ n, m, p }) => fc.record({ A: matrixOf(n, n), B: matrixOf(n, m), C: matrixOf(p, n), F: matrixOf(n, 1), sampled: fc.boolean() }));
    let designed = 0;
    fc.assert(
      fc.property(plant, ({ A, B, C, F, sampled }) => {
        const cont = createStateSpace({ A, B, C, F });
        const g = sampled ? discretize(cont, 0.1) : cont;
        const outputs = Array.from({ length: Math.min(B[0]!.length, C.length) }, (_, i) => i);
        let d;
        try {
          d = designIntegralLqr(g, outputs, Matrix.eye(A.length, A.length), Matrix.eye(B[0]!.length, B[0]!.length), outputs.map(() => 1));
        } catch (error) {
          // Measure-zero draws: a zero at the origin or an unstabilizable pair (typed errors).
          if (error instanceof EngineError && ["not-controllable", "no-stabilizing-solution"].includes(error.kind)) return true;
          throw error;
        }
        designed++;
        const Gr = rowsOf(dcGain(d.servoLoop, "input"), outputs);
        const Gw = rowsOf(dcGain(d.servoLoop, "disturbance"), outputs);
        const eye = outputs.map((_, i) => outputs.map((__, j) => (i === j ? 1 : 0)));
        expectMatrixClose(Gr, eye, 1e-7, "DC gain r → y_s");
        expectMatrixClose(Gw, outputs.map(() => [0]), 1e-7, "DC gain w → y_s", 1);
        expect(d.servoDcGain.passed).toBe(true);
        return true;
      }),
      { seed: 20240611, numRuns: 60 },
    );
    expect(designed).toBeGreaterThan(30);
  });
});

describe("designIntegralPoles", () => {
  it("places the integrator-plant poles by hand: Kx = 3, Ki = −2 for poles −1 and −2", () => {
    // Closed loop [[−Kx, −Ki], [−1, 0]] has s² + Kx·s − Ki = (s + 1)(s + 2) (hand-worked).
    const d = designIntegralPoles(createStateSpace({ A: [[0]], B: [[1]], C: [[1]] }), [0], [{ re: -1, im: 0 }], [{ re: -2, im: 0 }]);
    expectRelativeClose(d.Kx.get(0, 0), 3, 1e-12, "Kx");
    expectRelativeClose(d.Ki.get(0, 0), -2, 1e-12, "Ki");
    expect(d.riccati).toBeUndefined();
  });

  it("puts the sampled closed-loop poles where asked and keeps unit DC gain", () => {
    const g = discretize(createStateSpace({ A: [[0, 1], [0, 0]], B: [[0], [1]], C: [[1, 0]], F: [[0], [1]] }), 0.1);
    const poles = [{ re: 0.8, im: 0.1 }, { re: 0.8, im: -0.1 }];
    const d = designIntegralPoles(g, [0], poles, [{ re: 0.7, im: 0 }]);
    expectComplexSetsClose(d.closedLoopPoles, [...poles, { re: 0.7, im: 0 }], 1e-9, "closed-loop poles");
    expectMatrixClose(rowsOf(dcGain(d.servoLoop, "input"), [0]), [[1]], 1e-9, "DC gain r → y");
    expectMatrixClose(rowsOf(dcGain(d.servoLoop, "disturbance"), [0]), [[0]], 1e-9, "DC gain w → y", 1);
  });

  it("rejects pole lists of the wrong length", () => {
    const g = createStateSpace({ A: [[0]], B: [[1]], C: [[1]] });
    expectKind(() => designIntegralPoles(g, [0], [], [{ re: -1, im: 0 }]), "invalid-argument", /1 closed-loop poles/);
    expectKind(() => designIntegralPoles(g, [0], [{ re: -1, im: 0 }], []), "invalid-argument", /integratorPoles must list 1/);
  });
});
