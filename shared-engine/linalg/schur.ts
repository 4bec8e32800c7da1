/**
 * Real Schur decomposition A = Q T Qᵀ: Householder reduction to Hessenberg form, then the
 * Francis double-shift QR iteration (schurFrancis.ts, sweeps in schurSweep.ts) with the
 * small-subdiagonal deflation test of Ahues & Tisseur and the standardisation of 2×2 blocks of
 * LAPACK's dlanv2 (schurBlocks.ts). Kernels work on row-major Float64Arrays.
 */
import { Matrix } from "ml-matrix";
import { EngineError } from "../errors";
import { matrixOfRowMajor } from "./denseKernels";
import type { Complex } from "./complex";
import { reduceToHessenbergTransposedInPlace } from "./hessenberg";
import { eigenvaluesOfQuasiTriangular } from "./schurBlocks";
import { francisQRTransposedInPlace, transposeInto, transposeWorkspace } from "./schurFrancis";
import { checkSchurProbe, finiteRowMajorOf } from "./schurProbe";
import { requireSquare } from "./validate";

export { standardizeBlock2x2, standardizeBlockAt, eigenvaluesOfQuasiTriangular, type StandardizedBlock } from "./schurBlocks";
export { francisQRInPlace, francisQRTransposedInPlace } from "./schurFrancis";
export { checkSchurProbe, finiteRowMajorOf } from "./schurProbe";

const ULP = Number.EPSILON; // LAPACK dlamch('P') = 2^-52

export interface RealSchurForm {
  /** Upper quasi-triangular: 1×1 blocks (real eigenvalues) and standardised 2×2 blocks. */
  T: Matrix;
  /** Orthogonal, A = Q T Qᵀ. */
  Q: Matrix;
  /** In the order of the diagonal of T; conjugate pairs adjacent, positive imaginary part first. */
  eigenvalues: Complex[];
  /** Francis QR sweeps used. */
  iterations: number;
}

/** Default total sweep limit: 30·max(10, n), the per-eigenvalue allowance of dlahqr used as a total. */
export function defaultSchurIterationLimit(n: number): number {
  return 30 * Math.max(10, n);
}

/**
 * Computes: the real Schur decomposition A = Q T Qᵀ (A, T, Q: n×n) with Q orthogonal and T
 * upper quasi-triangular. 2×2 diagonal blocks hold complex conjugate pairs in standard form
 * (equal diagonal entries, off-diagonal entries of opposite sign); real eigenvalues sit in 1×1
 * blocks. `eigenvalues` follow the diagonal of T, each conjugate pair adjacent with the
 * positive imaginary part first.
 *
 * Requires: A square, non-empty, finite. No balancing is applied, so the identity holds for A
 * itself (use `eigenvalues` for balanced eigenvalue computation).
 *
 * Method: Householder reduction to Hessenberg form (Golub & Van Loan, 4th ed., Alg. 7.4.2),
 * then Francis implicit double-shift QR (J. G. F. Francis, "The QR transformation", Computer
 * J. 4, 1961–62) with the deflation criterion of Ahues & Tisseur (LAPACK Working Note 122,
 * 1997), exceptional shifts every 10 sweeps, and 2×2 blocks standardised as in Bai & Demmel,
 * Linear Algebra Appl. 186 (1993). The kernels keep Qᵀ rather than Q (row-major: a reflector
 * acting on columns k..k+2 of Q then updates three contiguous rows), from the accumulation
 * of the Hessenberg reflectors to the end of the sweeps, and transpose once into the result.
 * A matrix whose largest entry lies outside [2^−300, 2^300] is factored as 2^−e·A (largest
 * entry in [1, 2)) and T scaled back, both exact, so products of entries cannot overflow.
 *
 * Cost: about 25·n³ flops with Q (10/3·n³ Hessenberg, the rest QR sweeps, typically 2–4 per
 * eigenvalue); O(n²) memory. Iteration limit: `maxIterations` sweeps in total (default
 * 30·max(10, n)).
 *
 * Accuracy: backward stable, ‖A − QTQᵀ‖_F/‖A‖_F and ‖QᵀQ − I‖_F of order n·ε (tests require
 * ≤ 100·n·ε). Before returning, T and Q are checked finite and a probe-vector residual
 * ‖A Q x − Q T x‖/(‖A‖_F‖x‖) ≤ 1000·n·ε is verified.
 *
 * Errors: "empty", "shape-mismatch", "non-finite" (bad input); "invalid-argument" (bad
 * maxIterations); "no-convergence" when the sweep limit is reached (details.iterations);
 * "internal" if the a-posteriori check fails.
 *
 * Example:
 *   const A = new Matrix([[0, 1], [-2, -3]]);
 *   const { T, Q, eigenvalues } = realSchur(A); // eigenvalues −1, −2 (in some order)
 *   // ‖A − Q·T·Qᵀ‖_F / ‖A‖_F < 1e-15
 */
