/**
 * Controllability and observability Gramians of stable models (Lyapunov / Stein equations) and
 * the Hankel singular values.
 */
import { Matrix, SingularValueDecomposition } from "ml-matrix";
import { EngineError } from "../errors";
import { realSchur, solveContinuousLyapunov, solveDiscreteLyapunov } from "../linalg";
import type { StateSpace } from "../model";
import { stability } from "./stability";

export interface Gramians {
  /** W_c: n×n symmetric positive semidefinite. */
  controllability: Matrix;
  /** W_o: n×n symmetric positive semidefinite. */
  observability: Matrix;
  /** Relative residuals of the two equations (see Accuracy). */
  residuals: { controllability: number; observability: number };
}

/**
 * Computes: for continuous models the solutions of A W_c + W_c Aᵀ + B Bᵀ = 0 and
 *   Aᵀ W_o + W_o A + CᵀC = 0; for sampled models of A W_c Aᵀ − W_c + B Bᵀ = 0 and
 *   Aᵀ W_o A − W_o + CᵀC = 0 (A: n×n, B: n×m, C: p×n; inputs u only).
 * Requires: the model is asymptotically stable (`stability(model).stable`), n ≥ 1.
 * Method: Bartels–Stewart on one real Schur form ("Solution of the matrix equation
 *   AX + XB = C", Comm. ACM 15(9), 1972) for the Lyapunov equations, Barraud's Schur method
 *   (IEEE TAC 22(5), 1977) for the Stein equations (`solveContinuousLyapunov`,
 *   `solveDiscreteLyapunov`); results symmetrised (W + Wᵀ)/2.
 * Cost: two Schur-based solves, ≈ 70n³ flops; memory O(n²).
 * Accuracy: relative residual ‖A W + W Aᵀ + Q‖_F / (2‖A‖_F‖W‖_F + ‖Q‖_F) (Stein analogue with
 *   (‖A‖_F² + 1)‖W‖_F) is computed and returned; an "internal" error is thrown if it exceeds
 *   1e-8 (the solvers guarantee O(nε)).
 * Errors: "invalid-argument" when the model is not asymptotically stable, naming the unstable
 *   and boundary poles; "empty" when n = 0; "no-convergence" from the Schur iteration.
 * Example:
 *   gramians(createStateSpace({ A: [[-1]], B: [[2]], C: [[3]] }))
 *   // W_c = [[2]] (−2W + 4 = 0), W_o = [[4.5]]; residuals ≈ 0
 */
export function gramians(model: StateSpace): Gramians {
  requireStable(model);
  const { A, B, C } = model;
  const discrete = model.sampleTime !== null;
  const At = A.transpose();
  const BBt = B.columns > 0 ? B.mmul(B.transpose()) : Matrix.zeros(A.rows, A.rows);
  const CtC = C.rows > 0 ? C.transpose().mmul(C) : Matrix.zeros(A.rows, A.rows);
  const solveFor = (M: Matrix, Q: Matrix): Matrix => symmetrize(discrete ? solveDiscreteLyapunov(M, Q) : solveContinuousLyapunov(M, Q));
  const controllability = solveFor(A, BBt);
  const observability = solveFor(At, CtC);
  const residuals = {
    controllability: relativeResidual(A, controllability, BBt, discrete),
    observability: relativeResidual(At, observability, CtC, discrete),
  };
  for (const [what, r] of Object.entries(residuals)) {
    if (!(r <= 1e-8)) throw new EngineError("internal", `the ${what} Gramian equation has relative residual ${r.toExponential(2)}`, { residual: r });
  }
  return { controllability, observability, residuals };
}

