/**
 * The imaginary-axis test for the eigenvalues of a (balanced) Hamiltonian matrix in real Schur
 * form, with the eigenvalue's own condition number deciding the eigenvalues that are small
 * compared with ‖H‖ (graded problems, whose states differ in units by many orders of magnitude).
 */
import type { Complex } from "../linalg";
import { eigenvaluesOfQuasiTriangular } from "../linalg/kernels";
import { STABILITY_BOUNDARY_TOLERANCE } from "./riccatiPencil";

/**
 * Safety factor on the first-order error bound w·ε·‖H‖_F·κ(λ) below which the distance of a
 * computed eigenvalue from the imaginary axis is not resolved. WARNING: this decides whether a
 * design is rejected. For a Jordan block on the axis split by rounding into λ ± δ, the computed
 * κ is about ‖H‖/(2δ) and δ ≈ √(ε)·‖H‖, so the bound is about (w/2)·δ: the factor 10 keeps such
 * pairs (≥ 10·δ) well inside the rejected region; the graded fixture clears it by 67×
 * (|Re λ| = 1e-4 against 1.5e-6 after the solution-based rescaling of riccatiContinuous.ts).
 */
const AXIS_RESOLUTION_FACTOR = 10;

export interface AxisVerdict {
  /** First eigenvalue whose distance from the axis is not resolved (null when none). */
  onAxis: Complex | null;
  /** Tolerance that eigenvalue failed (‖H‖-relative or condition-based). */
  tolerance: number;
  /** True when some eigenvalue lies within 10·√ε·‖H‖_F of the axis but is resolved by its condition. */
  graded: boolean;
}

/**
 * Decides, for the w×w quasi-triangular Schur form `t` of a Hamiltonian H (‖H‖_F = normH), whether
 * an eigenvalue lies on the imaginary axis.
 *
 * Method: an eigenvalue with |Re λ| > 10·√ε·‖H‖_F is off the axis (the normwise test of the
 * solver's documentation). One within that band (a "suspect") is off the axis only when its
 * distance exceeds the first-order perturbation bound of a backward-stable Schur step:
 * |Re λ| > 10·w·ε·‖H‖_F·κ(λ), with κ(λ) = ‖x‖‖y‖/|yᴴx| from the right and left eigenvectors x, y
 * of T (J. H. Wilkinson, "The Algebraic Eigenvalue Problem", Oxford 1965, ch. 2, the condition
 * 1/|s_i| of a simple eigenvalue; from memory). Rounding splits an axis eigenvalue of a Jordan
 * block by O(√ε) with κ = O(1/√ε), and a repeated eigenvalue gives κ = ∞ (substitution pivot
 * replaced by ε·‖T‖), so both stay rejected; a simple eigenvalue that is merely small compared
 * with ‖H‖ (a slow mode beside a fast one) is accepted.
 *
 * Cost: O(w) without suspects; O(w²) per suspect eigenvalue (two substitutions).
 */
export function imaginaryAxisVerdict(t: Float64Array, w: number, normH: number): AxisVerdict {
  const bandTolerance = STABILITY_BOUNDARY_TOLERANCE * normH;
  const eigenvalues = eigenvaluesOfQuasiTriangular(t, w);
  let graded = false;
  for (let k = 0; k < w; k++) {
    const lambda = eigenvalues[k]!;
    if (Math.abs(lambda.re) > bandTolerance) continue;
    // A conjugate pair is decided by its first member, listed at the block's first index with
    // Im λ > 0 (eigenvaluesOfQuasiTriangular's order).
    if (lambda.im < 0) continue;
    const kappa = eigenvalueCondition(t, w, k, lambda);
    const tolerance = AXIS_RESOLUTION_FACTOR * w * Number.EPSILON * normH * kappa;
    if (!(Math.abs(lambda.re) > tolerance)) return { onAxis: lambda, tolerance: Math.max(tolerance, bandTolerance), graded };
    graded = true;
  }
  return { onAxis: null, tolerance: bandTolerance, graded };
}

/**
 * κ(λ) = ‖x‖‖y‖/|yᴴx| for the eigenvalue λ of the quasi-triangular t whose diagonal block starts at
 * index k (1×1, or 2×2 with λ its eigenvalue of positive imaginary part). Right eigenvector by
 * back substitution, left by forward substitution (LAPACK xTREVC's scheme, complex arithmetic);
 * near-singular pivots are replaced by ε·‖T‖ so a repeated eigenvalue gives a huge κ.
 */
