/**
 * Generalized real Schur form of a square pencil (A, E) by the QZ algorithm, and the
 * generalized eigenvalues λ with det(A − λE) = 0 (including infinite ones when E is singular).
 * Reordering of the form lives in qzReorder.ts (re-exported here).
 */
import { Matrix } from "ml-matrix";
import { EngineError } from "../errors";
import type { Complex } from "./complex";
import { asMatrix, requireSquareFinite, shapeOf, type MatrixInput } from "./validate";
import { iterate } from "./qzIteration";
import { reduceToHessenbergTriangular } from "./qzHessenbergTriangular";
import { ULP, type PencilWork, eigenvaluesOfForm, frobeniusNorm, loadPencil, matrixViewOfRowMajor } from "./qzKernels";

export { reorderQz, reorderQzRowMajor } from "./qzReorder";

/** One generalized eigenvalue λ = alpha / beta. `value` is null when the eigenvalue is infinite. */
export interface GeneralizedEigenvalue {
  alpha: Complex;
  beta: number;
  infinite: boolean;
  value: Complex | null;
}

/**
 * Qᵀ·A·Z = S (quasi upper triangular: 1×1 blocks and 2×2 blocks holding complex-conjugate
 * pairs, each 2×2 block with T's block diagonal and positive), Qᵀ·E·Z = T (upper triangular
 * with T[j][j] ≥ 0), Q and Z orthogonal. eigenvalues[j] belongs to diagonal position j.
 */
export interface GeneralizedSchurForm {
  S: Matrix;
  T: Matrix;
  Q: Matrix;
  Z: Matrix;
  eigenvalues: GeneralizedEigenvalue[];
  iterations: number;
}

/**
 * Computes: the generalized real Schur form of the pencil (A, E), A: n×n, E: n×n:
 *   Qᵀ·A·Z = S (quasi upper triangular), Qᵀ·E·Z = T (upper triangular), QᵀQ = ZᵀZ = I,
 * and the generalized eigenvalues λ_j = alpha_j / beta_j read from the diagonal blocks.
 *
 * Requires: A and E square, of the same size, non-empty, finite. E may be singular (its null
 * directions give infinite eigenvalues, reported with `infinite: true`, `value: null`).
 * A singular pencil (det(A − λE) ≡ 0) still gets a valid decomposition, but some 1×1 block
 * then has alpha ≈ 0 and beta ≈ 0 (eigenvalue undetermined); `generalizedEigenvalues` throws
 * "singular" for it, `qz` reports it as infinite and leaves the decision to the caller.
 *
 * Method: Moler & Stewart, "An algorithm for generalized matrix eigenvalue problems",
 * SIAM J. Numer. Anal. 10(2), 1973: Householder QR of E, Givens reduction to
 * Hessenberg–triangular form, then implicit double-shift QZ sweeps with deflation of
 * negligible subdiagonal entries of S and of negligible diagonal entries of T (a zero on T's
 * diagonal is chased to the bottom, or pushed out at the top of the active block, where it
 * deflates an infinite eigenvalue). Deflation tests and zero chasing follow the structure of
 * LAPACK dhgeqz (Anderson et al., LAPACK Users' Guide, 3rd ed., SIAM 1999). No balancing.
 * Implementation: the Householder reflectors are applied one after the other, each pass also
 * forming the next reflector's product; neighbouring Givens rotations are applied in one pass
 * where they touch the same rows or columns, and rotations of Zᵀ skip the columns still zero.
 * The sweep steps run in groups of two or three (qzSweep.ts): the block where a group's steps
 * act from both sides is computed in straight-line code, in between the previous group's long
 * loops; a group's left transformations take one pass over the far columns and the rows of Qᵀ,
 * and its right transformations, multiplied into one 3×3 or 4×4 matrix, one pass over the rows
 * above the bulge and the rows of Zᵀ. The transformations themselves are those of the plain
 * algorithm (only the rounding of the grouped right transformations differs).
 *
 * Cost: about 66n³ flops with Q and Z (Golub & Van Loan, Matrix Computations, 4th ed., §7.7.7),
 * 30n³ without; memory 4n² doubles (one buffer, which S, T, Q and Z then view on disjoint
 * stretches). At most `maxIterations` QZ sweeps (default 30·n).
 *
 * Accuracy: backward stable. The tests check ‖A − Q·S·Zᵀ‖_F ≤ 100·n·ε·‖A‖_F,
 * ‖E − Q·T·Zᵀ‖_F ≤ 100·n·ε·‖E‖_F and ‖QᵀQ − I‖_F, ‖ZᵀZ − I‖_F ≤ 100·n·ε. Subdiagonal entries of
 * S are set to zero when |s_{j,j−1}| ≤ ε·(|s_{jj}| + |s_{j−1,j−1}|); T's diagonal entries when
 * |t_jj| ≤ ε·‖E‖_F; an eigenvalue is reported infinite when beta ≤ n·ε·‖E‖_F.
 * Graded pencils (D·A0·D, D·E0·D with D = diag(g^k), large entries at the top left) keep their
 * grading: the sweeps' right reflectors are applied by their explicit entries (qzSweep.ts), and
 * the eigenvalues of such pencils come out with relative errors of 1e-14 to 1e-12 where normwise
 * bounds say nothing (test/engine/linalg/qzGraded.test.ts, against mpmath references). Not
 * handled: gradings that put T's diagonal below ε·‖E‖_F (those eigenvalues are reported
 * infinite, as LAPACK dggev does) and pencils graded the other way round (large at the bottom
 * right: the QR factorisation of E loses the grading).
 *
 * Errors: "empty" (A or E has no entries), "shape-mismatch" (not square, or sizes differ),
 * "non-finite" (NaN/Infinity in A or E, or an overflow in the result), "invalid-argument"
 * (maxIterations not a non-negative integer), "no-convergence" (more than maxIterations sweeps;
 * details carry `iterations`, `unconvergedIndex` and `lastSubdiagonal`).
 *
 * Example:
 *   const A = new Matrix([[1, 2], [3, 4]]), E = new Matrix([[1, 0], [0, 0]]);
 *   const { S, T, Q, Z, eigenvalues } = qz(A, E); // one finite (−0.5) and one infinite eigenvalue
 *   // ‖A − Q·S·Zᵀ‖_F / ‖A‖_F ≈ 1e−16
 */
