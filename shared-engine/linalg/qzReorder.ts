/**
 * Reordering of a generalized real Schur form: moves the eigenvalues chosen by a predicate to
 * the leading diagonal positions by swapping adjacent 1×1/2×2 blocks with orthogonal
 * transformations, so that the leading columns of Z (and Q) span the corresponding deflating
 * subspaces (used by Riccati solvers and stable/unstable splittings).
 */
import { Matrix } from "ml-matrix";
import { EngineError } from "../errors";
import type { GeneralizedEigenvalue, GeneralizedSchurForm, GeneralizedSchurWork } from "./qz";
import {
  SAFE_MIN, ULP, type PencilWork, eigenvaluesOfForm, frobeniusNorm, matrixFromRowMajor, negateRow, standardizeBlock2, transposeSquare,
} from "./qzKernels";
import { requireSquareFinite, toFloat64 } from "./validate";

/**
 * Computes: an updated generalized real Schur form (S', T', Q', Z') of the same pencil,
 *   A = Q'·S'·Z'ᵀ, E = Q'·T'·Z'ᵀ, with every eigenvalue for which `select` returns true in the
 *   leading `selectedCount` diagonal positions (their relative order kept). A complex pair is
 *   selected when `select` accepts either member.
 *
 * Requires: `form` as returned by `qz` (standardised blocks; it is not modified). `select` must
 * not put two eigenvalues that are equal (to rounding) on different sides: swapping blocks
 * with (nearly) equal spectra is ill-conditioned and is refused.
 *
 * Method: adjacent block swaps by the direct method of Kågström, "A direct method for
 * reordering eigenvalues in the generalized real Schur form of a regular matrix pair (A, B)",
 * in Linear Algebra for Large Scale and Real-Time Applications, Kluwer 1993, and Kågström &
 * Poromaa, "Computing eigenspaces with specified eigenvalues of a regular matrix pair (A, B)
 * and condition estimation: theory, algorithms and software", Numer. Algorithms 12, 1996:
 * solve the 2×2-block generalized Sylvester equation A11·R − L·A22 = −A12,
 * B11·R − L·B22 = −B12 (Kronecker form, Gaussian elimination with complete pivoting), take Q
 * and Z from QR factorizations of [L; I] and [R; I], and accept the swap only if it passes
 * their weak and strong stability tests. Swapped 2×2 blocks are re-standardised.
 *
 * Cost: at most n²/2 swaps, each O(n) flops on S, T, Q, Z: O(n³) worst case, 4n² doubles.
 *
 * Accuracy: each swap perturbs the pencil by at most 100·ε·‖(window of S, T)‖_F (the stability
 * tests); the tests check ‖A − Q'S'Z'ᵀ‖_F ≤ 100·n·ε·‖A‖_F and orthogonality as for `qz`, and that
 * the eigenvalue multiset is unchanged to rounding. A 1×1 block reported infinite keeps
 * beta = 0 exactly through the swaps (a noise-level beta ≤ 10·n·ε·‖E‖_F left by a swap is reset
 * to zero), so infinite eigenvalues cannot turn into huge finite ones of arbitrary sign.
 *
 * Errors: "shape-mismatch"/"non-finite"/"empty" for a malformed form; "invalid-argument" when
 * `select` is not a function, or when it gives a different answer for an eigenvalue after the
 * swaps (the eigenvalue lies within rounding of the selection boundary; details: `position`);
 * "singular" when a swap fails the stability test (eigenvalues of the two blocks too close;
 * details: `position`, `residual`, `tolerance`).
 *
 * Example:
 *   const form = qz(A, E);
 *   const r = reorderQz(form, (ev) => ev.value !== null && ev.value.re < 0);
 *   // r.Z columns 0..r.selectedCount−1 span the stable deflating subspace;
 *   // ‖A − r.Q·r.S·r.Zᵀ‖_F / ‖A‖_F ≈ 1e−15
 */
export function reorderQz(
  form: GeneralizedSchurForm,
  select: (ev: GeneralizedEigenvalue) => boolean,
): GeneralizedSchurForm & { selectedCount: number } {
  checkSelect(select);
  const n = checkForm(form);
  const w: PencilWork = {
    n,
    S: toFloat64(form.S),
    T: toFloat64(form.T),
    QT: transposeSquare(toFloat64(form.Q), n),
    ZT: transposeSquare(toFloat64(form.Z), n),
  };
  const { eigenvalues, selectedCount } = reorderInPlace(w, select);
  return {
    S: matrixFromRowMajor(w.S, n, false),
    T: matrixFromRowMajor(w.T, n, false),
    Q: matrixFromRowMajor(w.QT!, n, true),
    Z: matrixFromRowMajor(w.ZT!, n, true),
    eigenvalues,
    iterations: form.iterations,
    selectedCount,
  };
}

