/**
 * The small pieces shared by the quasi-triangular Sylvester and Lyapunov kernels (sylvester.ts,
 * sylvesterSymmetric.ts): the complete-pivoting solver of their ≤ 4×4 block systems and the
 * "singular" error naming the offending eigenvalues. Internal to linalg/.
 */
import { EngineError } from "../errors";
import type { Complex } from "./complex";

/** Which quasi-triangular equation the kernel solves. */
export type QuasiTriangularEquation = "sylvester" | "stein";

/** Labels used in the "singular" error message of the kernel. */
export interface SingularLabels {
  equation: string; // e.g. "A X + X B = C"
  first: string; // owner of S's eigenvalues, e.g. "A"
  second: string; // owner of T's eigenvalues, e.g. "B"
}

/**
 * Eigenvalues of the 1×1 or 2×2 diagonal block at i0 (size p) into out[o..o+3] as
 * (re₁, im₁, re₂, im₂); a 1×1 block repeats its eigenvalue. For a standardised complex block
 * [a b; c a] (b·c < 0) this is a ± i·sqrt(−bc), as `eigenvaluesOfQuasiTriangular` reads it.
 */
function blockEigenvaluesInto(t: Float64Array, n: number, i0: number, p: number, out: Float64Array, o: number): void {
  if (p === 1) {
    const v = t[i0 * n + i0];
    out[o] = v; out[o + 1] = 0; out[o + 2] = v; out[o + 3] = 0;
    return;
  }
  const a = t[i0 * n + i0], b = t[i0 * n + i0 + 1], c = t[(i0 + 1) * n + i0], d = t[(i0 + 1) * n + i0 + 1];
  const half = 0.5 * (a + d);
  const disc = 0.25 * (a - d) * (a - d) + b * c;
  if (disc >= 0) {
    const r = Math.sqrt(disc);
    out[o] = half + r; out[o + 1] = 0; out[o + 2] = half - r; out[o + 3] = 0;
  } else {
    const im = Math.sqrt(-disc);
    out[o] = half; out[o + 1] = im; out[o + 2] = half; out[o + 3] = -im;
  }
}

/** |x + iy| without Math.hypot's cost when the squares are safely in range. */
function modulus(x: number, y: number): number {
  if (y === 0) return Math.abs(x);
  const sum = x * x + y * y;
  if (sum > 1e-290 && sum < 1e290) return Math.sqrt(sum);
  return Math.hypot(x, y);
}

/** |λ + μ| ("sylvester") or |λμ − 1| ("stein") for λ = lr + i·li, μ = ur + i·ui. */
function relationGap(kind: QuasiTriangularEquation, lr: number, li: number, ur: number, ui: number): number {
  return kind === "sylvester" ? modulus(lr + ur, li + ui) : modulus(lr * ur - li * ui - 1, lr * ui + li * ur);
}

// Eigenvalues of the two blocks of a pair (S block in 0..3, T block in 4..7); synchronous use only.
const pairEigenvalues = new Float64Array(8);

/**
 * The separation the kernels compare with their threshold for the block pair (S block at i0 of
 * size p, T block at j0 of size q): min over the eigenvalues λ of the S block and μ of the T
 * block of |λ + μ| ("sylvester") or |λμ − 1| ("stein"), the numbers the "singular" error
 * reports. For two 1×1 blocks it is |s_ii + t_jj| (|s_ii·t_jj − 1|), the pivot itself.
 */
export function blockPairGap(
  kind: QuasiTriangularEquation, s: Float64Array, n: number, i0: number, p: number,
  t: Float64Array, m: number, j0: number, q: number,
): number {
  if (p === 1 && q === 1) {
    const sv = s[i0 * n + i0], tv = t[j0 * m + j0];
    return Math.abs(kind === "sylvester" ? sv + tv : sv * tv - 1);
  }
  const e = pairEigenvalues;
  blockEigenvaluesInto(s, n, i0, p, e, 0);
  blockEigenvaluesInto(t, m, j0, q, e, 4);
  let gap = Infinity;
  for (let a = 0; a < 4; a += 2) for (let b = 4; b < 8; b += 2) {
    const g = relationGap(kind, e[a], e[a + 1], e[b], e[b + 1]);
    if (g < gap) gap = g;
  }
  return gap;
}

