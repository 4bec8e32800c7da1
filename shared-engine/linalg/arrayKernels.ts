/**
 * Dense product kernels on plain JavaScript number arrays (row-major), for routines that keep
 * their whole workspace in such arrays (expm; denseKernels' large products copy into them). The
 * LU solve on such arrays is in arraySolve.ts. Internal to linalg/.
 *
 * Why plain arrays: V8 keeps a `number[]` whose elements are all doubles as one unboxed double
 * store (PACKED_DOUBLE_ELEMENTS) and reads it with a map check and a bounds check. A typed-array
 * read additionally guards against a detached buffer, and once any ArrayBuffer in the isolate
 * has been detached (e.g. transferred to a worker) V8 re-checks that on every access inside
 * loops: typed-array kernels lose about 18%. The `tsx` runner behind `npm run bench` puts Node
 * in that state at start-up (measured: loading its register hook, or detaching one buffer, costs
 * the same 18%). Measured under those conditions (Node 20): the 3×3 tile below runs at
 * 5.3–5.4 GFlop/s at n = 50…200 on number[], against 4.0–4.2 for the same tile and 3.6–3.9 for
 * denseKernels' 2×4 tile on Float64Array; 4.6 against 2.7 at n = 10. With no buffer ever
 * detached the typed 2×4 tile reaches about 4.6.
 *
 * Every array passed here must hold only numbers and be created by `doubleArray` (or come from
 * one): an array that starts with small integers is stored differently (SMI elements), and
 * mixing the two kinds in one kernel makes its element loads polymorphic.
 */

/**
 * A zero-filled number[] of the given length stored as unboxed doubles (packed, no holes).
 * Allocation costs about 15 ns per element (far more than a typed array), so callers cache
 * their arrays.
 */
export function doubleArray(length: number): number[] {
  // A double literal fixes the elements kind; doubling by concat stays packed.
  let out = [0.5, 0.5, 0.5, 0.5, 0.5, 0.5, 0.5, 0.5];
  while (out.length < length) out = out.concat(out);
  out.length = length;
  return out.fill(0);
}

/**
 * out (m×q) = a (m×p) · b (p×q) [+ c (m×q) when c is not null], all row-major number[]; each
 * entry is the k = 0…p−1 sum in order, then the addend, so the results are bit for bit those of
 * denseKernels' multiplyInto / multiplyAddInto. `out` may alias `c` but not `a` or `b`.
 *
 * Register tile: 3 rows × 3 columns of `out` in locals (9 accumulators, 3 values of a and one
 * of b live: it fits V8's 15 allocatable double registers without spills, which 2×4 plus its
 * loads does not always); remainder columns as 3×2 or 3×1, remainder rows as 2×4 or 1×4.
 */
export function productIntoArray(a: number[], b: number[], c: number[] | null, m: number, p: number, q: number, out: number[]): number[] {
  const m3 = m - (m % 3), q3 = q - (q % 3);
  for (let i = 0; i < m3; i += 3) {
    const i0 = i * p, i1 = i0 + p, i2 = i1 + p;
    const o0 = i * q, o1 = o0 + q, o2 = o1 + q;
    for (let j = 0; j < q3; j += 3) {
      let c00 = 0, c01 = 0, c02 = 0, c10 = 0, c11 = 0, c12 = 0, c20 = 0, c21 = 0, c22 = 0;
      for (let k = 0, kb = j; k < p; k = (k + 1) | 0, kb = (kb + q) | 0) {
        const a0 = a[(i0 + k) | 0]!, a1 = a[(i1 + k) | 0]!, a2 = a[(i2 + k) | 0]!;
        let x = b[kb]!; c00 += a0 * x; c10 += a1 * x; c20 += a2 * x;
        x = b[(kb + 1) | 0]!; c01 += a0 * x; c11 += a1 * x; c21 += a2 * x;
        x = b[(kb + 2) | 0]!; c02 += a0 * x; c12 += a1 * x; c22 += a2 * x;
      }
      if (c !== null) {
        c00 += c[o0 + j]!; c01 += c[o0 + j + 1]!; c02 += c[o0 + j + 2]!;
        c10 += c[o1 + j]!; c11 += c[o1 + j + 1]!; c12 += c[o1 + j + 2]!;
        c20 += c[o2 + j]!; c21 += c[o2 + j + 1]!; c22 += c[o2 + j + 2]!;
      }
      out[o0 + j] = c00; out[o0 + j + 1] = c01; out[o0 + j + 2] = c02;
      out[o1 + j] = c10; out[o1 + j + 1] = c11; out[o1 + j + 2] = c12;
      out[o2 + j] = c20; out[o2 + j + 1] = c21; out[o2 + j + 2] = c22;
    }
    if (q - q3 === 2) {
      // two columns left: a 3×2 tile
      const j = q3;
      let c00 = 0, c01 = 0, c10 = 0, c11 = 0, c20 = 0, c21 = 0;
      for (let k = 0, kb = j; k < p; k = (k + 1) | 0, kb = (kb + q) | 0) {
        const a0 = a[(i0 + k) | 0]!, a1 = a[(i1 + k) | 0]!, a2 = a[(i2 + k) | 0]!;
        let x = b[kb]!; c00 += a0 * x; c10 += a1 * x; c20 += a2 * x;
        x = b[(kb + 1) | 0]!; c01 += a0 * x; c11 += a1 * x; c21 += a2 * x;
      }
      if (c !== null) {
        c00 += c[o0 + j]!; c01 += c[o0 + j + 1]!; c10 += c[o1 + j]!; c11 += c[o1 + j + 1]!; c20 += c[o2 + j]!; c21 += c[o2 + j + 1]!;
      }
      out[o0 + j] = c00; out[o0 + j + 1] = c01; out[o1 + j] = c10; out[o1 + j + 1] = c11; out[o2 + j] = c20; out[o2 + j + 1] = c21;
    } else if (q - q3 === 1) {
      const j = q3;
      let c0 = 0, c1 = 0, c2 = 0;
      for (let k = 0, kb = j; k < p; k = (k + 1) | 0, kb = (kb + q) | 0) {
        const x = b[kb]!;
        c0 += a[(i0 + k) | 0]! * x; c1 += a[(i1 + k) | 0]! * x; c2 += a[(i2 + k) | 0]! * x;
      }
      if (c !== null) { c0 += c[o0 + j]!; c1 += c[o1 + j]!; c2 += c[o2 + j]!; }
      out[o0 + j] = c0; out[o1 + j] = c1; out[o2 + j] = c2;
    }
  }
  if (m - m3 === 2) productTwoRows(a, b, c, m3, p, q, out);
  else if (m - m3 === 1) productOneRow(a, b, c, m3, p, q, out);
  return out;
}

