/**
 * Orthogonal reduction to upper Hessenberg form by Householder reflections: A = Q H Qᵀ.
 * The kernel works in place on a row-major Float64Array so that the Schur and eigenvalue
 * pipelines can reuse it without copying through ml-matrix.
 */
import { Matrix } from "ml-matrix";
import { EngineError } from "../errors";
import { matrixOfRowMajor, rowMajorOf } from "./denseKernels";
import { requireSquareFinite } from "./validate";

/**
 * Kernel: reduces rows/columns ilo..ihi (0-based, inclusive) of the row-major n×n array `a` to
 * upper Hessenberg form in place, zeroing the entries below the subdiagonal exactly. Entries of
 * `a` outside that window are transformed consistently (rows to the right, columns above), so
 * a matrix that is already triangular outside the window (as after balancing with
 * permutation) stays similar to the input. When `q` is given (row-major n×n) it is
 * overwritten by Q = H_ilo·…·H_(ihi−2), the product of the reflectors, so that the input
 * equals Q·H·Qᵀ (its previous content is ignored).
 *
 * Method: Householder reflections H_k = I − τ v vᵀ built as in Golub & Van Loan, "Matrix
 * Computations", 4th ed. (2013), Algorithm 7.4.2. The column norm sums squares directly when
 * that sum is safely inside the normal range and falls back to max-abs scaling otherwise, so
 * entries near the underflow or overflow threshold keep full accuracy.
 * Each two-sided step H_k·A·H_k is applied as one rank-2 update (two passes over the
 * affected block instead of four; see the comment in the loop).
 * Q is formed afterwards by backward accumulation (as LAPACK dorghr), which touches only the
 * shrinking trailing block. Cost: 10/3·m³ flops for the window size m, plus 4/3·m³ with `q`.
 * Memory: a module-level workspace of 4n doubles (+ n² for the stored reflectors when `q` is
 * given), reused across calls.
 */
