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
import {
  ULP, type PencilWork, eigenvaluesOfForm, frobeniusNorm, givens as givensShared, loadPencil, matrixFromRowMajor, rot as rotShared, rotRows as rotRowsShared,
} from "./qzKernels";

// Module-level aliases of the shared scratch arrays and hot kernels: read through an import
// binding, every access in the inner loops cost a getter call under per-file CommonJS transpilation (tsx, vitest).
const rot = rotShared;
const givens = givensShared;
const rotRows = rotRowsShared;


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
 *
 * Cost: about 66n³ flops with Q and Z (Golub & Van Loan, Matrix Computations, 4th ed., §7.7.7),
 * 30n³ without; memory 4n² doubles. At most `maxIterations` QZ sweeps (default 30·n).
 *
 * Accuracy: backward stable. The tests check ‖A − Q·S·Zᵀ‖_F ≤ 100·n·ε·‖A‖_F,
 * ‖E − Q·T·Zᵀ‖_F ≤ 100·n·ε·‖E‖_F and ‖QᵀQ − I‖_F, ‖ZᵀZ − I‖_F ≤ 100·n·ε. Subdiagonal entries of
 * S are set to zero when |s_{j,j−1}| ≤ ε·(|s_{jj}| + |s_{j−1,j−1}|); T's diagonal entries when
 * |t_jj| ≤ ε·‖E‖_F; an eigenvalue is reported infinite when beta ≤ n·ε·‖E‖_F.
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
    S: matrixFromRowMajor(w.S, n, false),
    T: matrixFromRowMajor(w.T, n, false),
    Q: matrixFromRowMajor(w.QT!, n, true),
    Z: matrixFromRowMajor(w.ZT!, n, true),
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
function schurOfLoaded(w: PencilWork & { scratch: Float64Array }, maxIterations: number): { eigenvalues: GeneralizedEigenvalue[]; iterations: number } {
  const anorm = frobeniusNorm(w.S), bnorm = frobeniusNorm(w.T);
  reduceToHessenbergTriangular(w);
  const iterations = iterate(w, maxIterations, anorm, bnorm);
  cleanBelow(w);
  for (const [name, M] of [["S", w.S], ["T", w.T], ["Q", w.QT], ["Z", w.ZT]] as const) {
    if (!M) continue;
    for (let k = 0; k < M.length; k++) {
      if (!Number.isFinite(M[k])) {
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

/**
 * Moler & Stewart (1973) step 1 and 2: T ← Householder QR of E (applied to A as well), then
 * Givens rotations from the left zero A column by column from the bottom, each followed by a
 * right rotation removing the fill it creates below T's diagonal.
 */
function reduceToHessenbergTriangular(w: PencilWork & { scratch: Float64Array }): void {
  const { n, S, T, QT, ZT } = w;
  const v = w.scratch.subarray(0, n);
  const acc = w.scratch.subarray(n, 2 * n);
  const taus = w.scratch.subarray(2 * n, 3 * n);
  // Householder QR of T (Golub & Van Loan §5.2.2), applied to S at once. The reflectors are kept
  // below T's diagonal so that Q can be formed afterwards by backward accumulation (4n³/3 flops
  // instead of 2n³ for applying them to an identity matrix in forward order).
  for (let k = 0; k < n - 1; k++) {
    taus[k] = 0;
    // Column norm with scaling, so that entries near 1e±160 neither underflow nor overflow.
    let colMax = 0;
    for (let i = k + 1; i < n; i++) colMax = Math.max(colMax, Math.abs(T[i * n + k]));
    if (colMax === 0) continue;
    const alpha = T[k * n + k];
    const sc = Math.max(colMax, Math.abs(alpha));
    let sum = (alpha / sc) * (alpha / sc);
    for (let i = k + 1; i < n; i++) sum += (T[i * n + k] / sc) * (T[i * n + k] / sc);
    const norm = sc * Math.sqrt(sum);
    const beta = alpha >= 0 ? -norm : norm;
    const tau = (beta - alpha) / beta;
    const scal = 1 / (alpha - beta);
    v[k] = 1;
    for (let i = k + 1; i < n; i++) v[i] = T[i * n + k] * scal;
    applyReflectorRows(T, n, v, tau, k, k + 1, n, acc);
    T[k * n + k] = beta;
    for (let i = k + 1; i < n; i++) T[i * n + k] = v[i];
    taus[k] = tau;
    applyReflectorRows(S, n, v, tau, k, 0, n, acc);
  }
  if (QT && ZT) {
    // Q = H_0·H_1·…·H_{n−2}, accumulated backward in ZT's storage (still unused), then Qᵀ.
    ZT.fill(0);
    for (let i = 0; i < n; i++) ZT[i * n + i] = 1;
    for (let k = n - 2; k >= 0; k--) {
      if (taus[k] === 0) continue;
      v[k] = 1;
      for (let i = k + 1; i < n; i++) v[i] = T[i * n + k];
      applyReflectorRows(ZT, n, v, taus[k], k, k, n, acc);
    }
    for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) QT[j * n + i] = ZT[i * n + j];
    ZT.fill(0);
    for (let i = 0; i < n; i++) ZT[i * n + i] = 1;
  }
  for (let k = 0; k < n - 1; k++) for (let i = k + 1; i < n; i++) T[i * n + k] = 0;

  // Column j: left rotations (rows i−1, i) zero S[i][j] from the bottom; each leaves a fill at
  // T[i][i−1] that a right rotation (columns i, i−1) removes. Right rotations never touch
  // column j of S, so the left ones do not depend on them: S's right rotations are stored and
  // applied afterwards row by row, on contiguous memory (associativity of L·S·R).
  // T's right rotations are deferred the same way, row by row: a row of T needs the pending
  // ones only just before a left rotation first mixes it with the row below (which already
  // has them), so row i−1 is brought up to date then, in one contiguous pass; rows 0..j, never
  // touched from the left, get them all at the end with S. Every entry sees the same
  // operations in the same order as with column rotations applied at once (bit-identical),
  // without the stride-n column walks through T.
  // Two neighbouring steps (i and i−1) are fused where their left rotations act on the same
  // data (S's rows, T's far columns, Qᵀ's and Zᵀ's rows): one pass over three rows instead of
  // two passes over two, the fusion of the bulge chase in schur.ts. Per entry the operations
  // and their order are unchanged, so the result is bit-identical.
  const cs = v, sn = acc;
  for (let j = 0; j < n - 2; j++) {
    let i = n - 1;
    while (i >= j + 2) {
      if (i - 1 >= j + 2 && S[i * n + j] !== 0) {
        hessenbergTriangularPair(w, j, i, cs, sn);
        i -= 2;
        continue;
      }
      catchUpRow(T, n, i - 1, i + 1, cs, sn);
      const g = S[i * n + j];
      if (g === 0) {
        cs[i] = 1; sn[i] = 0;
        i--;
        continue;
      }
      givens(S[(i - 1) * n + j], g);
      const c = rot[0], s = rot[1];
      S[(i - 1) * n + j] = rot[2];
      S[i * n + j] = 0;
      rotRows(S, n, i - 1, i, c, s, j + 1, i - 1);
      rotRowsOfBoth(S, T, n, i - 1, c, s, i - 1);
      givens(T[i * n + i], T[i * n + i - 1]);
      const c2 = rot[0], s2 = rot[1];
      // The right rotation on rows i−1 and i now; rows above get it in their catch-up pass.
      const up = (i - 1) * n;
      const x = T[up + i], y = T[up + i - 1];
      T[up + i] = c2 * x + s2 * y;
      T[up + i - 1] = c2 * y - s2 * x;
      T[i * n + i] = rot[2];
      T[i * n + i - 1] = 0;
      cs[i] = c2; sn[i] = s2;
      if (QT && ZT) rotateAccumulators(QT, ZT, n, i - 1, c, s, c2, s2);
      else if (ZT) rotRows(ZT, n, i, i - 1, c2, s2, 0, n); // the Zᵀ half of rotateAccumulators
      i--;
    }
    for (let r = 0; r <= j; r++) catchUpRow(T, n, r, j + 2, cs, sn);
    for (let r = 0, o = 0; r < n; r++, o += n) {
      let xi = S[o + n - 1];
      for (let i = n - 1; i >= j + 2; i--) {
        const c = cs[i], s = sn[i], y = S[o + i - 1];
        S[o + i] = c * xi + s * y;
        xi = c * y - s * xi;
      }
      S[o + j + 1] = xi;
    }
  }
}

/**
 * Steps i and i−1 of column j of the Hessenberg–triangular reduction (S[i][j] ≠ 0, i − 1 ≥ j + 2):
 * left rotations L_i (rows i−1, i) and L_{i−1} (rows i−2, i−1) zeroing S[i][j] and S[i−1][j],
 * right rotations R_i, R_{i−1} removing their fills in T. The near entries of T (columns
 * i−2..i) are updated step by step, because R_i needs T after L_i; everything else sees L_i
 * then L_{i−1} (or R_i then R_{i−1}) in one pass over three rows.
 */
function hessenbergTriangularPair(w: PencilWork, j: number, i: number, cs: Float64Array, sn: Float64Array): void {
  const { n, S, T, QT, ZT } = w;
  const oa = (i - 2) * n, ob = oa + n, oc = ob + n;
  catchUpRow(T, n, i - 1, i + 1, cs, sn);
  // Both left rotations come from column j of S alone.
  givens(S[ob + j], S[oc + j]);
  const c1 = rot[0], s1 = rot[1];
  S[ob + j] = rot[2];
  S[oc + j] = 0;
  givens(S[oa + j], S[ob + j]);
  const c0 = rot[0], s0 = rot[1];
  S[oa + j] = rot[2];
  S[ob + j] = 0;
  // Step i on T's near columns i−1, i: L_i, then R_i from the fill T[i][i−1].
  for (let k = i - 1; k <= i; k++) {
    const x = T[ob + k], y = T[oc + k];
    T[ob + k] = c1 * x + s1 * y;
    T[oc + k] = c1 * y - s1 * x;
  }
  givens(T[oc + i], T[oc + i - 1]);
  const c2 = rot[0], s2 = rot[1];
  {
    const x = T[ob + i], y = T[ob + i - 1];
    T[ob + i] = c2 * x + s2 * y;
    T[ob + i - 1] = c2 * y - s2 * x;
  }
  T[oc + i] = rot[2];
  T[oc + i - 1] = 0;
  cs[i] = c2; sn[i] = s2;
  // Step i−1: row i−2 takes the pending right rotations (through R_i), then L_{i−1} on the
  // near columns i−2..i and R_{i−1} from the fill T[i−1][i−2].
  catchUpRow(T, n, i - 2, i, cs, sn);
  for (let k = i - 2; k <= i; k++) {
    const x = T[oa + k], y = T[ob + k];
    T[oa + k] = c0 * x + s0 * y;
    T[ob + k] = c0 * y - s0 * x;
  }
  givens(T[ob + i - 1], T[ob + i - 2]);
  const c3 = rot[0], s3 = rot[1];
  {
    const x = T[oa + i - 1], y = T[oa + i - 2];
    T[oa + i - 1] = c3 * x + s3 * y;
    T[oa + i - 2] = c3 * y - s3 * x;
  }
  T[ob + i - 1] = rot[2];
  T[ob + i - 2] = 0;
  cs[i - 1] = c3; sn[i - 1] = s3;
  // Far columns: L_i on rows (i−1, i), then L_{i−1} on rows (i−2, i−1); S from column j+1, T
  // from column i+1.
  for (let k = j + 1; k <= i; k++) {
    const xa = S[oa + k], xb = S[ob + k], xc = S[oc + k];
    const yb = c1 * xb + s1 * xc;
    S[oc + k] = c1 * xc - s1 * xb;
    S[oa + k] = c0 * xa + s0 * yb;
    S[ob + k] = c0 * yb - s0 * xa;
  }
  for (let k = i + 1; k < n; k++) {
    let xa = S[oa + k], xb = S[ob + k], xc = S[oc + k];
    let yb = c1 * xb + s1 * xc;
    S[oc + k] = c1 * xc - s1 * xb;
    S[oa + k] = c0 * xa + s0 * yb;
    S[ob + k] = c0 * yb - s0 * xa;
    xa = T[oa + k]; xb = T[ob + k]; xc = T[oc + k];
    yb = c1 * xb + s1 * xc;
    T[oc + k] = c1 * xc - s1 * xb;
    T[oa + k] = c0 * xa + s0 * yb;
    T[ob + k] = c0 * yb - s0 * xa;
  }
  if (QT && ZT) {
    // Qᵀ rows: L_i then L_{i−1}. Zᵀ rows: R_i on (i, i−1), then R_{i−1} on (i−1, i−2).
    for (let k = 0; k < n; k++) {
      const xa = QT[oa + k], xb = QT[ob + k], xc = QT[oc + k];
      const yb = c1 * xb + s1 * xc;
      QT[oc + k] = c1 * xc - s1 * xb;
      QT[oa + k] = c0 * xa + s0 * yb;
      QT[ob + k] = c0 * yb - s0 * xa;
      const za = ZT[oa + k], zb = ZT[ob + k], zc = ZT[oc + k];
      const ub = c2 * zb - s2 * zc;
      ZT[oc + k] = c2 * zc + s2 * zb;
      ZT[ob + k] = c3 * ub + s3 * za;
      ZT[oa + k] = c3 * za - s3 * ub;
    }
  } else if (ZT) {
    // The same Zᵀ updates without Q (same operations, same order).
    for (let k = 0; k < n; k++) {
      const za = ZT[oa + k], zb = ZT[ob + k], zc = ZT[oc + k];
      const ub = c2 * zb - s2 * zc;
      ZT[oc + k] = c2 * zc + s2 * zb;
      ZT[ob + k] = c3 * ub + s3 * za;
      ZT[oa + k] = c3 * za - s3 * ub;
    }
  }
}

/**
 * Row r of M ← row r · R_{n−1} ·…· R_{last}, where R_i is the stored right rotation (cs[i], sn[i])
 * on columns (i, i−1) (the convention of rotCols), applied from the right end as one carried pass.
 */
function catchUpRow(M: Float64Array, n: number, r: number, last: number, cs: Float64Array, sn: Float64Array): void {
  if (last > n - 1) return;
  const o = r * n;
  let xi = M[o + n - 1];
  for (let i = n - 1; i >= last; i--) {
    const c = cs[i], s = sn[i], y = M[o + i - 1];
    M[o + i] = c * xi + s * y;
    xi = c * y - s * xi;
  }
  M[o + last - 1] = xi;
}

/** Rotation (c, s) of rows r, r+1 of S and of T on columns [c0, n), in one loop. */
function rotRowsOfBoth(S: Float64Array, T: Float64Array, n: number, r: number, c: number, s: number, c0: number): void {
  const a = r * n, b = a + n;
  for (let k = c0; k < n; k++) {
    const x = S[a + k], y = S[b + k];
    S[a + k] = c * x + s * y;
    S[b + k] = c * y - s * x;
    const u = T[a + k], v = T[b + k];
    T[a + k] = c * u + s * v;
    T[b + k] = c * v - s * u;
  }
}

/** Qᵀ rows (r, r+1) ← left rotation (c, s); Zᵀ rows (r+1, r) ← right rotation (c2, s2); one loop. */
function rotateAccumulators(QT: Float64Array, ZT: Float64Array, n: number, r: number, c: number, s: number, c2: number, s2: number): void {
  const a = r * n, b = a + n;
  for (let k = 0; k < n; k++) {
    const x = QT[a + k], y = QT[b + k];
    QT[a + k] = c * x + s * y;
    QT[b + k] = c * y - s * x;
    const u = ZT[b + k], v = ZT[a + k];
    ZT[b + k] = c2 * u + s2 * v;
    ZT[a + k] = c2 * v - s2 * u;
  }
}

/** M[k0..n)[c0..c1) ← (I − τ·v·vᵀ)·M with v[k0..n); `acc` is scratch of length n. */
function applyReflectorRows(M: Float64Array, n: number, v: Float64Array, tau: number, k0: number, c0: number, c1: number, acc: Float64Array): void {
  // acc = vᵀ·M, then M −= τ·v·acc; rows are taken in pairs so that each pass over acc serves two
  // rows of M (the loop is bound by loads and stores, not by arithmetic).
  acc.fill(0, c0, c1);
  let i = k0;
  for (; i + 1 < n; i += 2) {
    const v0 = v[i], v1 = v[i + 1], o0 = i * n, o1 = o0 + n;
    for (let c = c0; c < c1; c++) acc[c] += v0 * M[o0 + c] + v1 * M[o1 + c];
  }
  if (i < n) {
    const v0 = v[i], o0 = i * n;
    for (let c = c0; c < c1; c++) acc[c] += v0 * M[o0 + c];
  }
  i = k0;
  for (; i + 1 < n; i += 2) {
    const f0 = tau * v[i], f1 = tau * v[i + 1], o0 = i * n, o1 = o0 + n;
    for (let c = c0; c < c1; c++) {
      const a = acc[c];
      M[o0 + c] -= f0 * a;
      M[o1 + c] -= f1 * a;
    }
  }
  if (i < n) {
    const f0 = tau * v[i], o0 = i * n;
    for (let c = c0; c < c1; c++) M[o0 + c] -= f0 * acc[c];
  }
}

/** Sets the entries below S's block structure and below T's diagonal to exact zeros. */
function cleanBelow(w: PencilWork): void {
  const { n, S, T } = w;
  for (let i = 1; i < n; i++) {
    for (let j = 0; j < i - 1; j++) S[i * n + j] = 0;
    for (let j = 0; j < i; j++) T[i * n + j] = 0;
  }
}

