/**
 * Single-input pole assignment on the controller Hessenberg form, by orthogonal deflation one
 * pole (or one conjugate pair) at a time. Kernel only: `placePoles` reduces (A, b) to the form
 * and checks the result.
 */
import { EngineError } from "../errors";
import type { Complex } from "../linalg/complex";

/** Rescale partial eigenvectors long before they could overflow. */
const RESCALE_THRESHOLD = 1e100;

/**
 * Computes: the row gain k (length n) such that H − e₁kᵀ has exactly the eigenvalues `poles`,
 * for H: n×n upper Hessenberg with nonzero subdiagonal (row-major, not modified) and the input
 * vector e₁ (so (H, e₁) is controllable). The gain is unique for a single input.
 *
 * Requires: `poles` has n entries, finite, conjugate pairs adjacent with the +im member first
 * (as `normalizePoleSet` orders them); h[i+1][i] ≠ 0.
 *
 * Method: the orthogonal deflation (implicit shifted RQ) method of Miminis & Paige, "An
 * algorithm for pole assignment of time invariant linear systems", Int. J. Control 35(2),
 * 1982, pp. 341–354. Rows 2..n of a closed-loop matrix do not depend on k, so the closed-loop
 * eigenvector x for λ solves rows 2..n of (H − λI)x = 0 (back substitution on the subdiagonal).
 * Givens rotations from the bottom map x to e₁ (for a pair, [Re x, Im x] to the leading 2
 * columns); the rotated H stays Hessenberg below its first 1 (or 2) rows and the rotated
 * input has 2 (or 3) nonzero leading entries, so the leading entries of k̂ follow from the
 * entries that must vanish below the deflated block, and the trailing block is a Hessenberg
 * problem of size n − 1 (or n − 2) with input along its e₁. A pair is handled in real
 * arithmetic, its real 2-dimensional invariant subspace being span{Re x, Im x}.
 *
 * Cost: about 6n³ flops (n stages, each O(stage size²)); O(n²) memory.
 *
 * Accuracy: orthogonal transformations only, so k is the exact gain of a nearby problem in the
 * sense of Miminis & Paige; the achieved poles are checked by the caller, against the closed
 * loop A − BK itself.
 *
 * Errors: "not-controllable" when a stage meets an input entry that is exactly zero (a
 * subdiagonal entry of H was zero); "non-finite" if the gain overflows.
 *
 * Example:
 *   // H = [[0,1],[−2,−3]] reordered so that b = e₁: see the placePoles tests; the check is
 *   // that eig(H − e₁kᵀ) equals the requested poles to about n·ε·‖H‖·κ(λ).
 */
export function placeSingleInputHessenberg(h: Float64Array, n: number, poles: Complex[]): Float64Array {
  const w = Float64Array.from(h);
  const gain = new Float64Array(n); // k̂ entries in the coordinates of their stage
  const rotations: { off: number; plane: number; c: number; s: number }[] = [];
  const xr = new Float64Array(n);
  const xi = new Float64Array(n);
  let off = 0;
  let beta = 1; // the input of the active block is beta·e₁
  let p = 0;
  while (off < n) {
    const ns = n - off;
    const lambda = poles[p]!;
    const pair = lambda.im !== 0;
    const at = (i: number, j: number) => (off + i) * n + off + j;
    if (!pair && ns === 1) {
      gain[off] = (w[at(0, 0)]! - lambda.re) / beta;
      break;
    }
    if (pair && ns === 2) {
      // (H − βe₁kᵀ) of order 2: trace = 2·Re λ and det = |λ|² fix k₀ then k₁.
      const h00 = w[at(0, 0)]!, h01 = w[at(0, 1)]!, h10 = w[at(1, 0)]!, h11 = w[at(1, 1)]!;
      requireNonzero(h10, off);
      const top = 2 * lambda.re - h11; // = h00 − βk₀
      gain[off] = (h00 - top) / beta;
      // top·h11 − (h01 − βk₁)·h10 = |λ|²
      const modulus2 = lambda.re * lambda.re + lambda.im * lambda.im;
      gain[off + 1] = (h01 - (top * h11 - modulus2) / h10) / beta;
      break;
    }
    // Closed-loop eigenvector: rows 1..ns−1 of (H − λI)x = 0 with x[ns−1] = 1 (step 1 of
    // Miminis & Paige), in complex arithmetic for a pair.
    solveTrailingRows(w, n, off, ns, lambda, xr, xi);
    let b0 = beta, b1 = 0, b2 = 0;
    const rotate = (plane: number, c: number, s: number) => {
      applyRotation(w, n, off, ns, plane, c, s);
      rotations.push({ off, plane, c, s });
      // the input vector has entries only in positions 0..2
      if (plane === 0) { const t = c * b0 + s * b1; b1 = -s * b0 + c * b1; b0 = t; }
      else if (plane === 1) { const t = c * b1 + s * b2; b2 = -s * b1 + c * b2; b1 = t; }
    };
    // Pass 1: rotations in planes (i−1, i) from the bottom zero x (Re x for a pair) below
    // its first entry; Q e₁ ∝ x, so the first column of Qᵀ(H − e₁kᵀ)Q is λe₁.
    for (let i = ns - 1; i >= 1; i--) {
      const lo = off + i - 1, hi = off + i;
      const [c, s] = givens(xr[lo]!, xr[hi]!);
      xr[lo] = c * xr[lo]! + s * xr[hi]!;
      xr[hi] = 0;
      const u = c * xi[lo]! + s * xi[hi]!;
      xi[hi] = -s * xi[lo]! + c * xi[hi]!;
      xi[lo] = u;
      rotate(i - 1, c, s);
    }
    if (!pair) {
      // Below the deflated 1×1 block only row 1 has an entry: Ĥ[1][0] − b₁k̂₀ = 0.
      requireNonzero(b1, off);
      gain[off] = w[at(1, 0)]! / b1;
      beta = b1;
      off += 1;
      p += 1;
      continue;
    }
    // Pass 2 for a pair: zero Im x below its second entry.
    for (let i = ns - 1; i >= 2; i--) {
      const lo = off + i - 1, hi = off + i;
      const [c, s] = givens(xi[lo]!, xi[hi]!);
      xi[lo] = c * xi[lo]! + s * xi[hi]!;
      xi[hi] = 0;
      rotate(i - 1, c, s);
    }
    // Below the deflated 2×2 block only row 2 has entries: Ĥ[2][0..1] − b₂k̂₀..₁ = 0.
    requireNonzero(b2, off);
    gain[off] = w[at(2, 0)]! / b2;
    gain[off + 1] = w[at(2, 1)]! / b2;
    beta = b2;
    off += 2;
    p += 2;
  }
  // k = Q₁ [k̂₁; Q₂ [k̂₂; …]]: undo the rotations of the stages from the last one back.
  for (let r = rotations.length - 1; r >= 0; r--) {
    const { off: o, plane, c, s } = rotations[r]!;
    const i = o + plane;
    const gi = gain[i]!, gj = gain[i + 1]!;
    gain[i] = c * gi - s * gj;
    gain[i + 1] = s * gi + c * gj;
  }
  for (let i = 0; i < n; i++) {
    if (!Number.isFinite(gain[i]!)) {
      throw new EngineError("non-finite", "the single-input pole-placement gain overflowed (the requested poles are too far for this system)", {
        index: i,
      });
    }
  }
  return gain;
}

