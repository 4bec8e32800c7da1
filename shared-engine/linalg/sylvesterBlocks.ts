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

/** Eigenvalues of the 1×1 or 2×2 diagonal block at i0 (size p). */
function blockEigenvalues(t: Float64Array, n: number, i0: number, p: number): Complex[] {
  if (p === 1) return [{ re: t[i0 * n + i0]!, im: 0 }];
  const a = t[i0 * n + i0]!, b = t[i0 * n + i0 + 1]!, c = t[(i0 + 1) * n + i0]!, d = t[(i0 + 1) * n + i0 + 1]!;
  const half = 0.5 * (a + d);
  const disc = 0.25 * (a - d) * (a - d) + b * c;
  if (disc >= 0) return [{ re: half + Math.sqrt(disc), im: 0 }, { re: half - Math.sqrt(disc), im: 0 }];
  const im = Math.sqrt(-disc);
  return [{ re: half, im }, { re: half, im: -im }];
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
 * the singular relation.
 */
export function throwSingular(
  kind: QuasiTriangularEquation, s: Float64Array, n: number, i0: number, p: number,
  t: Float64Array, m: number, j0: number, q: number, pivot: number, threshold: number, labels: SingularLabels,
): never {
  const ls = blockEigenvalues(s, n, i0, p);
  const mu = blockEigenvalues(t, m, j0, q);
  let best = { l: ls[0]!, u: mu[0]!, gap: Infinity };
  for (const l of ls) for (const u of mu) {
    const gap = kind === "sylvester"
      ? Math.hypot(l.re + u.re, l.im + u.im)
      : Math.hypot(l.re * u.re - l.im * u.im - 1, l.re * u.im + l.im * u.re);
    if (gap < best.gap) best = { l, u, gap };
  }
  const fmt = (z: Complex) => (z.im === 0 ? `${z.re.toPrecision(6)}` : `${z.re.toPrecision(6)}${z.im >= 0 ? "+" : "−"}${Math.abs(z.im).toPrecision(6)}i`);
  const relation = kind === "sylvester" ? "λ + μ ≈ 0" : "λ·μ ≈ 1";
  throw new EngineError(
    "singular",
    `${labels.equation} is singular: eigenvalue λ = ${fmt(best.l)} of ${labels.first} and μ = ${fmt(best.u)} of ${labels.second} satisfy ${relation} ` +
      `(|${kind === "sylvester" ? "λ + μ" : "λμ − 1"}| = ${best.gap.toExponential(2)}, threshold ${threshold.toExponential(2)})`,
    { eigenvalueFirst: best.l, eigenvalueSecond: best.u, gap: best.gap, pivot, threshold },
  );
}
