/**
 * Controllable and observable canonical (companion) forms of single-input / single-output
 * models, with the transformation, its condition number and a warning when it is large.
 */
import { Matrix, solve } from "ml-matrix";
import { EngineError } from "../errors";
import { eigenvalues, reciprocalCondition, type Complex } from "../linalg";
import { polynomialFromRoots, stateSpaceFromMatrices, type StateSpace } from "../model";
import { structure } from "./structure";

/** Above this κ₂(T) the canonical form carries a warning (about log10 κ digits lost; common practice). */
export const CANONICAL_CONDITION_WARNING = 1e6;

export interface CanonicalForm {
  /** The model in canonical coordinates z, x = T z. */
  model: StateSpace;
  /** n×n, x = T z. */
  T: Matrix;
  /** κ₂(T). */
  condition: number;
  /** Characteristic polynomial det(sI − A) = sⁿ + a_{n−1}sⁿ⁻¹ + … + a₀ as [1, a_{n−1}, …, a₀]. */
  characteristicPolynomial: number[];
  /** ‖A T − T A_canonical‖_F / (‖A‖_F ‖T‖_F). */
  residual: number;
  warning: string | null;
}

/**
 * Computes: for a single-input model (B: n×1) the controllable canonical form
 *   A_c = [[0, 1, 0, …], …, [0, …, 0, 1], [−a₀, −a₁, …, −a_{n−1}]], B_c = e_n,
 *   C_c = C T, F_c = T⁻¹F, D and E unchanged, with x = T z and det(sI − A) = sⁿ + … + a₀.
 * Requires: B has one column; (A, B) controllable (decided by the staircase in `structure`, not
 *   by the rank of [B AB …]); n ≥ 1.
 * Method: the characteristic polynomial from the eigenvalues (`polynomialFromRoots`), then the
 *   columns of T by the recursion t_n = b, t_k = A t_{k+1} + a_k b (k = n−1..1), which is
 *   T = [b, Ab, …, A^{n−1}b]·H(a) with the Hankel matrix of the coefficients (Kailath, "Linear
 *   Systems", 1980, §2.3 (from memory)); Cayley–Hamilton A t_1 + a_0 b = 0 is the residual check.
 * Cost: ≈ 10n³ (eigenvalues) + n matrix–vector products (2n³) + one SVD for κ(T).
 * Accuracy: the canonical form is inherently ill-conditioned for n beyond ~10 or spread-out
 *   poles (κ(T) grows exponentially); `residual` and `condition` are returned and `warning` is
 *   set when κ(T) > CANONICAL_CONDITION_WARNING.
 * Errors: "invalid-argument" (not single-input), "empty" (n = 0), "not-controllable" (naming
 *   the uncontrollable modes), "singular" (T numerically singular, κ ≥ 1/(nε)).
 * Example:
 *   controllableCanonicalForm(createStateSpace({ A: [[-1, 0], [0, -2]], B: [[1], [1]], C: [[1, 0]] }))
 *   // A_c = [[0, 1], [−2, −3]], B_c = [[0], [1]]; residual < 1e-15
 */
export function controllableCanonicalForm(model: StateSpace): CanonicalForm {
  const n = model.A.rows;
  if (model.B.columns !== 1) {
    throw new EngineError("invalid-argument", `the controllable canonical form needs a single-input model (B is ${n}×${model.B.columns})`, { inputs: model.B.columns });
  }
  if (n === 0) throw new EngineError("empty", "the model has no states, so it has no canonical form", {});
  const s = structure(model);
  if (!s.controllable) {
    throw new EngineError("not-controllable", `the controllable canonical form needs (A, B) controllable; uncontrollable modes: ${formatModes(s.uncontrollableModes)}`, {
      uncontrollableModes: s.uncontrollableModes,
    });
  }
  const { T, a, Acomp, residual } = companionBasis(model.A, model.B);
  const condition = checkCondition(T, n);
  const Bc = new Matrix(n, 1);
  Bc.set(n - 1, 0, 1);
  const names = Array.from({ length: n }, (_, i) => `z${i + 1}`);
  const canonical = stateSpaceFromMatrices({
    A: Acomp,
    B: Bc,
    C: model.C.rows > 0 ? model.C.mmul(T) : new Matrix(0, n),
    D: model.D,
    F: model.F.columns > 0 ? solve(T, model.F) : new Matrix(n, 0),
    E: model.E,
    sampleTime: model.sampleTime,
    names: { ...model.names, states: names },
    units: { ...model.units, states: names.map(() => "") },
  });
  return { model: canonical, T, condition, characteristicPolynomial: a, residual, warning: warningFor(condition) };
}