/**
 * Computes: `reorderQz` on a row-major form from `qzRowMajor`, IN PLACE: work.S, work.T,
 * work.ZT (and work.QT when it is not null) are overwritten by the reordered form
 * (A = Q'·S'·Z'ᵀ, E = Q'·T'·Z'ᵀ with the selected eigenvalues leading) and work.eigenvalues by
 * its eigenvalues. With work.QT null the left transformations are not accumulated; S, T and Z
 * are bit-identical to those of the path with Q. Returns the number of leading selected
 * positions. For engine code that needs only the right deflating subspace (the Riccati pencil
 * solvers); public callers use `reorderQz`.
 *
 * Requires: `work` as returned by `qzRowMajor` (not validated again); `select` as `reorderQz`.
 *
 * Method: as `reorderQz` (Kågström 1993; Kågström & Poromaa 1996), skipping the updates of Qᵀ
 * when it is absent.
 *
 * Cost: as `reorderQz`, O(n³) worst case, less a quarter of the swap updates without Q; no
 * extra memory beyond O(1) scratch.
 *
 * Accuracy: as `reorderQz` (each swap passes the weak and strong stability tests).
 *
 * Errors: as `reorderQz`: "invalid-argument" (select not a function, or ill-posed selection),
 * "singular" (a swap fails the stability test).
 *
 * Example:
 *   const w = qzRowMajor(a, e, n, { wantQ: false });
 *   const k = reorderQzRowMajor(w, (ev) => ev.value !== null && ev.value.re < 0);
 *   // rows 0..k−1 of w.ZT span the stable right deflating subspace; ‖w.ZT·w.ZTᵀ − I‖_F ≈ 1e−15
 */
export function reorderQzRowMajor(work: GeneralizedSchurWork, select: (ev: GeneralizedEigenvalue) => boolean): number {
  checkSelect(select);
  const { eigenvalues, selectedCount } = reorderInPlace(work, select);
  work.eigenvalues = eigenvalues;
  return selectedCount;
}

function checkSelect(select: unknown): void {
  if (typeof select !== "function") {
    throw new EngineError("invalid-argument", "select must be a function from an eigenvalue to a boolean", { argument: "select" });
  }
}

/** The reordering proper on row-major storage (shared by both entry points). */
function reorderInPlace(
  w: PencilWork, select: (ev: GeneralizedEigenvalue) => boolean,
): { eigenvalues: GeneralizedEigenvalue[]; selectedCount: number } {
  const n = w.n;
  const bnorm = frobeniusNorm(w.T);
  const before = eigenvaluesOfForm(w.S, w.T, n, bnorm);
  const blockSize = (i: number): 1 | 2 => (i + 1 < n && w.S[(i + 1) * n + i] !== 0 ? 2 : 1);
  const flags = new Uint8Array(n);
  for (let i = 0; i < n; i += blockSize(i)) {
    const chosen = blockSize(i) === 2 ? select(before[i]!) || select(before[i + 1]!) : select(before[i]!);
    flags[i] = chosen ? 1 : 0;
    if (blockSize(i) === 2) flags[i + 1] = flags[i]!;
  }

  const scratch = makeSwapScratch();
  let ks = 0; // positions [0, ks) hold selected blocks in their final place
  let i = 0;
  while (i < n) {
    const size = blockSize(i);
    if (!flags[i]) {
      i += size;
      continue;
    }
    let pos = i;
    let sz = size;
    while (pos > ks) {
      const above = pos - 2 >= ks && w.S[(pos - 1) * n + pos - 2] !== 0 ? 2 : 1;
      const start = pos - above;
      swapAdjacentBlocks(w, start, above, sz, n * ULP * bnorm, scratch);
      for (let k = start; k < start + sz; k++) flags[k] = 1;
      for (let k = start + sz; k < start + sz + above; k++) flags[k] = 0;
      pos = start;
      sz = blockSize(pos); // a 2×2 block may have split into two real 1×1 blocks
    }
    ks += blockSize(ks);
    i = ks; // rescan: a split block leaves its second half just below
  }

  const eigenvalues = eigenvaluesOfForm(w.S, w.T, n, bnorm);
  // The check that the selected eigenvalues lead: the predicate agrees with the placement.
  for (let j = 0; j < n; j += blockSize(j)) {
    const chosen = blockSize(j) === 2 ? select(eigenvalues[j]!) || select(eigenvalues[j + 1]!) : select(eigenvalues[j]!);
    if (chosen !== j < ks) {
      throw new EngineError(
        "invalid-argument",
        `select changed its answer for the eigenvalue at position ${j + 1} during reordering: it lies within rounding error of the selection boundary, so the selection is ill-posed`,
        { argument: "select", position: j, selectedCount: ks },
      );
    }
  }
  return { eigenvalues, selectedCount: ks };
}

