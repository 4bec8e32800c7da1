/**
 * Steady-state Kalman filters (continuous and discrete) by duality with the regulator Riccati
 * equations: the filter equation for (A, C, GWGᵀ, V) is the regulator equation for
 * (Aᵀ, Cᵀ, GWGᵀ, V).
 */
import { Matrix, solve } from "ml-matrix";
import { EngineError } from "../errors";
import { asMatrix, requireFinite, requireNonEmpty, requireSquareFinite, shapeOf, type Complex, type MatrixInput } from "../linalg";
import type { RiccatiSolution } from "./riccati";
import { solveContinuousRiccati } from "./riccatiContinuous";
import { solveDiscreteRiccati } from "./riccatiDiscrete";

/** Steady-state filter: gain, error covariance and diagnostics of the dual Riccati solve. */
export interface KalmanFilter {
  /** Observer (predictor) gain, n×p: x̂' = Ax̂ + Bu + L(y − Cx̂) (or x̂[k+1] = … in discrete time). */
  L: Matrix;
  /** Steady-state error covariance (discrete: of the one-step prediction x̂[k|k−1]), n×n. */
  P: Matrix;
  /** Eigenvalues of A − LC. */
  observerPoles: Complex[];
  /** Relative residual ‖Res‖_F/‖P‖_F of the filter Riccati equation. */
  residual: number;
  conditionIndicator: number;
  refined: boolean;
  method: string;
  warnings: string[];
}

/** Discrete filter; with form "current" also the measurement-update gain M and covariance Z. */
export interface DiscreteKalmanFilter extends KalmanFilter {
  form: "predictor" | "current";
  /** Current-estimate gain (n×p): x̂[k|k] = x̂[k|k−1] + M(y[k] − Cx̂[k|k−1]). */
  M?: Matrix;
  /** Covariance of the current estimate, Z = P − MCP (n×n). */
  Z?: Matrix;
}

interface KalmanData { A: Matrix; C: Matrix; GW: Matrix; V: Matrix; GS: Matrix | null }

function prepare(
  Ain: MatrixInput, Cin: MatrixInput, Gin: MatrixInput | null | undefined, Win: MatrixInput, Vin: MatrixInput, Sin: MatrixInput | null | undefined,
): KalmanData {
  const A = asMatrix(Ain, "A");
  requireSquareFinite(A, "A");
  const n = A.rows;
  const C = asMatrix(Cin, "C");
  requireNonEmpty(C, "C");
  if (C.columns !== n) {
    throw new EngineError("shape-mismatch", `C must have as many columns as A has rows (A is ${shapeOf(A)}, C is ${shapeOf(C)})`, { argument: "C" });
  }
  requireFinite(C, "C");
  const G = Gin === null || Gin === undefined ? Matrix.eye(n, n) : asMatrix(Gin, "G");
  requireNonEmpty(G, "G");
  if (G.rows !== n) {
    throw new EngineError("shape-mismatch", `G must have as many rows as A (A is ${shapeOf(A)}, G is ${shapeOf(G)})`, { argument: "G" });
  }
  requireFinite(G, "G");
  const W = asMatrix(Win, "W");
  const V = asMatrix(Vin, "V");
  const q = G.columns;
  const p = C.rows;
  if (W.rows !== q || W.columns !== q) {
    throw new EngineError("shape-mismatch", `W must be ${q}×${q}, one row per process-noise input (G is ${shapeOf(G)}, W is ${shapeOf(W)})`, { argument: "W" });
  }
  if (V.rows !== p || V.columns !== p) {
    throw new EngineError("shape-mismatch", `V must be ${p}×${p}, one row per measurement (C is ${shapeOf(C)}, V is ${shapeOf(V)})`, { argument: "V" });
  }
  requireFinite(W, "W");
  requireFinite(V, "V");
  let GS: Matrix | null = null;
  if (Sin !== null && Sin !== undefined) {
    const S = asMatrix(Sin, "cross");
    if (S.rows !== q || S.columns !== p) {
      throw new EngineError("shape-mismatch", `cross must be ${q}×${p} (E[w vᵀ]; cross is ${shapeOf(S)})`, { argument: "cross" });
    }
    requireFinite(S, "cross");
    GS = G.mmul(S);
  }
  // GWGᵀ is formed symmetric even when W is only symmetric to rounding.
  const GW = G.mmul(W).mmul(G.transpose());
  const sym = GW.clone().add(GW.transpose()).mul(0.5);
  return { A, C, GW: sym, V, GS };
}