export function realSchur(A: Matrix, options: { maxIterations?: number } = {}): RealSchurForm {
  requireSquare(A, "A");
  const n = A.rows;
  if (schurA.length < n * n) schurA = new Float64Array(n * n);
  const a = finiteRowMajorOf(A, "A", schurA);
  const maxIterations = options.maxIterations ?? defaultSchurIterationLimit(n);
  if (!Number.isInteger(maxIterations) || maxIterations < 0) {
    throw new EngineError("invalid-argument", `maxIterations must be a non-negative integer (got ${maxIterations})`, {
      argument: "maxIterations",
      value: maxIterations,
    });
  }
  if (schurT.length < n * n) {
    schurT = new Float64Array(n * n);
    schurQt = new Float64Array(n * n);
  }
  const t = schurT, qt = schurQt;
  const iterations = realSchurInto(a, n, maxIterations, t, qt);
  const T = matrixOfRowMajor(t, n, n); // copies: the workspaces are never handed out
  const Q = matrixOfRowMajor(transposeInto(qt, n, transposeWorkspace(n * n)), n, n);
  return { T, Q, eigenvalues: eigenvaluesOfQuasiTriangular(t, n), iterations };
}

// Workspaces of realSchur (A's copy, and T and Qᵀ before they are copied into the result).
let schurA = new Float64Array(0);
let schurT = new Float64Array(0);
let schurQt = new Float64Array(0);

/**
 * Kernel behind `realSchur` for callers that already hold a validated row-major copy `a`
 * (n×n, finite; not modified) and want T and Q row-major, skipping the Matrix round trips:
 * the same Hessenberg + Francis QR steps, zeroing below the quasi-triangle, finiteness check
 * and probe check (1000·n·ε) as `realSchur`. Returns fresh arrays. Throws the same errors.
 */
export function realSchurRowMajor(a: Float64Array, n: number, maxIterations: number): { t: Float64Array; q: Float64Array; iterations: number } {
  const t = new Float64Array(n * n);
  const qt = transposeWorkspace(n * n);
  const iterations = realSchurInto(a, n, maxIterations, t, qt);
  const q = transposeInto(qt, n, new Float64Array(n * n));
  return { t, q, iterations };
}

/**
 * Kernel: the real Schur form of the row-major n×n `a` (validated, finite; not modified) into
 * caller-owned arrays: `t` (first n² entries) receives T, `qt` receives Qᵀ (row-major), so
 * that a = Q·T·Qᵀ. Same steps, checks and errors as `realSchur`; returns the sweep count.
 * `t` and `qt` must not alias `a` or each other, nor the Hessenberg/transpose workspaces.
 */
export function realSchurInto(a: Float64Array, n: number, maxIterations: number, t: Float64Array, qt: Float64Array): number {
  let big = 0;
  for (let i = 0; i < n * n; i++) {
    const v = a[i];
    t[i] = v;
    if (v > big) big = v;
    else if (-v > big) big = -v;
  }
  // Very large or very small matrices: products of two entries would overflow or underflow in
  // the shifts and reflectors, so work on 2^−e·A (largest entry in [1, 2)) and scale T back.
  // Powers of two make both scalings exact; Q is unchanged (LAPACK's drivers scale likewise).
  const exponent = outOfRangeExponent(big);
  const scaled = exponent !== 0;
  if (scaled) {
    const down = 2 ** -exponent;
    for (let i = 0; i < n * n; i++) t[i] *= down;
  }
  reduceToHessenbergTransposedInPlace(t, n, 0, n - 1, qt);
  if (eigenvalueRe.length < n) {
    eigenvalueRe = new Float64Array(n);
    eigenvalueIm = new Float64Array(n);
  }
  const iterations = francisQRTransposedInPlace(t, n, 0, n - 1, true, qt, eigenvalueRe, eigenvalueIm, maxIterations);
  // exact zeros below the quasi-triangle (the sweeps leave them zero; make it a guarantee)
  for (let i = 2; i < n; i++) for (let j = 0, row = i * n; j < i - 1; j++) t[row + j] = 0;
  if (scaled) {
    const up = 2 ** exponent;
    for (let i = 0; i < n * n; i++) t[i] *= up;
  }
  try {
    checkSchurProbe(a, t, qt, n, 1000 * n * ULP, "realSchur", true);
  } catch (error) {
    // Every entry of T's quasi-triangle and of Q enters the probe (with nonzero weights), so
    // an Inf or NaN anywhere makes it fail: only then is it worth scanning for one, to report
    // an overflow as such rather than as an internal error.
    let nonFinite = 0;
    for (let i = 0; i < n * n; i++) nonFinite += t[i] * 0 + qt[i] * 0; // x·0 is NaN only for Inf/NaN
    if (nonFinite !== 0) throw new EngineError("non-finite", "Schur decomposition of A overflowed (entries of A too large)", { argument: "A" });
    throw error;
  }
  return iterations;
}

// Matrices whose largest entry lies outside [2^−300, 2^300] (about 5e-91 to 2e90) are worked on
// as 2^−e·A: products of two entries then stay far from overflow and underflow.
const SCALE_ABOVE = 2 ** 300;
const SCALE_BELOW = 2 ** -300;

/**
 * e such that 2^−e·A has its largest entry in [1, 2) when `largest` = max|a_ij| lies outside
 * [2^−300, 2^300]; 0 otherwise (no scaling). Shared by realSchurInto and eigenvalues.
 */
export function outOfRangeExponent(largest: number): number {
  return largest > SCALE_ABOVE || (largest > 0 && largest < SCALE_BELOW) ? Math.floor(Math.log2(largest)) : 0;
}

// wr/wi of realSchurInto (the eigenvalues are read off T afterwards).
let eigenvalueRe = new Float64Array(0);
let eigenvalueIm = new Float64Array(0);
