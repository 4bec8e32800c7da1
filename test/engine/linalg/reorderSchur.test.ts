import { describe, it, expect } from "vitest";
import fc from "fast-check";
import { Matrix } from "ml-matrix";
import { realSchur, type RealSchurForm } from "../../../shared-engine/linalg/schur";
import { reorderSchur, selectInsideUnitCircle, selectLeftHalfPlane } from "../../../shared-engine/linalg/reorderSchur";
import type { Complex } from "../../../shared-engine/linalg/complex";
import { EPS, expectAtMost, expectComplexSetsClose, expectStandardQuasiTriangular, orthogonalSimilarityErrors, seededMatrix, expectEngineError as expectKind } from "../../helpers/assertions";

/** Reorders the Schur form of A and checks every documented property; returns the result. */
function expectValidReorder(A: Matrix, select: (l: Complex) => boolean, what: string) {
  const n = A.rows;
  const form = realSchur(A);
  const r = reorderSchur(form, select);
  const { residual, orthogonality } = orthogonalSimilarityErrors(A, r.Q, r.T);
  expectAtMost(residual, 100 * n * EPS, `${what}: ‖A − Q'T'Q'ᵀ‖_F/‖A‖_F`);
  expectAtMost(orthogonality, 100 * n * EPS, `${what}: ‖Q'ᵀQ' − I‖_F`);
  expectStandardQuasiTriangular(r.T, r.eigenvalues);
  // the same eigenvalues as before reordering
  expectComplexSetsClose(r.eigenvalues, form.eigenvalues, 1e-8, `${what}: eigenvalues`);
  // exactly the selected eigenvalues lead; a pair is judged by its +im member
  const expectedCount = form.eigenvalues.filter((l, i) => (l.im < 0 ? select(form.eigenvalues[i - 1]!) : select(l))).length;
  expect(r.selectedCount, `${what}: selectedCount`).toBe(expectedCount);
  r.eigenvalues.forEach((l, i) => {
    const judged = l.im < 0 ? r.eigenvalues[i - 1]! : l;
    expect(select(judged), `${what}: eigenvalue ${i} (${l.re}, ${l.im}) selection`).toBe(i < r.selectedCount);
  });
  // the leading columns of Q' span an invariant subspace: A·Q1 = Q1·T11
  const k = r.selectedCount;
  if (k > 0 && k < n) {
    const Q1 = r.Q.subMatrix(0, n - 1, 0, k - 1);
    const T11 = r.T.subMatrix(0, k - 1, 0, k - 1);
    const gap = Matrix.sub(A.mmul(Q1), Q1.mmul(T11)).norm("frobenius");
    expectAtMost(gap, 100 * n * EPS * Math.max(A.norm("frobenius"), 1), `${what}: ‖A Q1 − Q1 T11‖_F`);
  }
  return r;
}

