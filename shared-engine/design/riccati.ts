/**
 * Shared parts of the algebraic Riccati solvers: the result type, entry checks for (A, B, Q, R,
 * N), the weight checks, the symplectic scaling and the final solve X = U21·U11⁻¹ from a basis
 * of the stable subspace. Kernels: riccatiKernels.ts; continuous solver: riccatiContinuous.ts;
 * discrete: riccatiDiscrete.ts; extended pencil: riccatiPencil.ts; Newton refinement and the
 * final verification: riccatiRefine.ts; the Hamiltonian's imaginary-axis test: riccatiAxis.ts.
 */
import { Matrix } from "ml-matrix";
import { EngineError } from "../errors";
import { asMatrix, requireFinite, requireNonEmpty, requireSquareFinite, shapeOf, type Complex, type MatrixInput } from "../linalg";
import { balanceInPlace, rowMajorOf } from "../linalg/kernels";
import { cholesky, frobeniusOf, multiply, oneNormRowMajor, solveInPlace } from "./riccatiKernels";

/** Result of a continuous or discrete algebraic Riccati solve. All matrices are fresh copies. */
export interface RiccatiSolution {
  /** Stabilizing solution (n×n, symmetric positive semidefinite). */
  X: Matrix;
  /** Optimal gain (m×n): u = −K x. */
  K: Matrix;
  /** Eigenvalues of A − B·K (computed from A − B·K itself, not read off the pencil). */
  closedLoopPoles: Complex[];
  /** Relative residual ‖Res(X)‖_F / ‖X‖_F (‖Res(X)‖_F when X = 0). */
  residual: number;
  /**
   * Reciprocal 1-norm condition number 1/(‖U11‖₁·‖U11⁻¹‖₁) of the block U11 of the orthonormal
   * basis [U11; U21] of the stable invariant (deflating) subspace of the balanced Hamiltonian
   * (or pencil), X_balanced = U21·U11⁻¹. Near 1: X is
   * obtained from a well-conditioned solve; near ε: X is huge or the problem is near the
   * boundary of stabilizability/detectability. Not the condition number of the Riccati equation.
   */
  conditionIndicator: number;
  /** True when at least one Newton (Kleinman / Hewer) correction step was applied. */
  refined: boolean;
  /** Short description of the method actually used. */
  method: string;
  /** Human-readable notes on accuracy (poor conditioning, refinement not converging, ...). */
  warnings: string[];
}

/** Options shared by both solvers. */
export interface RiccatiOptions {
  /**
   * Newton refinement: true = always at least one step, false = never, undefined = only when
   * the normalised residual exceeds 100·n·ε or X was visibly non-symmetric.
   */
  refine?: boolean;
}

/** Validated inputs copied into row-major arrays. N is all zeros when it was not given. */
export interface RiccatiData {
  n: number;
  m: number;
  a: Float64Array;
  b: Float64Array;
  q: Float64Array;
  r: Float64Array;
  nCross: Float64Array;
  hasCross: boolean;
}

/**
 * Symmetry tolerance for the weights: entries typed by a user or formed as CᵀC are symmetric
 * to within a few rounding errors of the largest entry.
 */
const SYMMETRY_TOLERANCE = 1000 * Number.EPSILON;

export function prepareRiccatiData(
  Ain: MatrixInput, Bin: MatrixInput, Qin: MatrixInput, Rin: MatrixInput, Nin: MatrixInput | null | undefined,
): RiccatiData {
  const A = asMatrix(Ain, "A");
  const B = asMatrix(Bin, "B");
  const Q = asMatrix(Qin, "Q");
  const R = asMatrix(Rin, "R");
  requireSquareFinite(A, "A");
  const n = A.rows;
  requireNonEmpty(B, "B");
  if (B.rows !== n) {
    throw new EngineError("shape-mismatch", `B must have as many rows as A (A is ${shapeOf(A)}, B is ${shapeOf(B)})`, {
      argument: "B", expectedRows: n, rows: B.rows,
    });
  }
  requireFinite(B, "B");
  const m = B.columns;
  requireShape(Q, "Q", n, n, `A is ${shapeOf(A)}`);
  requireShape(R, "R", m, m, `B is ${shapeOf(B)}, so there are ${m} inputs`);
  requireFinite(Q, "Q");
  requireFinite(R, "R");
  const q = rowMajorOf(Q);
  const r = rowMajorOf(R);
  requireSymmetric(q, n, "Q");
  requireSymmetric(r, m, "R");
  let nCross: Float64Array = new Float64Array(n * m);
  let hasCross = false;
  if (Nin !== null && Nin !== undefined) {
    const N = asMatrix(Nin, "N");
    requireShape(N, "N", n, m, `it pairs the ${n} states with the ${m} inputs`);
    requireFinite(N, "N");
    nCross = rowMajorOf(N);
    hasCross = nCross.some((v) => v !== 0);
  }
  return { n, m, a: rowMajorOf(A), b: rowMajorOf(B), q, r, nCross, hasCross };
}

