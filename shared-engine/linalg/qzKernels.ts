/**
 * Row-major Float64Array kernels shared by the QZ algorithm (qz.ts, qzHessenbergTriangular.ts,
 * qzIteration.ts, qzSweep*.ts) and the reordering of the generalized real Schur form (qzReorder.ts,
 * qzSwap.ts). Internal to linalg/: nothing here validates input.
 *
 * Conventions. The pencil under transformation is held as S (n×n) and T (n×n), row-major. The
 * orthogonal factors are held TRANSPOSED (QT = Qᵀ, ZT = Zᵀ, row-major) so that both left and
 * right transformations update contiguous rows of the accumulators:
 *   left  S ← G S, T ← G T   ⇒ Qᵀ ← G Qᵀ   (keeps A = Q S Zᵀ)
 *   right S ← S Gᵀ, T ← T Gᵀ ⇒ Zᵀ ← G Zᵀ   (rotCols applies Gᵀ on the right)
 * A rotation with (c, s) on indices (i, j) maps x_i ← c·x_i + s·x_j, x_j ← −s·x_i + c·x_j.
 */

import { Matrix } from "ml-matrix";
import type { Complex } from "./complex";
import type { GeneralizedEigenvalue } from "./qz";
import { copyRowMajorInto } from "./denseKernels";

export const SAFE_MIN = 2.2250738585072014e-308;
export const ULP = Number.EPSILON;

/** The pencil and (optionally) the transposed orthogonal factors being accumulated. */
export interface PencilWork {
  n: number;
  S: Float64Array;
  T: Float64Array;
  QT: Float64Array | null;
  ZT: Float64Array | null;
}

/** Scratch for `givens`: [c, s, r]. Reused to avoid allocating in inner loops. */
export const rot = new Float64Array(3);

/** (c, s, r) with c·f + s·g = r and −s·f + c·g = 0 (Golub & Van Loan, Matrix Computations, §5.1.8). */
export function givens(f: number, g: number): void {
  if (g === 0) {
    rot[0] = 1; rot[1] = 0; rot[2] = f;
    return;
  }
  if (f === 0) {
    rot[0] = 0; rot[1] = 1; rot[2] = g;
    return;
  }
  let r = Math.sqrt(f * f + g * g);
  // The plain formula under/overflows only for |f|,|g| outside ~1e±154; fall back to hypot then.
  if (r === 0 || r === Infinity) r = Math.hypot(f, g);
  if (r > 1e-290) {
    // One division instead of two (1/r cannot overflow here).
    const inv = 1 / r;
    rot[0] = f * inv; rot[1] = g * inv;
  } else {
    rot[0] = f / r; rot[1] = g / r;
  }
  rot[2] = r;
}

/** Rotates rows i and j of M (n columns) on columns [c0, c1). */
export function rotRows(M: Float64Array, n: number, i: number, j: number, c: number, s: number, c0: number, c1: number): void {
  const oi = i * n, oj = j * n;
  for (let k = c0; k < c1; k++) {
    const x = M[oi + k], y = M[oj + k];
    M[oi + k] = c * x + s * y;
    M[oj + k] = c * y - s * x;
  }
}

/** Rotates columns i and j of M (n columns) on rows [r0, r1). */
export function rotCols(M: Float64Array, n: number, i: number, j: number, c: number, s: number, r0: number, r1: number): void {
  for (let k = r0, o = r0 * n; k < r1; k++, o += n) {
    const x = M[o + i], y = M[o + j];
    M[o + i] = c * x + s * y;
    M[o + j] = c * y - s * x;
  }
}

/** Scratch for `house3`: [tau, v0, v1, v2, beta]. */
export const refl = new Float64Array(5);

/**
 * Householder reflector H = I − τ·v·vᵀ with H·(…) = β·e_p, where p is the position of `alpha`
 * in the 3-vector. `alpha` is the kept entry, x1 and x2 the two entries to annihilate; the
 * caller places v (unit in alpha's slot). Method: LAPACK-style dlarfg (Golub & Van Loan §5.1.3).
 */