function eigenvalueCondition(t: Float64Array, w: number, k: number, lambda: Complex): number {
  const size = k + 1 < w && t[(k + 1) * w + k] !== 0 ? 2 : 1;
  let normT = 0;
  for (let i = 0; i < w * w; i++) normT = Math.max(normT, Math.abs(t[i]!));
  const smin = Math.max(Number.EPSILON * normT, Number.MIN_VALUE);
  const lr = lambda.re, li = lambda.im;
  // Right eigenvector x (zero below the block) and left z = ȳ (zero above it): Tᵀz = λz.
  const xr = new Float64Array(w), xi = new Float64Array(w);
  const zr = new Float64Array(w), zi = new Float64Array(w);
  if (size === 1) {
    xr[k] = 1;
    zr[k] = 1;
  } else {
    const a = t[k * w + k]!, b = t[k * w + k + 1]!, c = t[(k + 1) * w + k]!;
    // (T_b − λI)v = 0 → v = (b, λ − a); (T_bᵀ − λI)u = 0 → u = (c, λ − a).
    xr[k] = b; xr[k + 1] = lr - a; xi[k + 1] = li;
    zr[k] = c; zr[k + 1] = lr - a; zi[k + 1] = li;
  }
  const blockEnd = k + size;
  // Back substitution for x over the blocks above k.
  for (let i = k - 1; i >= 0;) {
    const twoByTwo = i > 0 && t[i * w + i - 1] !== 0;
    const top = twoByTwo ? i - 1 : i;
    const rhs = new Float64Array(4);
    for (let r = top; r <= i; r++) {
      let sr = 0, si = 0;
      for (let j = i + 1; j < blockEnd; j++) { const v = t[r * w + j]!; sr -= v * xr[j]!; si -= v * xi[j]!; }
      rhs[2 * (r - top)] = sr; rhs[2 * (r - top) + 1] = si;
    }
    solveShiftedBlock(t, w, top, twoByTwo, false, lr, li, rhs, smin);
    for (let r = top; r <= i; r++) { xr[r] = rhs[2 * (r - top)]!; xi[r] = rhs[2 * (r - top) + 1]!; }
    i = top - 1;
  }
  // Forward substitution for z over the blocks below the eigenvalue's block.
  for (let i = blockEnd; i < w;) {
    const twoByTwo = i + 1 < w && t[(i + 1) * w + i] !== 0;
    const last = twoByTwo ? i + 1 : i;
    const rhs = new Float64Array(4);
    for (let r = i; r <= last; r++) {
      let sr = 0, si = 0;
      for (let j = k; j < i; j++) { const v = t[j * w + r]!; sr -= v * zr[j]!; si -= v * zi[j]!; }
      rhs[2 * (r - i)] = sr; rhs[2 * (r - i) + 1] = si;
    }
    solveShiftedBlock(t, w, i, twoByTwo, true, lr, li, rhs, smin);
    for (let r = i; r <= last; r++) { zr[r] = rhs[2 * (r - i)]!; zi[r] = rhs[2 * (r - i) + 1]!; }
    i = last + 1;
  }
  const nx = scaledNorm(xr, xi), nz = scaledNorm(zr, zi);
  if (!Number.isFinite(nx) || !Number.isFinite(nz)) return Infinity;
  // zᵀx with both scaled to unit norm (avoids overflow for huge eigenvector entries).
  let pr = 0, pi = 0;
  for (let j = 0; j < w; j++) {
    const ar = xr[j]! / nx, ai = xi[j]! / nx, br = zr[j]! / nz, bi = zi[j]! / nz;
    pr += ar * br - ai * bi;
    pi += ar * bi + ai * br;
  }
  const dot = Math.sqrt(pr * pr + pi * pi);
  return dot > 0 ? 1 / dot : Infinity;
}

/**
 * Solves (M − λI)v = rhs in place for the 1×1 or 2×2 diagonal block M of t at `top` (Mᵀ when
 * `transposed`); rhs holds (re, im) pairs. Pivots below `smin` are replaced by smin.
 */
function solveShiftedBlock(
  t: Float64Array, w: number, top: number, twoByTwo: boolean, transposed: boolean, lr: number, li: number, rhs: Float64Array, smin: number,
): void {
  if (!twoByTwo) {
    let dr = t[top * w + top]! - lr, di = -li;
    if (Math.hypot(dr, di) < smin) { dr = smin; di = 0; }
    const [qr, qi] = complexDivide(rhs[0]!, rhs[1]!, dr, di);
    rhs[0] = qr; rhs[1] = qi;
    return;
  }
  const p = t[top * w + top]!, s = t[(top + 1) * w + top + 1]!;
  const q = transposed ? t[(top + 1) * w + top]! : t[top * w + top + 1]!;
  const r = transposed ? t[top * w + top + 1]! : t[(top + 1) * w + top]!;
  // det = (p − λ)(s − λ) − q·r
  const ar = p - lr, ai = -li, br = s - lr, bi = -li;
  let detR = ar * br - ai * bi - q * r, detI = ar * bi + ai * br;
  if (Math.hypot(detR, detI) < smin * Math.max(Math.abs(p), Math.abs(q), Math.abs(r), Math.abs(s), smin)) { detR = smin * smin; detI = 0; }
  const [f0r, f0i, f1r, f1i] = [rhs[0]!, rhs[1]!, rhs[2]!, rhs[3]!];
  // Cramer: v0 = ((s − λ)f0 − q f1)/det, v1 = ((p − λ)f1 − r f0)/det.
  const n0r = br * f0r - bi * f0i - q * f1r, n0i = br * f0i + bi * f0r - q * f1i;
  const n1r = ar * f1r - ai * f1i - r * f0r, n1i = ar * f1i + ai * f1r - r * f0i;
  const [v0r, v0i] = complexDivide(n0r, n0i, detR, detI);
  const [v1r, v1i] = complexDivide(n1r, n1i, detR, detI);
  rhs[0] = v0r; rhs[1] = v0i; rhs[2] = v1r; rhs[3] = v1i;
}

/** (a + ib)/(c + id) by Smith's scaled formula (R. L. Smith, CACM 5(8), 1962; from memory). */
function complexDivide(a: number, b: number, c: number, d: number): [number, number] {
  if (Math.abs(c) >= Math.abs(d)) {
    const r = d / c, den = c + d * r;
    return [(a + b * r) / den, (b - a * r) / den];
  }
  const r = c / d, den = c * r + d;
  return [(a * r + b) / den, (b * r - a) / den];
}

function scaledNorm(re: Float64Array, im: Float64Array): number {
  let scale = 0;
  for (let i = 0; i < re.length; i++) scale = Math.max(scale, Math.abs(re[i]!), Math.abs(im[i]!));
  if (scale === 0 || !Number.isFinite(scale)) return scale;
  let s = 0;
  for (let i = 0; i < re.length; i++) { const a = re[i]! / scale, b = im[i]! / scale; s += a * a + b * b; }
  return scale * Math.sqrt(s);
}
