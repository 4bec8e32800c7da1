/**
 * Swapping two adjacent diagonal blocks (1×1 or 2×2) of a generalized real Schur form held in
 * row-major arrays (Kågström 1993; Kågström & Poromaa 1996): the generalized Sylvester solve,
 * the orthogonal factors of the swap, its stability tests and its application. Used by the
 * reordering in qzReorder.ts; internal to linalg/.
 */
import { EngineError } from "../errors";
import { SAFE_MIN, ULP, type PencilWork, negateRow } from "./qzKernels";
import {
  leftMultiplyRows as leftMultiplyRowsShared, leftMultiplyRowsOfBoth as leftMultiplyRowsOfBothShared,
  reconstructionPair as reconstructionPairShared, rightMultiplyCols as rightMultiplyColsShared,
  rightMultiplyColsOfBoth as rightMultiplyColsOfBothShared, similarityPair as similarityPairShared,
} from "./qzSwapKernels";

// Module-level aliases of the kernels: read through an import binding, every call cost a getter
// call under per-file CommonJS transpilation (tsx, vitest).
const leftMultiplyRows = leftMultiplyRowsShared;
const leftMultiplyRowsOfBoth = leftMultiplyRowsOfBothShared;
const rightMultiplyCols = rightMultiplyColsShared;
const rightMultiplyColsOfBoth = rightMultiplyColsOfBothShared;
const similarityPair = similarityPairShared;
const reconstructionPair = reconstructionPairShared;

/** Scratch reused by every swap (windows are at most 4×4, Kronecker systems 8×8). */
export interface SwapScratch {
  a: Float64Array; b: Float64Array; // window copies (m×m)
  K: Float64Array; rhs: Float64Array; x: Float64Array; y: Float64Array; colPerm: Int32Array; // Kronecker solve
  X: Float64Array; Qs: Float64Array; Zs: Float64Array; v: Float64Array; v2: Float64Array; // orthogonal factors of the swap
  an: Float64Array; bn: Float64Array; tmp: Float64Array; diff: Float64Array; // stability tests
}

// A reordering makes O(n²) swaps on windows of at most 4×4; allocating their small arrays anew
// each time cost more than the arithmetic, so one module-level scratch set serves every
// reordering (they run synchronously and never re-enter).
export const swapScratch: SwapScratch = makeSwapScratch();
function makeSwapScratch(): SwapScratch {
  return {
    a: new Float64Array(16), b: new Float64Array(16),
    K: new Float64Array(64), rhs: new Float64Array(8), x: new Float64Array(8), y: new Float64Array(8), colPerm: new Int32Array(8),
    X: new Float64Array(8), Qs: new Float64Array(16), Zs: new Float64Array(16), v: new Float64Array(4), v2: new Float64Array(4),
    an: new Float64Array(16), bn: new Float64Array(16), tmp: new Float64Array(16), diff: new Float64Array(16),
  };
}

/**
 * Swaps the p×p block at rows/columns j.. with the q×q block below it (Kågström 1993).
 * Throws "singular" when the swap would not be backward stable.
 */
export function swapAdjacentBlocks(w: PencilWork, j: number, p: number, q: number, infiniteTol: number, sc: SwapScratch): void {
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
  completeOrthogonal(sc.X, m, q, Qs, sc.v, sc.v2);
  stackWithIdentity(x, 0, p, q, sc.X);
  completeOrthogonal(sc.X, m, q, Zs, sc.v, sc.v2);

  // Stability tests on the small window (weak: the new (2,1) blocks are small; strong: the
  // window is reproduced with those blocks zeroed).
  similarityPair(Qs, a, b, Zs, m, an, bn, sc.tmp, sc.diff);
  const weak = Math.max(lowerBlockNorm(an, m, q) / tolA, lowerBlockNorm(bn, m, q) / tolB);
  zeroLowerBlock(an, m, q);
  zeroLowerBlock(bn, m, q);
  reconstructionPair(Qs, an, bn, Zs, a, b, m, sc.tmp, sc.diff);
  const strong = Math.max(windowNorm(sc.tmp, m * m) / tolA, windowNorm(sc.diff, m * m) / tolB);
  if (!(weak <= 1 && strong <= 1)) {
    throw new EngineError(
      "singular",
      `cannot swap the diagonal blocks at positions ${j + 1} and ${j + p + 1} stably: their eigenvalues are too close (the swap would perturb the pencil by ${Math.max(weak, strong).toExponential(2)} times the tolerance)`,
      { position: j, sizes: [p, q], residual: Math.max(weak * tolA, strong * tolA), tolerance: tolA },
    );
  }

  // Apply to the whole form: rows j..j+m−1 from the left by Qsᵀ, columns from the right by Zs.
  if (m === 2) {
    leftMultiplyRows(S, n, j, m, Qs, j, n);
    leftMultiplyRows(T, n, j, m, Qs, j, n);
    rightMultiplyCols(S, n, j, m, Zs, j + m);
    rightMultiplyCols(T, n, j, m, Zs, j + m);
  } else {
    leftMultiplyRowsOfBoth(S, T, n, j, m, Qs);
    rightMultiplyColsOfBoth(S, T, n, j, m, Zs);
  }
  if (w.QT) leftMultiplyRows(w.QT, n, j, m, Qs, 0, n);
  leftMultiplyRows(w.ZT!, n, j, m, Zs, 0, n);
  for (let r = q; r < m; r++) for (let c = 0; c < q; c++) {
    S[(j + r) * n + j + c] = 0;
    T[(j + r) * n + j + c] = 0;
  }
  finishSwap(w, j, p, q, infiniteTol, firstInfinite, secondInfinite);
}