export function house3(alpha: number, x1: number, x2: number): void {
  if (x1 === 0 && x2 === 0) {
    refl[0] = 0; refl[1] = 0; refl[2] = 0; refl[4] = alpha;
    return;
  }
  // One square root of the plain sum of squares: squares that underflow are then negligible
  // beside the sum, and none overflows. Outside ~1e±150 hypot (exact but slower) is used.
  let norm = Math.sqrt(alpha * alpha + x1 * x1 + x2 * x2);
  if (!(norm > 1e-150 && norm < 1e150)) norm = Math.hypot(alpha, x1, x2);
  const beta = alpha >= 0 ? -norm : norm;
  const scal = 1 / (alpha - beta);
  refl[0] = (beta - alpha) / beta;
  refl[1] = x1 * scal;
  refl[2] = x2 * scal;
  refl[4] = beta;
}

/**
 * Scratch for `reflectorEntries`: the entries of a symmetric 3×3 reflector H in the order
 * [h00, h11, h22, h01, h02, h12] (indices: slot of x1, slot of x2, slot of alpha).
 */
export const reflectorH = new Float64Array(6);

/**
 * The explicit entries of the 3×3 Householder reflector H = I − τ·v·vᵀ of `house3(alpha, x1,
 * x2)` (which maps (x1, x2, alpha), in this slot order, to (0, 0, β)), each with full relative
 * accuracy, written to `reflectorH`; `beta` must be that of `house3` (alpha when x1 = x2 = 0).
 *
 * Why: when |alpha| ≪ ‖(x1, x2)‖ the reflector is close to a permutation, and x − τ·v·(vᵀx)
 * then computes a small result as the difference of large terms: an error of ε·max|x_i| lands
 * in an entry that may be many orders of magnitude smaller (the grading of a graded pencil is
 * lost). The explicit entries below have no cancellation (with ν = ‖(alpha, x1, x2)‖,
 * a = |alpha|/ν, p = x1/ν, q = x2/ν, σ = sign(β)):
 *   h00 = 1 − τ·v1² = a + q²/(1 + a),  h11 = a + p²/(1 + a),  h22 = 1 − τ = alpha/β = −a,
 *   h01 = −p·q/(1 + a),  h02 = x1/β = σ·p,  h12 = σ·q,
 * (derived from ‖x − β·e‖² = 2β(β − alpha) = 2ν(ν + |alpha|); no citation), so H·x computed
 * entrywise has error ε·Σ_j |h_ij|·|x_j| per entry, as a product of rotations would.
 */
export function reflectorEntries(alpha: number, x1: number, x2: number, beta: number): void {
  const h = reflectorH;
  if (beta === alpha) {
    h[0] = 1; h[1] = 1; h[2] = 1; h[3] = 0; h[4] = 0; h[5] = 0;
    return;
  }
  // 1/ν and 1/(1 + a) = ν/(ν + |alpha|) are independent divisions (they overlap); the products
  // by 1/ν are replaced by quotients only for a subnormal ν, where 1/ν would overflow.
  const nu = Math.abs(beta), inv = 1 / nu, f = nu / (nu + Math.abs(alpha));
  let a: number, p: number, q: number;
  if (nu > 1e-300) {
    a = Math.abs(alpha) * inv; p = x1 * inv; q = x2 * inv;
  } else {
    a = Math.abs(alpha) / nu; p = x1 / nu; q = x2 / nu;
  }
  const sp = beta > 0 ? p : -p, sq = beta > 0 ? q : -q;
  h[0] = a + q * q * f; h[1] = a + p * p * f; h[2] = -a;
  h[3] = -(p * q * f); h[4] = sp; h[5] = sq;
}

/** Scratch for `eigenvalues2x2`: [re1, im1, re2, im2]; im1 ≥ 0 and im2 = −im1. */
export const eig2 = new Float64Array(4);

/**
 * Eigenvalues of the real 2×2 matrix [[a, b], [c, d]] without overflow in the discriminant and
 * without cancellation in the smaller real root (the formulas of LAPACK dlanv2: Bai & Demmel,
 * "On swapping diagonal blocks in real Schur form", Linear Algebra Appl. 186, 1993).
 * Returns true when the eigenvalues are real.
 */