/**
 * Per-block eigenvalue data of an upper quasi-triangular n×n row-major matrix, at each block
 * start i0: re[i0] the real part, im[i0] = |imaginary part| (0 for a 1×1 block), or im[i0] = −1
 * for a 2×2 block with real eigenvalues (not produced by a standardised Schur form; the
 * kernels then use `blockPairGap`). O(n); lets the kernels test a pair with one square root.
 */
export function blockSpectrumInto(t: Float64Array, n: number, re: Float64Array, im: Float64Array): void {
  for (let i = 0; i < n; ) {
    if (i + 1 < n && t[(i + 1) * n + i] !== 0) {
      blockEigenvaluesInto(t, n, i, 2, pairEigenvalues, 0);
      re[i] = pairEigenvalues[0];
      im[i] = pairEigenvalues[1] === 0 ? -1 : pairEigenvalues[1];
      i += 2;
    } else {
      re[i] = t[i * n + i];
      im[i] = 0;
      i += 1;
    }
  }
}

/**
 * `blockPairGap` from `blockSpectrumInto` data: λ = sr ± i·si, μ = tr ± i·ti with si, ti ≥ 0 (the
 * caller handles the −1 marker). The same expressions as the "singular" error's, so the
 * reported gap is the compared one: |λ + μ| is least with opposite imaginary signs; |λμ − 1|
 * takes the smaller of the two sign combinations (conjugating both changes neither modulus).
 */
export function pairSeparation(kind: QuasiTriangularEquation, sr: number, si: number, tr: number, ti: number): number {
  if (kind === "sylvester") return relationGap(kind, sr, si, tr, -ti);
  return Math.min(relationGap(kind, sr, si, tr, ti), relationGap(kind, sr, si, tr, -ti));
}

/**
 * Whether the pair (λ = sr ± i·si, μ = tr ± i·ti; si, ti ≥ 0) is certainly separated by more than
 * `threshold`: squared moduli above 4·threshold², no square root. When false the caller
 * compares `pairSeparation` itself (so a refusal always reports the compared number). Only used
 * for threshold ≥ 1e-140, where threshold² is a normal number.
 */
export function clearlySeparated(kind: QuasiTriangularEquation, sr: number, si: number, tr: number, ti: number, threshold: number): boolean {
  const bound = 4 * threshold * threshold;
  if (kind === "sylvester") {
    const x = sr + tr, y = si - ti;
    return x * x + y * y > bound;
  }
  const p = sr * tr, q = si * ti, u = sr * ti, v = si * tr;
  const x1 = p - q - 1, y1 = u + v, x2 = p + q - 1, y2 = v - u;
  return x1 * x1 + y1 * y1 > bound && x2 * x2 + y2 * y2 > bound;
}

/**
 * Spectral radius max |λᵢ| of an upper quasi-triangular n×n row-major matrix (a real Schur
 * form), read off its 1×1 and 2×2 diagonal blocks (|λ|² = det for a complex pair). O(n).
 */
export function spectralRadiusOfQuasiTriangular(t: Float64Array, n: number): number {
  let rho = 0;
  for (let i = 0; i < n; ) {
    if (i + 1 < n && t[(i + 1) * n + i] !== 0) {
      blockEigenvaluesInto(t, n, i, 2, pairEigenvalues, 0);
      const e = pairEigenvalues;
      rho = Math.max(rho, modulus(e[0], e[1]), modulus(e[2], e[3]));
      i += 2;
    } else {
      rho = Math.max(rho, Math.abs(t[i * n + i]));
      i += 1;
    }
  }
  return rho;
}

// Scratch of solveByCompletePivoting (at most 4×4): the kernels are synchronous and not
// re-entrant, so module-level buffers avoid an allocation per block (n²/4…n² blocks per solve).
const permutationScratch = new Int32Array(4);
const solutionScratch = new Float64Array(4);

/**
 * Solves the N×N system M z = r (N ≤ 4; M row-major in the first N² entries, destroyed) in place
 * in r by Gaussian elimination with complete pivoting (as LAPACK dlasy2 does for the small
 * Sylvester blocks). Returns the smallest pivot magnitude; when a pivot is ≤ `threshold` it
 * stops there and returns that pivot (r is then not a solution).
 */
