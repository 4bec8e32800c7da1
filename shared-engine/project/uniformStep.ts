/**
 * The drag preview's fast step response: on a uniform time grid the zero-order-hold transition
 * is computed once and the response is then one matrix–vector product per sample.
 */
import { Matrix } from "ml-matrix";
import type { Complex } from "../linalg";
import type { StateSpace } from "../model";
// As in analysis/transitionMatrices.ts: vanLoan is not re-exported by linalg/index.ts.
import { expmIntegral } from "../linalg/vanLoan";

/**
 * Computes: the step on input 0 of `system` (A: n×n, B: n×m, C: p×n, D: p×m) at uniformly
 *   spaced `times` (one step h, or one sample period of a sampled loop): Φ, Γ of the zero-order
 *   hold once, then x_{k+1} = Φ x_k + Γ and y_k = C x_k + D, with x_0 = 0.
 * Requires: times[0] = 0 and a constant step (relative 1e−12); `poles` are the poles of `system`.
 * Method: Φ, Γ by one block exponential (Van Loan, "Computing integrals involving the matrix
 *   exponential", IEEE TAC 23, 1978), as the general simulator. Same arithmetic as
 *   `stepResponse` on such a grid (which caches one Φ, Γ per distinct step), without the state
 *   and input histories it also returns.
 * Cost: O(n³) for the exponential, O(N·n·(n + p)) for N samples; O(N·p) memory.
 * Accuracy: every sample is checked finite.
 * Errors: none of its own — null when the grid is not uniform or the response overflows: the
 *   caller then runs the general simulator, which also raises its specific errors.
 * Example: uniformStep of x' = −x + u, y = x at times [0, 1] gives outputs [[0, 1 − e⁻¹]].
 */
export function uniformStep(system: StateSpace, times: readonly number[], poles: readonly Complex[]): { time: number[]; outputs: number[][]; warnings: string[] } | null {
  const N = times.length;
  const n = system.A.rows;
  const T = system.sampleTime;
  if (N < 2 || n === 0 || system.B.columns === 0 || times[0] !== 0) return null;
  const h = times[1]! - times[0]!;
  if (!(h > 0)) return null;
  // 1e−12: grids built as k·H/(N−1) differ from step to step in the last bits of t, not of h.
  for (let k = 1; k + 1 < N; k++) if (Math.abs(times[k + 1]! - times[k]! - h) > 1e-12 * h) return null;
  let Phi: Float64Array;
  const gamma = new Float64Array(n);
  const b = system.B.getColumnVector(0);
  if (T === null) {
    // With every input and disturbance column, as the general simulator does: the exponential's
    // scaling depends on the whole block, so this keeps the arithmetic (and the samples) identical.
    const { Phi: P, Gamma } = expmIntegral(system.A, system.F.columns > 0 ? joinColumns(system.B, system.F) : system.B, h);
    Phi = Float64Array.from(P.to1DArray());
    for (let i = 0; i < n; i++) gamma[i] = Gamma.get(i, 0);
  } else {
    if (Math.abs(h - T) > 1e-12 * T) return null;
    Phi = Float64Array.from(system.A.to1DArray());
    for (let i = 0; i < n; i++) gamma[i] = b.get(i, 0);
  }
  const p = system.C.rows;
  const C = Float64Array.from(system.C.to1DArray());
  const d = system.D.getColumn(0);
  const outputs = Array.from({ length: p }, () => new Array<number>(N).fill(0));
  let x = new Float64Array(n);
  let next = new Float64Array(n);
  for (let k = 0; k < N; k++) {
    for (let i = 0; i < p; i++) {
      let sum = 0;
      for (let c = 0; c < n; c++) sum += C[i * n + c]! * x[c]!;
      sum += d[i]!;
      if (!Number.isFinite(sum)) return null;
      outputs[i]![k] = sum;
    }
    if (k + 1 === N) break;
    for (let i = 0; i < n; i++) {
      let sum = 0;
      for (let c = 0; c < n; c++) sum += Phi[i * n + c]! * x[c]!;
      next[i] = sum + gamma[i]!;
      if (!Number.isFinite(next[i]!)) return null;
    }
    [x, next] = [next, x];
  }
  // The general simulator's growth remark, from the loop poles already computed.
  const unstable = poles.filter((q) => (T === null ? q.re > 1e-12 * Math.max(1, Math.hypot(q.re, q.im)) : Math.hypot(q.re, q.im) > 1 + 1e-12));
  const warnings = unstable.length > 0 ? [`the model has ${unstable.length} unstable pole(s) (${T === null ? "Re s > 0" : "|z| > 1"}); the response grows without bound`] : [];
  return { time: [...times], outputs, warnings };
}

function joinColumns(X: Matrix, Y: Matrix): Matrix {
  const out = new Matrix(X.rows, X.columns + Y.columns);
  out.setSubMatrix(X, 0, 0);
  out.setSubMatrix(Y, 0, X.columns);
  return out;
}