// Rows i, i+1 of the product (2×4 tiles, then single columns).
function productTwoRows(a: number[], b: number[], c: number[] | null, i: number, p: number, q: number, out: number[]): void {
  const q4 = q - (q % 4);
  const i0 = i * p, i1 = i0 + p, o0 = i * q, o1 = o0 + q;
  for (let j = 0; j < q4; j += 4) {
    let c00 = 0, c01 = 0, c02 = 0, c03 = 0, c10 = 0, c11 = 0, c12 = 0, c13 = 0;
    for (let k = 0, kb = j; k < p; k = (k + 1) | 0, kb = (kb + q) | 0) {
      const a0 = a[(i0 + k) | 0]!, a1 = a[(i1 + k) | 0]!;
      let x = b[kb]!; c00 += a0 * x; c10 += a1 * x;
      x = b[(kb + 1) | 0]!; c01 += a0 * x; c11 += a1 * x;
      x = b[(kb + 2) | 0]!; c02 += a0 * x; c12 += a1 * x;
      x = b[(kb + 3) | 0]!; c03 += a0 * x; c13 += a1 * x;
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
    for (let k = 0, kb = j; k < p; k = (k + 1) | 0, kb = (kb + q) | 0) { const x = b[kb]!; c0 += a[(i0 + k) | 0]! * x; c1 += a[(i1 + k) | 0]! * x; }
    if (c !== null) { c0 += c[o0 + j]!; c1 += c[o1 + j]!; }
    out[o0 + j] = c0; out[o1 + j] = c1;
  }
}

// Row i of the product (1×4 tiles, then single entries).
function productOneRow(a: number[], b: number[], c: number[] | null, i: number, p: number, q: number, out: number[]): void {
  const q4 = q - (q % 4);
  const i0 = i * p, o0 = i * q;
  for (let j = 0; j < q4; j += 4) {
    let c0 = 0, c1 = 0, c2 = 0, c3 = 0;
    for (let k = 0, kb = j; k < p; k = (k + 1) | 0, kb = (kb + q) | 0) {
      const x = a[(i0 + k) | 0]!;
      c0 += x * b[kb]!; c1 += x * b[(kb + 1) | 0]!; c2 += x * b[(kb + 2) | 0]!; c3 += x * b[(kb + 3) | 0]!;
    }
    if (c !== null) { c0 += c[o0 + j]!; c1 += c[o0 + j + 1]!; c2 += c[o0 + j + 2]!; c3 += c[o0 + j + 3]!; }
    out[o0 + j] = c0; out[o0 + j + 1] = c1; out[o0 + j + 2] = c2; out[o0 + j + 3] = c3;
  }
  for (let j = q4; j < q; j++) {
    let s = 0;
    for (let k = 0, kb = j; k < p; k = (k + 1) | 0, kb = (kb + q) | 0) s += a[(i0 + k) | 0]! * b[kb]!;
    out[o0 + j] = c !== null ? s + c[o0 + j]! : s;
  }
}

let columnSums = doubleArray(0);

/** The column sums of |a| from the last oneNormArray call (valid until the next call). */
export function lastColumnSums(): readonly number[] {
  return columnSums;
}

/** ‖a‖₁ (maximum absolute column sum) of a row-major n×n number[]; NaN propagates. */
export function oneNormArray(a: number[], n: number): number {
  if (columnSums.length < n) columnSums = doubleArray(n);
  const sums = columnSums;
  for (let j = 0; j < n; j++) sums[j] = 0;
  for (let i = 0; i < n; i++) {
    const io = i * n;
    for (let j = 0; j < n; j++) sums[j] += Math.abs(a[io + j]!);
  }
  let best = 0;
  for (let j = 0; j < n; j++) if (sums[j]! > best || Number.isNaN(sums[j]!)) best = sums[j]!;
  return best;
}