function checkForm(form: GeneralizedSchurForm): number {
  if (form === null || typeof form !== "object") {
    throw new EngineError("invalid-argument", "form must be a generalized Schur form returned by qz", { argument: "form" });
  }
  const names = ["S", "T", "Q", "Z"] as const;
  for (const name of names) {
    if (!(form[name] instanceof Matrix)) {
      throw new EngineError("invalid-argument", `form.${name} must be a Matrix`, { argument: `form.${name}` });
    }
    requireSquareFinite(form[name], `form.${name}`);
  }
  const n = form.S.rows;
  for (const name of names) {
    if (form[name].rows !== n) {
      throw new EngineError("shape-mismatch", `form.${name} must be ${n}×${n} like form.S (it is ${form[name].rows}×${form[name].columns})`, {
        argument: `form.${name}`,
      });
    }
  }
  return n;
}

/** Scratch reused by every swap of one reordering (windows are at most 4×4, Kronecker systems 8×8). */
interface SwapScratch {
  a: Float64Array; b: Float64Array; // window copies (m×m)
  K: Float64Array; rhs: Float64Array; x: Float64Array; y: Float64Array; colPerm: Int32Array; // Kronecker solve
  X: Float64Array; Qs: Float64Array; Zs: Float64Array; v: Float64Array; // orthogonal factors of the swap
  an: Float64Array; bn: Float64Array; tmp: Float64Array; diff: Float64Array; // stability tests
}

// A reordering makes O(n²) swaps on windows of at most 4×4; allocating their small arrays anew
// each time cost more than the arithmetic, so one scratch set serves a whole reordering.
function makeSwapScratch(): SwapScratch {
  return {
    a: new Float64Array(16), b: new Float64Array(16),
    K: new Float64Array(64), rhs: new Float64Array(8), x: new Float64Array(8), y: new Float64Array(8), colPerm: new Int32Array(8),
    X: new Float64Array(8), Qs: new Float64Array(16), Zs: new Float64Array(16), v: new Float64Array(4),
    an: new Float64Array(16), bn: new Float64Array(16), tmp: new Float64Array(16), diff: new Float64Array(16),
  };
}

/**
 * Swaps the p×p block at rows/columns j.. with the q×q block below it (Kågström 1993).
 * Throws "singular" when the swap would not be backward stable.
 */
function swapAdjacentBlocks(w: PencilWork, j: number, p: number, q: number, infiniteTol: number, sc: SwapScratch): void {
  const { n, S, T } = w;
  // An infinite eigenvalue (1×1 block with beta ≈ 0) stays infinite under exact swaps; rounding
  // leaves beta at noise level, possibly above the reporting threshold, so it is reset below.
  const firstInfinite = p === 1 && Math.abs(T[j * n + j]) <= infiniteTol;
  const secondInfinite = q === 1 && Math.abs(T[(j + p) * n + j + p]) <= infiniteTol;
  if (p === 1 && q === 1 && swapOneByOne(w, j)) {
    finishSwap(w, j, 1, 1, infiniteTol, firstInfinite, secondInfinite);
    return;
  }
  const m = p + q, mm = m * m;
  const { a, b, Qs, Zs, an, bn } = sc;
  for (let r = 0; r < m; r++) {
    for (let c = 0; c < m; c++) {
      a[r * m + c] = S[(j + r) * n + j + c];
      b[r * m + c] = T[(j + r) * n + j + c];
    }
  }
  const normA = windowNorm(a, mm), normB = windowNorm(b, mm);
  // Stability tolerance of the swap: Kågström & Poromaa use 10–20·ε·‖window‖; 100 leaves
  // room for the unscaled Kronecker solve while still bounding the perturbation locally.
  const tolA = Math.max(100 * ULP * normA, SAFE_MIN), tolB = Math.max(100 * ULP * normB, SAFE_MIN);

  // x = [vec R; vec L] (row-major p×q each).
  const x = solveBlockSylvester(a, b, p, q, sc);
  const pq = p * q;
  stackWithIdentity(x, pq, p, q, sc.X);
  completeOrthogonal(sc.X, m, q, Qs, sc.v);
  stackWithIdentity(x, 0, p, q, sc.X);
  completeOrthogonal(sc.X, m, q, Zs, sc.v);

  // Stability tests on the small window (weak: the new (2,1) blocks are small; strong: the
  // window is reproduced with those blocks zeroed).
  similarityPair(Qs, a, b, Zs, m, p, an, bn, sc.tmp, sc.diff);
  const weak = Math.max(lowerBlockNorm(an, m, q) / tolA, lowerBlockNorm(bn, m, q) / tolB);
  zeroLowerBlock(an, m, q);
  zeroLowerBlock(bn, m, q);
  reconstructionPair(Qs, an, bn, Zs, a, b, m, q, sc.tmp, sc.diff);
  const strong = Math.max(windowNorm(sc.tmp, m * m) / tolA, windowNorm(sc.diff, m * m) / tolB);
  if (!(weak <= 1 && strong <= 1)) {
    throw new EngineError(
      "singular",
      `cannot swap the diagonal blocks at positions ${j + 1} and ${j + p + 1} stably: their eigenvalues are too close (the swap would perturb the pencil by ${Math.max(weak, strong).toExponential(2)} times the tolerance)`,
      { position: j, sizes: [p, q], residual: Math.max(weak * tolA, strong * tolA), tolerance: tolA },
    );
  }

  // Apply to the whole form: rows j..j+m−1 from the left by Qsᵀ, columns from the right by Zs.
  leftMultiplyRows(S, n, j, m, Qs, j, n);
  leftMultiplyRows(T, n, j, m, Qs, j, n);
  if (w.QT) leftMultiplyRows(w.QT, n, j, m, Qs, 0, n);
  rightMultiplyCols(S, n, j, m, Zs, j + m);
  rightMultiplyCols(T, n, j, m, Zs, j + m);
  leftMultiplyRows(w.ZT!, n, j, m, Zs, 0, n);
  for (let r = q; r < m; r++) for (let c = 0; c < q; c++) {
    S[(j + r) * n + j + c] = 0;
    T[(j + r) * n + j + c] = 0;
  }
  finishSwap(w, j, p, q, infiniteTol, firstInfinite, secondInfinite);
}

