/**
 * Row-major Float64Array kernels shared by expm, Van Loan, Sylvester and Lyapunov solvers.
 * Internal to linalg/: public routines take and return ml-matrix `Matrix`; these kernels work
 * on flat copies so inner loops never call Matrix.get/set.
 *
 * Why a register tile: a plain i-k-j triple loop in V8 runs near 1 GFlop/s because every
 * update reloads and stores out[i][j]; a 2-row × 4-column tile held in locals reaches about
 * 3.7–4.6 GFlop/s for n = 20…200 (Node 20; the lower figure once any ArrayBuffer in the
 * isolate has been detached, see arrayKernels.ts). Large products (from 48³ multiply-adds, each
 * operand at most 2^16 entries) are copied into plain number arrays and run through
 * arrayKernels' 3×3 tile, which reaches 4.3–5.0 GFlop/s including the copies at n = 50…200.
 */
import { Matrix } from "ml-matrix";
import { EngineError } from "../errors";
import { doubleArray, productIntoArray } from "./arrayKernels";

/** out (m×q) = a (m×p) · b (p×q), all row-major. `out` must not alias `a` or `b`. */
export function multiplyInto<T extends Float64Array>(a: Float64Array, b: Float64Array, m: number, p: number, q: number, out: T): T {
  if (worthArrays(m, p, q)) return productThroughArrays(a, b, null, m, p, q, out);
  return productKernel(a, b, null, m, p, q, out);
}

/**
 * out (m×q) = a (m×p) · b (p×q) + c (m×q), all row-major, each entry rounded as the product
 * followed by one addition (bit-identical to multiplyInto then `+= c`, without the extra pass).
 * `out` may alias `c` but not `a` or `b`.
 */
export function multiplyAddInto<T extends Float64Array>(a: Float64Array, b: Float64Array, c: Float64Array, m: number, p: number, q: number, out: T): T {
  if (worthArrays(m, p, q)) return productThroughArrays(a, b, c, m, p, q, out);
  return productKernel(a, b, c, m, p, q, out);
}

// From this many multiply-adds the copies into number[] pay for themselves (measured: equal
// at n = 32, +10% at 40, +25% at 64, +30% at 100…200 under `npm run bench`).
const ARRAY_PATH_FROM = 48 * 48 * 48;
// Largest operand copied (2^16 entries = 256²): the four copies are cached, so this caps the
// memory held at 2 MiB; larger products stay on the typed path.
const ARRAY_PATH_LARGEST = 1 << 16;

function worthArrays(m: number, p: number, q: number): boolean {
  return m * p * q >= ARRAY_PATH_FROM && m * p <= ARRAY_PATH_LARGEST && p * q <= ARRAY_PATH_LARGEST && m * q <= ARRAY_PATH_LARGEST;
}

let arrayA = doubleArray(0), arrayB = doubleArray(0), arrayC = doubleArray(0), arrayOut = doubleArray(0);

// The product (plus addend) through cached number[] copies and arrayKernels' 3×3 tile. Each
// entry is summed in the same order as productKernel, so the result is bit for bit the same.
function productThroughArrays<T extends Float64Array>(a: Float64Array, b: Float64Array, c: Float64Array | null, m: number, p: number, q: number, out: T): T {
  if (arrayA.length < m * p) arrayA = doubleArray(m * p);
  if (arrayB.length < p * q) arrayB = doubleArray(p * q);
  if (arrayOut.length < m * q) arrayOut = doubleArray(m * q);
  const ja = arrayA, jb = arrayB, jo = arrayOut;
  for (let i = 0; i < m * p; i++) ja[i] = a[i]!;
  for (let i = 0; i < p * q; i++) jb[i] = b[i]!;
  let jc: number[] | null = null;
  if (c !== null) {
    if (arrayC.length < m * q) arrayC = doubleArray(m * q);
    jc = arrayC;
    for (let i = 0; i < m * q; i++) jc[i] = c[i]!;
  }
  productIntoArray(ja, jb, jc, m, p, q, jo);
  for (let i = 0; i < m * q; i++) out[i] = jo[i]!;
  return out;
}

