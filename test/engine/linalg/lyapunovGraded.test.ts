import { describe, it, expect } from "vitest";
import { Matrix, SingularValueDecomposition } from "ml-matrix";
import { balance } from "../../../shared-engine/linalg/balance";
import { solveContinuousLyapunov, solveDiscreteLyapunov } from "../../../shared-engine/linalg/lyapunov";
import { solveQuasiTriangularInPlace, solveSylvester } from "../../../shared-engine/linalg/sylvester";
import { solveSymmetricLyapunovTriangularInPlace } from "../../../shared-engine/linalg/sylvesterSymmetric";
import { EPS, expectAtMost, frobenius, frobeniusDifference, expectEngineError as expectKind } from "../../helpers/assertions";
import fixtures from "../../fixtures/linalg/lyapunov_graded.json";

/**
 * The row-major Kronecker matrix of the equation (the operator X ↦ AX + XB or AXB − X on
 * vec(X), rows i·m + j) and its 2-norm condition number, for the normwise forward error bound
 * ‖X − X_ref‖/‖X_ref‖ ≲ κ₂(K)·(backward error) (Higham, "Accuracy and Stability of Numerical
 * Algorithms", 2nd ed., §7.1 and §16.2).
 */
function kroneckerCondition(kind: "sylvester" | "stein", A: Matrix, B: Matrix): number {
  const n = A.rows, m = B.rows;
  const K = new Matrix(n * m, n * m);
  for (let i = 0; i < n; i++) for (let j = 0; j < m; j++) for (let k = 0; k < n; k++) for (let l = 0; l < m; l++) {
    const v = kind === "sylvester"
      ? (l === j ? A.get(i, k) : 0) + (k === i ? B.get(l, j) : 0)
      : A.get(i, k) * B.get(l, j) - (k === i && l === j ? 1 : 0);
    K.set(i * m + j, k * m + l, v);
  }
  const s = new SingularValueDecomposition(K, { computeLeftSingularVectors: false, computeRightSingularVectors: false }).diagonal;
  return Math.max(...s) / Math.min(...s);
}

interface GradedCase {
  name: string;
  kind: string;
  A: number[][];
  B?: number[][];
  C?: number[][];
  Q?: number[][];
  X: number[][];
  referenceChange: number;
  scipyRelativeError: number;
  scipyResidual: number;
}