/** After a swap: resets noise-level betas of infinite eigenvalues and makes 1×1 blocks' T entries ≥ 0. */
function finishSwap(
  w: PencilWork, j: number, p: number, q: number, infiniteTol: number, firstInfinite: boolean, secondInfinite: boolean,
): void {
  const { n, T } = w;
  // Resetting beta ≤ 10·n·ε·‖E‖_F to zero is a perturbation of E within the backward error of qz;
  // the window-relative tolerance would be too strict for graded pencils.
  if (secondInfinite && Math.abs(T[j * n + j]) <= 10 * infiniteTol) T[j * n + j] = 0;
  if (firstInfinite && Math.abs(T[(j + q) * n + j + q]) <= 10 * infiniteTol) T[(j + q) * n + j + q] = 0;
  // 1×1 blocks get T[j][j] ≥ 0 at once; 2×2 blocks are standardised at the end of the
  // reordering (reorderInPlace).
  if (q === 1 && T[j * n + j] < 0) negateRow(w, j, j, n);
  if (p === 1 && T[(j + q) * n + j + q] < 0) negateRow(w, j + q, j + q, n);
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
  // The search for each pivot (the first entry of largest magnitude, row by row) runs inside
  // the previous elimination step, over the entries just updated: one pass instead of two.
  let pr = 0, pc = 0, best = -1;
  for (let r = 0; r < N; r++) {
    const or = r * N;
    for (let c = 0; c < N; c++) {
      const v = Math.abs(K[or + c]);
      if (v > best) { best = v; pr = r; pc = c; }
    }
  }
  const smin = Math.max(ULP * Math.max(best, 0), SAFE_MIN);
  for (let k = 0; k < N; k++) {
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
    const rpiv = 1 / K[k * N + k];
    const ok = k * N;
    pr = k + 1; pc = k + 1; best = -1;
    for (let r = k + 1; r < N; r++) {
      const or = r * N;
      const f = K[or + k] * rpiv;
      if (f !== 0) {
        // Column k of the rows below is never read again (it would become zero).
        for (let c = k + 1; c < N; c++) {
          const v = K[or + c] - f * K[ok + c];
          K[or + c] = v;
          const a = Math.abs(v);
          if (a > best) { best = a; pr = r; pc = c; }
        }
        rhs[r] -= f * rhs[k];
      } else {
        for (let c = k + 1; c < N; c++) {
          const a = Math.abs(K[or + c]);
          if (a > best) { best = a; pr = r; pc = c; }
        }
      }
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
 * U (m×m, written to `U`) orthogonal with its first q columns (q = 1 or 2) spanning the columns
 * of x (m×q), by Householder QR (Golub & Van Loan §5.2), U = H1 (·H2) written out entrywise;
 * x's second column is overwritten. `v`, `v2` are scratch of length m.
 */
function completeOrthogonal(x: Float64Array, m: number, q: number, U: Float64Array, v: Float64Array, v2: Float64Array): void {
  const t1 = columnReflector(x, m, q, 0, v);
  if (q === 1) {
    // U = H1 = I − τ1·v·vᵀ.
    for (let i = 0; i < m; i++) {
      const f = t1 * v[i];
      for (let j = 0; j < m; j++) U[i * m + j] = (i === j ? 1 : 0) - f * v[j];
    }
    return;
  }
  // Column 1 ← H1·(column 1), then H2 from it (v2[0] = 0); U = H1·H2 written out:
  // I − τ1·v·vᵀ − τ2·v2·v2ᵀ + τ1·τ2·(vᵀv2)·v·v2ᵀ.
  let d = 0;
  for (let i = 0; i < m; i++) d += v[i] * x[i * q + 1];
  const f1 = t1 * d;
  for (let i = 0; i < m; i++) x[i * q + 1] -= f1 * v[i];
  const t2 = columnReflector(x, m, q, 1, v2);
  v2[0] = 0;
  let gamma = 0;
  for (let i = 1; i < m; i++) gamma += v[i] * v2[i];
  const g = t1 * t2 * gamma;
  for (let i = 0; i < m; i++) {
    const a = t1 * v[i], b = t2 * v2[i], c = g * v[i];
    for (let j = 0; j < m; j++) U[i * m + j] = (i === j ? 1 : 0) - a * v[j] - b * v2[j] + c * v2[j];
  }
}

/**
 * Householder reflector I − τ·v·vᵀ (v[k] = 1, v[k+1..m) written to `v`) mapping column k of the
 * m×q array x, rows k..m−1, to a multiple of e_k (LAPACK dlarfg); returns τ (0 for a zero
 * column). Only v and τ are produced; x itself is left as it is.
 */
function columnReflector(x: Float64Array, m: number, q: number, k: number, v: Float64Array): number {
  // The plain sum of squares unless it leaves the safe range (huge R or L); then scaled.
  let sum = 0;
  for (let i = k; i < m; i++) sum += x[i * q + k] * x[i * q + k];
  let norm: number;
  if (sum > 1e-250 && sum < 1e250) {
    norm = Math.sqrt(sum);
  } else {
    let scale = 0;
    for (let i = k; i < m; i++) {
      const a = Math.abs(x[i * q + k]);
      if (a > scale || a !== a) scale = a; // NaN propagates, as through Math.hypot
    }
    v[k] = 1;
    for (let i = k + 1; i < m; i++) v[i] = 0;
    if (scale === 0) return 0;
    sum = 0;
    for (let i = k; i < m; i++) {
      const a = x[i * q + k] / scale;
      sum += a * a;
    }
    norm = scale * Math.sqrt(sum);
  }
  const alpha = x[k * q + k];
  const beta = alpha >= 0 ? -norm : norm;
  v[k] = 1;
  const inv = 1 / (alpha - beta);
  for (let i = k + 1; i < m; i++) v[i] = x[i * q + k] * inv;
  return (beta - alpha) / beta;
}


/**
 * Frobenius norm of the first `len` entries of M, with the same scaled sum of squares as
 * `frobeniusNorm` (no subarray view, no Math.hypot: these run several times per swap).
 */
function windowNorm(M: Float64Array, len: number): number {
  // Plain sum of squares when it is safely inside the normal range (no overflow, no harmful
  // underflow); otherwise the scaled form.
  let sum = 0;
  for (let k = 0; k < len; k++) sum += M[k] * M[k];
  if (sum > 1e-250 && sum < 1e250) return Math.sqrt(sum);
  let scale = 0;
  for (let k = 0; k < len; k++) {
    const v = Math.abs(M[k]);
    if (v > scale || v !== v) scale = v; // NaN propagates, as through Math.max/Math.hypot
  }
  if (scale === 0 || !Number.isFinite(scale)) return scale;
  sum = 0;
  for (let k = 0; k < len; k++) {
    const v = M[k] / scale;
    sum += v * v;
  }
  return scale * Math.sqrt(sum);
}

/** Frobenius norm of the lower-left (m−q)×q block (as `windowNorm`, no Math.hypot). */
function lowerBlockNorm(M: Float64Array, m: number, q: number): number {
  let sum = 0;
  for (let r = q; r < m; r++) for (let c = 0; c < q; c++) sum += M[r * m + c] * M[r * m + c];
  if (sum > 1e-250 && sum < 1e250) return Math.sqrt(sum);
  let scale = 0;
  for (let r = q; r < m; r++) for (let c = 0; c < q; c++) {
    const v = Math.abs(M[r * m + c]);
    if (v > scale || v !== v) scale = v; // NaN propagates, as through Math.max/Math.hypot
  }
  if (scale === 0 || !Number.isFinite(scale)) return scale;
  sum = 0;
  for (let r = q; r < m; r++) for (let c = 0; c < q; c++) {
    const v = M[r * m + c] / scale;
    sum += v * v;
  }
  return scale * Math.sqrt(sum);
}

function zeroLowerBlock(M: Float64Array, m: number, q: number): void {
  for (let r = q; r < m; r++) for (let c = 0; c < q; c++) M[r * m + c] = 0;
}
