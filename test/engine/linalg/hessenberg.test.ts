import { describe, it, expect } from "vitest";
import fc from "fast-check";
import { Matrix } from "ml-matrix";
import { hessenberg } from "../../../shared-engine/linalg/hessenberg";
import { EPS, expectAtMost, orthogonalSimilarityErrors, seededMatrix, expectEngineError as expectKind } from "../../helpers/assertions";

function expectValidHessenberg(A: Matrix, what: string): { H: Matrix; Q: Matrix } {
  const n = A.rows;
  const r = hessenberg(A);
  for (let i = 2; i < n; i++) for (let j = 0; j < i - 1; j++) expect(r.H.get(i, j), `${what}: H[${i}][${j}]`).toBe(0);
  const { residual, orthogonality } = orthogonalSimilarityErrors(A, r.Q, r.H);
  expectAtMost(residual, 100 * n * EPS, `${what}: ‖A − QHQᵀ‖_F/‖A‖_F`);
  expectAtMost(orthogonality, 100 * n * EPS, `${what}: ‖QᵀQ − I‖_F`);
  return r;
}

describe("hessenberg", () => {
  it("reduces random matrices of order 1 to 60 with residual and orthogonality within 100·n·ε", () => {
    for (const n of [1, 2, 3, 4, 8, 20, 60]) expectValidHessenberg(new Matrix(seededMatrix(n, n, 500 + n)), `random ${n}×${n}`);
  });

  it("keeps the first row and column of Q equal to e1 (the reflectors act on rows 2..n)", () => {
    const { Q } = expectValidHessenberg(new Matrix(seededMatrix(6, 6, 8)), "random 6×6");
    expect(Q.get(0, 0)).toBe(1);
    for (let i = 1; i < 6; i++) {
      expect(Q.get(0, i)).toBe(0);
      expect(Q.get(i, 0)).toBe(0);
    }
  });

  it("returns an upper Hessenberg input unchanged with Q = I", () => {
    const A = new Matrix([[1, 2, 3], [4, 5, 6], [0, 7, 8]]);
    const { H, Q } = expectValidHessenberg(A, "already Hessenberg");
    expect(H.to2DArray()).toEqual(A.to2DArray());
    expect(Q.to2DArray()).toEqual(Matrix.eye(3).to2DArray());
  });

  it("reduces graded, zero and symmetric matrices (symmetric gives tridiagonal H)", () => {
    const d = [1e-4, 1e-2, 1, 1e2, 1e4];
    expectValidHessenberg(new Matrix(seededMatrix(5, 5, 3).map((row, i) => row.map((v, j) => (v * d[i]!) / d[j]!))), "graded 5×5");
    const z = expectValidHessenberg(Matrix.zeros(4, 4), "zero 4×4");
    expect(z.H.to2DArray().flat().every((v) => v === 0)).toBe(true);
    const S0 = new Matrix(seededMatrix(7, 7, 21));
    const S = S0.add(S0.transpose());
    const { H } = expectValidHessenberg(S, "symmetric 7×7");
    // orthogonal similarity keeps symmetry, so entries above the superdiagonal vanish to rounding
    for (let i = 0; i < 7; i++) for (let j = i + 2; j < 7; j++) expectAtMost(Math.abs(H.get(i, j)), 100 * 7 * EPS * S.norm("frobenius"), `H[${i}][${j}]`);
  });

  it("satisfies A = Q H Qᵀ on generated integer matrices (property)", () => {
    const gen = fc.integer({ min: 1, max: 10 }).chain((n) =>
      fc.record({ n: fc.constant(n), entries: fc.array(fc.integer({ min: -1000, max: 1000 }), { minLength: n * n, maxLength: n * n }) }),
    );
    fc.assert(
      fc.property(gen, ({ n, entries }) => {
        expectValidHessenberg(Matrix.from1DArray(n, n, entries.map((v) => v / 100)), `generated ${n}×${n}`);
      }),
      { seed: 13579, numRuns: 150 },
    );
  });

  it("rejects bad input with typed errors", () => {
    expectKind(() => hessenberg(new Matrix(3, 2)), "shape-mismatch");
    expectKind(() => hessenberg(new Matrix(0, 0)), "empty");
    expectKind(() => hessenberg(new Matrix([[1, NaN], [0, 1]])), "non-finite");
    expectKind(() => hessenberg(new Matrix([[Infinity]])), "non-finite");
  });

  it("returns copies: changing H does not change A", () => {
    const A = new Matrix([[1, 2, 3], [4, 5, 6], [7, 8, 10]]);
    const { H } = hessenberg(A);
    H.set(0, 0, 100);
    expect(A.get(0, 0)).toBe(1);
  });
});
