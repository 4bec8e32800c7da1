/**
 * Reduced-order (minimal-order) observer: estimates only the part of the state that the
 * outputs do not measure directly.
 */
import { Matrix, pseudoInverse } from "ml-matrix";
import { EngineError } from "../errors";
import type { Complex } from "../linalg/complex";
import { asMatrix, requireFinite, requireNonEmpty, requireSquareFinite, shapeOf, type MatrixInput } from "../linalg/validate";
import { placePolesAs, type PlacementOptions, type PlacementResult } from "./placePoles";

export interface ReducedObserverResult extends Omit<PlacementResult, "K"> {
  /** (n−p)×p gain: observer error dynamics F = A₂₂ − L A₁₂. */
  L: Matrix;
  /** Observer equations q' = F q + G y + H u (q has n − p entries). */
  F: Matrix;
  G: Matrix;
  H: Matrix;
  /** State estimate x̂ = M q + N y (M: n×(n−p), N: n×p). */
  M: Matrix;
  N: Matrix;
  /** Change of coordinates z = T x = [y; w] (n×n), with T⁻¹ = [C⁺, W]. */
  T: Matrix;
  Tinverse: Matrix;
}

/**
 * Computes: a reduced-order observer for ẋ = A x + B u, y = C x (A: n×n, B: n×m, C: p×n,
 * p < n). In coordinates z = T x = [y; w] with T = [C; Wᵀ], where the columns of W (n×(n−p))
 * are an orthonormal basis of null(C), the model reads y' = A₁₁y + A₁₂w + B₁u,
 * w' = A₂₁y + A₂₂w + B₂u (Ā = T A T⁻¹, B̄ = T B). The observer is
 *   q' = F q + G y + H u,   x̂ = M q + N y,
 * with F = A₂₂ − L A₁₂, G = F L + A₂₁ − L A₁₁, H = B₂ − L B₁, M = W, N = C⁺ + W L, and the
 * estimation error of w, e = w − (q + L y), obeys e' = F e with eig(F) = `poles`.
 *
 * Requires: C of full row rank p < n; (A, C) observable (equivalently (A₂₂, A₁₂) observable),
 * or every unobservable mode among the poles; `poles` n − p values closed under conjugation.
 * The output has no direct feedthrough (subtract D u from y first when there is one).
 *
 * Method: Luenberger, "Observers for multivariable systems", IEEE TAC 11(2), 1966 (reduced
 * order observer); the basis W from a Householder QR of Cᵀ (Golub & Van Loan, 4th ed., §5.2);
 * L placed by duality with `placePoles(A₂₂ᵀ, A₁₂ᵀ, poles)`.
 *
 * Cost: ≈ 4n³ for the coordinates and products, plus `placePoles` at size n − p with p inputs.
 *
 * Accuracy: T is well conditioned when C is (κ(T) = κ(C) for unit-norm rows); the achieved
 * poles are eigenvalues of F computed from F itself.
 *
 * Errors: "empty", "shape-mismatch", "non-finite" (inputs); "invalid-argument" when C does not
 * have full row rank, when p = n (nothing to estimate), or for the pole list;
 * "not-observable" naming unobservable modes that the request would move; and the errors of
 * `placePoles`.
 *
 * Example:
 *   const obs = reducedOrderObserver([[0, 1], [-2, -3]], [[0], [1]], [[1, 0]], [{ re: -8, im: 0 }]);
 *   // obs.F is 1×1 and equals [[-8]] to rounding; obs.M·q + obs.N·y = x when q = w − L y
 */