// The 2×4 register-tiled product behind multiplyInto / multiplyAddInto (c = null: no addend).
function productKernel<T extends Float64Array>(a: Float64Array, b: Float64Array, c: Float64Array | null, m: number, p: number, q: number, out: T): T {
  const q4 = q - (q % 4);
  const m2 = m - (m % 2);
  for (let i = 0; i < m2; i += 2) {
    const i0 = i * p;
    const i1 = i0 + p;
    const o0 = i * q;
    const o1 = o0 + q;
    for (let j = 0; j < q4; j += 4) {
      let c00 = 0, c01 = 0, c02 = 0, c03 = 0, c10 = 0, c11 = 0, c12 = 0, c13 = 0;
      for (let k = 0, kb = j; k < p; k++, kb += q) {
        const a0 = a[i0 + k]!;
        const a1 = a[i1 + k]!;
        const b0 = b[kb]!, b1 = b[kb + 1]!, b2 = b[kb + 2]!, b3 = b[kb + 3]!;
        c00 += a0 * b0; c01 += a0 * b1; c02 += a0 * b2; c03 += a0 * b3;
        c10 += a1 * b0; c11 += a1 * b1; c12 += a1 * b2; c13 += a1 * b3;
      }
      if (c !== null) {
        c00 += c[o0 + j]!; c01 += c[o0 + j + 1]!; c02 += c[o0 + j + 2]!; c03 += c[o0 + j + 3]!;
        c10 += c[o1 + j]!; c11 += c[o1 + j + 1]!; c12 += c[o1 + j + 2]!; c13 += c[o1 + j + 3]!;
      }
      out[o0 + j] = c00; out[o0 + j + 1] = c01; out[o0 + j + 2] = c02; out[o0 + j + 3] = c03;
      out[o1 + j] = c10; out[o1 + j + 1] = c11; out[o1 + j + 2] = c12; out[o1 + j + 3] = c13;
    }
    for (let j = q4; j < q; j++) {
      let c0 = 0, c1 = 0;
      for (let k = 0, kb = j; k < p; k++, kb += q) {
        const bk = b[kb]!;
        c0 += a[i0 + k]! * bk;
        c1 += a[i1 + k]! * bk;
      }
      if (c !== null) { c0 += c[o0 + j]!; c1 += c[o1 + j]!; }
      out[o0 + j] = c0;
      out[o1 + j] = c1;
    }
  }
  for (let i = m2; i < m; i++) {
    const io = i * p;
    for (let j = 0; j < q; j++) {
      let acc = 0;
      for (let k = 0, kb = j; k < p; k++, kb += q) acc += a[io + k]! * b[kb]!;
      out[i * q + j] = c !== null ? acc + c[i * q + j]! : acc;
    }
  }
  return out;
}

/** a (m×p) · b (p×q) into a new array. */
export function multiply(a: Float64Array, b: Float64Array, m: number, p: number, q: number): Float64Array<ArrayBuffer> {
  const out = new Float64Array(m * q);
  multiplyInto(a, b, m, p, q, out);
  return out;
}

/** Transpose of a row-major m×n array (a new n×m array). */
export function transpose(a: Float64Array, m: number, n: number): Float64Array<ArrayBuffer> {
  const out = new Float64Array(m * n);
  for (let i = 0; i < m; i++) for (let j = 0; j < n; j++) out[j * m + i] = a[i * n + j]!;
  return out;
}

/** Row-major 1-norm (maximum absolute column sum) of an m×n array. */
export function oneNormRowMajor(a: Float64Array, m: number, n: number): number {
  const sums = new Float64Array(n);
  for (let i = 0; i < m; i++) {
    const io = i * n;
    for (let j = 0; j < n; j++) sums[j] += Math.abs(a[io + j]!);
  }
  let best = 0;
  for (let j = 0; j < n; j++) if (sums[j]! > best || Number.isNaN(sums[j]!)) best = sums[j]!;
  return best;
}

/**
 * c[cOff + i·ldc + j] −= Σ_k a[aOff + i·lda + k] · b[bOff + k·ldb + j] for i < m, j < q, k < p:
 * the strided "C −= A·B" update on sub-blocks, with the same 2×4 register tile as multiplyInto.
 */
