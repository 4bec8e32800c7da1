import { describe, expect, it } from "vitest";
import fc from "fast-check";
import { Matrix, QrDecomposition } from "ml-matrix";
import { stateSpaceFromMatrices, type StateSpace } from "../../../shared-engine/model";
import { minimalRealization } from "../../../shared-engine/analysis/minimalRealization";
import { expectComplexSetsClose, expectMatrixClose, seededMatrix } from "../../helpers/assertions";
import { evaluateChannel, expectComplexClose, expectEngineError } from "../model/modelTestUtils";

const POINTS = [{ re: 0.3, im: 1.1 }, { re: -0.7, im: 2.5 }, { re: 1.9, im: 0 }];

/** Every channel of G(s) agrees at a few points (direct solve, independent of the engine). */
function expectSameTransfer(a: StateSpace, b: StateSpace, tol: number): void {
  for (const s of POINTS) {
    for (let i = 0; i < a.C.rows; i++) {
      for (let j = 0; j < a.B.columns; j++) {
        const ga = evaluateChannel(a, s, j, i);
        expectComplexClose(evaluateChannel(b, s, j, i), ga, tol, `G[${i}][${j}](${s.re}+${s.im}i)`, 1);
      }
    }
  }
}

describe("minimalRealization", () => {
  it("removes an uncontrollable and an unobservable state and keeps the original state names", () => {
    // hand-worked: x2 (mode −5) is not driven, x3 (mode −7) is not seen; G(s) = 1/(s + 1).
    const model = stateSpaceFromMatrices({
      A: [[-1, 0, 0], [0, -5, 0], [0, 0, -7]], B: [[1], [0], [1]], C: [[1, 1, 0]],
      names: { states: ["position", "drift", "hidden"], inputs: ["force"], outputs: ["y"] },
    });
    const r = minimalRealization(model);
    expect(r.removedStateCount).toBe(2);
    expect(r.stateNamesKept).toBe(true);
    expect(r.model.names.states).toEqual(["position"]);
    expect(r.model.names.inputs).toEqual(["force"]);
    expectMatrixClose(r.model.A, [[-1]], 0);
    expectComplexSetsClose(r.removedUncontrollable, [{ re: -5, im: 0 }], 1e-14, "removed uncontrollable");
    expectComplexSetsClose(r.removedUnobservable, [{ re: -7, im: 0 }], 1e-14, "removed unobservable");
  });

  it("returns the model unchanged when it is already minimal", () => {
    const model = stateSpaceFromMatrices({ A: [[0, 1], [-2, -3]], B: [[0], [1]], C: [[1, 0]] });
    const r = minimalRealization(model);
    expect(r.model).toBe(model);
    expect(r.removedStateCount).toBe(0);
  });

  it("keeps a state that only the disturbance drives", () => {
    // hand-worked: x2 is uncontrollable from u but driven by w, and y sees it.
    const model = stateSpaceFromMatrices({ A: [[-1, 0], [0, -2]], B: [[1], [0]], F: [[0], [1]], C: [[1, 1]] });
    expect(minimalRealization(model).removedStateCount).toBe(0);
  });

  it("cancels a pole–zero pair hidden by a rotation and names the new states", () => {
    // hand-worked: in coordinates x̃ = Qᵀx, mode −3 is uncontrollable; G(s) = 1/(s + 1).
    const Q = new QrDecomposition(new Matrix(seededMatrix(2, 2, 3))).orthogonalMatrix;
    const At = new Matrix([[-1, 2], [0, -3]]);
    const model = stateSpaceFromMatrices({ A: Q.mmul(At).mmul(Q.transpose()), B: Q.mmul(new Matrix([[1], [0]])), C: new Matrix([[1, 0.5]]).mmul(Q.transpose()) });
    const r = minimalRealization(model);
    expect(r.model.names.states).toEqual(["xr1"]);
    expect(r.stateNamesKept).toBe(false);
    expectMatrixClose(r.model.A, [[-1]], 1e-14);
    expectSameTransfer(model, r.model, 1e-13);
    expectEngineError(() => minimalRealization(model, Number.NaN), "invalid-argument", /tol must be a finite non-negative number/);
  });

  it("reduces random rotated Kalman-structured systems to the planted order with the same transfer function", () => {
    const prop = fc.property(
      fc.integer({ min: 1, max: 3 }), fc.integer({ min: 0, max: 2 }), fc.integer({ min: 0, max: 2 }), fc.integer({ min: 1, max: 100000 }),
      (r, nu, no, seed) => {
        const n = r + nu + no;
        const rnd = (rows: number, cols: number, k: number) => new Matrix(seededMatrix(rows, cols, seed + k)).mul(4);
        // states [x1 minimal (r), x2 uncontrollable (nu), x3 unobservable (no)]
        const A = rnd(n, n, 0);
        for (let i = r; i < r + nu; i++) for (let j = 0; j < n; j++) if (j < r || j >= r + nu) A.set(i, j, 0); // x2' = A2 x2
        for (let i = 0; i < r + nu; i++) for (let j = r + nu; j < n; j++) A.set(i, j, 0); // x3 feeds nothing
        const B = rnd(n, 2, 1);
        for (let i = r; i < r + nu; i++) B.setRow(i, [0, 0]);
        const C = rnd(2, n, 2);
        for (let j = r + nu; j < n; j++) C.setColumn(j, [0, 0]);
        const Q = new QrDecomposition(rnd(n, n, 3)).orthogonalMatrix;
        const model = stateSpaceFromMatrices({ A: Q.mmul(A).mmul(Q.transpose()), B: Q.mmul(B), C: C.mmul(Q.transpose()) });
        const red = minimalRealization(model);
        expect(red.model.A.rows).toBe(r); // generic: (A1, B1, C1) minimal with two inputs and outputs
        expect(red.removedUncontrollable.length + red.removedUnobservable.length).toBe(nu + no);
        expectSameTransfer(model, red.model, 1e-9);
      },
    );
    fc.assert(prop, { seed: 8675309, numRuns: 60 });
  });
});