export function solveByCompletePivoting(M: Float64Array, N: number, r: Float64Array, threshold: number): number {
  const perm = permutationScratch; // column permutation
  for (let k = 0; k < N; k++) perm[k] = k;
  let minPivot = Infinity;
  for (let k = 0; k < N; k++) {
    // largest remaining entry (row bi, column bj)
    let bi = k, bj = k, best = -1;
    for (let i = k; i < N; i++) {
      const row = i * N;
      for (let j = k; j < N; j++) {
        const v = Math.abs(M[row + j]);
        if (v > best) { best = v; bi = i; bj = j; }
      }
    }
    if (best < minPivot) minPivot = best;
    if (!(best > threshold)) return best;
    const rk = k * N;
    if (bi !== k) {
      const rb = bi * N;
      for (let j = 0; j < N; j++) { const x = M[rk + j]; M[rk + j] = M[rb + j]; M[rb + j] = x; }
      const x = r[k]; r[k] = r[bi]; r[bi] = x;
    }
    if (bj !== k) {
      for (let i = 0, row = 0; i < N; i++, row += N) { const x = M[row + k]; M[row + k] = M[row + bj]; M[row + bj] = x; }
      const x = perm[k]; perm[k] = perm[bj]; perm[bj] = x;
    }
    const pivot = M[rk + k];
    const rk0 = r[k];
    for (let i = k + 1, row = (k + 1) * N; i < N; i++, row += N) {
      const l = M[row + k] / pivot;
      for (let j = k + 1; j < N; j++) M[row + j] -= l * M[rk + j];
      r[i] -= l * rk0;
    }
  }
  const z = solutionScratch;
  for (let i = N - 1, row = (N - 1) * N; i >= 0; i--, row -= N) {
    let v = r[i];
    for (let j = i + 1; j < N; j++) v -= M[row + j] * z[j];
    z[i] = v / M[row + i];
  }
  for (let k = 0; k < N; k++) r[perm[k]] = z[k];
  return minPivot;
}

/**
 * Throws the "singular" error of the quasi-triangular kernels for the block equation at row
 * block (i0, p) of S and column block (j0, q) of T, naming the pair of eigenvalues closest to
 * the singular relation and the gap |λ + μ| (|λμ − 1|) that was compared with `threshold`
 * (`blockPairGap`). With `zeroPivot` the gap passed the test but the (balanced) block system
 * still had a zero pivot in floating point (only at the ends of the exponent range).
 */
export function throwSingular(
  kind: QuasiTriangularEquation, s: Float64Array, n: number, i0: number, p: number,
  t: Float64Array, m: number, j0: number, q: number, threshold: number, labels: SingularLabels,
  zeroPivot = false,
): never {
  const e = new Float64Array(8);
  blockEigenvaluesInto(s, n, i0, p, e, 0);
  blockEigenvaluesInto(t, m, j0, q, e, 4);
  let best = { l: { re: e[0], im: e[1] } as Complex, u: { re: e[4], im: e[5] } as Complex, gap: Infinity };
  for (let a = 0; a < 4; a += 2) for (let b = 4; b < 8; b += 2) {
    const gap = relationGap(kind, e[a], e[a + 1], e[b], e[b + 1]);
    if (gap < best.gap) best = { l: { re: e[a], im: e[a + 1] }, u: { re: e[b], im: e[b + 1] }, gap };
  }
  const fmt = (z: Complex) => (z.im === 0 ? `${z.re.toPrecision(6)}` : `${z.re.toPrecision(6)}${z.im >= 0 ? "+" : "−"}${Math.abs(z.im).toPrecision(6)}i`);
  const relation = kind === "sylvester" ? "λ + μ ≈ 0" : "λ·μ ≈ 1";
  const gapName = kind === "sylvester" ? "λ + μ" : "λμ − 1";
  const pair = `eigenvalue λ = ${fmt(best.l)} of ${labels.first} and μ = ${fmt(best.u)} of ${labels.second}`;
  const message = zeroPivot
    ? `${labels.equation} is numerically singular: the block system of ${pair} has a zero pivot in floating point (|${gapName}| = ${best.gap.toExponential(2)})`
    : `${labels.equation} is singular: ${pair} satisfy ${relation} (|${gapName}| = ${best.gap.toExponential(2)}, threshold ${threshold.toExponential(2)})`;
  throw new EngineError(
    "singular",
    message,
    { eigenvalueFirst: best.l, eigenvalueSecond: best.u, gap: best.gap, threshold },
  );
}