export function eigenvalues2x2(a: number, b: number, c: number, d: number): boolean {
  const p = 0.5 * (a - d);
  const bcmax = Math.max(Math.abs(b), Math.abs(c));
  const bcmis = Math.min(Math.abs(b), Math.abs(c)) * Math.sign(b) * Math.sign(c);
  const scale = Math.max(Math.abs(p), bcmax);
  if (scale === 0) {
    eig2[0] = d; eig2[1] = 0; eig2[2] = d; eig2[3] = 0;
    return true;
  }
  const z = (p / scale) * p + (bcmax / scale) * bcmis;
  if (z >= 0) {
    const zz = p + (p >= 0 ? 1 : -1) * Math.sqrt(scale) * Math.sqrt(z);
    if (zz === 0) {
      eig2[0] = d; eig2[2] = d;
    } else {
      eig2[0] = d + zz;
      eig2[2] = d - (bcmax / zz) * bcmis;
    }
    eig2[1] = 0; eig2[3] = 0;
    return true;
  }
  const im = Math.sqrt(scale) * Math.sqrt(-z);
  eig2[0] = d + p; eig2[1] = im; eig2[2] = d + p; eig2[3] = -im;
  return false;
}

/** Left rotation of rows i, j of S and T on columns [c0, c1) and of Qᵀ on all columns. */
export function rotateLeft(w: PencilWork, i: number, j: number, c: number, s: number, c0: number, c1: number): void {
  rotRows(w.S, w.n, i, j, c, s, c0, c1);
  rotRows(w.T, w.n, i, j, c, s, c0, c1);
  if (w.QT) rotRows(w.QT, w.n, i, j, c, s, 0, w.n);
}

/** Right rotation of columns i, j of S and T on rows [r0, r1) and of Zᵀ (rows i, j). */
export function rotateRight(w: PencilWork, i: number, j: number, c: number, s: number, r0: number, r1: number): void {
  rotCols(w.S, w.n, i, j, c, s, r0, r1);
  rotCols(w.T, w.n, i, j, c, s, r0, r1);
  if (w.ZT) rotRows(w.ZT, w.n, i, j, c, s, 0, w.n);
}

/** Negates row j of S and T (columns [c0, c1)) and of Qᵀ, so that T[j][j] becomes ≥ 0. */
export function negateRow(w: PencilWork, j: number, c0: number, c1: number): void {
  const o = j * w.n;
  for (let k = c0; k < c1; k++) {
    w.S[o + k] = 0 - w.S[o + k];
    w.T[o + k] = 0 - w.T[o + k];
  }
  if (w.QT) for (let k = 0; k < w.n; k++) w.QT[o + k] = 0 - w.QT[o + k];
}

/**
 * Standardises the 2×2 diagonal block at rows/columns j, j+1 (whose subdiagonal neighbours
 * are already zero). Rows are updated on columns [j, colEnd), columns on rows [rowStart, j+2).
 *
 * Complex pair: T's block is made diagonal with positive entries by a 2×2 SVD (a rotation
 * that symmetrises, then a Jacobi rotation), the convention of the generalized real Schur
 * form in Moler & Stewart (1973) and LAPACK dlagv2. Returns 2.
 * Real pair: the block is split into two 1×1 blocks by the exact-shift step: a right rotation
 * whose first column spans the null vector of (A − λT), then a left rotation that zeroes the
 * (2,1) entries (choosing whichever of A·z, T·z is larger for accuracy, as dlagv2 does).
 * Returns 1 (the first 1×1 block).
 */