// Source: test/fixtures/linalg/generate_lyapunov_graded.py (mpmath Kronecker reference X;
// scipy.linalg.solve_continuous_lyapunov / solve_discrete_lyapunov / solve_sylvester recorded
// beside it, with the versions in the fixture). Before the singularity test compared the
// eigenvalue separation, most of these were refused as "singular" (|λ + μ| = O(1) against a
// block pivot of 1e-15, or |1 − λμ| ≈ 0.95 against a threshold 20nε(1 + ‖A‖²) ≈ 1.25).
describe("graded Lyapunov, Stein and Sylvester equations (scipy and mpmath fixtures)", () => {
  for (const c of fixtures.cases as GradedCase[]) {
    it(`solves ${c.name} with a relative residual ≤ 100·n·ε and the forward error its condition allows`, () => {
      expectAtMost(c.referenceChange, 1e-40, "reference change at dps + 20");
      const A = new Matrix(c.A);
      let X: Matrix, residual: number, kappa: number, size: number;
      // κ₂ of the equation in balanced coordinates (A_b = D⁻¹AD, D from Parlett–Reinsch balancing
      // without permutation), which the Lyapunov solvers solve before returning X = D·X_b·D.
      let kappaBalanced = Infinity;
      if (c.kind === "continuous") {
        const Q = new Matrix(c.Q!);
        X = solveContinuousLyapunov(A, Q);
        residual = frobenius(A.mmul(X).add(X.mmul(A.transpose())).add(Q)) / (2 * frobenius(A) * frobenius(X) + frobenius(Q));
        kappa = kroneckerCondition("sylvester", A, A.transpose());
        const Ab = balance(A, { permute: false }).B;
        kappaBalanced = kroneckerCondition("sylvester", Ab, Ab.transpose());
        size = A.rows;
      } else if (c.kind === "discrete") {
        const Q = new Matrix(c.Q!);
        X = solveDiscreteLyapunov(A, Q);
        residual = frobenius(A.mmul(X).mmul(A.transpose()).sub(X).add(Q)) / ((frobenius(A) ** 2 + 1) * frobenius(X) + frobenius(Q));
        kappa = kroneckerCondition("stein", A, A.transpose());
        const Ab = balance(A, { permute: false }).B;
        kappaBalanced = kroneckerCondition("stein", Ab, Ab.transpose());
        size = A.rows;
      } else {
        const B = new Matrix(c.B!), C = new Matrix(c.C!);
        X = solveSylvester(A, B, C);
        residual = frobenius(A.mmul(X).add(X.mmul(B)).sub(C)) / ((frobenius(A) + frobenius(B)) * frobenius(X) + frobenius(C));
        kappa = kroneckerCondition("sylvester", A, B);
        size = Math.max(A.rows, B.rows);
      }
      expectAtMost(residual, 100 * size * EPS, "relative residual (scipy's: " + c.scipyResidual.toExponential(1) + ")");
      const forward = frobeniusDifference(X, c.X) / frobenius(c.X);
      if (c.kind === "sylvester") {
        // Normwise bound κ₂(K)·100·n·ε (capped at 1: beyond it the bound says nothing). On these
        // graded equations the orthogonal Schur reduction keeps only normwise accuracy, like
        // scipy's Bartels–Stewart (its error is recorded as scipyRelativeError).
        expectAtMost(forward, Math.min(1.5, kappa * 100 * size * EPS), `forward error (κ₂ = ${kappa.toExponential(1)}, scipy's ${c.scipyRelativeError.toExponential(1)})`);
      } else {
        // The Lyapunov solvers balance A first (X = D·X_b·D with D exact powers of two), so the
        // grading costs no accuracy: within 10× scipy's error (or 1e-12 where scipy reaches
        // rounding level), and within κ₂(K_b)·100·n·ε, the normwise bound of the balanced
        // equation (≈ 1e-12 for the similarity-graded cases, where scipy's continuous solver
        // loses up to all digits; the eigenvalue-spread cases are ill-conditioned after
        // balancing too, κ₂(K_b) ≈ 1e10).
        const bound = Math.min(1.5, kappa * 100 * size * EPS, kappaBalanced * 100 * size * EPS, 10 * Math.max(c.scipyRelativeError, 1e-13));
        expectAtMost(forward, bound, `forward error (κ₂ = ${kappa.toExponential(1)}, balanced κ₂ = ${kappaBalanced.toExponential(1)}, scipy's ${c.scipyRelativeError.toExponential(1)})`);
        // Balancing keeps an exactly symmetric Q's solution exactly symmetric.
        const Q = new Matrix(c.Q!);
        if (frobeniusDifference(Q, Q.transpose().to2DArray()) === 0) {
          for (let i = 0; i < size; i++) for (let j = 0; j < i; j++) expect(X.get(i, j)).toBe(X.get(j, i));
        }
      }
    });
  }
});