describe("reorderSchur", () => {
  it("moves the left-half-plane eigenvalues of random matrices to the front, keeping a valid Schur form", () => {
    for (const n of [2, 3, 5, 8, 13, 30]) expectValidReorder(new Matrix(seededMatrix(n, n, 300 + n)), selectLeftHalfPlane, `random ${n}×${n}`);
  });

  it("moves the eigenvalues inside the unit circle to the front", () => {
    for (const n of [4, 9, 20]) {
      const A = new Matrix(seededMatrix(n, n, 900 + n)).mul(3 / Math.sqrt(n));
      expectValidReorder(A, selectInsideUnitCircle, `scaled random ${n}×${n}`);
    }
  });

  it("reorders a 100×100 matrix within 100·n·ε", () => {
    expectValidReorder(new Matrix(seededMatrix(100, 100, 31337)), selectLeftHalfPlane, "random 100×100");
  });

  it("keeps conjugate pairs together, selected by the member with positive imaginary part", () => {
    // block-diagonal: real 2, pair −1 ± 3i, real −4, pair 0.5 ± i (block diagonal by construction)
    const A = new Matrix([
      [2, 0, 0, 0, 0, 0],
      [0, -1, 3, 0, 0, 0],
      [0, -3, -1, 0, 0, 0],
      [0, 0, 0, -4, 0, 0],
      [0, 0, 0, 0, 0.5, 1],
      [0, 0, 0, 0, -1, 0.5],
    ]);
    const r = expectValidReorder(A, (l) => l.im > 0, "only complex eigenvalues selected");
    expect(r.selectedCount).toBe(4);
    expect(r.eigenvalues.slice(0, 4).every((l) => l.im !== 0)).toBe(true);
    // relative order kept: −1 ± 3i before 0.5 ± i, then 2 before −4
    expect(r.eigenvalues.map((l) => Math.round(l.re * 10) / 10)).toEqual([-1, -1, 0.5, 0.5, 2, -4]);
  });

  it("returns selectedCount 0 or n and an unchanged form when nothing or everything is selected", () => {
    const A = new Matrix(seededMatrix(6, 6, 12));
    const form = realSchur(A);
    const none = reorderSchur(form, () => false);
    const all = reorderSchur(form, () => true);
    expect(none.selectedCount).toBe(0);
    expect(all.selectedCount).toBe(6);
    expect(none.T.to2DArray()).toEqual(form.T.to2DArray());
    expect(all.Q.to2DArray()).toEqual(form.Q.to2DArray());
  });

  it("exchanges two 1×1 blocks by a rotation that swaps the diagonal entries exactly", () => {
    const form: RealSchurForm = { T: new Matrix([[1, 2], [0, -3]]), Q: Matrix.eye(2), eigenvalues: [], iterations: 0 };
    const r = reorderSchur(form, selectLeftHalfPlane);
    expect(r.selectedCount).toBe(1);
    expect(r.T.get(0, 0)).toBe(-3);
    expect(r.T.get(1, 1)).toBe(1);
    expect(r.T.get(1, 0)).toBe(0);
    const { residual, orthogonality } = orthogonalSimilarityErrors(new Matrix([[1, 2], [0, -3]]), r.Q, r.T);
    expectAtMost(residual, 100 * 2 * EPS, "residual");
    expectAtMost(orthogonality, 100 * 2 * EPS, "orthogonality");
  });

  it("does not modify the input form", () => {
    const form = realSchur(new Matrix(seededMatrix(5, 5, 44)));
    const T0 = form.T.to2DArray();
    const Q0 = form.Q.to2DArray();
    reorderSchur(form, selectLeftHalfPlane);
    expect(form.T.to2DArray()).toEqual(T0);
    expect(form.Q.to2DArray()).toEqual(Q0);
  });

  it("splits a non-standard 2×2 block with real eigenvalues before reordering", () => {
    // [[4, 1], [2, 3]] has eigenvalues 5 and 2 (λ² − 7λ + 10 = 0, hand computation)
    const T = new Matrix([[4, 1, 1], [2, 3, 1], [0, 0, -1]]);
    const r = reorderSchur({ T, Q: Matrix.eye(3), eigenvalues: [], iterations: 0 }, (l) => l.re < 3);
    expect(r.selectedCount).toBe(2);
    expectComplexSetsClose(r.eigenvalues.slice(0, 2), [{ re: 2, im: 0 }, { re: -1, im: 0 }], 1e-14);
    const { residual } = orthogonalSimilarityErrors(T, r.Q, r.T);
    expectAtMost(residual, 100 * 3 * EPS, "residual");
  });

  it("reorders generated matrices with a random selection threshold and keeps the Schur identities (property)", () => {
    const gen = fc.integer({ min: 1, max: 9 }).chain((n) =>
      fc.record({
        n: fc.constant(n),
        entries: fc.array(fc.integer({ min: -1000, max: 1000 }), { minLength: n * n, maxLength: n * n }),
        threshold: fc.integer({ min: -10, max: 10 }),
      }),
    );
    fc.assert(
      fc.property(gen, ({ n, entries, threshold }) => {
        const A = Matrix.from1DArray(n, n, entries.map((v) => v / 200));
        // the boundary sits half-way between grid points, away from eigenvalues of integer-ish matrices
        const cut = threshold / 4 + 0.123;
        expectValidReorder(A, (l) => l.re < cut, `generated ${n}×${n}, re < ${cut}`);
      }),
      { seed: 8642, numRuns: 150 },
    );
  });

  it("reorders generated matrices by eigenvalue modulus, moving complex pairs as units (property)", () => {
    const gen = fc.integer({ min: 2, max: 9 }).chain((n) =>
      fc.record({
        n: fc.constant(n),
        entries: fc.array(fc.integer({ min: -1000, max: 1000 }), { minLength: n * n, maxLength: n * n }),
        radius: fc.integer({ min: 1, max: 12 }),
      }),
    );
    fc.assert(
      fc.property(gen, ({ n, entries, radius }) => {
        const A = Matrix.from1DArray(n, n, entries.map((v) => v / 400));
        const r = radius / 4 + 0.0371; // off the grid of likely eigenvalue moduli
        expectValidReorder(A, (l) => Math.hypot(l.re, l.im) < r, `generated ${n}×${n}, |λ| < ${r}`);
      }),
      { seed: 11235, numRuns: 150 },
    );
  });

  it("rejects a swap of blocks with nearly equal eigenvalues as too ill-conditioned, with details", () => {
    // pairs 1 ± 1e-6 i and (1 + 1e-6) ± 1e-6 i: nearly Jordan 2×2 blocks 1e-6 apart; the
    // Sylvester equation of the swap is singular to working precision (Bai & Demmel 1993 §3)
    const T = new Matrix([
      [1, 1, 1, 1],
      [-1e-12, 1, 1, 1],
      [0, 0, 1 + 1e-6, 1],
      [0, 0, -1e-12, 1 + 1e-6],
    ]);
    const e = expectKind(() => reorderSchur({ T, Q: Matrix.eye(4), eigenvalues: [], iterations: 0 }, (l) => l.re > 1 + 5e-7), "no-convergence");
    expect(e.details.reason).toBe("swap-rejected");
    expect(e.details.weakResidual as number).toBeGreaterThan(e.details.threshold as number);
    expect(e.message).toMatch(/rejected/);
  });

  it("reports when rounding moves an eigenvalue across the selection boundary", () => {
    // the pair 1 ± 1e-8 i is a nearly defective block (eigenvalue sensitivity √ε ≈ 1e-8), so the
    // swap past the real eigenvalue 1 + 1e-8 may turn it real; selecting "real" then changes
    const T = new Matrix([[1, 1, 1], [-1e-16, 1, 1], [0, 0, 1 + 1e-8]]);
    const e = expectKind(() => reorderSchur({ T, Q: Matrix.eye(3), eigenvalues: [], iterations: 0 }, (l) => l.im === 0), "no-convergence");
    expect(e.details.reason).toBe("selection-changed");
  });

  it("rejects bad input with typed errors", () => {
    const good = realSchur(new Matrix([[1, 2], [3, 4]]));
    expectKind(() => reorderSchur({ ...good, T: new Matrix(2, 3) }, selectLeftHalfPlane), "shape-mismatch");
    expectKind(() => reorderSchur({ ...good, Q: Matrix.eye(3) }, selectLeftHalfPlane), "shape-mismatch");
    expectKind(() => reorderSchur({ ...good, T: new Matrix([[1, NaN], [0, 1]]) }, selectLeftHalfPlane), "non-finite");
    expectKind(() => reorderSchur({ ...good, Q: new Matrix([[1, 0], [0, Infinity]]) }, selectLeftHalfPlane), "non-finite");
    expectKind(() => reorderSchur({ ...good, T: new Matrix(0, 0), Q: new Matrix(0, 0) }, selectLeftHalfPlane), "empty");
    const notQuasi = new Matrix([[1, 2, 3], [4, 5, 6], [7, 8, 9]]);
    expectKind(() => reorderSchur({ T: notQuasi, Q: Matrix.eye(3), eigenvalues: [], iterations: 0 }, selectLeftHalfPlane), "invalid-argument");
    const twoSub = new Matrix([[1, 2, 3], [4, 5, 6], [0, 8, 9]]);
    expectKind(() => reorderSchur({ T: twoSub, Q: Matrix.eye(3), eigenvalues: [], iterations: 0 }, selectLeftHalfPlane), "invalid-argument");
  });

  it("selects by the documented predicates: re < 0 and |λ| < 1, boundary excluded", () => {
    expect(selectLeftHalfPlane({ re: -1e-300, im: 5 })).toBe(true);
    expect(selectLeftHalfPlane({ re: 0, im: 1 })).toBe(false);
    expect(selectInsideUnitCircle({ re: 0.6, im: 0.79 })).toBe(true);
    expect(selectInsideUnitCircle({ re: 0.6, im: 0.8 })).toBe(false); // |0.6 + 0.8i| = 1 (3-4-5 triangle)
  });
});