export function qz(A: Matrix, E: Matrix, options: { maxIterations?: number } = {}): GeneralizedSchurForm {
  const n = checkPencil(A, E);
  const maxIterations = checkMaxIterations(options.maxIterations, n);
  const w = loadPencil(A, E, "both");
  const { eigenvalues, iterations } = schurOfLoaded(w, maxIterations);
  return {
    // Views of the work buffer, allocated for this call alone (S, T, Q, Z on disjoint stretches).
    S: matrixViewOfRowMajor(w.S, n, false),
    T: matrixViewOfRowMajor(w.T, n, false),
    Q: matrixViewOfRowMajor(w.QT!, n, true),
    Z: matrixViewOfRowMajor(w.ZT!, n, true),
    eigenvalues,
    iterations,
  };
}

/**
 * A generalized real Schur form held row-major for engine-internal callers: S, T (n×n), the
 * TRANSPOSED factors QT = Qᵀ and ZT = Zᵀ (row-major n×n, so ZT's row j is Z's column j), and
 * the eigenvalues by diagonal position. QT is null when Q was not requested.
 */
export interface GeneralizedSchurWork {
  n: number;
  S: Float64Array;
  T: Float64Array;
  QT: Float64Array | null;
  ZT: Float64Array;
  eigenvalues: GeneralizedEigenvalue[];
  iterations: number;
}