/** After a swap: resets noise-level betas of infinite eigenvalues and re-standardises the blocks. */
function finishSwap(
  w: PencilWork, j: number, p: number, q: number, infiniteTol: number, firstInfinite: boolean, secondInfinite: boolean,
): void {
  const { n, T } = w;
  // Resetting beta ≤ 10·n·ε·‖E‖_F to zero is a perturbation of E within the backward error of qz;
  // the window-relative tolerance would be too strict for graded pencils.
  if (secondInfinite && Math.abs(T[j * n + j]) <= 10 * infiniteTol) T[j * n + j] = 0;
  if (firstInfinite && Math.abs(T[(j + q) * n + j + q]) <= 10 * infiniteTol) T[(j + q) * n + j + q] = 0;
  // Re-standardise: 2×2 blocks get T diagonal and positive; 1×1 blocks get T[j][j] ≥ 0.
  if (q === 2) standardizeBlock2(w, j, 0, n);
  else if (T[j * n + j] < 0) negateRow(w, j, j, n);
  if (p === 2) standardizeBlock2(w, j + q, 0, n);
  else if (T[(j + q) * n + j + q] < 0) negateRow(w, j + q, j + q, n);
}

/**
 * Direct swap of two adjacent 1×1 blocks at rows/columns j, j+1 (the n1 = n2 = 1 case of
 * Kågström & Poromaa 1996): the right rotation's first column is the eigenvector of the lower
 * eigenvalue (s22, t22), z1 ∝ [g, −f] with f = s22·t11 − t22·s11, g = s22·t12 − t22·s12; the
 * left rotation then zeroes the (2,1) entry of whichever of S·Z, T·Z has the larger first column
 * (|s22·t11| vs |s11·t22|; the two columns are parallel in exact arithmetic). The swap is applied
 * only if it passes the same weak and strong stability tests as the general path (tolerance
 * 100·ε·‖window‖_F); otherwise nothing is changed and false is returned (the caller falls back
 * to the Sylvester construction, which may refuse the swap).
 */
