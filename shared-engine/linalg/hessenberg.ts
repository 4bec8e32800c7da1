/**
 * Orthogonal reduction to upper Hessenberg form by Householder reflections: A = Q H Qᵀ.
 * The kernel works in place on a row-major Float64Array so that the Schur and eigenvalue
 * pipelines can reuse it without copying through ml-matrix.
 */
import { Matrix } from "ml-matrix";
import { EngineError } from "../errors";
import { fromFloat64, requireSquareFinite, toFloat64 } from "./validate";

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
 * Q is formed afterwards by backward accumulation (as LAPACK dorghr), which touches only the
 * shrinking trailing block. Cost: 10/3·m³ flops for the window size m, plus 4/3·m³ with `q`.
 * Memory: O(n), plus O(n·m) for the stored reflectors when `q` is given.
 */
export function reduceToHessenbergInPlace(a: Float64Array, n: number, ilo: number, ihi: number, q: Float64Array | null): void {
  const v = new Float64Array(n);
  const w = new Float64Array(n);
  // reflectors for the backward accumulation of Q: row k holds v_k (entries k+1..ihi)
  const reflectors = q ? new Float64Array(n * n) : null;
  const taus = new Float64Array(n);
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

    // Left: a[r0..ihi][k+1..n-1] -= τ v (vᵀ a), accumulated row by row for contiguous access.
    // (two rows per pass halve the loads and stores of w)
    for (let j = k + 1; j < n; j++) w[j] = 0;
    let i = r0;
    for (; i + 1 <= ihi; i += 2) {
      const vi = v[i];
      const vi1 = v[i + 1];
      const row = i * n;
      const row1 = row + n;
      for (let j = k + 1; j < n; j++) w[j] += vi * a[row + j] + vi1 * a[row1 + j];
    }
    if (i <= ihi) {
      const vi = v[i];
      const row = i * n;
      for (let j = k + 1; j < n; j++) w[j] += vi * a[row + j];
    }
    for (let i2 = r0; i2 <= ihi; i2++) {
      const f = tau * v[i2];
      if (f === 0) continue;
      const row = i2 * n;
      for (let j = k + 1; j < n; j++) a[row + j] -= f * w[j];
    }
    // Right: a[0..ihi][r0..ihi] -= τ (a v) vᵀ.
    for (let i = 0; i <= ihi; i++) {
      const row = i * n;
      let s = 0;
      for (let j = r0; j <= ihi; j++) s += a[row + j] * v[j];
      s *= tau;
      if (s === 0) continue;
      for (let j = r0; j <= ihi; j++) a[row + j] -= s * v[j];
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
    for (let i = r0; i <= ihi; i++) {
      const vi = reflectors[vk + i];
      const row = i * n;
      for (let j = r0; j <= ihi; j++) w[j] += vi * q[row + j];
    }
    for (let i = r0; i <= ihi; i++) {
      const f = tau * reflectors[vk + i];
      const row = i * n;
      for (let j = r0; j <= ihi; j++) q[row + j] -= f * w[j];
    }
  }
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
  const a = toFloat64(A);
  const q = identityFloat64(n);
  reduceToHessenbergInPlace(a, n, 0, n - 1, q);
  for (let i = 0; i < n * n; i++) {
    if (!Number.isFinite(a[i]) || !Number.isFinite(q[i])) {
      throw new EngineError("non-finite", "Hessenberg reduction of A overflowed (entries of A too large to square)", {
        argument: "A",
      });
    }
  }
  return { H: fromFloat64(a, n, n), Q: fromFloat64(q, n, n) };
}