/** Runs the dual regulator solve; rewords weight errors in the filter's terms. */
function dualSolve(kind: "continuous" | "discrete", d: KalmanData): RiccatiSolution {
  const At = d.A.transpose();
  const Ct = d.C.transpose();
  try {
    return kind === "continuous"
      ? solveContinuousRiccati(At, Ct, d.GW, d.V, d.GS)
      : solveDiscreteRiccati(At, Ct, d.GW, d.V, d.GS);
  } catch (error) {
    if (error instanceof EngineError) {
      const msg = error.message
        .replace(/\bR must\b/, "V must")
        .replace(/\bQ must\b/, "GWGᵀ must")
        .replace("[Q N; Nᵀ R]", "[GWGᵀ GS; (GS)ᵀ V]")
        .replace("Q and R must", "W and V must")
        .replace("(A, B) may not be stabilizable or (Q, A) not detectable", "(C, A) may not be detectable or (A, GW^½) not stabilizable");
      throw new EngineError(error.kind, `Kalman filter: ${msg}`, { ...error.details, dualProblem: "regulator for (Aᵀ, Cᵀ, GWGᵀ, V, G·cross)" });
    }
    throw error;
  }
}

/**
 * Computes: the steady-state Kalman–Bucy filter for x' = Ax + Bu + Gw, y = Cx + v with
 * E[wwᵀ] = W δ, E[vvᵀ] = V δ, E[wvᵀ] = S δ (S = `cross`, zero when omitted): P (n×n) solving
 *   AP + PAᵀ − (PCᵀ + GS)V⁻¹(CP + SᵀGᵀ) + GWGᵀ = 0,
 * the gain L = (PCᵀ + GS)V⁻¹ (n×p) and the observer poles eig(A − LC). A: n×n, C: p×n,
 * G: n×q (identity when null), W: q×q, V: p×p, cross: q×p.
 *
 * Requires: V positive definite; [GWGᵀ GS; SᵀGᵀ V] positive semidefinite; (C, A) detectable;
 * no uncontrollable mode of (A, GW^½) on the imaginary axis.
 *
 * Method: duality (R. E. Kalman & R. S. Bucy, "New results in linear filtering and prediction
 * theory", Trans. ASME J. Basic Eng. 83, 1961): P = X of the regulator equation for
 * (Aᵀ, Cᵀ, GWGᵀ, V, GS), solved by `solveContinuousRiccati` (Laub's Schur method); L = Kᵀ.
 *
 * Cost: as `solveContinuousRiccati` with m = p (≈ 200n³ flops) plus O(n²q) for GWGᵀ.
 *
 * Accuracy: verified as in the regulator solve (normalised residual ≤ √ε, A − LC stable).
 *
 * Errors: "shape-mismatch", "non-finite", "empty" (inputs, named in the filter's terms);
 * "invalid-argument" (V not positive definite, weights not semidefinite);
 * "no-stabilizing-solution" (not detectable, or a noise-free undamped mode).
 *
 * Example:
 *   const f = kalmanContinuous([[0, 1], [0, 0]], [[1, 0]], [[0], [1]], [[1]], [[1]]);
 *   // f.L ≈ [[√2], [1]], f.residual < 1e-14
 */
