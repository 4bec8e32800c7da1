/**
 * Numerical rank, orthonormal bases of the range and null space, and the 2-norm reciprocal
 * condition number, all read from one singular value decomposition.
 */
import { Matrix, SingularValueDecomposition } from "ml-matrix";
import { EngineError } from "../errors";
import { asMatrix, requireFinite, requireNonEmpty, type MatrixInput } from "./validate";

/** Everything the SVD says about rank; compute once, read many. Matrices are fresh copies. */
export interface RankDecomposition {
  /** Number of singular values strictly greater than `tolerance`. */
  rank: number;
  /** The threshold used: the caller's, or max(m, n)·σ_max·ε. */
  tolerance: number;
  /** The min(m, n) singular values, in decreasing order. */
  singularValues: number[];
  /** m×rank, orthonormal columns spanning range(A). */
  range: Matrix;
  /** n×(n − rank), orthonormal columns spanning null(A). */
  nullSpace: Matrix;
  /** σ_min/σ_max in the 2-norm (0 for a zero matrix). */
  reciprocalCondition: number;
}

/** A as a Matrix, non-empty and finite (the errors name "A"). */
function checkedInput(A: MatrixInput): Matrix {
  const a = asMatrix(A, "A");
  requireNonEmpty(a, "A");
  requireFinite(a, "A");
  return a;
}

function checkTolerance(tol: number | undefined): void {
  if (tol === undefined) return;
  if (typeof tol !== "number" || !Number.isFinite(tol) || tol < 0) {
    throw new EngineError("invalid-argument", `tol must be a finite non-negative number (it is ${String(tol)})`, {
      argument: "tol", value: String(tol),
    });
  }
}

/**
 * Computes the SVD A = U Σ Vᵀ of A: m×n and reads from it rank, tolerance, singular values,
 * orthonormal bases of range(A) (m×r) and null(A) (n×(n−r)), and σ_min/σ_max.
 *
 * Requires: A non-empty and finite; tol (if given) finite and ≥ 0.
 *
 * Method: one-sided Golub–Kahan–Reinsch SVD as implemented by ml-matrix (G. H. Golub &
 * C. Reinsch, "Singular value decomposition and least squares solutions", Numer. Math. 14,
 * 1970). For m < n the matrix is padded with n − m zero rows so the full n×n V is available
 * for the null space; padding adds only zero singular values, which are not reported. Default
 * tolerance max(m, n)·σ_max·ε is the usual choice (Golub & Van Loan, "Matrix Computations",
 * 4th ed., §5.4.1): singular values below it are indistinguishable from rounding of A.
 *
 * Cost: O(max(m, n)·n²) flops (about 12 max(m,n) n² with both factors), O(max(m,n)·n) memory.
 * The SVD iteration is ml-matrix's and has no explicit cap (it always converges in practice).
 *
 * Accuracy: each singular value is within ≈ max(m,n)·ε·σ_max of the exact one (backward
 * stability of the SVD, Weyl's inequality); the bases are orthonormal to O(nε). Outputs are
 * checked finite.
 *
 * Errors: "empty", "non-finite", "invalid-argument" (not a matrix; bad tol), "non-finite" if
 * the SVD produced NaN (overflow for entries near the double range).
 *
 * Example: A = [[1, 2], [2, 4]] has rank 1, null space ±[2, −1]/√5; check ‖A·N‖ < 1e-15.
 */
export function rankDecomposition(A: MatrixInput, tol?: number): RankDecomposition {
  const a = checkedInput(A);
  checkTolerance(tol);
  const m = a.rows;
  const n = a.columns;
  let work = a;
  if (m < n) {
    work = Matrix.zeros(n, n);
    work.setSubMatrix(a, 0, 0);
  }
  const svd = new SingularValueDecomposition(work, { computeLeftSingularVectors: true, computeRightSingularVectors: true });
  const k = Math.min(m, n);
  const singularValues = svd.diagonal.slice(0, k);
  if (!singularValues.every(Number.isFinite)) {
    throw new EngineError("non-finite", "the SVD of A overflowed (entries of A too large)", { argument: "A" });
  }
  const sigmaMax = singularValues[0] ?? 0;
  const tolerance = tol ?? Math.max(m, n) * sigmaMax * Number.EPSILON;
  let rank = 0;
  while (rank < k && singularValues[rank]! > tolerance) rank++;
  const U = svd.leftSingularVectors;
  const V = svd.rightSingularVectors;
  const range = new Matrix(m, rank);
  for (let i = 0; i < m; i++) for (let j = 0; j < rank; j++) range.set(i, j, U.get(i, j));
  const nullSpace = new Matrix(n, n - rank);
  for (let i = 0; i < n; i++) for (let j = rank; j < n; j++) nullSpace.set(i, j - rank, V.get(i, j));
  const sigmaMin = singularValues[k - 1]!;
  return {
    rank,
    tolerance,
    singularValues,
    range,
    nullSpace,
    reciprocalCondition: sigmaMax === 0 ? 0 : sigmaMin / sigmaMax,
  };
}

