/**
 * Row-major Float64Array helpers specific to the Riccati solvers (Cholesky, triangular
 * substitution, symmetry, scaling), beside the general dense kernels re-exported from linalg.
 */

// The general dense kernels are linalg's (one implementation for the whole engine).
export { multiply, transpose, oneNormRowMajor, solveInPlace } from "../linalg/kernels";

/**
 * Cholesky factor L (lower, row-major) of a symmetric n×n array with L·Lᵀ = S, or null when a
 * pivot is ≤ `floor` (S not positive definite to that tolerance). Golub & Van Loan, 4th ed.,
 * Alg. 4.2.2 (outer-product form, row-oriented).
 */
export function cholesky(s: Float64Array, n: number, floor: number): Float64Array | null {
  const l = new Float64Array(n * n);
  for (let j = 0; j < n; j++) {
    let d = s[j * n + j]!;
    const jo = j * n;
    for (let k = 0; k < j; k++) d -= l[jo + k]! * l[jo + k]!;
    if (!(d > floor)) return null;
    const ljj = Math.sqrt(d);
    l[jo + j] = ljj;
    for (let i = j + 1; i < n; i++) {
      const io = i * n;
      let v = s[io + j]!;
      for (let k = 0; k < j; k++) v -= l[io + k]! * l[jo + k]!;
      l[io + j] = v / ljj;
    }
  }
  return l;
}

/** Solves L·Y = Rhs in place (Rhs: n×q row-major, L lower triangular n×n). */
export function forwardSubstitute(l: Float64Array, n: number, rhs: Float64Array, q: number): void {
  for (let i = 0; i < n; i++) {
    const io = i * q;
    for (let k = 0; k < i; k++) {
      const f = l[i * n + k]!;
      if (f === 0) continue;
      const ko = k * q;
      for (let j = 0; j < q; j++) rhs[io + j] -= f * rhs[ko + j]!;
    }
    const d = l[i * n + i]!;
    for (let j = 0; j < q; j++) rhs[io + j] /= d;
  }
}

/** Frobenius norm of a Float64Array with max-abs scaling (no overflow for entries near 1e±200). */
export function frobeniusOf(a: Float64Array): number {
  let scale = 0;
  for (let i = 0; i < a.length; i++) scale = Math.max(scale, Math.abs(a[i]!));
  if (scale === 0 || !Number.isFinite(scale)) return scale;
  let s = 0;
  for (let i = 0; i < a.length; i++) {
    const v = a[i]! / scale;
    s += v * v;
  }
  return scale * Math.sqrt(s);
}

/** ‖S − Sᵀ‖_F / ‖S‖_F for a square array (0 for S = 0). */
export function asymmetryOf(s: Float64Array, n: number): number {
  let d = 0;
  for (let i = 0; i < n; i++) for (let j = i + 1; j < n; j++) { const v = s[i * n + j]! - s[j * n + i]!; d += 2 * v * v; }
  const f = frobeniusOf(s);
  return f === 0 ? 0 : Math.sqrt(d) / f;
}

/** (S + Sᵀ)/2 in place. */
export function symmetrizeInPlace(s: Float64Array, n: number): void {
  for (let i = 0; i < n; i++) for (let j = i + 1; j < n; j++) {
    const v = 0.5 * (s[i * n + j]! + s[j * n + i]!);
    s[i * n + j] = v;
    s[j * n + i] = v;
  }
}

/** Nearest power of two to v > 0 (scalings by it are exact in binary floating point). */
export function powerOfTwoNear(v: number): number {
  if (!(v > 0) || !Number.isFinite(v)) return 1;
  return 2 ** Math.round(Math.log2(v));
}
