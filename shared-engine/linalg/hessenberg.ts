/**
 * Orthogonal reduction to upper Hessenberg form by Householder reflections: A = Q H Qᵀ.
 * The kernel works in place on a row-major Float64Array so that the Schur and eigenvalue
 * pipelines can reuse it without copying through ml-matrix.
 */
import { Matrix } from "ml-matrix";
import { EngineError } from "../errors";
import { matrixOfRowMajor, rowMajorOf } from "./denseKernels";
import { accumulateTransposedQ } from "./hessenbergFactor";
import { requireSquareFinite } from "./validate";

/**
 * Kernel: reduces rows/columns ilo..ihi (0-based, inclusive) of the row-major n×n array `a` to
 * upper Hessenberg form in place, zeroing the entries below the subdiagonal exactly. Entries of
 * `a` outside that window are transformed consistently (rows to the right, columns above), so
 * a matrix that is already triangular outside the window (as after balancing with
 * permutation) stays similar to the input. When `qt` is given (row-major n×n) it is
 * overwritten by Qᵀ, the transpose of Q = H_ilo·…·H_(ihi−2), so that the input equals
 * Q·H·Qᵀ (its previous content is ignored). The Schur kernels update Q through its transpose
 * (see francisQRTransposedInPlace), so this is the form they want; `reduceToHessenbergInPlace`
 * returns Q itself.
 *
 * Method: Householder reflections H_k = I − τ v vᵀ built as in Golub & Van Loan, "Matrix
 * Computations", 4th ed. (2013), Algorithm 7.4.2. The column norm sums squares directly when
 * that sum is safely inside the normal range and falls back to max-abs scaling otherwise, so
 * entries near the underflow or overflow threshold keep full accuracy.
 * Each two-sided step H_k·A·H_k is applied as one rank-2 update (two passes over the
 * affected block instead of four; see the comment in the loop), four rows at a time.
 * The reflectors are kept below the subdiagonal (as LAPACK dgehrd does) and Qᵀ is formed
 * afterwards by backward accumulation (as LAPACK dorghr): Qᵀ ← Qᵀ·H_k for k from the last
 * reflector down, which touches only the shrinking trailing block, one row of Qᵀ at a time
 * and two reflectors per pass (`accumulateTransposedQ`).
 * Cost: 10/3·m³ flops for the window size m, plus 4/3·m³ with `qt`. Memory: module-level
 * workspaces of 4n doubles, reused across calls.
 */
