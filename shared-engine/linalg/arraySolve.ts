/**
 * The engine's one dense LU solve, on plain number arrays (see arrayKernels.ts for why such
 * arrays): solveInPlaceArray and its helpers. expm's Padé solve calls it directly; denseKernels'
 * solveInPlace copies its Float64Arrays in and out. Internal to linalg/.
 */
import { EngineError } from "../errors";
import { oneNormArray } from "./arrayKernels";

/**
 * c[cOff + i·ldc + j] −= Σ_k a[aOff + i·lda + k] · b[bOff + k·ldb + j] for i < m, j < q, k < p:
 * the strided "C −= A·B" update on sub-blocks, with a 2×4 register tile.
 */
export function subtractProductIntoArray(
  a: number[], aOff: number, lda: number,
  b: number[], bOff: number, ldb: number,
  c: number[], cOff: number, ldc: number,
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
// the tiled update; measured (Node 20, n = 20…200, on Float64Array) 8 beat 4, 12, 16, 32 and 48
// by 5–40%.
const BLOCK = 8;

/**
 * The LU solve behind denseKernels' solveInPlace (which copies its Float64Arrays in and out):
 * solves M X = R in place (R becomes X) for square M
 * (n×n, destroyed: holds its LU factors) and R (n×q), by LU with partial pivoting (Golub & Van Loan, "Matrix Computations", 4th ed.,
 * Alg. 3.4.1 for the pivoting, §3.2.9 for the blocked right-looking form). The trailing update
 * and both triangular solves use the tiled `subtractProductIntoArray`, so ~all (2/3·n³ + 2n²q) flops
 * run at matrix-product speed. Throws "singular" naming `what` when a pivot is ≤ n·ε·‖M‖₁.
 * Orders up to `unblockedUpTo` (default SMALL_SOLVE) use the unblocked form.
 */
export function solveInPlaceArray(mat: number[], rhs: number[], n: number, q: number, what: string, unblockedUpTo = SMALL_SOLVE): void {
  if (n <= unblockedUpTo) { solveSmallInPlaceArray(mat, rhs, n, q, what); return; }
  const threshold = n * Number.EPSILON * oneNormArray(mat, n);
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
      subtractProductIntoArray(mat, k1 * n + k0, n, mat, k0 * n + k1, n, mat, k1 * n + k1, n, n - k1, k1 - k0, n - k1);
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
    if (k1 < n) subtractProductIntoArray(mat, k1 * n + k0, n, rhs, k0 * q, q, rhs, k1 * q, q, n - k1, k1 - k0, q);
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
    if (k0 > 0) subtractProductIntoArray(mat, k0, n, rhs, k0 * q, q, rhs, 0, q, k0, k1 - k0, q);
  }
}

// Up to this order the unblocked solver wins on number[] (measured under `npm run bench`
// conditions with q = n: 3.5 against 2.7 GFlop/s at n = 33, 3.9 against 3.7 at 64, equal at 80;
// denseKernels' solveInPlace keeps its historical switch at 32, so its results stay bit for bit).
const SMALL_SOLVE = 80;

function throwSingularPivot(what: string, best: number, k: number, n: number, threshold: number): never {
  throw new EngineError("singular", `${what} is numerically singular (pivot ${best.toExponential(3)} at step ${k + 1} of ${n})`, {
    step: k, pivot: best, threshold,
  });
}

// Partial pivoting at step k of solveSmallInPlace: finds the largest |mat[i][k]|, i ≥ k, and
// swaps that row (of mat and rhs) into row k; throws "singular" when it is ≤ threshold.
function pivotRowArray(mat: number[], rhs: number[], n: number, q: number, k: number, threshold: number, what: string): void {
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
function solveSmallInPlaceArray(mat: number[], rhs: number[], n: number, q: number, what: string): void {
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
    pivotRowArray(mat, rhs, n, q, k, threshold, what);
    const pivot = mat[kn + k]!;
    if (k + 1 === n) break;
    const k1 = k + 1, k1n = kn + n;
    const ukk1 = mat[kn + k1]!;
    for (let i = k1; i < n; i++) {
      const io = i * n;
      const l = (mat[io + k]! /= pivot);
      mat[io + k1] -= l * ukk1;
    }
    pivotRowArray(mat, rhs, n, q, k1, threshold, what);
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