/**
 * Computes: as `qz`, Qᵀ·A·Z = S, Qᵀ·E·Z = T, for A, E given as row-major Float64Arrays of
 * length n² (A: n×n, E: n×n, not modified), returned row-major (`GeneralizedSchurWork`). With
 * `wantQ: false` the left factor Q is not accumulated and QT is null; S, T, Z and the
 * eigenvalues are then bit-identical to those with Q (the left transformations act on S and T
 * exactly as before; only their accumulation is skipped). For engine code that needs only the
 * right deflating subspaces (the Riccati pencil solvers); public callers use `qz`.
 *
 * Requires: n ≥ 1, A and E of length ≥ n² with finite entries (checked); as `qz` otherwise.
 *
 * Method: `qz` (Moler & Stewart 1973), accumulating Z alone when `wantQ` is false, as the
 * right-vectors-only mode of LAPACK dhgeqz (Anderson et al., LAPACK Users' Guide, 3rd ed., 1999).
 *
 * Cost: about 66n³ flops with Q and Z, about 46n³ with Z alone (Golub & Van Loan, Matrix
 * Computations, 4th ed., §7.7.7); 3n² doubles without Q, 4n² with it (plus the eigenvalues). At most `maxIterations` QZ sweeps (default 30·n).
 *
 * Accuracy: as `qz` (backward stable; the tests compare S, T, Z bit for bit with the path that
 * accumulates Q, and check ‖A − Q·S·Zᵀ‖_F ≤ 100·n·ε·‖A‖_F for the full path).
 *
 * Errors: "empty" (n < 1), "shape-mismatch" (A or E shorter than n²), "non-finite" (NaN/Infinity
 * in A or E, or an overflow in the result), "invalid-argument" (maxIterations not a
 * non-negative integer), "no-convergence" (as `qz`).
 *
 * Example:
 *   const a = Float64Array.of(1, 2, 3, 4), e = Float64Array.of(1, 0, 0, 0);
 *   const w = qzRowMajor(a, e, 2, { wantQ: false }); // w.QT === null, w.ZT holds Zᵀ
 *   // one finite eigenvalue (−0.5), one infinite; ‖Zᵀ·Z − I‖_F ≈ 1e−16
 */
export function qzRowMajor(
  A: Float64Array, E: Float64Array, n: number, options: { maxIterations?: number; wantQ?: boolean } = {},
): GeneralizedSchurWork {
  if (!Number.isInteger(n) || n < 1) {
    throw new EngineError("empty", `n must be a positive integer (it is ${n})`, { argument: "n" });
  }
  for (const [name, M] of [["A", A], ["E", E]] as const) {
    if (M.length < n * n) {
      throw new EngineError("shape-mismatch", `${name} must hold n² = ${n * n} entries (it has ${M.length})`, { argument: name });
    }
    for (let k = 0; k < n * n; k++) {
      if (!Number.isFinite(M[k])) {
        throw new EngineError("non-finite", `${name} must be finite (entry ${Math.floor(k / n)},${k % n} is ${M[k]})`, { argument: name });
      }
    }
  }
  const maxIterations = checkMaxIterations(options.maxIterations, n);
  const w = loadPencil(A, E, options.wantQ === false ? "right" : "both", n);
  const { eigenvalues, iterations } = schurOfLoaded(w, maxIterations);
  return { n, S: w.S, T: w.T, QT: w.QT, ZT: w.ZT!, eigenvalues, iterations };
}

/** Hessenberg–triangular reduction, QZ iteration and output checks on a loaded pencil. */
function schurOfLoaded(w: PencilWork & { scratch: Float64Array; all: Float64Array }, maxIterations: number): { eigenvalues: GeneralizedEigenvalue[]; iterations: number } {
  const anorm = frobeniusNorm(w.S), bnorm = frobeniusNorm(w.T);
  reduceToHessenbergTriangular(w);
  const iterations = iterate(w, maxIterations, anorm, bnorm);
  cleanBelow(w);
  // S, T and the accumulators lie back to back in w.all: one pass checks them all (x·0 is 0
  // exactly for finite x and NaN otherwise, so the sum is 0 unless some entry is not finite).
  // Four partial sums: one running sum is a chain of dependent additions (latency-bound).
  const all = w.all, len = all.length;
  let p0 = 0, p1 = 0, p2 = 0, p3 = 0, k = 0;
  for (; k + 3 < len; k += 4) {
    p0 += all[k] * 0; p1 += all[k + 1] * 0; p2 += all[k + 2] * 0; p3 += all[k + 3] * 0;
  }
  for (; k < len; k++) p0 += all[k] * 0;
  if (p0 + p1 + p2 + p3 !== 0) {
    for (const [name, M] of [["S", w.S], ["T", w.T], ["Q", w.QT], ["Z", w.ZT]] as const) {
      if (M && !M.every(Number.isFinite)) {
        throw new EngineError("non-finite", `QZ produced a non-finite entry in ${name} (overflow); scale A and E`, { matrix: name });
      }
    }
  }
  return { eigenvalues: eigenvaluesOfForm(w.S, w.T, w.n, bnorm), iterations };
}

