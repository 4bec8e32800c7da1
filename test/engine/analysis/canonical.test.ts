import { describe, expect, it } from "vitest";
import { Matrix } from "ml-matrix";
import { stateSpaceFromMatrices, type StateSpace } from "../../../shared-engine/model";
import { controllableCanonicalForm, observableCanonicalForm } from "../../../shared-engine/analysis/canonicalForms";
import { expectAtMost, expectMatrixClose } from "../../helpers/assertions";
import { evaluateChannel, expectComplexClose, expectEngineError } from "../model/modelTestUtils";

function expectSameTransfer(a: StateSpace, b: StateSpace, tol: number): void {
  for (const s of [{ re: 0.5, im: 1 }, { re: -0.3, im: 3 }]) expectComplexClose(evaluateChannel(b, s), evaluateChannel(a, s), tol, `G(${s.re}+${s.im}i)`, 1);
}

describe("controllableCanonicalForm", () => {
  it("builds the companion form with the hand-worked transformation", () => {
    // hand-worked: A = diag(−1, −2), b = (1, 1): a(s) = s² + 3s + 2; t2 = b, t1 = A b + 3b = (2, 1);
    // C T = [2, 1], i.e. G(s) = (s + 2)/((s + 1)(s + 2)).
    const model = stateSpaceFromMatrices({ A: [[-1, 0], [0, -2]], B: [[1], [1]], C: [[1, 0]] });
    const r = controllableCanonicalForm(model);
    expectMatrixClose(r.model.A, [[0, 1], [-2, -3]], 1e-15);
    expectMatrixClose(r.model.B, [[0], [1]], 0);
    expectMatrixClose(r.T, [[2, 1], [1, 1]], 1e-15);
    expectMatrixClose(r.model.C, [[2, 1]], 1e-15);
    expect(r.characteristicPolynomial).toEqual([1, 3, 2]);
    expectAtMost(r.residual, 1e-15, "residual");
    expect(r.warning).toBeNull();
    expectSameTransfer(model, r.model, 1e-14);
  });

  it("refuses a multi-input or uncontrollable model, naming the uncontrollable mode", () => {
    expectEngineError(() => controllableCanonicalForm(stateSpaceFromMatrices({ A: [[-1]], B: [[1, 1]], C: [[1]] })), "invalid-argument", /single-input/);
    expectEngineError(() => controllableCanonicalForm(stateSpaceFromMatrices({ A: [[-1, 0], [0, -2]], B: [[1], [0]], C: [[1, 1]] })), "not-controllable", /uncontrollable modes: -2/);
  });

  it("warns that the form is ill-conditioned for spread-out poles", () => {
    // poles −1 … −8: κ(T) of the companion basis grows like the coefficient spread (common practice)
    const n = 8;
    const model = stateSpaceFromMatrices({ A: Matrix.diag(Array.from({ length: n }, (_, k) => -(k + 1))), B: new Matrix(Matrix.ones(n, 1)), C: new Matrix(Matrix.ones(1, n)) });
    const r = controllableCanonicalForm(model);
    expect(r.condition).toBeGreaterThan(1e6);
    expect(r.warning).toMatch(/ill-conditioned/);
    expectSameTransfer(model, r.model, 1e-8);
  });
});

describe("observableCanonicalForm", () => {
  it("builds the transposed companion form with C = e_nᵀ and the same transfer function", () => {
    // hand-worked: A = diag(−1, −2), c = (1, 1), b = (1, 0): G(s) = 1/(s + 1) = (s + 2)/(s² + 3s + 2)
    const model = stateSpaceFromMatrices({ A: [[-1, 0], [0, -2]], B: [[1], [0]], C: [[1, 1]] });
    const r = observableCanonicalForm(model);
    expectMatrixClose(r.model.A, [[0, -2], [1, -3]], 1e-15);
    expectMatrixClose(r.model.C, [[0, 1]], 0);
    expectMatrixClose(r.model.B, [[2], [1]], 1e-15);
    expectMatrixClose(model.A.mmul(r.T), r.T.mmul(r.model.A), 1e-14, "A T = T A_o");
    expectSameTransfer(model, r.model, 1e-14);
    expectEngineError(() => observableCanonicalForm(stateSpaceFromMatrices({ A: [[-1, 0], [0, -2]], B: [[1], [1]], C: [[1, 0]] })), "not-observable", /unobservable modes: -2/);
    expectEngineError(() => observableCanonicalForm(stateSpaceFromMatrices({ A: [[-1]], B: [[1]], C: [[1], [1]] })), "invalid-argument", /single-output/);
  });
});