export function reduceToHessenbergTransposedInPlace(a: Float64Array, n: number, ilo: number, ihi: number, qt: Float64Array | null): void {
  if (scratchV.length < n) {
    scratchV = new Float64Array(n);
    scratchW = new Float64Array(n);
    scratchY = new Float64Array(n);
    scratchTau = new Float64Array(n);
  }
  const v = scratchV, w = scratchW, y = scratchY, taus = scratchTau;
  for (let k = ilo; k < ihi - 1; k++) {
    taus[k] = 0; // a skipped step (column already zero) must read as H_k = I below
    // Householder vector for x = a[k+1..ihi][k] (Golub & Van Loan Alg. 5.1.1).
    const r0 = k + 1;
    const alpha = a[r0 * n + k];
    let below = 0;
    for (let i = r0 + 1, p = (r0 + 1) * n + k; i <= ihi; i++, p += n) {
      const x = a[p];
      below += x * x;
    }
    let norm: number;
    if (below > 1e-280 && below < 1e280 && alpha * alpha < 1e280) {
      norm = Math.sqrt(alpha * alpha + below);
    } else {
      // rare: squares would under- or overflow; redo with max-abs scaling
      let maxAbs = 0;
      for (let i = r0 + 1; i <= ihi; i++) {
        const x = Math.abs(a[i * n + k]);
        if (x > maxAbs) maxAbs = x;
      }
      if (maxAbs === 0) continue; // already zero below the subdiagonal: H_k = I
      const sc = Math.max(maxAbs, Math.abs(alpha));
      let sumSq = 0;
      for (let i = r0; i <= ihi; i++) {
        const x = a[i * n + k] / sc;
        sumSq += x * x;
      }
      norm = sc * Math.sqrt(sumSq);
    }
    const beta = alpha >= 0 ? -norm : norm;
    const tau = (beta - alpha) / beta;
    const inv = 1 / (alpha - beta);
    v[r0] = 1;
    for (let i = r0 + 1, p = (r0 + 1) * n + k; i <= ihi; i++, p += n) {
      const x = a[p] * inv;
      v[i] = x;
      a[p] = qt ? x : 0; // the reflector is stored where the zeros go (for Qᵀ below)
    }
    a[r0 * n + k] = beta;
    taus[k] = tau;

    // Two-sided update H_k A H_k in two passes instead of four (left product, left update,
    // right product, right update). With y = A v (rows 0..ihi) and z = Aᵀ v (columns k+1..n−1),
    // both taken from the same A, and γ = vᵀ y = vᵀ A v:
    //   (I − τvvᵀ) A (I − τvvᵀ) = A − v (τz)ᵀ − (τy − τ²γ v) vᵀ,
    // the expansion of the product in Golub & Van Loan Alg. 7.4.2 (the rank-2 form of the
    // symmetric case, §8.3.1, without its symmetry). v is zero outside r0..ihi.
    for (let j = r0; j < n; j++) w[j] = 0;
    let i = 0;
    for (; i + 3 < r0; i += 4) {
      // four rows per pass: four independent sums instead of one latency-bound chain
      const p0 = i * n, p1 = p0 + n, p2 = p1 + n, p3 = p2 + n;
      let s0 = 0, s1 = 0, s2 = 0, s3 = 0;
      for (let j = r0; j <= ihi; j++) {
        const vj = v[j];
        s0 += a[p0 + j] * vj;
        s1 += a[p1 + j] * vj;
        s2 += a[p2 + j] * vj;
        s3 += a[p3 + j] * vj;
      }
      y[i] = s0;
      y[i + 1] = s1;
      y[i + 2] = s2;
      y[i + 3] = s3;
    }
    if (i + 1 < r0) {
      const p0 = i * n, p1 = p0 + n;
      let s0 = 0, s1 = 0;
      for (let j = r0; j <= ihi; j++) {
        const vj = v[j];
        s0 += a[p0 + j] * vj;
        s1 += a[p1 + j] * vj;
      }
      y[i] = s0;
      y[i + 1] = s1;
      i += 2;
    }
    if (i < r0) {
      const row = i * n;
      let sum = 0;
      for (let j = r0; j <= ihi; j++) sum += a[row + j] * v[j];
      y[i] = sum;
    }
    let gamma = 0;
    i = r0;
    for (; i + 3 <= ihi; i += 4) {
      // four rows per pass: one load and store of z (held in w) serves four rows
      const v0 = v[i], v1 = v[i + 1], v2 = v[i + 2], v3 = v[i + 3];
      const p0 = i * n, p1 = p0 + n, p2 = p1 + n, p3 = p2 + n;
      let s0 = 0, s1 = 0, s2 = 0, s3 = 0;
      for (let j = r0; j <= ihi; j++) {
        const x0 = a[p0 + j], x1 = a[p1 + j], x2 = a[p2 + j], x3 = a[p3 + j];
        const vj = v[j];
        s0 += x0 * vj;
        s1 += x1 * vj;
        s2 += x2 * vj;
        s3 += x3 * vj;
        w[j] += v0 * x0 + v1 * x1 + v2 * x2 + v3 * x3;
      }
      for (let j = ihi + 1; j < n; j++) w[j] += v0 * a[p0 + j] + v1 * a[p1 + j] + v2 * a[p2 + j] + v3 * a[p3 + j];
      y[i] = s0;
      y[i + 1] = s1;
      y[i + 2] = s2;
      y[i + 3] = s3;
      gamma += v0 * s0 + v1 * s1 + v2 * s2 + v3 * s3;
    }
    if (i + 1 <= ihi) {
      const v0 = v[i], v1 = v[i + 1];
      const p0 = i * n, p1 = p0 + n;
      let s0 = 0, s1 = 0;
      for (let j = r0; j <= ihi; j++) {
        const x0 = a[p0 + j], x1 = a[p1 + j];
        const vj = v[j];
        s0 += x0 * vj;
        s1 += x1 * vj;
        w[j] += v0 * x0 + v1 * x1;
      }
      for (let j = ihi + 1; j < n; j++) w[j] += v0 * a[p0 + j] + v1 * a[p1 + j];
      y[i] = s0;
      y[i + 1] = s1;
      gamma += v0 * s0 + v1 * s1;
      i += 2;
    }
    if (i <= ihi) {
      const vi = v[i];
      const row = i * n;
      let sum = 0;
      for (let j = r0; j <= ihi; j++) {
        const x = a[row + j];
        sum += x * v[j];
        w[j] += vi * x;
      }
      for (let j = ihi + 1; j < n; j++) w[j] += vi * a[row + j];
      y[i] = sum;
      gamma += vi * sum;
    }
    for (let j = r0; j < n; j++) w[j] *= tau;
    const tau2gamma = tau * tau * gamma;
    let i2 = 0;
    for (; i2 + 3 < r0; i2 += 4) {
      const f0 = tau * y[i2], f1 = tau * y[i2 + 1], f2 = tau * y[i2 + 2], f3 = tau * y[i2 + 3];
      const p0 = i2 * n, p1 = p0 + n, p2 = p1 + n, p3 = p2 + n;
      for (let j = r0; j <= ihi; j++) {
        const vj = v[j];
        a[p0 + j] -= f0 * vj;
        a[p1 + j] -= f1 * vj;
        a[p2 + j] -= f2 * vj;
        a[p3 + j] -= f3 * vj;
      }
    }
    if (i2 + 1 < r0) {
      const f0 = tau * y[i2], f1 = tau * y[i2 + 1];
      const p0 = i2 * n, p1 = p0 + n;
      for (let j = r0; j <= ihi; j++) {
        const vj = v[j];
        a[p0 + j] -= f0 * vj;
        a[p1 + j] -= f1 * vj;
      }
      i2 += 2;
    }
    if (i2 < r0) {
      const f = tau * y[i2];
      const row = i2 * n;
      for (let j = r0; j <= ihi; j++) a[row + j] -= f * v[j];
    }
    i2 = r0;
    for (; i2 + 3 <= ihi; i2 += 4) {
      // four rows per pass share the loads of w and v
      const v0 = v[i2], v1 = v[i2 + 1], v2 = v[i2 + 2], v3 = v[i2 + 3];
      const f0 = tau * y[i2] - tau2gamma * v0;
      const f1 = tau * y[i2 + 1] - tau2gamma * v1;
      const f2 = tau * y[i2 + 2] - tau2gamma * v2;
      const f3 = tau * y[i2 + 3] - tau2gamma * v3;
      const p0 = i2 * n, p1 = p0 + n, p2 = p1 + n, p3 = p2 + n;
      for (let j = r0; j <= ihi; j++) {
        const wj = w[j];
        const vj = v[j];
        a[p0 + j] -= v0 * wj + f0 * vj;
        a[p1 + j] -= v1 * wj + f1 * vj;
        a[p2 + j] -= v2 * wj + f2 * vj;
        a[p3 + j] -= v3 * wj + f3 * vj;
      }
      for (let j = ihi + 1; j < n; j++) {
        const wj = w[j];
        a[p0 + j] -= v0 * wj;
        a[p1 + j] -= v1 * wj;
        a[p2 + j] -= v2 * wj;
        a[p3 + j] -= v3 * wj;
      }
    }
    if (i2 + 1 <= ihi) {
      const v0 = v[i2], v1 = v[i2 + 1];
      const f0 = tau * y[i2] - tau2gamma * v0;
      const f1 = tau * y[i2 + 1] - tau2gamma * v1;
      const p0 = i2 * n, p1 = p0 + n;
      for (let j = r0; j <= ihi; j++) {
        const wj = w[j];
        const vj = v[j];
        a[p0 + j] -= v0 * wj + f0 * vj;
        a[p1 + j] -= v1 * wj + f1 * vj;
      }
      for (let j = ihi + 1; j < n; j++) {
        const wj = w[j];
        a[p0 + j] -= v0 * wj;
        a[p1 + j] -= v1 * wj;
      }
      i2 += 2;
    }
    if (i2 <= ihi) {
      const vi = v[i2];
      const f = tau * y[i2] - tau2gamma * vi;
      const row = i2 * n;
      for (let j = r0; j <= ihi; j++) a[row + j] -= vi * w[j] + f * v[j];
      for (let j = ihi + 1; j < n; j++) a[row + j] -= vi * w[j];
    }
  }
  if (!qt) return;
  accumulateTransposedQ(a, n, ilo, ihi, qt, taus, y, w);
}

