/**
 * Row-major Float64Array kernels for the Riccati solvers (linalg keeps its own kernels
 * internal). Plain loops ordered for contiguous access; none calls Matrix.get/set.
 */
import { EngineError } from "../errors";

/** out (p×r) = a (p×q) · b (q×r); i-k-j order so the inner loop runs along rows. */
export function multiply(a: Float64Array, b: Float64Array, p: number, q: number, r: number): Float64Array {
  const out = new Float64Array(p * r);
  for (let i = 0; i < p; i++) {
    const io = i * r;
    const ia = i * q;
    for (let k = 0; k < q; k++) {
      const f = a[ia + k]!;
      if (f === 0) continue;
      const kb = k * r;
      for (let j = 0; j < r; j++) out[io + j] += f * b[kb + j]!;
    }
  }
  return out;
}

/** Transpose of a row-major p×q array (new q×p array). */
export function transpose(a: Float64Array, p: number, q: number): Float64Array {
  const out = new Float64Array(p * q);
  for (let i = 0; i < p; i++) for (let j = 0; j < q; j++) out[j * p + i] = a[i * q + j]!;
  return out;
}

/** Maximum absolute column sum of a row-major p×q array. */
export function oneNormRowMajor(a: Float64Array, p: number, q: number): number {
  const sums = new Float64Array(q);
  for (let i = 0; i < p; i++) for (let j = 0; j < q; j++) sums[j] += Math.abs(a[i * q + j]!);
  let best = 0;
  for (let j = 0; j < q; j++) best = Math.max(best, sums[j]!);
  return best;
}

/**
 * Solves M·X = Rhs in place (Rhs n×q becomes X; M n×n is destroyed) by LU with partial
 * pivoting (Golub & Van Loan, 4th ed., Alg. 3.4.1). Throws "singular" naming `what` when a
 * pivot is ≤ n·ε·‖M‖₁.
 */
export function solveInPlace(mat: Float64Array, rhs: Float64Array, n: number, q: number, what: string): void {
  const threshold = n * Number.EPSILON * oneNormRowMajor(mat, n, n);
  for (let k = 0; k < n; k++) {
    let p = k;
    let best = Math.abs(mat[k * n + k]!);
    for (let i = k + 1; i < n; i++) {
      const v = Math.abs(mat[i * n + k]!);
      if (v > best) { best = v; p = i; }
    }
    if (!(best > threshold)) {
      throw new EngineError("singular", `${what} is numerically singular (pivot ${best.toExponential(3)} at step ${k + 1} of ${n})`, {
        step: k, pivot: best, threshold,
      });
    }
    if (p !== k) {
      for (let j = 0; j < n; j++) { const t = mat[k * n + j]!; mat[k * n + j] = mat[p * n + j]!; mat[p * n + j] = t; }
      for (let j = 0; j < q; j++) { const t = rhs[k * q + j]!; rhs[k * q + j] = rhs[p * q + j]!; rhs[p * q + j] = t; }
    }
    const pivot = mat[k * n + k]!;
    for (let i = k + 1; i < n; i++) {
      const l = mat[i * n + k]! / pivot;
      if (l === 0) continue;
      for (let j = k + 1; j < n; j++) mat[i * n + j] -= l * mat[k * n + j]!;
      for (let j = 0; j < q; j++) rhs[i * q + j] -= l * rhs[k * q + j]!;
    }
  }
  for (let i = n - 1; i >= 0; i--) {
    const io = i * q;
    for (let k = i + 1; k < n; k++) {
      const u = mat[i * n + k]!;
      if (u === 0) continue;
      for (let j = 0; j < q; j++) rhs[io + j] -= u * rhs[k * q + j]!;
    }
    const d = mat[i * n + i]!;
    for (let j = 0; j < q; j++) rhs[io + j] /= d;
  }
}

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
