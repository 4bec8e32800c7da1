/**
 * One-interval transition matrices of a linear model under a held input: for x' = Ax + Gv
 * (continuous) or x[k+1] = Ax[k] + Gv[k] (sampled), the Φ, Γ₀, Γ₁ with
 * x_{k+1} = Φx_k + Γ₀v_k + Γ₁v_{k+1} over one step of the time grid. Zero-order hold (Van Loan's
 * block exponential), first-order "triangle" hold (a 3-block exponential), and a sampled gap of
 * j periods (a power of the augmented matrix). `simulateLinear` caches one set per distinct step.
 */
import { Matrix } from "ml-matrix";
import { expm } from "../linalg";
// vanLoan is not (yet) re-exported by linalg/index.ts, so it is imported from its module file.
import { expmIntegral } from "../linalg/vanLoan";

/** Row-major n×n and n×r blocks of one step; r = columns of G (inputs and disturbances). */
export interface StepMatrices {
  Phi: Float64Array; // n×n
  Gamma0: Float64Array; // n×r, multiplies v_k
  Gamma1: Float64Array | null; // n×r, multiplies v_{k+1} (first-order hold only)
}

/**
 * Computes: Φ = e^{Ah} and Γ₀ = ∫₀^h e^{As} ds·G (zero-order hold over a step h), Γ₁ = null.
 * Requires: A n×n, G n×r, h > 0 finite. Method: Van Loan's block exponential through
 *   `expmIntegral` (C. F. Van Loan, "Computing integrals involving the matrix exponential",
 *   IEEE TAC 23(3), 1978); e^{Ah} alone when r = 0.
 * Cost: one expm of order n + r, ≈ 15(n + r)³ flops. Accuracy: that of expm.
 * Errors: those of `expm` / `expmIntegral`.
 * Example: zohStep([[-1]], [[1]], 1) → Φ = e⁻¹, Γ₀ = 1 − e⁻¹.
 */
export function zohStep(A: Matrix, G: Matrix, h: number): StepMatrices {
  if (G.columns === 0) return { Phi: flat(expm(A.clone().mul(h))), Gamma0: new Float64Array(0), Gamma1: null };
  const { Phi, Gamma } = expmIntegral(A, G, h);
  return { Phi: flat(Phi), Gamma0: flat(Gamma), Gamma1: null };
}

/**
 * Computes: the first-order (triangle) hold over a step h: Phi = e^{Ah}, Gamma0 = Γ₁ − Γ₂ and
 *   Gamma1 = Γ₂, where Γ₁ = ∫₀^h e^{As}ds·G and Γ₂ = (1/h)∫₀^h e^{A(h−τ)} τ dτ·G, so that
 *   x_{k+1} = Φx_k + (Γ₁ − Γ₂)v_k + Γ₂v_{k+1} when v moves linearly between the samples.
 * Requires: as `zohStep`. Method: exp([[A h, G h, 0], [0, 0, I], [0, 0, 0]]) =
 *   [[Φ, Γ₁, Γ₂], [0, I, I], [0, 0, I]] (G. F. Franklin, J. D. Powell & M. L. Workman, "Digital
 *   Control of Dynamic Systems", 3rd ed., §6.3.2 "triangle hold equivalent", from memory).
 * Cost: one expm of order n + 2r. Accuracy: that of expm. Errors: those of `expm`.
 * Example: fohStep([[0]], [[1]], 1) → Φ = 1, Gamma0 = Gamma1 = 1/2 (the trapezoid rule, exact
 *   for x' = v with v linear).
 */
export function fohStep(A: Matrix, G: Matrix, h: number): StepMatrices {
  const n = A.rows;
  const r = G.columns;
  const M = new Matrix(n + 2 * r, n + 2 * r);
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < n; j++) M.set(i, j, A.get(i, j) * h);
    for (let j = 0; j < r; j++) M.set(i, n + j, G.get(i, j) * h);
  }
  for (let j = 0; j < r; j++) M.set(n + j, n + r + j, 1);
  const E = expm(M);
  const Phi = new Float64Array(n * n);
  const Gamma0 = new Float64Array(n * r);
  const Gamma1 = new Float64Array(n * r);
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < n; j++) Phi[i * n + j] = E.get(i, j);
    for (let j = 0; j < r; j++) {
      Gamma1[i * r + j] = E.get(i, n + r + j);
      Gamma0[i * r + j] = E.get(i, n + j) - E.get(i, n + r + j);
    }
  }
  return { Phi, Gamma0, Gamma1 };
}

/**
 * Computes: Φ = A^j and Γ₀ = Σ_{i<j} AⁱG for a gap of j sample periods of a sampled model with the
 *   input held (Γ₁ = null); j = 1 gives Φ = A, Γ₀ = G.
 * Requires: A n×n, G n×r, j ≥ 1 an integer. Method: [[A, G], [0, I]]^j = [[A^j, Σ_{i<j} AⁱG],
 *   [0, I]], by repeated squaring.
 * Cost: about 2·log₂ j products of order n + r. Accuracy: rounding of the products. Errors: none.
 * Example: sampledStep([[0.5]], [[1]], 2) → Φ = 0.25, Γ₀ = 1.5.
 */
export function sampledStep(A: Matrix, G: Matrix, j: number): StepMatrices {
  const n = A.rows;
  const r = G.columns;
  const M = Matrix.eye(n + r);
  for (let i = 0; i < n; i++) {
    for (let c = 0; c < n; c++) M.set(i, c, A.get(i, c));
    for (let c = 0; c < r; c++) M.set(i, n + c, G.get(i, c));
  }
  let result = Matrix.eye(n + r);
  let base = M;
  for (let e = j; e > 0; e = Math.floor(e / 2)) {
    if (e % 2 === 1) result = result.mmul(base);
    if (e > 1) base = base.mmul(base);
  }
  const Phi = new Float64Array(n * n);
  const Gamma0 = new Float64Array(n * r);
  for (let i = 0; i < n; i++) {
    for (let c = 0; c < n; c++) Phi[i * n + c] = result.get(i, c);
    for (let c = 0; c < r; c++) Gamma0[i * r + c] = result.get(i, n + c);
  }
  return { Phi, Gamma0, Gamma1: null };
}

/** The entries of M in row-major order, as a Float64Array (rows × columns). */
export function flat(M: Matrix): Float64Array {
  const out = new Float64Array(M.rows * M.columns);
  for (let i = 0; i < M.rows; i++) for (let j = 0; j < M.columns; j++) out[i * M.columns + j] = M.get(i, j);
  return out;
}