export function subtractProductInto(
  a: Float64Array, aOff: number, lda: number,
  b: Float64Array, bOff: number, ldb: number,
  c: Float64Array, cOff: number, ldc: number,
  m: number, p: number, q: number,
): void {
  const q4 = q - (q % 4);
  const m2 = m - (m % 2);
  for (let i = 0; i < m2; i += 2) {
    const i0 = aOff + i * lda;
    const i1 = i0 + lda;
    const o0 = cOff + i * ldc;
    const o1 = o0 + ldc;
    for (let j = 0; j < q4; j += 4) {
      let c00 = 0, c01 = 0, c02 = 0, c03 = 0, c10 = 0, c11 = 0, c12 = 0, c13 = 0;
      for (let k = 0, kb = bOff + j; k < p; k++, kb += ldb) {
        const a0 = a[i0 + k]!;
        const a1 = a[i1 + k]!;
        const b0 = b[kb]!, b1 = b[kb + 1]!, b2 = b[kb + 2]!, b3 = b[kb + 3]!;
        c00 += a0 * b0; c01 += a0 * b1; c02 += a0 * b2; c03 += a0 * b3;
        c10 += a1 * b0; c11 += a1 * b1; c12 += a1 * b2; c13 += a1 * b3;
      }
      c[o0 + j] -= c00; c[o0 + j + 1] -= c01; c[o0 + j + 2] -= c02; c[o0 + j + 3] -= c03;
      c[o1 + j] -= c10; c[o1 + j + 1] -= c11; c[o1 + j + 2] -= c12; c[o1 + j + 3] -= c13;
    }
    for (let j = q4; j < q; j++) {
      let c0 = 0, c1 = 0;
      for (let k = 0, kb = bOff + j; k < p; k++, kb += ldb) {
        const bk = b[kb]!;
        c0 += a[i0 + k]! * bk;
        c1 += a[i1 + k]! * bk;
      }
      c[o0 + j] -= c0;
      c[o1 + j] -= c1;
    }
  }
  for (let i = m2; i < m; i++) {
    const io = aOff + i * lda;
    const oo = cOff + i * ldc;
    for (let j = 0; j < q; j++) {
      let v = 0;
      for (let k = 0, kb = bOff + j; k < p; k++, kb += ldb) v += a[io + k]! * b[kb]!;
      c[oo + j] -= v;
    }
  }
}

// Panel width of the blocked LU and triangular solves. Narrow panels leave almost all flops to
// the tiled update; measured (Node 20, n = 20…200) 8 beat 4, 12, 16, 32 and 48 by 5–40%.
const BLOCK = 8;

/**
 * Solves M X = R in place (R becomes X) for square M (n×n, destroyed: holds its LU factors)
 * and R (n×q), by LU with partial pivoting (Golub & Van Loan, "Matrix Computations", 4th ed.,
 * Alg. 3.4.1 for the pivoting, §3.2.9 for the blocked right-looking form). The trailing update
 * and both triangular solves use the tiled `subtractProductInto`, so ~all (2/3·n³ + 2n²q) flops
 * run at matrix-product speed. Throws "singular" naming `what` when a pivot is ≤ n·ε·‖M‖₁.
 */
