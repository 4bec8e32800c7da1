/**
 * Real modal (block-diagonal) form of a state-space model by an eigenvector similarity, with the
 * conditioning of the transformation and a warning when it is large.
 */
import { Matrix, solve } from "ml-matrix";
import { EngineError } from "../errors";
import { eigenvectors, reciprocalCondition, type Complex } from "../linalg";
import { stateSpaceFromMatrices, type StateSpace } from "../model";

/**
 * Above this κ₂(T) the modal form carries a warning: about log10(κ) of the 16 significant
 * digits are lost in T⁻¹·(·), and κ this large signals a nearly defective A (common practice:
 * a modal basis with κ > 1e6 is not trusted for decoupled design).
 */
export const MODAL_CONDITION_WARNING = 1e6;

export interface ModalBlock {
  /** Index of the block's first modal state. */
  start: number;
  size: 1 | 2;
  /** The real eigenvalue, or the member with positive imaginary part of the pair. */
  eigenvalue: Complex;
}

export interface ModalForm {
  /** z = T⁻¹x: A block diagonal ([[σ, ω], [−ω, σ]] per pair), B = T⁻¹B, F = T⁻¹F, C = CT. */
  model: StateSpace;
  /** n×n real, x = T z. Columns: eigenvector (real mode) or [Re v, Im v] (pair), unit 2-norm per block. */
  T: Matrix;
  blocks: ModalBlock[];
  /** κ₂(T) = σ_max/σ_min. */
  condition: number;
  /** ‖T⁻¹AT − Λ‖_F / max(‖A‖_F, tiny): how far the computed similarity is from block diagonal. */
  residual: number;
  /** Null, or a sentence saying the modal form is ill-conditioned and why. */
  warning: string | null;
}

/**
 * Computes: a real nonsingular T (n×n) with T⁻¹AT = Λ block diagonal: 1×1 blocks λ for real
 *   eigenvalues, 2×2 blocks [[σ, ω], [−ω, σ]] for pairs σ ± iω (ω > 0), and the transformed
 *   model (T⁻¹B, CT, T⁻¹F, D, E). Blocks are ordered by decreasing real part (continuous) or
 *   modulus (sampled): slowest mode first. Modal states are named mode1, mode2.re, mode2.im, …
 * Requires: A diagonalizable (not defective); n ≥ 1.
 * Method: right eigenvectors by Francis QR and back substitution on the Schur form
 *   (`eigenvectors`; Golub & Van Loan, "Matrix Computations", 4th ed., §7.6.4); for a pair with
 *   A v = (σ + iω) v, A [Re v, Im v] = [Re v, Im v]·[[σ, ω], [−ω, σ]] (real modal form, e.g.
 *   Kailath, "Linear Systems", 1980, §2.3 (from memory)). Λ is built from the eigenvalues;
 *   T⁻¹(·) by LU with partial pivoting.
 * Cost: ≈ 30n³ (eigenvectors) + one SVD for κ₂(T) (≈ 12n³) + LU solves; memory O(n²).
 * Accuracy: the residual ‖T⁻¹AT − Λ‖_F/‖A‖_F is returned; it is O(κ(T)·n·ε). κ(T) >
 *   MODAL_CONDITION_WARNING sets `warning`.
 * Errors: "empty" (n = 0), "singular" when T is numerically singular (κ₂(T) ≥ 1/(n·ε): A is
 *   defective, e.g. a Jordan block; no modal form exists), "no-convergence" from QR.
 * Example:
 *   const r = modalForm(createStateSpace({ A: [[0, 1], [-5, -2]], B: [[0], [1]], C: [[1, 0]] }));
 *   // r.model.A = [[−1, 2], [−2, −1]]; ‖A·T − T·r.model.A‖_F < 1e-14·‖T‖
 */
export function modalForm(model: StateSpace): ModalForm {
  const { A } = model;
  const n = A.rows;
  if (n === 0) throw new EngineError("empty", "the model has no states, so it has no modal form", {});
  const discrete = model.sampleTime !== null;
  const { values, vectors } = eigenvectors(A);
  // One entry per real eigenvalue or conjugate pair (+im member), with its real basis columns.
  const modes: { eigenvalue: Complex; columns: number[][] }[] = [];
  for (let k = 0; k < n; k++) {
    const l = values[k]!;
    const v = vectors[k]!;
    if (l.im === 0) {
      modes.push({ eigenvalue: l, columns: [v.map((c) => c.re)] });
    } else if (l.im > 0) {
      const re = v.map((c) => c.re);
      const im = v.map((c) => c.im);
      const scale = Math.hypot(...re, ...im);
      modes.push({ eigenvalue: l, columns: [re.map((x) => x / scale), im.map((x) => x / scale)] });
    }
  }
  const key = (l: Complex): number => (discrete ? Math.hypot(l.re, l.im) : l.re);
  modes.sort((a, b) => key(b.eigenvalue) - key(a.eigenvalue) || b.eigenvalue.im - a.eigenvalue.im);
  const T = new Matrix(n, n);
  const Lambda = new Matrix(n, n);
  const blocks: ModalBlock[] = [];
  const names: string[] = [];
  let col = 0;
  modes.forEach((mode, index) => {
    const { re: s, im: w } = mode.eigenvalue;
    mode.columns.forEach((c, j) => c.forEach((x, i) => T.set(i, col + j, x)));
    if (mode.columns.length === 1) {
      Lambda.set(col, col, s);
      names.push(`mode${index + 1}`);
    } else {
      Lambda.set(col, col, s);
      Lambda.set(col + 1, col + 1, s);
      Lambda.set(col, col + 1, w);
      Lambda.set(col + 1, col, -w);
      names.push(`mode${index + 1}.re`, `mode${index + 1}.im`);
    }
    blocks.push({ start: col, size: mode.columns.length as 1 | 2, eigenvalue: mode.eigenvalue });
    col += mode.columns.length;
  });
  if (col !== n) throw new EngineError("internal", `modal basis has ${col} columns for n = ${n}`, {});
  const rcond = reciprocalCondition(T);
  if (!(rcond > n * Number.EPSILON)) {
    throw new EngineError(
      "singular",
      `A is defective (or numerically so): its eigenvector matrix is singular (reciprocal condition ${rcond.toExponential(2)}), so no modal (block-diagonal) form exists; use the real Schur form instead`,
      { reciprocalCondition: rcond },
    );
  }
  const condition = 1 / rcond;
  const invTimes = (M: Matrix): Matrix => (M.columns === 0 ? new Matrix(n, 0) : solve(T, M));
  const residual = invTimes(A.mmul(T)).sub(Lambda).norm("frobenius") / Math.max(A.norm("frobenius"), Number.MIN_VALUE);
  const warning = condition > MODAL_CONDITION_WARNING
    ? `the modal form is ill-conditioned: κ(T) = ${condition.toExponential(2)}, so A is nearly defective (eigenvectors nearly parallel) and about ${Math.round(Math.log10(condition))} significant digits are lost in the modal coordinates`
    : null;
  const transformed = stateSpaceFromMatrices({
    A: Lambda,
    B: invTimes(model.B),
    C: model.C.rows > 0 ? model.C.mmul(T) : new Matrix(0, n),
    D: model.D,
    F: invTimes(model.F),
    E: model.E,
    sampleTime: model.sampleTime,
    names: { ...model.names, states: names },
    units: { ...model.units, states: names.map(() => "") },
  });
  return { model: transformed, T, blocks, condition, residual, warning };
}