export function standardizeBlock2(w: PencilWork, j: number, rowStart: number, colEnd: number): 1 | 2 {
  const { n, S, T } = w;
  const j0 = j * n + j, j1 = j0 + n; // offsets of [j][j] and [j+1][j]
  // 2×2 SVD of T's block: a left rotation (c1, s1) by θ = atan2(c − b, a + d) makes it
  // symmetric, then a Jacobi rotation (c2, s2) by φ = ½·atan2(2b', a' − d') from both sides
  // diagonalises it (Golub & Van Loan §8.5.2). cos and sin are formed algebraically (a
  // normalised vector, and the half-angle formulas on the branch without cancellation), and
  // the two left rotations are applied as one, by θ + φ.
  const a = T[j0], b = T[j0 + 1], c = T[j1], d = T[j1 + 1];
  let c1 = 1, s1 = 0;
  const r1 = norm2(a + d, c - b);
  if (r1 > 0) { c1 = (a + d) / r1; s1 = (c - b) / r1; }
  const as = c1 * a + s1 * c, bs = c1 * b + s1 * d, ds = c1 * d - s1 * b;
  let c2 = 1, s2 = 0;
  const x = as - ds, y = 2 * bs, r2 = norm2(x, y);
  if (r2 > 0) {
    const cos2 = x / r2, sin2 = y / r2;
    if (cos2 >= 0) {
      c2 = Math.sqrt(0.5 * (1 + cos2)); s2 = sin2 / (2 * c2);
    } else {
      // φ within π/4 of ±π/2; its sign is that of sin 2φ (of −0 too, as atan2 has it).
      s2 = Math.sqrt(0.5 * (1 - cos2));
      if (sin2 < 0 || (sin2 === 0 && 1 / sin2 < 0)) s2 = -s2;
      c2 = sin2 / (2 * s2);
    }
  }
  rotateLeft(w, j, j + 1, c1 * c2 - s1 * s2, s1 * c2 + c1 * s2, j, colEnd);
  rotateRight(w, j, j + 1, c2, s2, rowStart, j + 2);
  T[j0 + 1] = 0; T[j1] = 0;
  if (T[j0] < 0) negateRow(w, j, j, colEnd);
  if (T[j1 + 1] < 0) negateRow(w, j + 1, j, colEnd);
  const d1 = T[j0], d2 = T[j1 + 1];
  if (d1 > 0 && d2 > 0) {
    const real = eigenvalues2x2(S[j0] / d1, S[j0 + 1] / d2, S[j1] / d1, S[j1 + 1] / d2);
    if (!real) return 2;
  }
  splitRealBlock(w, j, rowStart, colEnd);
  return 1;
}

/** Splits a 2×2 block with real eigenvalues (T's block diagonal and ≥ 0) into two 1×1 blocks. */
function splitRealBlock(w: PencilWork, j: number, rowStart: number, colEnd: number): void {
  const { n, S, T } = w;
  const j0 = j * n + j, j1 = j0 + n;
  const d1 = T[j0], d2 = T[j1 + 1];
  // λ: a generalized eigenvalue of the block. With d1 = 0 or d2 = 0 the block has an infinite
  // eigenvalue; then the null vector of T (λ = ∞, i.e. of T itself) is used instead.
  let m00: number, m01: number, m10: number, m11: number;
  if (d1 > 0 && d2 > 0) {
    eigenvalues2x2(S[j0] / d1, S[j0 + 1] / d2, S[j1] / d1, S[j1 + 1] / d2);
    const lambda = eig2[0];
    m00 = S[j0] - lambda * d1; m01 = S[j0 + 1]; m10 = S[j1]; m11 = S[j1 + 1] - lambda * d2;
  } else {
    m00 = T[j0]; m01 = T[j0 + 1]; m10 = T[j1]; m11 = T[j1 + 1];
  }
  // Null vector z of M from its larger row: row (p, q) ⟂ z = (−q, p).
  let zx: number, zy: number;
  if (norm2(m00, m01) >= norm2(m10, m11)) { zx = -m01; zy = m00; } else { zx = -m11; zy = m10; }
  const zn = norm2(zx, zy);
  if (zn === 0) { zx = 1; zy = 0; } else { zx /= zn; zy /= zn; }
  // Right rotation with first column z: new column j = zx·col j + zy·col j+1.
  rotateRight(w, j, j + 1, zx, zy, rowStart, j + 2);
  // Left rotation zeroing the (2,1) entries; use the better scaled of S·z and T·z.
  const sScale = Math.abs(S[j0]) + Math.abs(S[j0 + 1]) + Math.abs(S[j1]) + Math.abs(S[j1 + 1]);
  const tScale = Math.abs(T[j0]) + Math.abs(T[j0 + 1]) + Math.abs(T[j1]) + Math.abs(T[j1 + 1]);
  const sCol = (Math.abs(S[j0]) + Math.abs(S[j1])) / (sScale || 1);
  const tCol = (Math.abs(T[j0]) + Math.abs(T[j1])) / (tScale || 1);
  if (sCol >= tCol) givens(S[j0], S[j1]); else givens(T[j0], T[j1]);
  rotateLeft(w, j, j + 1, rot[0], rot[1], j, colEnd);
  S[j1] = 0; T[j1] = 0;
  if (T[j0] < 0) negateRow(w, j, j, colEnd);
  if (T[j1 + 1] < 0) negateRow(w, j + 1, j + 1, colEnd);
}