export function solveInPlace(mat: Float64Array, rhs: Float64Array, n: number, q: number, what: string): void {
  if (n <= SMALL_SOLVE) { solveSmallInPlace(mat, rhs, n, q, what); return; }
  const threshold = n * Number.EPSILON * oneNormRowMajor(mat, n, n);
  const pivots = new Int32Array(n);
  for (let k0 = 0; k0 < n; k0 += BLOCK) {
    const k1 = Math.min(n, k0 + BLOCK);
    // Panel factorisation of columns k0..k1−1 (rows k0..n−1), row swaps applied to whole rows.
    for (let k = k0; k < k1; k++) {
      let p = k;
      let best = Math.abs(mat[k * n + k]!);
      for (let i = k + 1; i < n; i++) {
        const v = Math.abs(mat[i * n + k]!);
        if (v > best) { best = v; p = i; }
      }
      if (!(best > threshold) || best === 0) {
        throw new EngineError("singular", `${what} is numerically singular (pivot ${best.toExponential(3)} at step ${k + 1} of ${n})`, {
          step: k, pivot: best, threshold,
        });
      }
      pivots[k] = p;
      if (p !== k) {
        for (let j = 0; j < n; j++) { const t = mat[k * n + j]!; mat[k * n + j] = mat[p * n + j]!; mat[p * n + j] = t; }
      }
      const pivot = mat[k * n + k]!;
      for (let i = k + 1; i < n; i++) {
        const l = (mat[i * n + k]! /= pivot);
        if (l === 0) continue;
        // update only the rest of the panel; columns ≥ k1 are updated in blocks below
        for (let j = k + 1; j < k1; j++) mat[i * n + j] -= l * mat[k * n + j]!;
      }
    }
    if (k1 < n) {
      // U12 = L11⁻¹ A12 (unit lower triangular solve within the panel rows).
      for (let i = k0 + 1; i < k1; i++) {
        for (let k = k0; k < i; k++) {
          const l = mat[i * n + k]!;
          if (l === 0) continue;
          for (let j = k1; j < n; j++) mat[i * n + j] -= l * mat[k * n + j]!;
        }
      }
      // A22 −= L21 · U12
      subtractProductInto(mat, k1 * n + k0, n, mat, k0 * n + k1, n, mat, k1 * n + k1, n, n - k1, k1 - k0, n - k1);
    }
  }
  // Apply the row interchanges to R.
  for (let k = 0; k < n; k++) {
    const p = pivots[k]!;
    if (p === k) continue;
    for (let j = 0; j < q; j++) { const t = rhs[k * q + j]!; rhs[k * q + j] = rhs[p * q + j]!; rhs[p * q + j] = t; }
  }
  // Forward substitution L Y = R, blocked: solve a block of rows, then update the rows below.
  for (let k0 = 0; k0 < n; k0 += BLOCK) {
    const k1 = Math.min(n, k0 + BLOCK);
    for (let i = k0 + 1; i < k1; i++) {
      for (let k = k0; k < i; k++) {
        const l = mat[i * n + k]!;
        if (l === 0) continue;
        for (let j = 0; j < q; j++) rhs[i * q + j] -= l * rhs[k * q + j]!;
      }
    }
    if (k1 < n) subtractProductInto(mat, k1 * n + k0, n, rhs, k0 * q, q, rhs, k1 * q, q, n - k1, k1 - k0, q);
  }
  // Back substitution U X = Y, blocked from the bottom.
  for (let k1 = n; k1 > 0; k1 -= BLOCK) {
    const k0 = Math.max(0, k1 - BLOCK);
    for (let i = k1 - 1; i >= k0; i--) {
      for (let k = i + 1; k < k1; k++) {
        const u = mat[i * n + k]!;
        if (u === 0) continue;
        for (let j = 0; j < q; j++) rhs[i * q + j] -= u * rhs[k * q + j]!;
      }
      const d = mat[i * n + i]!;
      for (let j = 0; j < q; j++) rhs[i * q + j] /= d;
    }
    if (k0 > 0) subtractProductInto(mat, k0, n, rhs, k0 * q, q, rhs, 0, q, k0, k1 - k0, q);
  }
}

// Up to this order the whole matrix fits in L1 cache, so blocking only adds loop overhead:
// solveSmallInPlace (unblocked LU, register-tiled substitutions) is 2–3× faster at n = 10…20.
const SMALL_SOLVE = 32;

function throwSingularPivot(what: string, best: number, k: number, n: number, threshold: number): never {
  throw new EngineError("singular", `${what} is numerically singular (pivot ${best.toExponential(3)} at step ${k + 1} of ${n})`, {
    step: k, pivot: best, threshold,
  });
}