function swapOneByOne(w: PencilWork, j: number): boolean {
  const { n, S, T } = w;
  const o0 = j * n + j, o1 = o0 + n;
  const s11 = S[o0], s12 = S[o0 + 1], s22 = S[o1 + 1];
  const t11 = T[o0], t12 = T[o0 + 1], t22 = T[o1 + 1];
  const f = s22 * t11 - t22 * s11, g = s22 * t12 - t22 * s12;
  // Zs = [[zc, zs], [−zs, zc]] (columns: new basis), zc = g/r, zs = f/r.
  let zc = 1, zs = 0;
  const r = Math.hypot(f, g);
  if (r > 0) { zc = g / r; zs = f / r; }
  // First columns of S·Zs and T·Zs.
  const sx0 = s11 * zc - s12 * zs, sx1 = -s22 * zs;
  const tx0 = t11 * zc - t12 * zs, tx1 = -t22 * zs;
  // Qs = [[qc, −qs], [qs, qc]] with first column parallel to the larger of the two columns.
  const useS = Math.abs(s22) * Math.abs(t11) >= Math.abs(s11) * Math.abs(t22);
  const x0 = useS ? sx0 : tx0, x1 = useS ? sx1 : tx1;
  let qc = 1, qs = 0;
  const h = Math.hypot(x0, x1);
  if (h > 0) { qc = x0 / h; qs = x1 / h; }
  // Stability tests exactly as the general path, on the 2×2 window.
  const normA = Math.hypot(s11, s12, s22), normB = Math.hypot(t11, t12, t22);
  const tolA = Math.max(100 * ULP * normA, SAFE_MIN), tolB = Math.max(100 * ULP * normB, SAFE_MIN);
  const sy1 = s11 * zs + s12 * zc, sy2 = s22 * zc; // second column of S·Zs
  const ty1 = t11 * zs + t12 * zc, ty2 = t22 * zc;
  // Qsᵀ·(S·Zs): rows [qc, qs], [−qs, qc].
  const a11 = qc * sx0 + qs * sx1, a12 = qc * sy1 + qs * sy2, a21 = qc * sx1 - qs * sx0, a22 = qc * sy2 - qs * sy1;
  const b11 = qc * tx0 + qs * tx1, b12 = qc * ty1 + qs * ty2, b21 = qc * tx1 - qs * tx0, b22 = qc * ty2 - qs * ty1;
  const weak = Math.max(Math.abs(a21) / tolA, Math.abs(b21) / tolB);
  const strong = Math.max(
    reconstruction2(qc, qs, zc, zs, a11, a12, a22, s11, s12, 0, s22) / tolA,
    reconstruction2(qc, qs, zc, zs, b11, b12, b22, t11, t12, 0, t22) / tolB,
  );
  if (!(weak <= 1 && strong <= 1)) return false;

  // Columns j, j+1 of S, T (rows 0..j+1) ← (those columns)·Zs.
  for (let k = 0, o = j; k <= j + 1; k++, o += n) {
    const u = S[o], v = S[o + 1];
    S[o] = zc * u - zs * v;
    S[o + 1] = zs * u + zc * v;
    const x = T[o], y = T[o + 1];
    T[o] = zc * x - zs * y;
    T[o + 1] = zs * x + zc * y;
  }
  // Rows j, j+1 of S, T (columns j..n−1) ← Qsᵀ·(those rows).
  for (let c = j; c < n; c++) {
    const u = S[j * n + c], v = S[(j + 1) * n + c];
    S[j * n + c] = qc * u + qs * v;
    S[(j + 1) * n + c] = qc * v - qs * u;
    const x = T[j * n + c], y = T[(j + 1) * n + c];
    T[j * n + c] = qc * x + qs * y;
    T[(j + 1) * n + c] = qc * y - qs * x;
  }
  S[o1] = 0;
  T[o1] = 0;
  const QT = w.QT, ZT = w.ZT!;
  const r0 = j * n, r1 = r0 + n;
  if (QT) {
    for (let c = 0; c < n; c++) {
      const u = QT[r0 + c], v = QT[r1 + c];
      QT[r0 + c] = qc * u + qs * v;
      QT[r1 + c] = qc * v - qs * u;
    }
  }
  // Zᵀ rows ← Zsᵀ·(those rows).
  for (let c = 0; c < n; c++) {
    const u = ZT[r0 + c], v = ZT[r1 + c];
    ZT[r0 + c] = zc * u - zs * v;
    ZT[r1 + c] = zs * u + zc * v;
  }
  return true;
}

/**
 * ‖Qs·[[m11, m12], [0, m22]]·Zsᵀ − [[o11, o12], [o21, o22]]‖_F for Qs = [[qc, −qs], [qs, qc]],
 * Zs = [[zc, zs], [−zs, zc]] (the strong stability test of a 1×1 swap).
 */
function reconstruction2(
  qc: number, qs: number, zc: number, zs: number, m11: number, m12: number, m22: number,
  o11: number, o12: number, o21: number, o22: number,
): number {
  const p11 = qc * m11, p12 = qc * m12 - qs * m22, p21 = qs * m11, p22 = qs * m12 + qc * m22; // Qs·M
  // (Qs·M)·Zsᵀ, Zsᵀ = [[zc, −zs], [zs, zc]].
  const d11 = p11 * zc + p12 * zs - o11, d12 = -p11 * zs + p12 * zc - o12;
  const d21 = p21 * zc + p22 * zs - o21, d22 = -p21 * zs + p22 * zc - o22;
  return Math.hypot(d11, d12, d21, d22);
}

/**
 * Kronecker solve of A11·R − L·A22 = −A12, B11·R − L·B22 = −B12 (R, L: p×q, row-major).
 * Returns sc.x holding [R; L] (R at 0, L at p·q).
 */