/**
 * sqrt(x² + y²) without harmful overflow or underflow: the plain formula when the sum of squares
 * lies safely inside the normal range, the scaled one (LAPACK dlapy2) otherwise. Math.hypot is
 * exact too, but several times slower in V8.
 */
function norm2(x: number, y: number): number {
  const sq = x * x + y * y;
  if (sq > 1e-280 && sq < 1e280) return Math.sqrt(sq);
  const ax = Math.abs(x), ay = Math.abs(y);
  const big = ax > ay ? ax : ay, small = ax > ay ? ay : ax;
  if (small === 0 || big === Infinity || big !== big) return big + small;
  const ratio = small / big;
  return big * Math.sqrt(1 + ratio * ratio);
}

/** Frobenius norm of a flat array: the plain sum of squares when it is safely in range, scaled otherwise. */
export function frobeniusNorm(M: Float64Array): number {
  // Plain sum of squares when it lies safely inside the normal range; the scaled form otherwise.
  let plain = 0;
  for (let k = 0; k < M.length; k++) plain += M[k] * M[k];
  if (plain > 1e-250 && plain < 1e250) return Math.sqrt(plain);
  let scale = 0;
  for (let k = 0; k < M.length; k++) scale = Math.max(scale, Math.abs(M[k]));
  if (scale === 0 || !Number.isFinite(scale)) return scale;
  let sum = 0;
  for (let k = 0; k < M.length; k++) {
    const v = M[k] / scale;
    sum += v * v;
  }
  return scale * Math.sqrt(sum);
}

/** Row-major transpose copy of an n×n array. */
export function transposeSquare(M: Float64Array, n: number): Float64Array {
  const out = new Float64Array(n * n);
  for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) out[j * n + i] = M[i * n + j];
  return out;
}

/**
 * Which orthogonal factors a QZ run accumulates: none (eigenvalues only), only Z (the right
 * Schur vectors, all that deflating-subspace users such as the Riccati solvers read), or both.
 */
export type PencilFactors = "none" | "right" | "both";

/**
 * Copies A and E (n×n) into one fresh buffer holding S, T, the requested accumulators
 * initialised to the identity (Qᵀ = Zᵀ = I), plus 7n doubles of scratch; `all` views S, T and the
 * accumulators together (they lie back to back). One allocation instead
 * of six: for n ≤ 20 allocation and garbage collection otherwise cost more than the arithmetic.
 * A and E are Matrices, or row-major Float64Arrays of length n² (then `size` gives n).
 */
export function loadPencil(
  A: Matrix | Float64Array, E: Matrix | Float64Array, factors: PencilFactors, size = 0,
): PencilWork & { scratch: Float64Array; all: Float64Array } {
  const n = A instanceof Float64Array ? size : A.rows, nn = n * n;
  const blocks = factors === "both" ? 4 : factors === "right" ? 3 : 2;
  const buffer = new Float64Array(blocks * nn + 7 * n);
  const S = buffer.subarray(0, nn), T = buffer.subarray(nn, 2 * nn);
  // Bulk row copies instead of 2n² Matrix.get calls.
  if (A instanceof Float64Array) S.set(A.subarray(0, nn)); else copyRowMajorInto(A, S);
  if (E instanceof Float64Array) T.set(E.subarray(0, nn)); else copyRowMajorInto(E, T);
  let QT: Float64Array | null = null, ZT: Float64Array | null = null;
  if (factors !== "none") {
    ZT = buffer.subarray((blocks - 1) * nn, blocks * nn);
    for (let i = 0; i < n; i++) ZT[i * n + i] = 1;
  }
  if (factors === "both") {
    QT = buffer.subarray(2 * nn, 3 * nn);
    for (let i = 0; i < n; i++) QT[i * n + i] = 1;
  }
  return { n, S, T, QT, ZT, scratch: buffer.subarray(blocks * nn), all: buffer.subarray(0, blocks * nn) };
}