// Partial pivoting at step k of solveSmallInPlace: finds the largest |mat[i][k]|, i ≥ k, and
// swaps that row (of mat and rhs) into row k; throws "singular" when it is ≤ threshold.
function pivotRow(mat: Float64Array, rhs: Float64Array, n: number, q: number, k: number, threshold: number, what: string): void {
  const kn = k * n;
  let p = k;
  let best = Math.abs(mat[kn + k]!);
  for (let i = k + 1; i < n; i++) {
    const v = Math.abs(mat[i * n + k]!);
    if (v > best) { best = v; p = i; }
  }
  if (!(best > threshold) || best === 0) throwSingularPivot(what, best, k, n, threshold);
  if (p === k) return;
  const pn = p * n;
  for (let j = 0; j < n; j++) { const t = mat[kn + j]!; mat[kn + j] = mat[pn + j]!; mat[pn + j] = t; }
  const kq = k * q, pq = p * q;
  for (let j = 0; j < q; j++) { const t = rhs[kq + j]!; rhs[kq + j] = rhs[pq + j]!; rhs[pq + j] = t; }
}

// solveInPlace for n ≤ SMALL_SOLVE: the same LU with partial pivoting (Golub & Van Loan,
// Alg. 3.4.1), unblocked; forward and back substitution in the left-looking (dot-product)
// form with two rows × four columns of the right-hand side held in registers.
function solveSmallInPlace(mat: Float64Array, rhs: Float64Array, n: number, q: number, what: string): void {
  let norm = 0;
  for (let j = 0; j < n; j++) {
    let sum = 0;
    for (let i = 0; i < n; i++) sum += Math.abs(mat[i * n + j]!);
    if (sum > norm || Number.isNaN(sum)) norm = sum;
  }
  const threshold = n * Number.EPSILON * norm;
  // Two pivot columns per sweep: the trailing matrix is read and written once per rank-2
  // update instead of once per column (halves the memory traffic that bounds this loop).
  for (let k = 0; k < n; k += 2) {
    const kn = k * n;
    pivotRow(mat, rhs, n, q, k, threshold, what);
    const pivot = mat[kn + k]!;
    if (k + 1 === n) break;
    const k1 = k + 1, k1n = kn + n;
    const ukk1 = mat[kn + k1]!;
    for (let i = k1; i < n; i++) {
      const io = i * n;
      const l = (mat[io + k]! /= pivot);
      mat[io + k1] -= l * ukk1;
    }
    pivotRow(mat, rhs, n, q, k1, threshold, what);
    const pivot1 = mat[k1n + k1]!;
    const lk = mat[k1n + k]!;
    for (let j = k + 2; j < n; j++) mat[k1n + j] -= lk * mat[kn + j]!;
    for (let i = k + 2; i < n; i++) {
      const io = i * n;
      const l0 = mat[io + k]!;
      const l1 = (mat[io + k1]! /= pivot1);
      if (l0 === 0 && l1 === 0) continue;
      for (let j = k + 2; j < n; j++) mat[io + j] -= l0 * mat[kn + j]! + l1 * mat[k1n + j]!;
    }
  }
  // Forward substitution L Y = R (unit lower L), rows in pairs: Y_i = R_i − Σ_{k<i} L_ik Y_k.
  const q4 = q - (q % 4);
  const n2 = n - (n % 2);
  for (let i = 0; i < n2; i += 2) {
    const l0 = i * n, l1 = l0 + n;
    const lc = mat[l1 + i]!; // L[i+1][i]
    const r0 = i * q, r1 = r0 + q;
    for (let j = 0; j < q4; j += 4) {
      let a0 = 0, a1 = 0, a2 = 0, a3 = 0, b0 = 0, b1 = 0, b2 = 0, b3 = 0;
      for (let k = 0, kb = j; k < i; k++, kb += q) {
        const x = mat[l0 + k]!, y = mat[l1 + k]!;
        const y0 = rhs[kb]!, y1 = rhs[kb + 1]!, y2 = rhs[kb + 2]!, y3 = rhs[kb + 3]!;
        a0 += x * y0; a1 += x * y1; a2 += x * y2; a3 += x * y3;
        b0 += y * y0; b1 += y * y1; b2 += y * y2; b3 += y * y3;
      }
      const u0 = rhs[r0 + j]! - a0, u1 = rhs[r0 + j + 1]! - a1, u2 = rhs[r0 + j + 2]! - a2, u3 = rhs[r0 + j + 3]! - a3;
      rhs[r0 + j] = u0; rhs[r0 + j + 1] = u1; rhs[r0 + j + 2] = u2; rhs[r0 + j + 3] = u3;
      rhs[r1 + j] = rhs[r1 + j]! - b0 - lc * u0; rhs[r1 + j + 1] = rhs[r1 + j + 1]! - b1 - lc * u1;
      rhs[r1 + j + 2] = rhs[r1 + j + 2]! - b2 - lc * u2; rhs[r1 + j + 3] = rhs[r1 + j + 3]! - b3 - lc * u3;
    }
    for (let j = q4; j < q; j++) {
      let a0 = 0, b0 = 0;
      for (let k = 0, kb = j; k < i; k++, kb += q) { const y0 = rhs[kb]!; a0 += mat[l0 + k]! * y0; b0 += mat[l1 + k]! * y0; }
      const u0 = rhs[r0 + j]! - a0;
      rhs[r0 + j] = u0;
      rhs[r1 + j] = rhs[r1 + j]! - b0 - lc * u0;
    }
  }
  for (let i = n2; i < n; i++) {
    const l0 = i * n, r0 = i * q;
    for (let j = 0; j < q; j++) {
      let a0 = 0;
      for (let k = 0, kb = j; k < i; k++, kb += q) a0 += mat[l0 + k]! * rhs[kb]!;
      rhs[r0 + j] -= a0;
    }
  }
  // Back substitution U X = Y, rows in pairs from the bottom: X_i = (Y_i − Σ_{k>i} U_ik X_k)/U_ii.
  let i = n - 1;
  if (n % 2 === 1) {
    const d = mat[i * n + i]!, r0 = i * q;
    for (let j = 0; j < q; j++) rhs[r0 + j] /= d;
    i--;
  }
  for (; i > 0; i -= 2) {
    const u1 = i * n, u0 = u1 - n; // rows i (lower) and i−1 (upper)
    const d1 = mat[u1 + i]!, d0 = mat[u0 + i - 1]!, uc = mat[u0 + i]!;
    const r1 = i * q, r0 = r1 - q;
    for (let j = 0; j < q4; j += 4) {
      let a0 = 0, a1 = 0, a2 = 0, a3 = 0, b0 = 0, b1 = 0, b2 = 0, b3 = 0;
      for (let k = i + 1, kb = (i + 1) * q + j; k < n; k++, kb += q) {
        const x = mat[u0 + k]!, y = mat[u1 + k]!;
        const y0 = rhs[kb]!, y1 = rhs[kb + 1]!, y2 = rhs[kb + 2]!, y3 = rhs[kb + 3]!;
        a0 += x * y0; a1 += x * y1; a2 += x * y2; a3 += x * y3;
        b0 += y * y0; b1 += y * y1; b2 += y * y2; b3 += y * y3;
      }
      const x0 = (rhs[r1 + j]! - b0) / d1, x1 = (rhs[r1 + j + 1]! - b1) / d1;
      const x2 = (rhs[r1 + j + 2]! - b2) / d1, x3 = (rhs[r1 + j + 3]! - b3) / d1;
      rhs[r1 + j] = x0; rhs[r1 + j + 1] = x1; rhs[r1 + j + 2] = x2; rhs[r1 + j + 3] = x3;
      rhs[r0 + j] = (rhs[r0 + j]! - a0 - uc * x0) / d0; rhs[r0 + j + 1] = (rhs[r0 + j + 1]! - a1 - uc * x1) / d0;
      rhs[r0 + j + 2] = (rhs[r0 + j + 2]! - a2 - uc * x2) / d0; rhs[r0 + j + 3] = (rhs[r0 + j + 3]! - a3 - uc * x3) / d0;
    }
    for (let j = q4; j < q; j++) {
      let a0 = 0, b0 = 0;
      for (let k = i + 1, kb = (i + 1) * q + j; k < n; k++, kb += q) { const y0 = rhs[kb]!; a0 += mat[u0 + k]! * y0; b0 += mat[u1 + k]! * y0; }
      const x0 = (rhs[r1 + j]! - b0) / d1;
      rhs[r1 + j] = x0;
      rhs[r0 + j] = (rhs[r0 + j]! - a0 - uc * x0) / d0;
    }
  }
}