/**
 * Computes: the n generalized eigenvalues λ of A: n×n, E: n×n (det(A − λE) = 0), as
 * alpha/beta pairs, in the order of the diagonal of the generalized Schur form (complex pairs
 * adjacent, positive imaginary part first). Infinite eigenvalues have `value: null`.
 *
 * Requires: as `qz`; the pencil must be regular.
 *
 * Method: `qz` without accumulating Q and Z (row updates restricted to the active block, as in
 * the eigenvalues-only mode of Moler & Stewart 1973).
 *
 * Cost: about 30n³ flops, 2n² doubles.
 *
 * Accuracy: each eigenvalue is exact for a pencil within about n·ε·(‖A‖_F, ‖E‖_F) of (A, E);
 * well-conditioned eigenvalues match scipy.linalg.eigvals(A, E) to ~1e−12 relative in the tests.
 *
 * Errors: as `qz`, plus "singular" when some 1×1 block has |alpha| ≤ 10·n·ε·‖A‖_F and
 * |beta| ≤ 10·n·ε·‖E‖_F: the pencil is (numerically) singular, det(A − λE) ≡ 0, and its
 * eigenvalues are undetermined (details: `indices`).
 *
 * Example:
 *   generalizedEigenvalues([[2, 0], [0, 3]], [[1, 0], [0, 2]]).map((e) => e.value); // 2 and 1.5
 *   // residual check: |det(A − λE)| ≈ 0 for each λ
 */
export function generalizedEigenvalues(A: MatrixInput, E: MatrixInput): GeneralizedEigenvalue[] {
  const a = asMatrix(A, "A"), e = asMatrix(E, "E");
  const n = checkPencil(a, e);
  const w = loadPencil(a, e, "none");
  const anorm = frobeniusNorm(w.S), bnorm = frobeniusNorm(w.T);
  reduceToHessenbergTriangular(w);
  iterate(w, 30 * n, anorm, bnorm);
  const values = eigenvaluesOfForm(w.S, w.T, n, bnorm);
  const indices: number[] = [];
  const tolA = 10 * n * ULP * anorm, tolB = 10 * n * ULP * bnorm;
  values.forEach((ev, j) => {
    if (ev.alpha.im === 0 && Math.abs(ev.alpha.re) <= tolA && Math.abs(ev.beta) <= tolB) indices.push(j);
  });
  if (indices.length > 0) {
    throw new EngineError(
      "singular",
      `the pencil (A, E) is singular: det(A − λE) vanishes for every λ (alpha and beta both ≈ 0 at position${indices.length > 1 ? "s" : ""} ${indices.join(", ")}), so its eigenvalues are undetermined`,
      { indices, alphaTolerance: tolA, betaTolerance: tolB },
    );
  }
  return values;
}

function checkPencil(A: Matrix, E: Matrix): number {
  requireSquareFinite(A, "A");
  requireSquareFinite(E, "E");
  if (E.rows !== A.rows) {
    throw new EngineError("shape-mismatch", `E must have the same size as A (A is ${shapeOf(A)}, E is ${shapeOf(E)})`, {
      arguments: ["A", "E"],
    });
  }
  return A.rows;
}

function checkMaxIterations(value: number | undefined, n: number): number {
  if (value === undefined) return 30 * n;
  if (!Number.isInteger(value) || value < 0) {
    throw new EngineError("invalid-argument", `options.maxIterations must be a non-negative integer (it is ${value})`, {
      argument: "options.maxIterations",
    });
  }
  return value;
}

/** Sets the entries below S's block structure and below T's diagonal to exact zeros. */
function cleanBelow(w: PencilWork): void {
  const { n, S, T } = w;
  for (let i = 1; i < n; i++) {
    for (let j = 0; j < i - 1; j++) S[i * n + j] = 0;
    for (let j = 0; j < i; j++) T[i * n + j] = 0;
  }
}