function requireShape(M: Matrix, name: string, rows: number, cols: number, why: string): void {
  if (M.rows !== rows || M.columns !== cols) {
    throw new EngineError("shape-mismatch", `${name} must be ${rows}×${cols} (${why}; ${name} is ${shapeOf(M)})`, {
      argument: name, expected: [rows, cols], actual: [M.rows, M.columns],
    });
  }
}

/** Throws "invalid-argument" unless |s_ij − s_ji| ≤ 1000·ε·max|s|; then symmetrises in place. */
export function requireSymmetric(s: Float64Array, n: number, name: string): void {
  let maxAbs = 0;
  for (let i = 0; i < n * n; i++) maxAbs = Math.max(maxAbs, Math.abs(s[i]!));
  const tol = SYMMETRY_TOLERANCE * maxAbs;
  for (let i = 0; i < n; i++) {
    for (let j = i + 1; j < n; j++) {
      const d = Math.abs(s[i * n + j]! - s[j * n + i]!);
      if (d > tol) {
        throw new EngineError("invalid-argument", `${name} must be symmetric (${name}[${i}][${j}] = ${s[i * n + j]} but ${name}[${j}][${i}] = ${s[j * n + i]})`, {
          argument: name, row: i, col: j, difference: d, tolerance: tol,
        });
      }
      const mean = 0.5 * (s[i * n + j]! + s[j * n + i]!);
      s[i * n + j] = mean;
      s[j * n + i] = mean;
    }
  }
}

/**
 * [Q N; Nᵀ R] positive semidefinite to within τ = 100·(n+m)·ε·‖[Q N; Nᵀ R]‖_F: Cholesky of
 * W + τI must succeed. Throws "invalid-argument" otherwise. With `requireRDefinite`, R must
 * be positive definite: its Cholesky pivots must exceed m·ε·‖R‖_F (continuous case).
 * Returns the Cholesky factor of R (or null when R is only semidefinite).
 */
export function checkWeights(data: RiccatiData, requireRDefinite: boolean): { rFactor: Float64Array | null; rConditionEstimate: number } {
  const { n, m, q, r, nCross } = data;
  const normR = frobeniusOf(r);
  const rFactor = cholesky(r, m, m * Number.EPSILON * normR);
  if (requireRDefinite && rFactor === null) {
    throw new EngineError("invalid-argument", "R must be positive definite (its Cholesky factorisation meets a pivot ≤ m·ε·‖R‖_F)", {
      argument: "R", tolerance: m * Number.EPSILON * normR,
    });
  }
  const size = n + m;
  const w = new Float64Array(size * size);
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < n; j++) w[i * size + j] = q[i * n + j]!;
    for (let j = 0; j < m; j++) {
      w[i * size + n + j] = nCross[i * m + j]!;
      w[(n + j) * size + i] = nCross[i * m + j]!;
    }
  }
  for (let i = 0; i < m; i++) for (let j = 0; j < m; j++) w[(n + i) * size + n + j] = r[i * m + j]!;
  const tau = Math.max(100 * size * Number.EPSILON * frobeniusOf(w), Number.MIN_VALUE);
  for (let i = 0; i < size; i++) w[i * size + i] += tau;
  if (cholesky(w, size, 0) === null) {
    throw new EngineError(
      "invalid-argument",
      data.hasCross
        ? "The weight [Q N; Nᵀ R] must be positive semidefinite (it has a negative eigenvalue below −100·(n+m)·ε·‖W‖_F)"
        : "Q and R must be positive semidefinite (one has a negative eigenvalue below −100·(n+m)·ε·‖W‖_F)",
      { argument: data.hasCross ? "[Q N; Nᵀ R]" : "Q, R", tolerance: tau },
    );
  }
  let rConditionEstimate = Infinity;
  if (rFactor) {
    let lo = Infinity, hi = 0;
    for (let i = 0; i < m; i++) { const d = rFactor[i * m + i]!; lo = Math.min(lo, d); hi = Math.max(hi, d); }
    rConditionEstimate = (hi / lo) ** 2;
  }
  return { rFactor, rConditionEstimate };
}