/**
 * Computes: the Hankel singular values σ₁ ≥ … ≥ σ_n ≥ 0 of a stable model: σᵢ = √λᵢ(W_c W_o).
 * Requires: asymptotically stable model, n ≥ 1.
 * Method: square-root method (A. J. Laub, M. T. Heath, C. C. Paige & R. C. Ward, "Computation
 *   of system balancing transformations and other applications of simultaneous
 *   diagonalization algorithms", IEEE TAC 32(2):115–122, 1987): W_c = L_c L_cᵀ and W_o = L_o L_oᵀ
 *   from symmetric eigendecompositions (negative rounding eigenvalues clipped to 0), then
 *   σ = singular values of L_oᵀ L_c, avoiding the non-symmetric product W_c W_o.
 * Cost: the Gramians (≈ 70n³) plus two symmetric eigendecompositions and one SVD (≈ 30n³).
 * Accuracy: absolute error ≈ n·ε·‖W_c‖^{1/2}‖W_o‖^{1/2} plus the Gramians' own error
 *   (backward stable factors); σ far below σ₁ lose relative accuracy.
 * Errors: as `gramians`.
 * Example: hankelSingularValues(createStateSpace({ A: [[-1]], B: [[2]], C: [[3]] })) // [3] = √(2·4.5)
 */
export function hankelSingularValues(model: StateSpace): number[] {
  const g = gramians(model);
  const Lc = symmetricFactor(g.controllability);
  const Lo = symmetricFactor(g.observability);
  const M = Lo.transpose().mmul(Lc);
  const sv = new SingularValueDecomposition(M, { computeLeftSingularVectors: false, computeRightSingularVectors: false }).diagonal;
  const out = [...sv].sort((a, b) => b - a);
  if (!out.every(Number.isFinite)) throw new EngineError("non-finite", "Hankel singular values overflowed", {});
  return out;
}

function requireStable(model: StateSpace): void {
  if (model.A.rows === 0) throw new EngineError("empty", "the model has no states, so it has no Gramians", {});
  const s = stability(model);
  if (!s.stable) {
    const bad = [...s.unstablePoles, ...s.boundaryPoles].map((l) => (l.im === 0 ? `${l.re}` : `${l.re}${l.im >= 0 ? "+" : "−"}${Math.abs(l.im)}i`));
    const region = model.sampleTime === null ? "Re s < 0" : "|z| < 1";
    throw new EngineError("invalid-argument", `Gramians need an asymptotically stable model (every pole in ${region}); these poles are not: ${bad.join(", ")}`, {
      unstablePoles: s.unstablePoles,
      boundaryPoles: s.boundaryPoles,
    });
  }
}

function symmetrize(W: Matrix): Matrix {
  return W.clone().add(W.transpose()).mul(0.5);
}

function relativeResidual(A: Matrix, W: Matrix, Q: Matrix, discrete: boolean): number {
  const a = A.norm("frobenius");
  const w = W.norm("frobenius");
  const q = Q.norm("frobenius");
  const R = discrete ? A.mmul(W).mmul(A.transpose()).sub(W).add(Q) : A.mmul(W).add(W.mmul(A.transpose())).add(Q);
  const scale = discrete ? (a * a + 1) * w + q : 2 * a * w + q;
  return scale === 0 ? 0 : R.norm("frobenius") / scale;
}

/**
 * L with W = L Lᵀ for symmetric positive semidefinite W (eigenvalues below 0 set to 0). The
 * eigen-decomposition of the symmetric W is its real Schur form W = Q T Qᵀ (T diagonal up to
 * rounding), computed by our capped Francis QR: ml-matrix's eigen-decomposition has no
 * iteration cap and is never run on user data.
 */
function symmetricFactor(W: Matrix): Matrix {
  const { T, Q: V } = realSchur(W);
  const d = Array.from({ length: T.rows }, (_, j) => T.get(j, j));
  const L = V.clone();
  for (let j = 0; j < d.length; j++) {
    const s = Math.sqrt(Math.max(0, d[j]!));
    for (let i = 0; i < L.rows; i++) L.set(i, j, L.get(i, j) * s);
  }
  return L;
}
