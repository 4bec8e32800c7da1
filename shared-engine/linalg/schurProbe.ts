/**
 * Entry and exit checks of the Schur kernels: the finite row-major copy of the input and the
 * a-posteriori probe-vector check of A = Q T Qᵀ.
 */
import { Matrix } from "ml-matrix";
import { EngineError } from "../errors";
import { copyRowMajorInto } from "./denseKernels";
import { requireFinite } from "./validate";

const SAFE_MIN = 2.2250738585072014e-308; // dlamch('S'): smallest normal number

/**
 * Cheap a-posteriori check (O(n²)): with a fixed probe vector x, compares A·(Q·x) with
 * Q·(T·x) and Qᵀ·(Q·x) with x. Throws "internal" when either relative residual exceeds
 * `tolerance`; a failure means a bug, since the algorithm is backward stable. With
 * `qIsTransposed` the array `q` holds Qᵀ (row-major), as the Schur kernels keep it.
 */
export function checkSchurProbe(a: Float64Array, t: Float64Array, q: Float64Array, n: number, tolerance: number, what: string, qIsTransposed = false): void {
  if (probeWork.length < 5 * n) probeWork = new Float64Array(5 * n);
  const w = probeWork; // five probe vectors at offsets 0, n, 2n, 3n, 4n
  const x = 0, tx = n, qx = 2 * n, qtx = 3 * n, aqx = 4 * n;
  for (let i = 0; i < n; i++) w[x + i] = 1 + ((i * 7919) % 13) / 13; // deterministic, no cancellation pattern
  // T·x over the quasi-triangle only (row i starts at column i − 1)
  for (let i = 0; i < n; i++) {
    const row = i * n;
    let sum = 0;
    for (let j = i > 0 ? i - 1 : 0; j < n; j++) sum += t[row + j] * w[x + j];
    w[tx + i] = sum;
  }
  // Q·x and Q·(T·x) in one pass over Q
  if (qIsTransposed) transposedMatVec2(q, n, w, x, qx, tx, qtx);
  else {
    matVec(q, n, w, x, qx);
    matVec(q, n, w, tx, qtx);
  }
  matVec(a, n, w, qx, aqx);
  let a0 = 0, a1 = 0, a2 = 0, a3 = 0;
  const nn = n * n, nn4 = nn - (nn % 4);
  for (let i = 0; i < nn4; i += 4) {
    a0 += a[i] * a[i];
    a1 += a[i + 1] * a[i + 1];
    a2 += a[i + 2] * a[i + 2];
    a3 += a[i + 3] * a[i + 3];
  }
  for (let i = nn4; i < nn; i++) a0 += a[i] * a[i];
  let normA = Math.sqrt(a0 + a1 + a2 + a3);
  let normX = 0;
  let res = 0;
  for (let i = 0; i < n; i++) {
    normX += w[x + i] * w[x + i];
    res += (w[aqx + i] - w[qtx + i]) ** 2;
  }
  // Entries beyond ~1e154 (or below ~1e-154) overflow (underflow) the plain sums of squares:
  // redo both with the entries scaled by the largest |a_ij|, as a scaled 2-norm does.
  if (!(normA < 1e150 && normA > 1e-150) || !Number.isFinite(res)) {
    let big = 0;
    for (let i = 0; i < nn; i++) big = Math.max(big, Math.abs(a[i]));
    if (big > 0 && Number.isFinite(big)) {
      let sa = 0, sr = 0;
      for (let i = 0; i < nn; i++) sa += (a[i] / big) ** 2;
      for (let i = 0; i < n; i++) sr += ((w[aqx + i] - w[qtx + i]) / big) ** 2;
      normA = Math.sqrt(sa); // both in units of `big`: the ratio below is unchanged
      res = sr;
    }
  }
  // Qᵀ·(Q·x) into the slot of T·x (no longer needed)
  if (qIsTransposed) matVec(q, n, w, qx, tx);
  else transposedMatVec(q, n, w, qx, tx);
  let orth = 0;
  for (let j = 0; j < n; j++) orth += (w[tx + j] - w[x + j]) ** 2;
  normX = Math.sqrt(normX);
  const relRes = Math.sqrt(res) / (Math.max(normA, SAFE_MIN) * normX);
  const relOrth = Math.sqrt(orth) / normX;
  if (!(relRes <= tolerance) || !(relOrth <= tolerance)) {
    throw new EngineError("internal", `${what}: a-posteriori check failed (relative residual ${relRes}, orthogonality ${relOrth})`, {
      residual: relRes,
      orthogonality: relOrth,
      tolerance,
    });
  }
}