// Workspaces of the (synchronous, non-re-entrant) kernel above: grown on demand, never handed
// out. At n ≤ 20 allocating them per call costs more than the reduction itself.
let scratchV = new Float64Array(0);
let scratchW = new Float64Array(0);
let scratchY = new Float64Array(0);
let scratchTau = new Float64Array(0);
let scratchTransposed = new Float64Array(0);

/**
 * Kernel: as `reduceToHessenbergTransposedInPlace`, but `q` (when given) is overwritten by Q
 * itself (row-major), so that the input equals Q·H·Qᵀ.
 */
export function reduceToHessenbergInPlace(a: Float64Array, n: number, ilo: number, ihi: number, q: Float64Array | null): void {
  if (!q) {
    reduceToHessenbergTransposedInPlace(a, n, ilo, ihi, null);
    return;
  }
  if (scratchTransposed.length < n * n) scratchTransposed = new Float64Array(n * n);
  const qt = scratchTransposed;
  reduceToHessenbergTransposedInPlace(a, n, ilo, ihi, qt);
  for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) q[j * n + i] = qt[i * n + j];
}

/** Row-major n×n identity. */
export function identityFloat64(n: number): Float64Array {
  const out = new Float64Array(n * n);
  for (let i = 0; i < n; i++) out[i * n + i] = 1;
  return out;
}

