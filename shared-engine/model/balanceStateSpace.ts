/**
 * Diagonal state scaling of a model, used after companion-form realizations whose
 * coefficients can span many orders of magnitude.
 */
import { balance } from "../linalg";
import { stateSpaceFromMatrices, type StateSpace } from "./stateSpace";

/**
 * Computes: the equivalent model (D⁻¹AD, D⁻¹B, CD, D, D⁻¹F, E) with D = diag(scale) a
 *   diagonal of powers of two, and `scale` itself. The transfer function is unchanged.
 * Requires: a valid model (n = 0 returns it unchanged with an empty scale).
 * Method: Parlett–Reinsch balancing of A alone, without permutation (B. N. Parlett &
 *   C. Reinsch, "Balancing a matrix for calculation of eigenvalues and eigenvectors", Numer.
 *   Math. 13 (1969) 293–304), via linalg `balance`.
 * Cost: O(n²) per sweep (a few sweeps) plus O(n(n + m + p + q)) for the scaling.
 * Accuracy: exact: scaling by powers of two introduces no rounding (barring underflow).
 * Errors: those of `balance` ("no-convergence" at its sweep cap).
 * Example: balanceStateSpace(realizeTransferFunction(tf)).model has the same G(s) as before;
 *   check |G_before(s) − G_after(s)| ≤ 1e-14·|G(s)| at a test point.
 */
export function balanceStateSpace(model: StateSpace): { model: StateSpace; scale: number[] } {
  const n = model.A.rows;
  if (n === 0) return { model, scale: [] };
  const { B: A, scale } = balance(model.A, { permute: false, scale: true });
  const B = model.B.clone();
  const F = model.F.clone();
  const C = model.C.clone();
  for (let i = 0; i < n; i++) {
    const s = scale[i]!;
    for (let j = 0; j < B.columns; j++) B.set(i, j, B.get(i, j) / s);
    for (let j = 0; j < F.columns; j++) F.set(i, j, F.get(i, j) / s);
    for (let r = 0; r < C.rows; r++) C.set(r, i, C.get(r, i) * s);
  }
  const scaled = stateSpaceFromMatrices({ ...model, A, B, C, F });
  return { model: scaled, scale: Array.from(scale) };
}
