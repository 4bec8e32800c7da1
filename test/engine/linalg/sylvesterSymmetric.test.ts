import { describe, it, expect } from "vitest";
import fc from "fast-check";
import { Matrix } from "ml-matrix";
import { solveContinuousLyapunov } from "../../../shared-engine/linalg/lyapunov";
import { realSchur } from "../../../shared-engine/linalg/schur";
import { solveQuasiTriangularInPlace } from "../../../shared-engine/linalg/sylvester";
import { multiplyUpperInto, solveSymmetricLyapunovTriangularInPlace } from "../../../shared-engine/linalg/sylvesterSymmetric";
import { EPS, expectAtMost, expectMatrixClose, frobenius, seededMatrix, expectEngineError as expectKind } from "../../helpers/assertions";
import fixtures from "../../fixtures/linalg/lyapunov_symmetric.json";

/** ‖AX + XAᵀ + Q‖_F / (2‖A‖_F‖X‖_F + ‖Q‖_F) */
function continuousResidual(A: Matrix, Q: Matrix, X: Matrix): number {
  const R = A.mmul(X).add(X.mmul(A.transpose())).add(Q);
  return frobenius(R) / (2 * frobenius(A) * frobenius(X) + frobenius(Q));
}

const labels = { equation: "S Y + Y Sᵀ = C", first: "S", second: "S" };

/** Row-major T of the real Schur form of a seeded random n×n matrix (1×1 and 2×2 blocks). */
function quasiTriangular(n: number, seed: number, shift: number): Float64Array {
  const A = new Matrix(seededMatrix(n, n, seed)).sub(Matrix.eye(n).mul(shift));
  return Float64Array.from(realSchur(A).T.to1DArray());
}

describe("continuous Lyapunov equation with symmetric Q (one-triangle kernel)", () => {
  // Source: test/fixtures/linalg/generate_lyapunov_symmetric.py
  // (scipy.linalg.solve_continuous_lyapunov(A, -Q), numpy/scipy versions in the file).
  for (const c of fixtures.continuousLyapunovSymmetric) {
    it(`matches scipy and has a tiny residual for ${c.name}`, () => {
      const A = new Matrix(c.A), Q = new Matrix(c.Q);
      const X = solveContinuousLyapunov(A, Q);
      expectMatrixClose(X, c.X, 1e-12, c.name, 0);
      expectAtMost(continuousResidual(A, Q, X), 1e-14, "relative residual");
      expect(X.isSymmetric()).toBe(true);
    });
  }

  it("agrees with the general quasi-triangular kernel on the full Y (property)", () => {
    // Independent route: the general Bartels–Stewart kernel solves S Y + Y T = C with
    // T = P Sᵀ P (the reversal permutation P), for the whole Y, with no symmetry used.
    fc.assert(
      fc.property(fc.integer({ min: 1, max: 16 }), fc.integer({ min: 1, max: 10_000 }), (n, seed) => {
        const s = quasiTriangular(n, seed, 0.5 * n + 1);
        const C = new Matrix(seededMatrix(n, n, seed + 1));
        const Csym = C.add(C.transpose());
        const y = Float64Array.from(Csym.to1DArray());
        solveSymmetricLyapunovTriangularInPlace(s, n, y, 1e-13, labels);
        const tp = new Float64Array(n * n);
        for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) tp[i * n + j] = s[(n - 1 - j) * n + (n - 1 - i)]!;
        const fp = new Float64Array(n * n);
        for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) fp[i * n + j] = Csym.get(i, n - 1 - j);
        solveQuasiTriangularInPlace("sylvester", s, n, tp, n, fp, 1e-13, labels);
        const general = Matrix.from1DArray(n, n, Array.from({ length: n * n }, (_, k) => fp[Math.floor(k / n) * n + (n - 1 - (k % n))]!));
        const mine = Matrix.from1DArray(n, n, Array.from(y));
        expectMatrixClose(mine, general, 1e3 * n * EPS, `n = ${n}, seed ${seed}`);
        expect(mine.isSymmetric()).toBe(true);
      }),
      { seed: 60602, numRuns: 60 },
    );
  });

  it("reads only the upper triangle of C", () => {
    const n = 6;
    const s = quasiTriangular(n, 11, 4);
    const C = new Matrix(seededMatrix(n, n, 12));
    const upper = Float64Array.from(C.add(C.transpose()).to1DArray());
    const garbage = upper.slice();
    for (let i = 0; i < n; i++) for (let j = 0; j < i; j++) garbage[i * n + j] = 1e30 * (i + j + 1);
    solveSymmetricLyapunovTriangularInPlace(s, n, upper, 1e-13, labels);
    solveSymmetricLyapunovTriangularInPlace(s, n, garbage, 1e-13, labels);
    expect(Array.from(garbage)).toEqual(Array.from(upper));
  });

  it("reports a singular diagonal complex pair (λ₁ + λ₂ = 0) and a singular off-diagonal pair (λ + μ = 0)", () => {
    // ±3i: the 3×3 system of the diagonal 2×2 block is singular (eigenvalue λ₁ + λ₂ = 0)
    const pair = Float64Array.from([0, 3, -3, 0]);
    expectKind(() => solveSymmetricLyapunovTriangularInPlace(pair, 2, Float64Array.from([1, 0, 0, 1]), 1e-13, labels), "singular");
    // λ = 2 and μ = −2 in two 1×1 blocks
    const twoReal = Float64Array.from([2, 1, 0, -2]);
    const e = expectKind(() => solveSymmetricLyapunovTriangularInPlace(twoReal, 2, Float64Array.from([1, 0, 0, 1]), 1e-13, labels), "singular");
    expect(e.message).toMatch(/λ \+ μ ≈ 0/);
    // pairs 1 ± 2i and −1 ± 2i in two 2×2 blocks: the 4×4 system of the off-diagonal block is singular
    const pairs = new Float64Array(16);
    pairs.set([1, 2, 0.5, 0.25], 0);
    pairs.set([-2, 1, 0.1, 0.3], 4);
    pairs.set([0, 0, -1, 2], 8);
    pairs.set([0, 0, -2, -1], 12);
    expectKind(() => solveSymmetricLyapunovTriangularInPlace(pairs, 4, Float64Array.from(Matrix.eye(4).to1DArray()), 1e-13, labels), "singular");
  });
});