/** w[out1..) = Mᵀ·w[src1..) and w[out2..) = Mᵀ·w[src2..) (n-vectors) in one pass over the row-major n×n M. */
function transposedMatVec2(m: Float64Array, n: number, w: Float64Array, src1: number, out1: number, src2: number, out2: number): void {
  for (let j = 0; j < n; j++) {
    w[out1 + j] = 0;
    w[out2 + j] = 0;
  }
  let i = 0;
  for (; i + 1 < n; i += 2) {
    const x0 = w[src1 + i], x1 = w[src1 + i + 1], y0 = w[src2 + i], y1 = w[src2 + i + 1];
    const p0 = i * n, p1 = p0 + n;
    for (let j = 0; j < n; j++) {
      const m0 = m[p0 + j], m1 = m[p1 + j];
      w[out1 + j] += m0 * x0 + m1 * x1;
      w[out2 + j] += m0 * y0 + m1 * y1;
    }
  }
  if (i < n) {
    const x0 = w[src1 + i], y0 = w[src2 + i];
    const p0 = i * n;
    for (let j = 0; j < n; j++) {
      w[out1 + j] += m[p0 + j] * x0;
      w[out2 + j] += m[p0 + j] * y0;
    }
  }
}

let probeWork = new Float64Array(0); // workspace of checkSchurProbe (synchronous, not re-entrant)

/** w[out..out+n) = M·w[src..src+n) for a row-major n×n M (four rows at a time: four independent sums). */
function matVec(m: Float64Array, n: number, w: Float64Array, src: number, out: number): void {
  let i = 0;
  for (; i + 3 < n; i += 4) {
    const p0 = i * n, p1 = p0 + n, p2 = p1 + n, p3 = p2 + n;
    let s0 = 0, s1 = 0, s2 = 0, s3 = 0;
    for (let j = 0; j < n; j++) {
      const xj = w[src + j];
      s0 += m[p0 + j] * xj;
      s1 += m[p1 + j] * xj;
      s2 += m[p2 + j] * xj;
      s3 += m[p3 + j] * xj;
    }
    w[out + i] = s0;
    w[out + i + 1] = s1;
    w[out + i + 2] = s2;
    w[out + i + 3] = s3;
  }
  for (; i < n; i++) {
    let s = 0;
    const row = i * n;
    for (let j = 0; j < n; j++) s += m[row + j] * w[src + j];
    w[out + i] = s;
  }
}

/** w[out..out+n) = Mᵀ·w[src..src+n) for a row-major n×n M (rows combined four at a time, contiguous). */
function transposedMatVec(m: Float64Array, n: number, w: Float64Array, src: number, out: number): void {
  for (let j = 0; j < n; j++) w[out + j] = 0;
  let i = 0;
  for (; i + 3 < n; i += 4) {
    const x0 = w[src + i], x1 = w[src + i + 1], x2 = w[src + i + 2], x3 = w[src + i + 3];
    const p0 = i * n, p1 = p0 + n, p2 = p1 + n, p3 = p2 + n;
    for (let j = 0; j < n; j++) w[out + j] += m[p0 + j] * x0 + m[p1 + j] * x1 + m[p2 + j] * x2 + m[p3 + j] * x3;
  }
  for (; i < n; i++) {
    const xi = w[src + i];
    const row = i * n;
    for (let j = 0; j < n; j++) w[out + j] += m[row + j] * xi;
  }
}

/**
 * Row-major copy of M (into the first rows·columns entries of `out` when given, else a new
 * array), checked finite on the way (x·0 is 0 for finite x and NaN otherwise, so one running
 * sum detects any Inf or NaN). Reads ml-matrix's row arrays directly when they are present
 * (a plain loop: `set` per row and `get` per entry cost more than the copy at n ≤ 20), else
 * `copyRowMajorInto`. On a non-finite entry, `requireFinite` locates and reports it.
 */
export function finiteRowMajorOf(M: Matrix, name: string, out?: Float64Array): Float64Array {
  const rows = M.rows, cols = M.columns;
  const a = out ?? new Float64Array(rows * cols);
  const data = (M as unknown as { data?: unknown }).data;
  let direct = Array.isArray(data) && data.length === rows;
  let probe = 0;
  for (let i = 0; direct && i < rows; i++) {
    const row = (data as unknown[])[i];
    if (!(row instanceof Float64Array) || row.length !== cols) {
      direct = false;
      break;
    }
    for (let j = 0, o = i * cols; j < cols; j++) {
      const x = row[j];
      a[o + j] = x;
      probe += x * 0;
    }
  }
  if (!direct) {
    copyRowMajorInto(M, a);
    probe = 0;
    for (let i = 0; i < rows * cols; i++) probe += a[i] * 0;
  }
  if (probe !== 0) requireFinite(M, name);
  return a;
}