/**
 * Right eigenvector x of the closed loop H − e₁kᵀ for λ, using only rows 2..n of H (they do not
 * depend on k): written into (xr, xi) for the active block off..n−1, x[last] = 1 before scaling.
 */
export function solveTrailingRows(w: Float64Array, n: number, off: number, ns: number, lambda: Complex, xr: Float64Array, xi: Float64Array): void {
  xr.fill(0, off, n);
  xi.fill(0, off, n);
  xr[off + ns - 1] = 1;
  for (let i = ns - 1; i >= 1; i--) {
    const row = (off + i) * n + off;
    // s = Σ_{j ≥ i} (H − λI)[i][j] x[j]
    let sr = 0, si = 0;
    for (let j = i; j < ns; j++) {
      const hij = w[row + j]!;
      sr += hij * xr[off + j]!;
      si += hij * xi[off + j]!;
    }
    sr -= lambda.re * xr[off + i]! - lambda.im * xi[off + i]!;
    si -= lambda.re * xi[off + i]! + lambda.im * xr[off + i]!;
    const sub = w[row + i - 1]!;
    requireNonzero(sub, off + i);
    xr[off + i - 1] = -sr / sub;
    xi[off + i - 1] = -si / sub;
    const big = Math.max(Math.abs(xr[off + i - 1]!), Math.abs(xi[off + i - 1]!));
    if (big > RESCALE_THRESHOLD) {
      for (let j = i - 1; j < ns; j++) { xr[off + j] /= big; xi[off + j] /= big; }
    }
  }
}

function requireNonzero(value: number, position: number): void {
  if (value === 0 || !Number.isFinite(value)) {
    throw new EngineError(
      "not-controllable",
      `the system lost controllability at step ${position + 1} of the single-input placement (a zero coupling in the controller Hessenberg form)`,
      { step: position },
    );
  }
}

/** (c, s) with [c s; −s c]·[a; b] = [r; 0], r ≥ 0. */
function givens(a: number, b: number): [number, number] {
  if (b === 0) return a >= 0 ? [1, 0] : [-1, 0];
  const r = Math.hypot(a, b);
  return [a / r, b / r];
}

/** Similarity by the rotation G in plane (off+p, off+p+1) on the active block: W ← GᵀW G... as rows then columns. */
function applyRotation(w: Float64Array, n: number, off: number, ns: number, p: number, c: number, s: number): void {
  const r0 = (off + p) * n;
  const r1 = r0 + n;
  for (let j = off; j < n; j++) {
    const a = w[r0 + j]!, b = w[r1 + j]!;
    w[r0 + j] = c * a + s * b;
    w[r1 + j] = -s * a + c * b;
  }
  const c0 = off + p;
  for (let i = off; i < off + ns; i++) {
    const row = i * n;
    const a = w[row + c0]!, b = w[row + c0 + 1]!;
    w[row + c0] = c * a + s * b;
    w[row + c0 + 1] = -s * a + c * b;
  }
}
