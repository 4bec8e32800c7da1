/**
 * Matrix norms: 1-norm, ∞-norm and Frobenius norm of a real m×n matrix.
 *
 * Degenerate-input policy: an empty matrix (0 rows or 0 columns) has norm 0, which is the
 * mathematically correct value and what dimension-generic callers need. NaN or ±Infinity
 * entries throw, so a norm is never a silent NaN/Infinity.
 */
import { Matrix } from "ml-matrix";
import { EngineError } from "../errors";
import { asMatrix, requireFinite, type MatrixInput } from "./validate";

function prepare(value: MatrixInput, name: string): Matrix {
  const m = asMatrix(value, name);
  requireFinite(m, name);
  return m;
}

/**
 * Computes ‖A‖₁ = max_j Σ_i |a_ij| (maximum absolute column sum) for A: m×n.
 * Requires: finite entries. Method: direct summation (Golub & Van Loan, "Matrix Computations",
 * 4th ed., §2.3.2). Cost: mn additions, n extra numbers. Accuracy: each column sum has relative
 * error ≤ m·ε. Errors: "non-finite" for NaN/Infinity entries; "invalid-argument" for a value
 * that is not a matrix. Example: `norm1([[1, -2], [3, 4]]) === 6` (column 2: |−2| + |4|).
 */
export function norm1(A: MatrixInput): number {
  const m = prepare(A, "A");
  let best = 0;
  for (let j = 0; j < m.columns; j++) {
    let s = 0;
    for (let i = 0; i < m.rows; i++) s += Math.abs(m.get(i, j));
    if (s > best) best = s;
  }
  return finiteOrThrow(best, "‖A‖₁");
}

/**
 * Computes ‖A‖∞ = max_i Σ_j |a_ij| (maximum absolute row sum) for A: m×n.
 * Requires: finite entries. Method: direct summation (Golub & Van Loan, 4th ed., §2.3.2).
 * Cost: mn additions. Accuracy: relative error ≤ n·ε per row sum. Errors: "non-finite",
 * "invalid-argument". Example: `normInf([[1, -2], [3, 4]]) === 7` (row 2: 3 + 4).
 */
export function normInf(A: MatrixInput): number {
  const m = prepare(A, "A");
  let best = 0;
  for (let i = 0; i < m.rows; i++) {
    let s = 0;
    for (let j = 0; j < m.columns; j++) s += Math.abs(m.get(i, j));
    if (s > best) best = s;
  }
  return finiteOrThrow(best, "‖A‖∞");
}

/**
 * Computes ‖A‖_F = (Σ_ij a_ij²)^{1/2} for A: m×n.
 * Requires: finite entries. Method: scaled sum of squares as in the reference BLAS dnrm2
 * (Hammarling's scaling; Blue, "A portable Fortran program to find the Euclidean norm of a
 * vector", ACM TOMS 4(1), 1978), so entries near 1e±200 neither overflow nor underflow.
 * Cost: mn multiply-adds and at most mn divisions. Accuracy: relative error ≤ (mn+2)·ε.
 * Errors: "non-finite" (input, or a norm above the largest double), "invalid-argument".
 * Example: `normFrobenius([[3, 0], [0, 4]]) === 5`.
 */
export function normFrobenius(A: MatrixInput): number {
  const m = prepare(A, "A");
  let scale = 0;
  let ssq = 1;
  for (let i = 0; i < m.rows; i++) {
    for (let j = 0; j < m.columns; j++) {
      const v = Math.abs(m.get(i, j));
      if (v === 0) continue;
      if (scale < v) {
        ssq = 1 + ssq * (scale / v) * (scale / v);
        scale = v;
      } else {
        ssq += (v / scale) * (v / scale);
      }
    }
  }
  return finiteOrThrow(scale * Math.sqrt(ssq), "‖A‖_F");
}

function finiteOrThrow(value: number, what: string): number {
  if (!Number.isFinite(value)) {
    throw new EngineError("non-finite", `${what} exceeds the largest representable number`, { value: String(value) });
  }
  return value;
}
