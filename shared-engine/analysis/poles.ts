/**
 * Poles of a state-space model: the eigenvalues of A (every mode of the realization, including
 * uncontrollable or unobservable ones; `minimalRealization` removes those first when only the
 * transfer function's poles are wanted).
 */
import { eigenvalues, type Complex } from "../linalg";
import type { StateSpace } from "../model";

/**
 * Computes: the n eigenvalues λ of A (n×n) of `model`, i.e. the roots of det(sI − A) (s-plane
 *   for continuous models, z-plane for sampled ones). Conjugate pairs are adjacent, positive
 *   imaginary part first; real poles have im === 0 exactly.
 * Requires: a model built by `createStateSpace` / `stateSpaceFromMatrices` (finite entries).
 *   n = 0 (a static gain) gives [].
 * Method: balancing, Hessenberg reduction and Francis double-shift QR (`eigenvalues` in linalg;
 *   J. G. F. Francis, "The QR transformation", Computer J. 4, 1961–62).
 * Cost: ≈ 10n³ flops, O(n²) memory; at most 30·max(10, n) QR sweeps.
 * Accuracy: backward stable: exact poles of A + ΔA with ‖ΔA‖ ≈ n·ε·‖A‖; the forward error is
 *   that times each eigenvalue's condition number (large for nearly defective A).
 * Errors: "no-convergence" from the QR iteration (details.iterations).
 * Example:
 *   poles(createStateSpace({ A: [[0, 1], [-2, -3]], B: [[0], [1]], C: [[1, 0]] })); // −1, −2
 *   // check: |λ² + 3λ + 2| < 1e-14 for each λ
 */
export function poles(model: StateSpace): Complex[] {
  if (model.A.rows === 0) return [];
  return eigenvalues(model.A);
}