export function reduceToHessenbergInPlace(a: Float64Array, n: number, ilo: number, ihi: number, q: Float64Array | null): void {
  // One reused workspace instead of five typed arrays per call: at n ≤ 20 their (off-heap)
  // allocation and collection cost more than the reduction itself.
  const work = workspace(4 * n + (q ? n * n : 0));
  const v = work.subarray(0, n);
  const w = work.subarray(n, 2 * n);
  const y = work.subarray(2 * n, 3 * n);
  const taus = work.subarray(3 * n, 4 * n);
  taus.fill(0); // a skipped step (column already zero) must read as H_k = I below
  // reflectors for the backward accumulation of Q: row k holds v_k (entries k+1..ihi)
  const reflectors = q ? work.subarray(4 * n, 4 * n + n * n) : null;
  for (let k = ilo; k < ihi - 1; k++) {
    // Householder vector for x = a[k+1..ihi][k] (Golub & Van Loan Alg. 5.1.1).
    const r0 = k + 1;
    const alpha = a[r0 * n + k];
    let below = 0;
    for (let i = r0 + 1; i <= ihi; i++) {
      const x = a[i * n + k];
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
    for (let i = r0 + 1; i <= ihi; i++) {
      v[i] = a[i * n + k] * inv;
      a[i * n + k] = 0;
    }
    a[r0 * n + k] = beta;

    // Two-sided update H_k A H_k in two passes instead of four (left product, left update,
    // right product, right update). With y = A v (rows 0..ihi) and z = Aᵀ v (columns k+1..n−1),
    // both taken from the same A, and γ = vᵀ y = vᵀ A v:
    //   (I − τvvᵀ) A (I − τvvᵀ) = A − v (τz)ᵀ − (τy − τ²γ v) vᵀ,
    // the expansion of the product in Golub & Van Loan Alg. 7.4.2 (the rank-2 form of the
    // symmetric case, §8.3.1, without its symmetry). v is zero outside r0..ihi.
    for (let j = k + 1; j < n; j++) w[j] = 0;
    for (let i = 0; i < r0; i++) {
      const row = i * n;
      let sum = 0;
      for (let j = r0; j <= ihi; j++) sum += a[row + j] * v[j];
      y[i] = sum;
    }
    let gamma = 0;
    let i = r0;
    for (; i + 1 <= ihi; i += 2) {
      // two rows per pass halve the loads and stores of z (held in w)
      const vi = v[i];
      const vi1 = v[i + 1];
      const row = i * n;
      const row1 = row + n;
      let sum = 0;
      let sum1 = 0;
      for (let j = r0; j <= ihi; j++) {
        const x = a[row + j];
        const x1 = a[row1 + j];
        const vj = v[j];
        sum += x * vj;
        sum1 += x1 * vj;
        w[j] += vi * x + vi1 * x1;
      }
      for (let j = ihi + 1; j < n; j++) w[j] += vi * a[row + j] + vi1 * a[row1 + j];
      y[i] = sum;
      y[i + 1] = sum1;
      gamma += vi * sum + vi1 * sum1;
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
    for (let j = k + 1; j < n; j++) w[j] *= tau;
    const tau2gamma = tau * tau * gamma;
    for (let i2 = 0; i2 < r0; i2++) {
      const f = tau * y[i2];
      if (f === 0) continue;
      const row = i2 * n;
      for (let j = r0; j <= ihi; j++) a[row + j] -= f * v[j];
    }
    let i2 = r0;
    for (; i2 + 1 <= ihi; i2 += 2) {
      // two rows per pass share the loads of w and v
      const vi = v[i2];
      const vi1 = v[i2 + 1];
      const f = tau * y[i2] - tau2gamma * vi;
      const f1 = tau * y[i2 + 1] - tau2gamma * vi1;
      const row = i2 * n;
      const row1 = row + n;
      for (let j = r0; j <= ihi; j++) {
        const wj = w[j];
        const vj = v[j];
        a[row + j] -= vi * wj + f * vj;
        a[row1 + j] -= vi1 * wj + f1 * vj;
      }
      for (let j = ihi + 1; j < n; j++) {
        const wj = w[j];
        a[row + j] -= vi * wj;
        a[row1 + j] -= vi1 * wj;
      }
    }
    if (i2 <= ihi) {
      const vi = v[i2];
      const f = tau * y[i2] - tau2gamma * vi;
      const row = i2 * n;
      for (let j = r0; j <= ihi; j++) a[row + j] -= vi * w[j] + f * v[j];
      for (let j = ihi + 1; j < n; j++) a[row + j] -= vi * w[j];
    }
    if (reflectors) {
      taus[k] = tau;
      for (let j = r0; j <= ihi; j++) reflectors[k * n + j] = v[j];
    }
  }
  if (!q || !reflectors) return;
  // Q = H_ilo·…·H_last formed from the right end: Q ← H_k·Q acts on rows/columns k+1..ihi only
  q.fill(0);
  for (let i = 0; i < n; i++) q[i * n + i] = 1;
  for (let k = ihi - 2; k >= ilo; k--) {
    const tau = taus[k];
    if (tau === 0) continue;
    const r0 = k + 1;
    const vk = k * n;
    for (let j = r0; j <= ihi; j++) w[j] = 0;
    let i = r0;
    for (; i + 1 <= ihi; i += 2) {
      // two rows per pass halve the loads and stores of w
      const vi = reflectors[vk + i];
      const vi1 = reflectors[vk + i + 1];
      const row = i * n;
      const row1 = row + n;
      for (let j = r0; j <= ihi; j++) w[j] += vi * q[row + j] + vi1 * q[row1 + j];
    }
    if (i <= ihi) {
      const vi = reflectors[vk + i];
      const row = i * n;
      for (let j = r0; j <= ihi; j++) w[j] += vi * q[row + j];
    }
    for (i = r0; i + 1 <= ihi; i += 2) {
      const f = tau * reflectors[vk + i];
      const f1 = tau * reflectors[vk + i + 1];
      const row = i * n;
      const row1 = row + n;
      for (let j = r0; j <= ihi; j++) {
        const wj = w[j];
        q[row + j] -= f * wj;
        q[row1 + j] -= f1 * wj;
      }
    }
    if (i <= ihi) {
      const f = tau * reflectors[vk + i];
      const row = i * n;
      for (let j = r0; j <= ihi; j++) q[row + j] -= f * w[j];
    }
  }
}

// Workspace shared by every call of the (synchronous, non-re-entrant) kernel above; grown on
// demand, never handed out.
let sharedWorkspace = new Float64Array(0);
function workspace(size: number): Float64Array {
  if (sharedWorkspace.length < size) sharedWorkspace = new Float64Array(Math.max(size, 2 * sharedWorkspace.length));
  return sharedWorkspace;
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
 * backward from the stored reflectors (G&VL §5.1.6). No balancing is done, so the identity
 * holds for A itself.
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