export function kalmanContinuous(
  A: MatrixInput, C: MatrixInput, G: MatrixInput | null | undefined, W: MatrixInput, V: MatrixInput, cross?: MatrixInput | null,
): KalmanFilter {
  const d = prepare(A, C, G, W, V, cross);
  const s = dualSolve("continuous", d);
  return {
    L: s.K.transpose(),
    P: s.X,
    observerPoles: s.closedLoopPoles,
    residual: s.residual,
    conditionIndicator: s.conditionIndicator,
    refined: s.refined,
    method: `duality: ${s.method}`,
    warnings: s.warnings,
  };
}

/**
 * Computes: the steady-state discrete Kalman filter for x[k+1] = Ax[k] + Bu[k] + Gw[k],
 * y[k] = Cx[k] + v[k] with covariances W, V and cross covariance S = E[w vᵀ] (`cross`): the
 * prediction error covariance P (n×n) solving
 *   APAᵀ − P − (APCᵀ + GS)(CPCᵀ + V)⁻¹(CPAᵀ + SᵀGᵀ) + GWGᵀ = 0,
 * the predictor gain L = (APCᵀ + GS)(CPCᵀ + V)⁻¹ (n×p) and observer poles eig(A − LC). With
 * form "current" also M = PCᵀ(CPCᵀ + V)⁻¹ (n×p) and Z = P − MCP; then (for S = 0) L = A·M.
 *
 * Requires: [GWGᵀ GS; SᵀGᵀ V] positive semidefinite, CPCᵀ + V positive definite (V positive
 * definite suffices); (C, A) detectable; no noise-free mode of A on the unit circle. A may be
 * singular.
 *
 * Method: duality with the discrete regulator equation for (Aᵀ, Cᵀ, GWGᵀ, V, GS)
 * (R. E. Kalman, "A new approach to linear filtering and prediction problems", Trans. ASME J.
 * Basic Eng. 82, 1960), solved by `solveDiscreteRiccati` (QZ on the extended pencil).
 *
 * Cost: as `solveDiscreteRiccati` with m = p, plus O(n²p) for M and Z.
 *
 * Accuracy: verified as in the regulator solve (normalised residual ≤ √ε, |eig(A − LC)| < 1).
 *
 * Errors: as `kalmanContinuous`; "invalid-argument" for a form other than "predictor" or
 * "current".
 *
 * Example:
 *   const f = kalmanDiscrete([[1]], [[1]], null, [[1]], [[1]], "current");
 *   // P = (1 + √5)/2, M = P/(P + 1); residual < 1e-15
 */
export function kalmanDiscrete(
  A: MatrixInput, C: MatrixInput, G: MatrixInput | null | undefined, W: MatrixInput, V: MatrixInput,
  form: "predictor" | "current" = "predictor", cross?: MatrixInput | null,
): DiscreteKalmanFilter {
  if (form !== "predictor" && form !== "current") {
    throw new EngineError("invalid-argument", `form must be "predictor" or "current" (it is ${JSON.stringify(form)})`, { argument: "form" });
  }
  const d = prepare(A, C, G, W, V, cross);
  const s = dualSolve("discrete", d);
  const result: DiscreteKalmanFilter = {
    form,
    L: s.K.transpose(),
    P: s.X,
    observerPoles: s.closedLoopPoles,
    residual: s.residual,
    conditionIndicator: s.conditionIndicator,
    refined: s.refined,
    method: `duality: ${s.method}`,
    warnings: s.warnings,
  };
  if (form === "current") {
    const PCt = s.X.mmul(d.C.transpose());
    const innovation = d.C.mmul(PCt).add(d.V);
    // M = PCᵀ(CPCᵀ + V)⁻¹ via the transposed solve (CPCᵀ + V) Mᵀ = CP (innovation is symmetric).
    // It is positive definite whenever the dual solve succeeded (it is that solve's verified
    // R + BᵀXB), so ml-matrix's LU solve is safe; p is the (small) number of measurements.
    const M = solve(innovation, PCt.transpose()).transpose();
    const Z = s.X.clone().sub(M.mmul(d.C).mmul(s.X));
    result.M = M;
    result.Z = Z.add(Z.transpose()).mul(0.5);
  }
  return result;
}