/**
 * Computes: the Hessenberg decomposition A = Q H Qᵀ of a square matrix (A, H, Q: n×n), with
 * H upper Hessenberg (H[i][j] = 0 exactly for i > j + 1) and Q orthogonal.
 *
 * Requires: A square, non-empty, all entries finite.
 *
 * Method: n − 2 Householder reflections applied from both sides (Golub & Van Loan, "Matrix
 * Computations", 4th ed., Johns Hopkins 2013, §7.4.3, Algorithm 7.4.2); Q accumulated
 * backward from the stored reflectors (G&VL §5.1.6), two at a time in the two-column compact
 * WY form (Schreiber & Van Loan, "A storage-efficient WY representation for products of
 * Householder transformations", SIAM J. Sci. Stat. Comput. 10(1), 1989; cited from memory).
 * No balancing is done, so the identity holds for A itself.
 *
 * Cost: 10/3·n³ flops for H and 4/3·n³ more for Q; O(n²) memory (row-major copies).
 *
 * Accuracy: backward stable; ‖A − Q H Qᵀ‖_F ≲ c·n·ε·‖A‖_F and ‖QᵀQ − I‖_F ≲ c·n·ε (Golub & Van
 * Loan §7.4.3). Before returning, H and Q are checked to be finite.
 *
 * Errors: "empty" (0×0), "shape-mismatch" (not square), "non-finite" (NaN/Infinity in A, or an
 * overflow during the reduction).
 *
 * Example:
 *   const { H, Q } = hessenberg(new Matrix([[4, 1, 2], [3, 5, 1], [2, 2, 6]]));
 *   // H.get(2, 0) === 0 and ‖A − Q·H·Qᵀ‖_F / ‖A‖_F < 1e-15
 */
export function hessenberg(A: Matrix): { H: Matrix; Q: Matrix } {
  requireSquareFinite(A, "A");
  const n = A.rows;
  const a = rowMajorOf(A);
  const q = identityFloat64(n);
  reduceToHessenbergInPlace(a, n, 0, n - 1, q);
  for (let i = 0; i < n * n; i++) {
    if (!Number.isFinite(a[i]) || !Number.isFinite(q[i])) {
      throw new EngineError("non-finite", "Hessenberg reduction of A overflowed (entries of A too large to square)", {
        argument: "A",
      });
    }
  }
  return { H: matrixOfRowMajor(a, n, n), Q: matrixOfRowMajor(q, n, n) };
}