/**
 * Computes the numerical rank r = #{σᵢ > tol} of A: m×n, with the tolerance used and the
 * min(m, n) singular values (decreasing).
 * Requires: A non-empty, finite; tol ≥ 0 finite (default max(m, n)·σ_max·ε).
 * Method: singular values alone (Golub–Reinsch SVD via ml-matrix, no singular vectors), so
 * cheaper than `rankDecomposition`; the same values and rank decision. Accuracy: see there.
 * Errors: "empty", "non-finite", "invalid-argument".
 * Example: `numericalRank(new Matrix([[1, 2], [2, 4]])).rank === 1`; check σ₂ ≤ tolerance.
 */
export function numericalRank(A: Matrix, tol?: number): { rank: number; tolerance: number; singularValues: number[] } {
  const a = checkedInput(A);
  checkTolerance(tol);
  const singularValues = singularValuesOnly(a);
  const sigmaMax = singularValues[0] ?? 0;
  const tolerance = tol ?? Math.max(a.rows, a.columns) * sigmaMax * Number.EPSILON;
  let rank = 0;
  while (rank < singularValues.length && singularValues[rank]! > tolerance) rank++;
  return { rank, tolerance, singularValues };
}

/**
 * The min(m, n) singular values of a validated A, in decreasing order, without singular vectors
 * (Golub–Kahan–Reinsch via ml-matrix with the vector accumulation switched off: the same values
 * `rankDecomposition` finds, at a fraction of its cost for large n).
 */
function singularValuesOnly(a: Matrix): number[] {
  const svd = new SingularValueDecomposition(a, { computeLeftSingularVectors: false, computeRightSingularVectors: false, autoTranspose: true });
  const singularValues = svd.diagonal.slice(0, Math.min(a.rows, a.columns));
  if (!singularValues.every(Number.isFinite)) {
    throw new EngineError("non-finite", "the SVD of A overflowed (entries of A too large)", { argument: "A" });
  }
  return singularValues;
}

/**
 * Computes N: n×(n − r) with orthonormal columns spanning {x : A x ≈ 0} for A: m×n, r the
 * numerical rank at `tol`: the right singular vectors of the singular values ≤ tol.
 * Requires, Method, Cost, Accuracy: see `rankDecomposition`; ‖A N‖₂ ≤ tol + O(ε‖A‖₂).
 * Errors: "empty", "non-finite", "invalid-argument".
 * Example: `nullSpace(new Matrix([[1, 1]]))` is ±[[1], [−1]]/√2; check ‖A·N‖ < 1e-15.
 */
export function nullSpace(A: Matrix, tol?: number): Matrix {
  return rankDecomposition(A, tol).nullSpace;
}

/**
 * Computes R: m×r with orthonormal columns spanning the numerical range (column space) of
 * A: m×n: the left singular vectors of the singular values > tol.
 * Requires, Method, Cost, Accuracy: see `rankDecomposition`; ‖(I − R Rᵀ) A‖₂ ≤ tol + O(ε‖A‖₂).
 * Errors: "empty", "non-finite", "invalid-argument".
 * Example: `rangeSpace(new Matrix([[1, 2], [2, 4]]))` is ±[[1], [2]]/√5; check ‖(I − RRᵀ)A‖ < 1e-15.
 */
export function rangeSpace(A: Matrix, tol?: number): Matrix {
  return rankDecomposition(A, tol).range;
}

/**
 * Computes the reciprocal 2-norm condition number σ_min/σ_max of A: m×n (σ_min the smallest of
 * the min(m, n) singular values). Exactly this ratio, not an estimate: 1 for orthogonal
 * matrices, 0 for a zero matrix, ≈ ε or below for numerically singular ones.
 * Requires: A non-empty and finite. Method: the singular values alone (Golub–Kahan–Reinsch SVD
 * via ml-matrix, no singular vectors accumulated). Cost ≈ 4mn² flops for m ≥ n (the
 * bidiagonalisation dominates); a few times cheaper than `rankDecomposition`, which also forms
 * the bases. Accuracy: absolute error ≈ max(m,n)·ε.
 * Errors: "empty", "non-finite", "invalid-argument".
 * Example: `reciprocalCondition(new Matrix([[2, 0], [0, 0.5]])) === 0.25`.
 */
export function reciprocalCondition(A: Matrix): number {
  const a = checkedInput(A);
  const sv = singularValuesOnly(a);
  const sigmaMax = sv[0]!;
  return sigmaMax === 0 ? 0 : sv[sv.length - 1]! / sigmaMax;
}