/** ‖x‖_F of a flat array, with the scaled sum of squares of the reference BLAS dnrm2. */
export function frobeniusRowMajor(a: Float64Array): number {
  let scale = 0, ssq = 1;
  for (let i = 0; i < a.length; i++) {
    const v = Math.abs(a[i]!);
    if (v === 0) continue;
    if (scale < v) { ssq = 1 + ssq * (scale / v) * (scale / v); scale = v; } else ssq += (v / scale) * (v / scale);
  }
  return scale * Math.sqrt(ssq);
}

/** True when every entry is finite. */
export function allFinite(a: Float64Array): boolean {
  for (let i = 0; i < a.length; i++) if (!Number.isFinite(a[i]!)) return false;
  return true;
}

interface MatrixRows { data?: unknown; rows: number; columns: number }

/**
 * Row-major copy of a Matrix (rows × columns). Reads ml-matrix's row arrays directly when they
 * are present (one bulk copy per row); element-wise `get` costs a call per entry, which
 * dominated the conversions at n ≤ 20. Falls back to `get` for any other storage.
 */
export function rowMajorOf(m: Matrix): Float64Array {
  return copyRowMajorInto(m, new Float64Array(m.rows * m.columns));
}

/** Writes the entries of m (rows × columns) row-major into out[0 .. rows·columns); returns out. */
export function copyRowMajorInto(m: Matrix, out: Float64Array): Float64Array {
  const rows = m.rows, cols = m.columns;
  const data = (m as unknown as MatrixRows).data;
  if (Array.isArray(data) && data.length === rows) {
    for (let i = 0; i < rows; i++) {
      const row = data[i] as unknown;
      if (!(row instanceof Float64Array) || row.length !== cols) return rowMajorBySlowPath(m, out);
      out.set(row, i * cols);
    }
    return out;
  }
  return rowMajorBySlowPath(m, out);
}