function solveBlockSylvester(a: Float64Array, b: Float64Array, p: number, q: number, sc: SwapScratch): Float64Array {
  const m = p + q, pq = p * q, N = 2 * pq;
  const { K, rhs } = sc;
  K.fill(0, 0, N * N);
  for (let pass = 0; pass < 2; pass++) {
    const M = pass === 0 ? a : b, off = pass === 0 ? 0 : pq;
    for (let i = 0; i < p; i++) {
      for (let k = 0; k < q; k++) {
        const row = off + i * q + k;
        for (let t = 0; t < p; t++) K[row * N + t * q + k] += M[i * m + t]; // (M11·R)[i][k]
        for (let t = 0; t < q; t++) K[row * N + pq + i * q + t] -= M[(p + t) * m + p + k]; // −(L·M22)[i][k]
        rhs[row] = -M[i * m + p + k];
      }
    }
  }
  return solveCompletePivoting(K, rhs, N, sc);
}

/** Gaussian elimination with complete pivoting; tiny pivots are perturbed as in LAPACK dgetc2. */
function solveCompletePivoting(K: Float64Array, rhs: Float64Array, N: number, sc: SwapScratch): Float64Array {
  const colPerm = sc.colPerm;
  for (let i = 0; i < N; i++) colPerm[i] = i;
  let maxAbs = 0;
  for (let k = 0; k < N * N; k++) {
    const v = Math.abs(K[k]);
    if (v > maxAbs) maxAbs = v;
  }
  const smin = Math.max(ULP * maxAbs, SAFE_MIN);
  for (let k = 0; k < N; k++) {
    let pr = k, pc = k, best = -1;
    for (let r = k; r < N; r++) {
      const or = r * N;
      for (let c = k; c < N; c++) {
        const v = Math.abs(K[or + c]);
        if (v > best) { best = v; pr = r; pc = c; }
      }
    }
    if (pr !== k) {
      // Columns < k of rows ≥ k hold stale multipliers that are never read again.
      for (let c = k; c < N; c++) { const t = K[k * N + c]; K[k * N + c] = K[pr * N + c]; K[pr * N + c] = t; }
      const t = rhs[k]; rhs[k] = rhs[pr]; rhs[pr] = t;
    }
    if (pc !== k) {
      for (let r = 0; r < N; r++) { const t = K[r * N + k]; K[r * N + k] = K[r * N + pc]; K[r * N + pc] = t; }
      const t = colPerm[k]; colPerm[k] = colPerm[pc]; colPerm[pc] = t;
    }
    if (Math.abs(K[k * N + k]) < smin) K[k * N + k] = smin;
    const piv = K[k * N + k];
    const ok = k * N;
    for (let r = k + 1; r < N; r++) {
      const or = r * N;
      const f = K[or + k] / piv;
      if (f === 0) continue;
      for (let c = k; c < N; c++) K[or + c] -= f * K[ok + c];
      rhs[r] -= f * rhs[k];
    }
  }
  const y = sc.y, x = sc.x;
  for (let k = N - 1; k >= 0; k--) {
    let s = rhs[k];
    for (let c = k + 1; c < N; c++) s -= K[k * N + c] * y[c];
    y[k] = s / K[k * N + k];
  }
  for (let k = 0; k < N; k++) x[colPerm[k]] = y[k];
  return x;
}

/** out (m×q) = [X; I_q] for X: p×q (row-major) stored in src from offset `from`. */
function stackWithIdentity(src: Float64Array, from: number, p: number, q: number, out: Float64Array): void {
  const m = p + q;
  out.fill(0, 0, m * q);
  for (let k = 0; k < p * q; k++) out[k] = src[from + k];
  for (let k = 0; k < q; k++) out[(p + k) * q + k] = 1;
}

/**
 * U (m×m, written to `U`) orthogonal with its first q columns spanning the columns of x (m×q),
 * by Householder QR; x is overwritten. `v` is scratch of length m.
 */
function completeOrthogonal(x: Float64Array, m: number, q: number, U: Float64Array, v: Float64Array): void {
  U.fill(0, 0, m * m);
  for (let i = 0; i < m; i++) U[i * m + i] = 1;
  for (let k = 0; k < q; k++) {
    let scale = 0;
    for (let i = k; i < m; i++) {
      const a = Math.abs(x[i * q + k]);
      if (a > scale || a !== a) scale = a; // NaN propagates, as through Math.hypot
    }
    if (scale === 0) continue;
    let sum = 0;
    for (let i = k; i < m; i++) {
      const a = x[i * q + k] / scale;
      sum += a * a;
    }
    const norm = scale * Math.sqrt(sum);
    const alpha = x[k * q + k];
    const beta = alpha >= 0 ? -norm : norm;
    v[k] = 1;
    for (let i = k + 1; i < m; i++) v[i] = x[i * q + k] / (alpha - beta);
    const tau = (beta - alpha) / beta;
    // x ← H·x (remaining columns), U ← U·H.
    for (let c = k; c < q; c++) {
      let s = 0;
      for (let i = k; i < m; i++) s += v[i] * x[i * q + c];
      for (let i = k; i < m; i++) x[i * q + c] -= tau * v[i] * s;
    }
    // U ← U·H on columns k..m−1 ((tau·s)·v[i] as before, hoisted).
    for (let r = 0; r < m; r++) {
      const or = r * m;
      let s = 0;
      for (let i = k; i < m; i++) s += U[or + i] * v[i];
      if (s === 0) continue; // the update would subtract exact zeros
      const ts = tau * s;
      for (let i = k; i < m; i++) U[or + i] -= ts * v[i];
    }
  }
}