export function reducedOrderObserver(AInput: MatrixInput, BInput: MatrixInput, CInput: MatrixInput, poles: Complex[], options: PlacementOptions = {}): ReducedObserverResult {
  const A = asMatrix(AInput, "A");
  const B = asMatrix(BInput, "B");
  const C = asMatrix(CInput, "C");
  requireSquareFinite(A, "A");
  requireNonEmpty(B, "B");
  requireFinite(B, "B");
  requireNonEmpty(C, "C");
  requireFinite(C, "C");
  const n = A.rows;
  const p = C.rows;
  if (B.rows !== n) {
    throw new EngineError("shape-mismatch", `B must have as many rows as A (A is ${shapeOf(A)}, B is ${shapeOf(B)})`, { arguments: ["A", "B"] });
  }
  if (C.columns !== n) {
    throw new EngineError("shape-mismatch", `C must have as many columns as A (A is ${shapeOf(A)}, C is ${shapeOf(C)})`, { arguments: ["A", "C"] });
  }
  if (p >= n) {
    throw new EngineError("invalid-argument", `C has ${p} rows for ${n} states: a reduced-order observer needs fewer outputs than states (with p = n the state is y solved for x)`, {
      argument: "C", outputs: p, states: n,
    });
  }
  const { W, rank, diagonal } = nullSpaceOfRows(C);
  if (rank < p) {
    throw new EngineError("invalid-argument", `C must have full row rank ${p} (its rank is ${rank}): remove dependent outputs`, {
      argument: "C", rank, diagonal,
    });
  }
  const T = new Matrix(n, n);
  T.setSubMatrix(C, 0, 0);
  T.setSubMatrix(W.transpose(), p, 0);
  const Cplus = pseudoInverse(C);
  const Tinverse = new Matrix(n, n);
  Tinverse.setSubMatrix(Cplus, 0, 0);
  Tinverse.setSubMatrix(W, 0, p);
  const Abar = T.mmul(A).mmul(Tinverse);
  const Bbar = T.mmul(B);
  const q = n - p;
  const A11 = Abar.subMatrix(0, p - 1, 0, p - 1);
  const A12 = Abar.subMatrix(0, p - 1, p, n - 1);
  const A21 = Abar.subMatrix(p, n - 1, 0, p - 1);
  const A22 = Abar.subMatrix(p, n - 1, p, n - 1);
  const B1 = Bbar.subMatrix(0, p - 1, 0, B.columns - 1);
  const B2 = Bbar.subMatrix(p, n - 1, 0, B.columns - 1);

  const placed = placePolesAs(A22.transpose(), A12.transpose(), poles, options, {
    A: "A₂₂ (the unmeasured part of A)",
    B: "C (via A₁₂, the coupling of the unmeasured states into the measured ones)",
    dual: true,
  });
  const { K, ...diagnostics } = placed;
  const L = K.transpose(); // q×p
  const F = A22.clone().sub(L.mmul(A12));
  const G = F.mmul(L).add(A21).sub(L.mmul(A11));
  const H = B2.clone().sub(L.mmul(B1));
  const M = W.clone();
  const N = Cplus.clone().add(W.mmul(L));
  for (const [name, m] of [["F", F], ["G", G], ["H", H], ["N", N]] as const) requireFinite(m, `the observer matrix ${name}`);
  if (q !== F.rows) throw new EngineError("internal", "reduced observer has the wrong order");
  return { ...diagnostics, L, F, G, H, M, N, T, Tinverse };
}

/**
 * Orthonormal basis W (n×(n−p)) of null(C) for C: p×n, and the numerical rank of C, from a
 * Householder QR of Cᵀ (no pivoting; the rank test uses |R_kk| ≤ max(n,p)·ε·‖C‖_F).
 */
function nullSpaceOfRows(C: Matrix): { W: Matrix; rank: number; diagonal: number[] } {
  const p = C.rows;
  const n = C.columns;
  const work = C.transpose().to2DArray(); // n×p
  const tol = Math.max(n, p) * Number.EPSILON * C.norm("frobenius");
  const reflectors: Float64Array[] = [];
  const diagonal: number[] = [];
  for (let k = 0; k < p; k++) {
    let norm = 0;
    for (let i = k; i < n; i++) norm = Math.hypot(norm, work[i]![k]!);
    const v = new Float64Array(n);
    const alpha = work[k]![k]!;
    const beta = alpha >= 0 ? -norm : norm;
    diagonal.push(Math.abs(beta));
    reflectors.push(v);
    if (norm === 0) continue;
    v[k] = alpha - beta;
    for (let i = k + 1; i < n; i++) v[i] = work[i]![k]!;
    let vv = 0;
    for (let i = k; i < n; i++) vv += v[i]! * v[i]!;
    for (let j = k; j < p; j++) {
      let s = 0;
      for (let i = k; i < n; i++) s += v[i]! * work[i]![j]!;
      s *= 2 / vv;
      for (let i = k; i < n; i++) work[i]![j] -= s * v[i]!;
    }
  }
  const rank = diagonal.filter((d) => d > tol).length;
  // W = H₀ ⋯ H_{p−1} [0; I]: apply the reflectors in reverse order to e_p, …, e_{n−1}.
  const W = new Matrix(n, n - p);
  for (let j = p; j < n; j++) {
    const y = new Float64Array(n);
    y[j] = 1;
    for (let k = p - 1; k >= 0; k--) {
      const v = reflectors[k]!;
      let vv = 0, s = 0;
      for (let i = k; i < n; i++) { vv += v[i]! * v[i]!; s += v[i]! * y[i]!; }
      if (vv === 0) continue;
      s *= 2 / vv;
      for (let i = k; i < n; i++) y[i] -= s * v[i]!;
    }
    for (let i = 0; i < n; i++) W.set(i, j - p, y[i]!);
  }
  return { W, rank, diagonal };
}
