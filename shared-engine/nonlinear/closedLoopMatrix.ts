/**
 * The closed-loop matrix of a linearized plant under state feedback with integral action, used
 * by the closed-loop simulation (its linear prediction and default tracking time) and by the
 * robustness sweep (closed-loop poles per parameter set).
 */
import { Matrix } from "ml-matrix";

/**
 * The continuous closed-loop matrix of [δx; ξ] under u = −Kδx − Kiξ, ξ' = C_I δx + D_I δu:
 * [[A − BK, −BKi], [C_I − D_I K, −D_I Ki]] (C_I, D_I: the tracked rows of C, D).
 */
export function closedLoopMatrix(A: Matrix, B: Matrix, C: Matrix, D: Matrix, K: Matrix, Ki: Matrix, tracked: number[]): Matrix {
  const n = A.rows;
  const r = tracked.length;
  const M = new Matrix(n + r, n + r);
  const BK = B.mmul(K);
  const BKi = B.mmul(Ki);
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < n; j++) M.set(i, j, A.get(i, j) - BK.get(i, j));
    for (let j = 0; j < r; j++) M.set(i, n + j, -BKi.get(i, j));
  }
  if (r > 0) {
    const CI = new Matrix(tracked.map((t) => C.getRow(t)));
    const DI = new Matrix(tracked.map((t) => D.getRow(t)));
    const DK = DI.mmul(K);
    const DKi = DI.mmul(Ki);
    for (let i = 0; i < r; i++) {
      for (let j = 0; j < n; j++) M.set(n + i, j, CI.get(i, j) - DK.get(i, j));
      for (let j = 0; j < r; j++) M.set(n + i, n + j, -DKi.get(i, j));
    }
  }
  return M;
}