/**
 * outA = Uᵀ·A·V and outB = Uᵀ·B·V for m×m row-major windows whose lower-left (m−p)×p block is
 * zero (both products in one pass; the known-zero terms are skipped, which changes no rounding).
 * `ta`, `tb` are scratch.
 */
function similarityPair(
  U: Float64Array, A: Float64Array, B: Float64Array, V: Float64Array, m: number, p: number,
  outA: Float64Array, outB: Float64Array, ta: Float64Array, tb: Float64Array,
): void {
  for (let i = 0; i < m; i++) for (let j = 0; j < m; j++) {
    const kEnd = j < p ? p : m;
    let sa = 0, sb = 0;
    for (let k = 0; k < kEnd; k++) {
      const u = U[k * m + i];
      sa += u * A[k * m + j];
      sb += u * B[k * m + j];
    }
    ta[i * m + j] = sa;
    tb[i * m + j] = sb;
  }
  for (let i = 0; i < m; i++) for (let j = 0; j < m; j++) {
    let sa = 0, sb = 0;
    for (let k = 0; k < m; k++) {
      const v = V[k * m + j];
      sa += ta[i * m + k] * v;
      sb += tb[i * m + k] * v;
    }
    outA[i * m + j] = sa;
    outB[i * m + j] = sb;
  }
}

/**
 * The residuals of the strong stability test for both matrices in one pass: dA = U·MA·Vᵀ − A0
 * and dB = U·MB·Vᵀ − B0 (m×m row-major; MA, MB have their lower-left (m−q)×q block zeroed,
 * whose terms are skipped). dA, dB also serve as scratch for the products U·MA, U·MB, so each
 * product is formed once.
 */
function reconstructionPair(
  U: Float64Array, MA: Float64Array, MB: Float64Array, V: Float64Array, A0: Float64Array, B0: Float64Array,
  m: number, q: number, dA: Float64Array, dB: Float64Array,
): void {
  const pa = prodA, pb = prodB;
  for (let i = 0; i < m; i++) for (let j = 0; j < m; j++) {
    const kEnd = j < q ? q : m;
    let sa = 0, sb = 0;
    for (let k = 0; k < kEnd; k++) {
      const u = U[i * m + k];
      sa += u * MA[k * m + j];
      sb += u * MB[k * m + j];
    }
    pa[i * m + j] = sa;
    pb[i * m + j] = sb;
  }
  for (let i = 0; i < m; i++) for (let j = 0; j < m; j++) {
    let sa = 0, sb = 0;
    for (let k = 0; k < m; k++) {
      const v = V[j * m + k];
      sa += pa[i * m + k] * v;
      sb += pb[i * m + k] * v;
    }
    dA[i * m + j] = sa - A0[i * m + j];
    dB[i * m + j] = sb - B0[i * m + j];
  }
}

// Products of the strong test (at most 4×4), module-level so no swap allocates.
const prodA = new Float64Array(16), prodB = new Float64Array(16);

/**
 * Frobenius norm of the first `len` entries of M, with the same scaled sum of squares as
 * `frobeniusNorm` (no subarray view, no Math.hypot: these run several times per swap).
 */
function windowNorm(M: Float64Array, len: number): number {
  let scale = 0;
  for (let k = 0; k < len; k++) {
    const v = Math.abs(M[k]);
    if (v > scale || v !== v) scale = v; // NaN propagates, as through Math.max/Math.hypot
  }
  if (scale === 0 || !Number.isFinite(scale)) return scale;
  let sum = 0;
  for (let k = 0; k < len; k++) {
    const v = M[k] / scale;
    sum += v * v;
  }
  return scale * Math.sqrt(sum);
}

/** Frobenius norm of the lower-left (m−q)×q block (scaled sum of squares, no Math.hypot). */
function lowerBlockNorm(M: Float64Array, m: number, q: number): number {
  let scale = 0;
  for (let r = q; r < m; r++) for (let c = 0; c < q; c++) {
    const v = Math.abs(M[r * m + c]);
    if (v > scale || v !== v) scale = v; // NaN propagates, as through Math.max/Math.hypot
  }
  if (scale === 0 || !Number.isFinite(scale)) return scale;
  let sum = 0;
  for (let r = q; r < m; r++) for (let c = 0; c < q; c++) {
    const v = M[r * m + c] / scale;
    sum += v * v;
  }
  return scale * Math.sqrt(sum);
}

