/**
 * Full-order state observer by pole placement: x̂' = A x̂ + B u + L (y − C x̂), whose error
 * e = x − x̂ obeys e' = (A − L C) e. Designed as the dual of state feedback.
 */
import type { Matrix } from "ml-matrix";
import type { Complex } from "../linalg/complex";
import { asMatrix, requireFinite, requireNonEmpty, requireSquareFinite, type MatrixInput } from "../linalg/validate";
import { placePolesAs, type PlacementOptions, type PlacementResult } from "./placePoles";

export interface ObserverPlacementResult extends Omit<PlacementResult, "K"> {
  /** n×p observer gain: error dynamics A − L C. */
  L: Matrix;
}

/**
 * Computes: L (n×p) with eig(A − L C) = `poles`, for A: n×n, C: p×n; diagnostics as
 * `placePoles` (achievedPoles are the eigenvalues of A − L C; eigenvectorCondition is κ₂ of
 * the eigenvectors of (A − L C)ᵀ, i.e. of the left eigenvectors of A − L C).
 *
 * Requires: A square, C with n columns, finite; `poles` n values closed under conjugation,
 * none repeated more than rank(C) times; unobservable modes of (A, C) among the poles.
 *
 * Method: duality, eig(A − L C) = eig(Aᵀ − Cᵀ Lᵀ): `placePoles(Aᵀ, Cᵀ, poles)` gives K and
 * L = Kᵀ (Kalman, "On the general theory of control systems", 1st IFAC Congress, 1960, for
 * the duality; the placement methods are those of `placePoles`).
 *
 * Cost: that of `placePoles` with m = p, plus two transposes.
 *
 * Accuracy: as `placePoles`; achievedPoles are recomputed from Aᵀ − CᵀLᵀ, whose eigenvalues
 * are those of A − L C.
 *
 * Errors: as `placePoles`, naming A and C; "not-observable" (instead of "not-controllable")
 * naming the unobservable modes the request would move.
 *
 * Example:
 *   const { L, maxPoleError } = placeObserverPoles(new Matrix([[0, 1], [-2, -3]]), new Matrix([[1, 0]]),
 *     [{ re: -10, im: 0 }, { re: -11, im: 0 }]);
 *   // eig(A − L C) = {−10, −11}: maxPoleError < 1e-12
 */
export function placeObserverPoles(AInput: MatrixInput, CInput: MatrixInput, poles: Complex[], options: PlacementOptions = {}): ObserverPlacementResult {
  const A = asMatrix(AInput, "A");
  const C = asMatrix(CInput, "C");
  requireSquareFinite(A, "A");
  requireNonEmpty(C, "C");
  requireFinite(C, "C");
  const result = placePolesAs(A.transpose(), C.transpose(), poles, options, { A: "A", B: "C", dual: true });
  const { K, ...diagnostics } = result;
  return { ...diagnostics, L: K.transpose() };
}
