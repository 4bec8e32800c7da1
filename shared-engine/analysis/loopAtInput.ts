/**
 * The state-feedback loop broken at one plant input, the other inputs' loops closed: the loop
 * whose margins are "the margins at the plant input" (loop at a time for several inputs).
 */
import { Matrix } from "ml-matrix";
import { stateSpaceFromMatrices, type StateSpace } from "../model";

/**
 * Computes: L_j = K_j (sI − A + B_{≠j} K_{≠j})⁻¹ B_j (or the same in z when sampled) for the
 *   loop x' = A x + B u, u = −K x, broken at input channel j. Negative feedback closes it:
 *   u_j = −L_j u_j. A: n×n, B: n×m, K: m×n, 0 ≤ j < m.
 * Requires: consistent shapes (callers pass a designed loop). Method: the closed other channels
 *   folded into A by rank-one updates, channel by channel. Cost O(m·n²). Accuracy: exact
 *   arithmetic on the given matrices. Errors: none of its own.
 * Example: loopAtInput(A, B, K, 0, null) for a single-input loop is K(sI − A)⁻¹B.
 */
export function loopAtInput(A: Matrix, B: Matrix, K: Matrix, j: number, sampleTime: number | null): StateSpace {
  const m = B.columns;
  let Aj = A.clone();
  for (let c = 0; c < m; c++) {
    if (c === j) continue;
    Aj = Aj.sub(B.subMatrixColumn([c]).mmul(K.subMatrixRow([c])));
  }
  return stateSpaceFromMatrices({
    A: Aj,
    B: B.subMatrixColumn([j]),
    C: K.subMatrixRow([j]),
    D: new Matrix(1, 1),
    sampleTime,
  });
}