function zeroLowerBlock(M: Float64Array, m: number, q: number): void {
  for (let r = q; r < m; r++) for (let c = 0; c < q; c++) M[r * m + c] = 0;
}

/**
 * Rows j..j+m−1 of M (columns [c0, c1)) ← Uᵀ·(those rows), U: m×m. Written out for each window
 * size (2, 3, 4): these loops run O(n) times per swap and O(n²) swaps per reordering, and the
 * generic triple loop with a buffer was three times slower. Same operations, same order.
 */
function leftMultiplyRows(M: Float64Array, n: number, j: number, m: number, U: Float64Array, c0: number, c1: number): void {
  const o0 = j * n, o1 = o0 + n, o2 = o1 + n, o3 = o2 + n;
  if (m === 2) {
    const u00 = U[0], u01 = U[1], u10 = U[2], u11 = U[3];
    for (let c = c0; c < c1; c++) {
      const x0 = M[o0 + c], x1 = M[o1 + c];
      M[o0 + c] = u00 * x0 + u10 * x1;
      M[o1 + c] = u01 * x0 + u11 * x1;
    }
  } else if (m === 3) {
    const u00 = U[0], u01 = U[1], u02 = U[2], u10 = U[3], u11 = U[4], u12 = U[5], u20 = U[6], u21 = U[7], u22 = U[8];
    for (let c = c0; c < c1; c++) {
      const x0 = M[o0 + c], x1 = M[o1 + c], x2 = M[o2 + c];
      M[o0 + c] = u00 * x0 + u10 * x1 + u20 * x2;
      M[o1 + c] = u01 * x0 + u11 * x1 + u21 * x2;
      M[o2 + c] = u02 * x0 + u12 * x1 + u22 * x2;
    }
  } else {
    const u00 = U[0], u01 = U[1], u02 = U[2], u03 = U[3], u10 = U[4], u11 = U[5], u12 = U[6], u13 = U[7];
    const u20 = U[8], u21 = U[9], u22 = U[10], u23 = U[11], u30 = U[12], u31 = U[13], u32 = U[14], u33 = U[15];
    for (let c = c0; c < c1; c++) {
      const x0 = M[o0 + c], x1 = M[o1 + c], x2 = M[o2 + c], x3 = M[o3 + c];
      M[o0 + c] = u00 * x0 + u10 * x1 + u20 * x2 + u30 * x3;
      M[o1 + c] = u01 * x0 + u11 * x1 + u21 * x2 + u31 * x3;
      M[o2 + c] = u02 * x0 + u12 * x1 + u22 * x2 + u32 * x3;
      M[o3 + c] = u03 * x0 + u13 * x1 + u23 * x2 + u33 * x3;
    }
  }
}

/** Columns j..j+m−1 of M (rows [0, r1)) ← (those columns)·V, V: m×m; written out per size as above. */
function rightMultiplyCols(M: Float64Array, n: number, j: number, m: number, V: Float64Array, r1: number): void {
  if (m === 2) {
    const v00 = V[0], v01 = V[1], v10 = V[2], v11 = V[3];
    for (let r = 0, o = j; r < r1; r++, o += n) {
      const x0 = M[o], x1 = M[o + 1];
      M[o] = x0 * v00 + x1 * v10;
      M[o + 1] = x0 * v01 + x1 * v11;
    }
  } else if (m === 3) {
    const v00 = V[0], v01 = V[1], v02 = V[2], v10 = V[3], v11 = V[4], v12 = V[5], v20 = V[6], v21 = V[7], v22 = V[8];
    for (let r = 0, o = j; r < r1; r++, o += n) {
      const x0 = M[o], x1 = M[o + 1], x2 = M[o + 2];
      M[o] = x0 * v00 + x1 * v10 + x2 * v20;
      M[o + 1] = x0 * v01 + x1 * v11 + x2 * v21;
      M[o + 2] = x0 * v02 + x1 * v12 + x2 * v22;
    }
  } else {
    const v00 = V[0], v01 = V[1], v02 = V[2], v03 = V[3], v10 = V[4], v11 = V[5], v12 = V[6], v13 = V[7];
    const v20 = V[8], v21 = V[9], v22 = V[10], v23 = V[11], v30 = V[12], v31 = V[13], v32 = V[14], v33 = V[15];
    for (let r = 0, o = j; r < r1; r++, o += n) {
      const x0 = M[o], x1 = M[o + 1], x2 = M[o + 2], x3 = M[o + 3];
      M[o] = x0 * v00 + x1 * v10 + x2 * v20 + x3 * v30;
      M[o + 1] = x0 * v01 + x1 * v11 + x2 * v21 + x3 * v31;
      M[o + 2] = x0 * v02 + x1 * v12 + x2 * v22 + x3 * v32;
      M[o + 3] = x0 * v03 + x1 * v13 + x2 * v23 + x3 * v33;
    }
  }
}