/**
 * From a 2n×2n orthogonal basis matrix `u` (row-major; its transpose when `transposed`) whose
 * first n columns span the stable subspace, forms X = U21·U11⁻¹ (n×n) and the reciprocal 1-norm condition of U11. Throws
 * "no-stabilizing-solution" when U11 is numerically singular (the subspace is not a graph).
 */
export function graphSolution(u: Float64Array, n: number, transposed = false): { x: Float64Array; rcond: number } {
  const w = 2 * n;
  const u11 = new Float64Array(n * n);
  const u21 = new Float64Array(n * n);
  if (transposed) {
    // `u` holds the basis transposed (row j = column j): read it without forming the transpose.
    for (let j = 0; j < n; j++) {
      const row = j * w;
      for (let i = 0; i < n; i++) {
        u11[i * n + j] = u[row + i]!;
        u21[i * n + j] = u[row + n + i]!;
      }
    }
  } else {
    for (let i = 0; i < n; i++) {
      for (let j = 0; j < n; j++) {
        u11[i * n + j] = u[i * w + j]!;
        u21[i * n + j] = u[(n + i) * w + j]!;
      }
    }
  }
  const norm11 = oneNormRowMajor(u11, n, n);
  // Inverse of U11 by LU (it gives the condition indicator exactly, for 2n³ extra flops).
  const inv = new Float64Array(n * n);
  for (let i = 0; i < n; i++) inv[i * n + i] = 1;
  try {
    solveInPlace(u11.slice(), inv, n, n, "U11");
  } catch (error) {
    if (error instanceof EngineError && error.kind === "singular") {
      throw new EngineError(
        "no-stabilizing-solution",
        "No stabilizing solution: the stable subspace has a singular U11 block (the pair is not stabilizable/detectable or the solution is unbounded)",
        { reason: "singular-U11", ...error.details },
      );
    }
    throw error;
  }
  const rcond = 1 / (norm11 * oneNormRowMajor(inv, n, n));
  return { x: multiply(u21, inv, n, n, n), rcond };
}


/**
 * Structure-preserving diagonal scaling D = diag(S, S⁻¹, T) for a Hamiltonian matrix or the
 * extended Riccati pencil (P. Benner, "Symplectic balancing of Hamiltonian matrices", SIAM J.
 * Sci. Comput. 22(5), 2001; the same device scales the extended pencil before compression).
 * `mag` is the size×size array |H| (+ |J|); Parlett–Reinsch balancing of it (without
 * permutation) gives d, and sᵢ = 2^round((log₂dᵢ − log₂d_{n+i})/2) imposes d_{n+i} = 1/dᵢ so
 * that D⁻¹HD stays Hamiltonian. With the balanced subspace solution X_b, X = S⁻¹·X_b·S⁻¹.
 * Returns all-ones when balancing changes nothing or fails (scaling is only an aid).
 */
export function symplecticScaling(mag: Float64Array, size: number, n: number): Float64Array {
  const d = new Float64Array(size).fill(1);
  let any = false;
  for (let i = 0; i < size; i++) {
    mag[i * size + i] = 0;
    for (let j = 0; j < size && !any; j++) if (mag[i * size + j] !== 0) any = true;
  }
  if (!any) return d;
  // `mag` is scratch: balance it in place (finite, since H and J are).
  const scale = new Float64Array(size);
  try {
    balanceInPlace(mag, size, false, true, new Int32Array(size), scale);
  } catch (error) {
    if (error instanceof EngineError && error.kind === "no-convergence") return d;
    throw error;
  }
  for (let i = 0; i < n; i++) {
    const e = Math.round((Math.log2(scale[i]!) - Math.log2(scale[n + i]!)) / 2);
    d[i] = 2 ** e;
    d[n + i] = 2 ** -e;
  }
  for (let i = 2 * n; i < size; i++) d[i] = scale[i]!;
  return d;
}