/**
 * A fresh n×n Matrix holding M (or Mᵀ when `transpose`), M row-major. Its rows are views of one
 * new buffer owned by this Matrix alone (never of M), which avoids n separate allocations.
 * This relies on ml-matrix 6 keeping rows in `data`; if that ever changes, the plain copy is used.
 */
export function matrixFromRowMajor(M: Float64Array, n: number, transpose: boolean): Matrix {
  const own = new Float64Array(n * n);
  if (transpose) {
    for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) own[j * n + i] = M[i * n + j];
  } else {
    own.set(M.subarray(0, n * n));
  }
  const m = new Matrix(0, n) as unknown as { data: unknown; rows: number };
  if (!Array.isArray(m.data)) {
    const copy = new Matrix(n, n);
    for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) copy.set(i, j, own[i * n + j]);
    return copy;
  }
  const rows = new Array<Float64Array>(n);
  // A view constructor on the buffer costs half of what subarray() does (no species lookup).
  for (let i = 0, o = own.byteOffset; i < n; i++, o += 8 * n) rows[i] = new Float64Array(own.buffer, o, n);
  m.data = rows;
  m.rows = n;
  return m as unknown as Matrix;
}

/**
 * An n×n Matrix whose rows are views of M (row-major, length ≥ n²), transposed in place first
 * when `transposeInPlace`. No copy: only for a work array allocated for this one call and not
 * used again by the engine (qz hands its pencil buffer out this way, S, T, Q and Z on disjoint
 * stretches of one buffer, so that writes to one never reach another). Falls back to a copy if
 * ml-matrix ever stops keeping rows in `data` (see matrixFromRowMajor).
 */
export function matrixViewOfRowMajor(M: Float64Array, n: number, transposeInPlace: boolean): Matrix {
  if (transposeInPlace) {
    for (let i = 0; i < n; i++) {
      for (let j = i + 1; j < n; j++) {
        const t = M[i * n + j];
        M[i * n + j] = M[j * n + i];
        M[j * n + i] = t;
      }
    }
  }
  const m = new Matrix(0, n) as unknown as { data: unknown; rows: number };
  if (!Array.isArray(m.data)) return matrixFromRowMajor(M, n, false);
  const rows = new Array<Float64Array>(n);
  for (let i = 0, o = M.byteOffset; i < n; i++, o += 8 * n) rows[i] = new Float64Array(M.buffer, o, n);
  m.data = rows;
  m.rows = n;
  return m as unknown as Matrix;
}

/**
 * Reads alpha/beta from the diagonal blocks of a standardised form: a nonzero s_{j+1,j} marks a
 * 2×2 block (T's block diagonal), anything else is a 1×1 block. Used by qz and reorderQz.
 */
export function eigenvaluesOfForm(S: Float64Array, T: Float64Array, n: number, bnorm: number): GeneralizedEigenvalue[] {
  const infiniteTol = n * ULP * bnorm;
  const out: GeneralizedEigenvalue[] = [];
  const one = (alpha: Complex, beta: number): GeneralizedEigenvalue => {
    const infinite = Math.abs(beta) <= infiniteTol;
    return { alpha, beta, infinite, value: infinite ? null : { re: alpha.re / beta, im: alpha.im / beta } };
  };
  for (let j = 0; j < n; j++) {
    if (j + 1 < n && S[(j + 1) * n + j] !== 0) {
      const d1 = T[j * n + j], d2 = T[(j + 1) * n + j + 1];
      const real = eigenvalues2x2(
        S[j * n + j] / d1, S[j * n + j + 1] / d2, S[(j + 1) * n + j] / d1, S[(j + 1) * n + j + 1] / d2,
      );
      const re1 = eig2[0], im1 = eig2[1], re2 = eig2[2], im2 = eig2[3];
      out.push(one({ re: re1 * d1, im: real ? 0 : im1 * d1 }, d1));
      out.push(one({ re: re2 * d2, im: real ? 0 : im2 * d2 }, d2));
      j++;
    } else {
      out.push(one({ re: S[j * n + j], im: 0 }, T[j * n + j]));
    }
  }
  return out;
}
