/**
 * The loop transfer L(s) = c(sI − A)⁻¹b + d of a single-input single-output model evaluated at
 * one point: at a complex s (for the gain that puts a closed-loop pole there, `gainAtPoint`) and
 * at a real x together with its derivative L'(x) (for the break points of the root locus). Both
 * by Gaussian elimination with partial pivoting on sI − A.
 */
import { EngineError } from "../errors";
import type { Complex } from "../linalg";
import type { StateSpace } from "../model";

/**
 * Computes: k = −1/L(s) for a point s of the complex plane (the gain that would put a
 *   closed-loop pole at s), returned as its real part `gain`, and `onLocusError` =
 *   |Im k|/|k|, the sine of the angle by which s misses the angle condition (0 on the locus
 *   of positive or negative gain).
 * Requires: SISO model; s finite and not a zero of L. At an open-loop pole the gain is 0.
 * Method: one complex LU solve of (sI − A)x = b with partial pivoting; L = c x + d.
 * Cost: ≈ (8/3)n³ real flops. Accuracy: backward stable solve; relative error ≈ κ(sI − A)·ε.
 * Errors: "invalid-argument" (not SISO; s is a zero of L), "non-finite" (s not finite).
 * Example: for 1/(s(s+1)(s+2)) at s = j√2: gain 6, onLocusError < 1e-15.
 */
export function gainAtPoint(L: StateSpace, s: Complex): { gain: number; onLocusError: number } {
  if (L.B.columns !== 1 || L.C.rows !== 1) {
    throw new EngineError("invalid-argument", `gainAtPoint needs a single-input single-output loop (this model has ${L.B.columns} inputs and ${L.C.rows} outputs)`, {});
  }
  if (!s || !Number.isFinite(s.re) || !Number.isFinite(s.im)) {
    throw new EngineError("non-finite", `s must be a finite complex number {re, im}, not ${JSON.stringify(s)}`, { argument: "s" });
  }
  const value = evaluateLoop(L, s);
  if (value === null) return { gain: 0, onLocusError: 0 }; // s is an open-loop pole: k = 0
  const mag2 = value.re * value.re + value.im * value.im;
  if (mag2 === 0) {
    throw new EngineError("invalid-argument", `s = ${s.re}${s.im >= 0 ? "+" : "−"}${Math.abs(s.im)}j is a zero of the loop: no finite gain puts a pole there`, { argument: "s" });
  }
  // k = −1/L = −conj(L)/|L|²
  const k = { re: -value.re / mag2, im: value.im / mag2 };
  return { gain: k.re, onLocusError: Math.abs(k.im) / Math.hypot(k.re, k.im) };
}

/** L(s) = c(sI − A)⁻¹b + d at complex s, or null when sI − A is exactly singular (s a pole). */
function evaluateLoop(L: StateSpace, s: Complex): Complex | null {
  const n = L.A.rows;
  const re = new Float64Array(n * n);
  const im = new Float64Array(n * n);
  const xr = new Float64Array(n);
  const xi = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < n; j++) re[i * n + j] = (i === j ? s.re : 0) - L.A.get(i, j);
    im[i * n + i] = s.im;
    xr[i] = L.B.get(i, 0);
  }
  // Gaussian elimination with partial pivoting (Golub & Van Loan, Alg. 3.4.1) in complex form.
  for (let k = 0; k < n; k++) {
    let piv = k;
    for (let i = k + 1; i < n; i++) if (Math.hypot(re[i * n + k]!, im[i * n + k]!) > Math.hypot(re[piv * n + k]!, im[piv * n + k]!)) piv = i;
    if (re[piv * n + k] === 0 && im[piv * n + k] === 0) return null;
    if (piv !== k) {
      for (let j = 0; j < n; j++) {
        swap(re, k * n + j, piv * n + j);
        swap(im, k * n + j, piv * n + j);
      }
      swap(xr, k, piv);
      swap(xi, k, piv);
    }
    const pr = re[k * n + k]!;
    const pi = im[k * n + k]!;
    const p2 = pr * pr + pi * pi;
    for (let i = k + 1; i < n; i++) {
      const ar = re[i * n + k]!;
      const ai = im[i * n + k]!;
      const lr = (ar * pr + ai * pi) / p2;
      const li = (ai * pr - ar * pi) / p2;
      if (lr === 0 && li === 0) continue;
      for (let j = k + 1; j < n; j++) {
        const br = re[k * n + j]!;
        const bi = im[k * n + j]!;
        re[i * n + j] -= lr * br - li * bi;
        im[i * n + j] -= lr * bi + li * br;
      }
      const yr = xr[k]!;
      const yi = xi[k]!;
      xr[i] -= lr * yr - li * yi;
      xi[i] -= lr * yi + li * yr;
    }
  }
  for (let k = n - 1; k >= 0; k--) {
    let sr = xr[k]!;
    let si = xi[k]!;
    for (let j = k + 1; j < n; j++) {
      sr -= re[k * n + j]! * xr[j]! - im[k * n + j]! * xi[j]!;
      si -= re[k * n + j]! * xi[j]! + im[k * n + j]! * xr[j]!;
    }
    const pr = re[k * n + k]!;
    const pi = im[k * n + k]!;
    const p2 = pr * pr + pi * pi;
    xr[k] = (sr * pr + si * pi) / p2;
    xi[k] = (si * pr - sr * pi) / p2;
  }
  let vr = L.D.get(0, 0);
  let vi = 0;
  for (let j = 0; j < n; j++) {
    vr += L.C.get(0, j) * xr[j]!;
    vi += L.C.get(0, j) * xi[j]!;
  }
  return Number.isFinite(vr) && Number.isFinite(vi) ? { re: vr, im: vi } : null;
}