function rowMajorBySlowPath(m: Matrix, out: Float64Array): Float64Array {
  const cols = m.columns;
  for (let i = 0; i < m.rows; i++) for (let j = 0; j < cols; j++) out[i * cols + j] = m.get(i, j);
  return out;
}

/**
 * Matrix (rows × cols) whose rows are views into `data` itself (no copy): for results the
 * caller has just allocated and hands over, saving the copy `matrixOfRowMajor` makes. The
 * caller must not keep or reuse `data`. Falls back to a copy if ml-matrix ever stores its
 * rows differently.
 */
export function matrixAdoptingRowMajor(data: Float64Array, rows: number, cols: number): Matrix {
  const m = new Matrix(0, cols) as unknown as MatrixRows;
  if (!Array.isArray(m.data)) return matrixOfRowMajor(data, rows, cols);
  const rowViews = new Array<Float64Array>(rows);
  for (let i = 0; i < rows; i++) rowViews[i] = data.subarray(i * cols, i * cols + cols);
  m.data = rowViews;
  m.rows = rows;
  return m as unknown as Matrix;
}

/**
 * Matrix (rows × cols) holding a copy of the row-major `data`. The rows are views into one
 * fresh buffer (one allocation instead of one per row, as qzKernels.matrixFromRowMajor does);
 * falls back to element-wise `set` if ml-matrix ever stores its rows differently.
 */
export function matrixOfRowMajor(data: Float64Array, rows: number, cols: number): Matrix {
  const own = data.slice(0, rows * cols);
  const m = new Matrix(0, cols) as unknown as MatrixRows;
  if (!Array.isArray(m.data)) {
    const copy = new Matrix(rows, cols);
    for (let i = 0; i < rows; i++) for (let j = 0; j < cols; j++) copy.set(i, j, own[i * cols + j]!);
    return copy;
  }
  const rowViews = new Array<Float64Array>(rows);
  for (let i = 0; i < rows; i++) rowViews[i] = own.subarray(i * cols, i * cols + cols);
  m.data = rowViews;
  m.rows = rows;
  return m as unknown as Matrix;
}