describe("multiplyUpperInto", () => {
  it("equals the upper triangle of the full product for n = 1 to 13 (property)", () => {
    fc.assert(
      fc.property(fc.integer({ min: 1, max: 13 }), fc.integer({ min: 1, max: 10_000 }), (n, seed) => {
        const A = new Matrix(seededMatrix(n, n, seed)), B = new Matrix(seededMatrix(n, n, seed + 7));
        const out = new Float64Array(n * n);
        multiplyUpperInto(Float64Array.from(A.to1DArray()), Float64Array.from(B.to1DArray()), n, out);
        const full = A.mmul(B);
        for (let i = 0; i < n; i++) for (let j = i; j < n; j++) expect(Math.abs(out[i * n + j]! - full.get(i, j))).toBeLessThanOrEqual(4 * n * EPS * (1 + Math.abs(full.get(i, j))));
      }),
      { seed: 1313, numRuns: 40 },
    );
  });
});

describe("workspace reuse", () => {
  it("results of earlier calls are unchanged by later calls of realSchur and solveContinuousLyapunov", () => {
    const A1 = new Matrix(seededMatrix(7, 7, 71)).sub(Matrix.eye(7).mul(4));
    const A2 = new Matrix(seededMatrix(9, 9, 72)).sub(Matrix.eye(9).mul(4));
    const s1 = realSchur(A1);
    const T1 = s1.T.to2DArray(), Q1 = s1.Q.to2DArray();
    const X1 = solveContinuousLyapunov(A1, Matrix.eye(7));
    const X1rows = X1.to2DArray();
    realSchur(A2);
    solveContinuousLyapunov(A2, Matrix.eye(9));
    realSchur(A1.mul(-1));
    expect(s1.T.to2DArray()).toEqual(T1);
    expect(s1.Q.to2DArray()).toEqual(Q1);
    expect(X1.to2DArray()).toEqual(X1rows);
  });
});