describe("singular equations are still refused", () => {
  it("refuses A = diag(1, −1): λ₁ + λ₂ = 0 exactly, reporting the compared gap 0", () => {
    // Hand derivation: the (1, 2) entry of A X + X Aᵀ is (1 − 1)·x₁₂ = 0, whatever x₁₂.
    const e = expectKind(() => solveContinuousLyapunov(new Matrix([[1, 0], [0, -1]]), Matrix.eye(2)), "singular");
    expect(e.details.gap).toBe(0);
    expect(e.message).toMatch(/λ \+ μ ≈ 0 \(\|λ \+ μ\| = 0\.00e\+0, threshold /);
  });

  it("refuses A = [[0, 1], [−1, 0]] (eigenvalues ±i: λ + λ̄ = 0), with symmetric and nonsymmetric Q", () => {
    // Hand derivation: the eigenvalues of A are ±i, so λ₁ + λ₂ = 0.
    const A = new Matrix([[0, 1], [-1, 0]]);
    for (const Q of [Matrix.eye(2), new Matrix([[1, 2], [0, 1]])]) {
      const e = expectKind(() => solveContinuousLyapunov(A, Q), "singular");
      expect(Math.abs((e.details.eigenvalueFirst as { im: number }).im)).toBe(1);
      expect(e.details.gap).toBe(0);
    }
  });

  it("refuses the same singular equations when graded: diag(1e4, 1e−4)·[[0, 1], [−1, 0]]·diag(1e−4, 1e4)", () => {
    // Hand derivation: a diagonal similarity keeps the eigenvalues ±i.
    const A = new Matrix([[0, 1e8], [-1e-8, 0]]);
    expectKind(() => solveContinuousLyapunov(A, Matrix.eye(2)), "singular", /λ \+ μ ≈ 0/);
  });

  it("refuses a rank-deficient A whose computed zero eigenvalue is only rounding (|λ| ≈ ε‖A‖)", () => {
    // Hand derivation: rows 1 and 3 are multiples of row 2's pattern (1, 2, 3): rank 1, so 0
    // is a double eigenvalue; the Schur form carries it as O(ε) numbers, below 20·n·ε·ρ(A).
    const A = new Matrix([[-1, -2, -3], [-2, -4, -6], [1, 2, 3]]);
    const e = expectKind(() => solveContinuousLyapunov(A, Matrix.eye(3)), "singular", /λ \+ μ ≈ 0/);
    // the reported numbers are the compared ones
    expect(e.details.gap as number).toBeLessThanOrEqual(e.details.threshold as number);
    expect(e.details.threshold as number).toBeGreaterThan(0);
  });

  it("refuses the discrete equation for λμ = 1, also on a graded A", () => {
    // Hand derivation: 0.6 ± 0.8i have modulus 1, and diag(1e3, 1e−3) similarity keeps them.
    expectKind(() => solveDiscreteLyapunov(new Matrix([[0.6, -0.8], [0.8, 0.6]]), Matrix.eye(2)), "singular", /λ·μ ≈ 1/);
    expectKind(() => solveDiscreteLyapunov(new Matrix([[0.6, -0.8e6], [0.8e-6, 0.6]]), Matrix.eye(2)), "singular", /λ·μ ≈ 1/);
  });

  it("refuses the Sylvester equation for λ(A) + μ(B) = 0 behind a graded 2×2 block", () => {
    // Hand derivation: A has eigenvalues 1 ± 2i (a diagonal similarity of [[1, 2], [−2, 1]]),
    // B = [[−1, −2], [2, −1]] has −1 ∓ 2i: λ + μ = 0 for a conjugate-free pair.
    const A = new Matrix([[1, 2e6], [-2e-6, 1]]);
    const B = new Matrix([[-1, -2], [2, -1]]);
    expectKind(() => solveSylvester(A, B, Matrix.ones(2, 2)), "singular", /λ \+ μ ≈ 0/);
  });
});

describe("graded equations near, but not at, the singular relation", () => {
  it("solves a graded complex pair −1e−10 ± i (|λ₁ + λ₂| = 2e−10 far above 20·n·ε·ρ) with a tiny residual", () => {
    // Hand derivation: the block [[a, b], [c, a]] with b·c = −1 has eigenvalues a ± i.
    const A = new Matrix([[-1e-10, 1e8], [-1e-8, -1e-10]]);
    const Q = Matrix.eye(2);
    const X = solveContinuousLyapunov(A, Q);
    const residual = frobenius(A.mmul(X).add(X.mmul(A.transpose())).add(Q)) / (2 * frobenius(A) * frobenius(X) + frobenius(Q));
    expectAtMost(residual, 100 * 2 * EPS, "relative residual");
  });
});

describe("quasi-triangular kernels: the separation test on unusual 2×2 blocks", () => {
  const labels = { equation: "S Y + Y Sᵀ = C", first: "S", second: "S" };

  it("solves a 2×2 block with real eigenvalues (not a standardised Schur block) and refuses one with an eigenvalue 0", () => {
    // Hand derivation: [[1, 1], [0.5, 2]] has eigenvalues (3 ± √3)/2, so all λ + μ > 0;
    // [[1, 1], [1, 1]] has eigenvalues 0 and 2, so 2·0 = 0.
    const s = Float64Array.from([1, 1, 0.5, 2]);
    const y = Float64Array.from([1, 0, 0, 1]);
    solveSymmetricLyapunovTriangularInPlace(s, 2, y, 1e-13, labels);
    const S = new Matrix([[1, 1], [0.5, 2]]), Y = new Matrix([[y[0]!, y[1]!], [y[2]!, y[3]!]]);
    expectAtMost(frobenius(S.mmul(Y).add(Y.mmul(S.transpose())).sub(Matrix.eye(2))) / (2 * frobenius(S) * frobenius(Y) + Math.SQRT2), 100 * 2 * EPS, "relative residual");
    const t = Float64Array.from([1, 1, 1, 1]);
    const f = Float64Array.from([1, 0, 0, 1]);
    expectKind(() => solveQuasiTriangularInPlace("sylvester", t, 2, Float64Array.from([1, 1, 1, 1]), 2, f, 1e-13, labels), "singular", /λ \+ μ ≈ 0/);
  });

  it("reports a zero pivot of the block system when the gap passes but elimination underflows", () => {
    // Hand derivation: [[−1, 1e300], [−1e−300, −1]] has eigenvalues −1 ± i (b·c = −1), so the
    // gap 2 passes; complete pivoting takes 2e300 and 1e300 first, and the product of the three
    // pivots of the diagonal block's system must be its determinant 16: the last underflows.
    const s = Float64Array.from([-1, 1e300, -1e-300, -1]);
    expectKind(() => solveSymmetricLyapunovTriangularInPlace(s, 2, Float64Array.from([1, 0, 0, 1]), 1e-13, labels), "singular", /zero pivot/);
  });
});
