/**
 * Steady-state (DC) gain of a state-space model, with an explicit answer when an integrator
 * makes it unbounded.
 */
import { Matrix, solve } from "ml-matrix";
import { EngineError } from "../errors";
import { reciprocalCondition } from "../linalg";
import type { StateSpace } from "../model";
import { minimalPart } from "./minimalRealization";

export type DcGainReason =
  | "pole at s = 0 (integrator): the DC gain is unbounded"
  | "pole at z = 1 (integrator): the DC gain is unbounded";

export interface DcGain {
  /** p×m matrix G(0) (continuous) or G(1) (sampled); null when a pole makes it unbounded. */
  gain: number[][] | null;
  reason?: DcGainReason;
}

/**
 * Computes: G(0) = D − C A⁻¹ B for continuous models, G(1) = D + C (I − A)⁻¹ B for sampled
 *   ones (A: n×n, B: n×m, C: p×n, D: p×m); from inputs u only.
 * Requires: a valid model. n = 0 gives D.
 * Method: M = A (resp. I − A). If M is well conditioned (reciprocal 2-norm condition >
 *   1000·n·ε), solve M X = B by LU with partial pivoting. Otherwise the near-singular M may be
 *   due to modes that do not reach y from u, so the minimal part of (A, B, C) is taken first
 *   (staircase, Van Dooren 1981) and the test is repeated: a pole at s = 0 (z = 1) that
 *   remains there gives `gain: null` with the reason; a cancelled one does not.
 * Cost: one SVD and one LU of n×n (≈ 15n³), plus two staircases in the near-singular case.
 * Accuracy: relative error ≈ κ(M)·ε in X; the threshold 1000·n·ε makes "unbounded" mean
 *   that the gain would exceed ~1/(1000nε) relative to ‖B‖‖C‖/‖M‖. Results checked finite.
 * Errors: "non-finite" if the solve overflowed; "no-convergence" from eigenvalue routines.
 * Example:
 *   dcGain(createStateSpace({ A: [[-2]], B: [[4]], C: [[1]] })).gain // [[2]]
 *   dcGain(createStateSpace({ A: [[0]], B: [[1]], C: [[1]] })) // gain null, reason "pole at s = 0 …"
 */
export function dcGain(model: StateSpace): DcGain {
  const discrete = model.sampleTime !== null;
  const n = model.A.rows;
  if (n === 0) return { gain: model.D.to2DArray() };
  const shifted = (A: Matrix): Matrix => (discrete ? Matrix.eye(A.rows).sub(A) : A.clone());
  const wellConditioned = (M: Matrix): boolean => M.rows === 0 || reciprocalCondition(M) > 1000 * M.rows * Number.EPSILON;
  let A = model.A;
  let B = model.B;
  let C = model.C;
  if (!wellConditioned(shifted(A))) {
    const part = minimalPart(A, B, C);
    if (!wellConditioned(shifted(part.A))) {
      return {
        gain: null,
        reason: discrete ? "pole at z = 1 (integrator): the DC gain is unbounded" : "pole at s = 0 (integrator): the DC gain is unbounded",
      };
    }
    ({ A, B, C } = part);
  }
  const p = model.D.rows;
  const m = model.D.columns;
  const G = model.D.clone();
  if (A.rows > 0 && m > 0 && p > 0) {
    const X = solve(shifted(A), B); // M X = B
    const CX = C.mmul(X);
    // G(0) = D − C A⁻¹ B; G(1) = D + C (I − A)⁻¹ B
    for (let i = 0; i < p; i++) for (let j = 0; j < m; j++) G.set(i, j, G.get(i, j) + (discrete ? 1 : -1) * CX.get(i, j));
  }
  const gain = G.to2DArray();
  gain.forEach((row, i) => row.forEach((v, j) => {
    if (!Number.isFinite(v)) throw new EngineError("non-finite", `DC gain entry [${i}][${j}] overflowed (${v})`, { row: i, col: j });
  }));
  return { gain };
}
