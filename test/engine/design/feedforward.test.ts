import { Matrix, solve } from "ml-matrix";
import { describe, expect, it } from "vitest";
import { blockMatrix, referenceFeedforward, steadyStateGain } from "../../../shared-engine/design/feedforward";
import { placePoles } from "../../../shared-engine/design/placePoles";
import { createStateSpace, discretize } from "../../../shared-engine/model";
import { expectAtMost, expectMatrixClose, expectRelativeClose, expectEngineError as expectKind } from "../../helpers/assertions";

describe("referenceFeedforward", () => {
  it("gives the hand-worked scalar gain N = 2 for ẋ = −x + u, y = 2x, K = 3", () => {
    // Closed loop ẋ = −4x + N r, y = 2x: DC gain 2N/4 = 1 ⇒ N = 2 (hand-worked).
    const f = referenceFeedforward(createStateSpace({ A: [[-1]], B: [[1]], C: [[2]] }), new Matrix([[3]]));
    expectRelativeClose(f.N.get(0, 0), 2, 1e-15, "N");
    expectAtMost(f.residual, 1e-15, "‖G_cl N − I‖");
    expect(f.warning).toMatch(/exact only for the nominal model.*prefer integral action/);
  });

  it("uses the sampled formula: N = 0.7 for x[k+1] = 0.5x + u, y = x, K = 0.2", () => {
    // x[k+1] = 0.3x + N r ⇒ x_ss = N r/0.7 ⇒ N = 0.7 (hand-worked).
    const f = referenceFeedforward(createStateSpace({ A: [[0.5]], B: [[1]], C: [[1]], sampleTime: 0.1 }), [[0.2]]);
    expectRelativeClose(f.N.get(0, 0), 0.7, 1e-14, "N");
  });

  it("accounts for a direct feedthrough D", () => {
    // ẋ = −x + u, y = x + u, K = 1: u = −x + N r, ẋ = −2x + N r, x_ss = N/2, y_ss = x + u
    // = N/2 − N/2 + N = N ⇒ N = 1 (hand-worked).
    const f = referenceFeedforward(createStateSpace({ A: [[-1]], B: [[1]], C: [[1]], D: [[1]] }), [[1]]);
    expectRelativeClose(f.N.get(0, 0), 1, 1e-14, "N with D");
  });

  it("makes the nominal multivariable DC gain the identity but leaves an error for a perturbed plant", () => {
    const A = [[0, 1, 0], [-2, -1, 1], [0, 0, -4]];
    const B = [[0, 0], [1, 0], [0, 1]];
    const C = [[1, 0, 0], [0, 0, 1]];
    const g = createStateSpace({ A, B, C });
    const K = placePoles(g.A, g.B, [{ re: -2, im: 1 }, { re: -2, im: -1 }, { re: -5, im: 0 }]).K;
    const { N } = referenceFeedforward(g, K);
    // Independent check: y_ss = C (BK − A)⁻¹ B N.
    const dc = (Am: Matrix) => g.C.mmul(solve(g.B.mmul(K).sub(Am), g.B)).mmul(N);
    expectMatrixClose(dc(g.A), Matrix.eye(2, 2), 1e-12, "nominal DC gain");
    const perturbed = g.A.clone();
    perturbed.set(1, 0, -2.4);
    const err = dc(perturbed).sub(Matrix.eye(2, 2)).norm("frobenius");
    expect(err).toBeGreaterThan(1e-3); // the caveat in the warning is real
  });

  it("works on a zero-order-hold discretization (DC gain at z = 1)", () => {
    const g = discretize(createStateSpace({ A: [[0, 1], [-1, -0.2]], B: [[0], [1]], C: [[1, 0]] }), 0.1);
    const K = placePoles(g.A, g.B, [{ re: 0.9, im: 0 }, { re: 0.8, im: 0 }]).K;
    const { N } = referenceFeedforward(g, K);
    const y = g.C.mmul(solve(Matrix.eye(2, 2).sub(g.A).add(g.B.mmul(K)), g.B)).mmul(N);
    expectRelativeClose(y.get(0, 0), 1, 1e-12, "sampled DC gain");
  });

  it("throws for a non-square loop, a zero at the origin and a wrong-sized K", () => {
    const twoOut = createStateSpace({ A: [[-1]], B: [[1]], C: [[1], [2]] });
    expectKind(() => referenceFeedforward(twoOut, [[1]]), "shape-mismatch", /as many outputs as inputs/);
    // G(s) = s/(s + 1): zero at the origin (hand-worked realization).
    const zero = createStateSpace({ A: [[-1]], B: [[1]], C: [[-1]], D: [[1]] });
    expectKind(() => referenceFeedforward(zero, [[1]]), "singular", /zero at s = 0/);
    expectKind(() => referenceFeedforward(createStateSpace({ A: [[-1]], B: [[1]], C: [[1]] }), [[1, 2]]), "shape-mismatch", /K must be 1×1/);
    expectKind(() => referenceFeedforward(createStateSpace({ A: [[-1]], B: [[1]], C: [[1]] }), [[NaN]]), "non-finite");
  });

  it("throws when the state-feedback loop keeps a pole at the origin", () => {
    expectKind(() => referenceFeedforward(createStateSpace({ A: [[0]], B: [[1]], C: [[1]] }), [[0]]), "singular", /pole at s = 0/);
  });
});

describe("helpers", () => {
  it("steadyStateGain is C(−A)⁻¹B + D, and blockMatrix accepts zero-sized blocks", () => {
    const g = steadyStateGain(new Matrix([[-2]]), new Matrix([[1]]), new Matrix([[4]]), new Matrix([[0.5]]), null, "test");
    expectRelativeClose(g.gain.get(0, 0), 2.5, 1e-15, "4/2 + 0.5");
    const M = blockMatrix([[Matrix.eye(2, 2), new Matrix(2, 0)], [new Matrix(0, 2), new Matrix(0, 0)]]);
    expect(M.to2DArray()).toEqual([[1, 0], [0, 1]]);
  });
});
