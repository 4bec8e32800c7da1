/**
 * Householder reflector kernels on row-major arrays: P = I − f·v·vᵀ applied from the left to
 * rows top..n−1 or from the right to columns top..n−1, with v zero above index top (the
 * entries of v below `top` are not read). Used by the staircase reductions (analysis/structure
 * and design/placePoles). No validation: callers pass consistent sizes.
 */

let rowSums = new Float64Array(0);

/**
 * x ← P·x on rows top..n−1 of a row-major n×w array, P = I − f·v·vᵀ. Cost 4·(n − top)·w flops,
 * two passes over the rows (row-major streaming: s = vᵀx accumulated row by row, then
 * x ← x − f·v·s).
 */
export function reflectRows(x: Float64Array, n: number, w: number, v: Float64Array, top: number, f: number): void {
  if (w === 0 || top >= n) return;
  if (rowSums.length < w) rowSums = new Float64Array(w);
  const s = rowSums;
  s.fill(0, 0, w);
  for (let i = top; i < n; i++) {
    const vi = v[i]!;
    if (vi === 0) continue;
    const row = i * w;
    for (let j = 0; j < w; j++) s[j] += vi * x[row + j]!;
  }
  for (let i = top; i < n; i++) {
    const vi = f * v[i]!;
    if (vi === 0) continue;
    const row = i * w;
    for (let j = 0; j < w; j++) x[row + j] -= vi * s[j]!;
  }
}

/** x ← x·P on columns top..n−1 of a row-major m×n array (m = x.length / n). Cost 4·m·(n − top) flops. */
export function reflectColumns(x: Float64Array, n: number, v: Float64Array, top: number, f: number): void {
  const m = n === 0 ? 0 : x.length / n;
  for (let i = 0; i < m; i++) {
    const row = i * n;
    let s = 0;
    for (let j = top; j < n; j++) s += x[row + j]! * v[j]!;
    if (s === 0) continue;
    s *= f;
    for (let j = top; j < n; j++) x[row + j] -= s * v[j]!;
  }
}