/**
 * Computes: L(x) = c(xI − A)⁻¹b + d and L'(x) = −c(xI − A)⁻²b at a real x; null when xI − A is
 *   exactly singular (x a real pole) or either value overflows.
 * Requires: SISO model. Method: one LU factorization of xI − A with partial pivoting (Golub &
 *   Van Loan, Alg. 3.4.1), then two solves: y = (xI − A)⁻¹b, z = (xI − A)⁻¹y.
 * Cost: ≈ (2/3)n³ flops. Accuracy: backward stable solve; relative error ≈ κ(xI − A)·ε.
 * Errors: none (null instead). Example: for 1/(s + 1) at x = 1: value 1/2, derivative −1/4.
 */
export function realLoopAndDerivative(L: StateSpace, x: number): { value: number; derivative: number } | null {
  const n = L.A.rows;
  const M = new Float64Array(n * n);
  for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) M[i * n + j] = (i === j ? x : 0) - L.A.get(i, j);
  const perm = Int32Array.from({ length: n }, (_, i) => i);
  for (let k = 0; k < n; k++) {
    let piv = k;
    for (let i = k + 1; i < n; i++) if (Math.abs(M[i * n + k]!) > Math.abs(M[piv * n + k]!)) piv = i;
    if (M[piv * n + k] === 0) return null;
    if (piv !== k) {
      for (let j = 0; j < n; j++) swap(M, k * n + j, piv * n + j);
      const t = perm[k]!;
      perm[k] = perm[piv]!;
      perm[piv] = t;
    }
    for (let i = k + 1; i < n; i++) {
      const l = (M[i * n + k]! /= M[k * n + k]!);
      if (l !== 0) for (let j = k + 1; j < n; j++) M[i * n + j] -= l * M[k * n + j]!;
    }
  }
  const solve = (rhs: Float64Array): Float64Array => {
    const y = Float64Array.from(perm, (p) => rhs[p]!);
    for (let i = 0; i < n; i++) for (let j = 0; j < i; j++) y[i] -= M[i * n + j]! * y[j]!;
    for (let i = n - 1; i >= 0; i--) {
      for (let j = i + 1; j < n; j++) y[i] -= M[i * n + j]! * y[j]!;
      y[i] /= M[i * n + i]!;
    }
    return y;
  };
  const y = solve(Float64Array.from({ length: n }, (_, i) => L.B.get(i, 0)));
  const z = solve(y);
  let value = L.D.get(0, 0);
  let derivative = 0;
  for (let j = 0; j < n; j++) {
    value += L.C.get(0, j) * y[j]!;
    derivative -= L.C.get(0, j) * z[j]!;
  }
  return Number.isFinite(value) && Number.isFinite(derivative) ? { value, derivative } : null;
}

function swap(a: Float64Array, i: number, j: number): void {
  const t = a[i]!;
  a[i] = a[j]!;
  a[j] = t;
}