/**
 * Computes: for a single-output model (C: 1×n) the observable canonical form
 *   A_o = A_cᵀ (companion transposed, last column −a), C_o = e_nᵀ, B_o = T⁻¹B, F_o = T⁻¹F,
 *   with x = T z; the dual of `controllableCanonicalForm`: with T_d from (Aᵀ, Cᵀ), T = T_d⁻ᵀ.
 * Requires: C has one row; (A, C) observable (staircase); n ≥ 1.
 * Method, Cost, Accuracy: as `controllableCanonicalForm` on the dual pair; `residual` is
 *   ‖AᵀT_d − T_d A_c‖_F/(‖A‖_F‖T_d‖_F).
 * Errors: "invalid-argument" (not single-output), "empty", "not-observable" (naming the
 *   unobservable modes), "singular".
 * Example:
 *   observableCanonicalForm(createStateSpace({ A: [[-1, 0], [0, -2]], B: [[1], [0]], C: [[1, 1]] }))
 *   // A_o = [[0, −2], [1, −3]], C_o = [[0, 1]]
 */
export function observableCanonicalForm(model: StateSpace): CanonicalForm {
  const n = model.A.rows;
  if (model.C.rows !== 1) {
    throw new EngineError("invalid-argument", `the observable canonical form needs a single-output model (C is ${model.C.rows}×${n})`, { outputs: model.C.rows });
  }
  if (n === 0) throw new EngineError("empty", "the model has no states, so it has no canonical form", {});
  const s = structure(model);
  if (!s.observable) {
    throw new EngineError("not-observable", `the observable canonical form needs (A, C) observable; unobservable modes: ${formatModes(s.unobservableModes)}`, {
      unobservableModes: s.unobservableModes,
    });
  }
  const { T: Td, a, Acomp, residual } = companionBasis(model.A.transpose(), model.C.transpose());
  const condition = checkCondition(Td, n);
  const T = solve(Td.transpose(), Matrix.eye(n)); // T = T_d⁻ᵀ, so T⁻¹ = T_dᵀ
  const Co = new Matrix(1, n);
  Co.set(0, n - 1, 1);
  const names = Array.from({ length: n }, (_, i) => `z${i + 1}`);
  const canonical = stateSpaceFromMatrices({
    A: Acomp.transpose(),
    B: Td.transpose().mmul(model.B),
    C: Co,
    D: model.D,
    F: model.F.columns > 0 ? Td.transpose().mmul(model.F) : new Matrix(n, 0),
    E: model.E,
    sampleTime: model.sampleTime,
    names: { ...model.names, states: names },
    units: { ...model.units, states: names.map(() => "") },
  });
  return { model: canonical, T, condition, characteristicPolynomial: a, residual, warning: warningFor(condition) };
}

/** T with A T = T·companion(a), T e_n = b; a = [1, a_{n−1}, …, a₀]. */
function companionBasis(A: Matrix, b: Matrix): { T: Matrix; a: number[]; Acomp: Matrix; residual: number } {
  const n = A.rows;
  const lambdas: Complex[] = eigenvalues(A);
  const a = polynomialFromRoots(lambdas); // a[0] = 1, a[j] multiplies s^{n−j}
  const coeff = (k: number): number => a[n - k]!; // a_k, coefficient of s^k
  const T = new Matrix(n, n);
  let t = b.getColumn(0);
  T.setColumn(n - 1, t);
  for (let k = n - 1; k >= 1; k--) {
    const At = A.mmul(Matrix.columnVector(t)).getColumn(0);
    t = At.map((v, i) => v + coeff(k) * b.get(i, 0));
    T.setColumn(k - 1, t);
  }
  const Acomp = new Matrix(n, n);
  for (let i = 0; i + 1 < n; i++) Acomp.set(i, i + 1, 1);
  for (let j = 0; j < n; j++) Acomp.set(n - 1, j, -coeff(j));
  const res = A.mmul(T).sub(T.mmul(Acomp)).norm("frobenius");
  const scale = Math.max(A.norm("frobenius"), Number.MIN_VALUE) * Math.max(T.norm("frobenius"), Number.MIN_VALUE);
  return { T, a, Acomp, residual: res / scale };
}

function checkCondition(T: Matrix, n: number): number {
  const rcond = reciprocalCondition(T);
  if (!(rcond > n * Number.EPSILON)) {
    throw new EngineError("singular", `the canonical-form transformation is numerically singular (reciprocal condition ${rcond.toExponential(2)}); the pair is too close to uncontrollable for this form`, { reciprocalCondition: rcond });
  }
  return 1 / rcond;
}

function warningFor(condition: number): string | null {
  return condition > CANONICAL_CONDITION_WARNING
    ? `the canonical form is ill-conditioned: κ(T) = ${condition.toExponential(2)}, so about ${Math.round(Math.log10(condition))} significant digits are lost in its coefficients; prefer the modal or staircase form for computation`
    : null;
}

function formatModes(modes: Complex[]): string {
  return modes.map((l) => (l.im === 0 ? `${l.re}` : `${l.re}${l.im >= 0 ? "+" : "−"}${Math.abs(l.im)}i`)).join(", ");
}
