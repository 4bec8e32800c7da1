/**
 * Linear-quadratic regulator: state feedback u = −Kx minimising ∫ xᵀQx + uᵀRu + 2xᵀNu dt
 * (or the sum over samples), from the continuous or discrete Riccati solution; weight sweeps
 * along R = ρR₀ (the symmetric root locus for a single input).
 */
import { EngineError } from "../errors";
import { asMatrix, type Complex, type MatrixInput } from "../linalg";
import type { RiccatiSolution } from "./riccati";
import { solveContinuousRiccati } from "./riccatiContinuous";
import { solveDiscreteRiccati } from "./riccatiDiscrete";
import { loopMargins, type LoopMarginReport } from "./lqrMargins";

export type { LoopMarginReport } from "./lqrMargins";

/** LQR design: the Riccati solution plus the sample time and, for one input, the margin report. */
export interface LqrResult extends RiccatiSolution {
  /** null for a continuous design, else the sample period in seconds. */
  sampleTime: number | null;
  /**
   * Margins of L(s) = K(sI − A)⁻¹B for a continuous single-input design (null otherwise). For
   * N = 0 the Safonov–Athans guarantee (gain margin [1/2, ∞), phase margin ≥ 60°, |1 + L| ≥ 1)
   * is checked numerically; `margins.guaranteeHolds` is false only if that check failed.
   */
  margins: LoopMarginReport | null;
}

function checkSampleTime(sampleTime: number | null | undefined): number | null {
  if (sampleTime === null || sampleTime === undefined) return null;
  if (typeof sampleTime !== "number" || !Number.isFinite(sampleTime) || sampleTime <= 0) {
    throw new EngineError("invalid-argument", `sampleTime must be a positive finite number of seconds or null for continuous time (it is ${String(sampleTime)})`, {
      argument: "sampleTime",
    });
  }
  return sampleTime;
}

/**
 * Computes: the LQR gain K (m×n) for x' = Ax + Bu (sampleTime null) or x[k+1] = Ax[k] + Bu[k]
 * (sampleTime = T > 0; A, B are then the discrete-time matrices), minimising
 * J = ∫ (xᵀQx + uᵀRu + 2xᵀNu) dt or Σ (xᵀQx + uᵀRu + 2xᵀNu), with A: n×n, B: n×m, Q: n×n,
 * R: m×m, N: n×m; X, closed-loop poles eig(A − BK), diagnostics and (continuous, m = 1) the
 * loop margins at the plant input.
 *
 * Requires: as `solveContinuousRiccati` / `solveDiscreteRiccati`.
 *
 * Method: K from the stabilizing Riccati solution (R. E. Kalman, "Contributions to the theory
 * of optimal control", Bol. Soc. Mat. Mexicana 5, 1960). Margin check: M. G. Safonov &
 * M. Athans, "Gain and phase margin for multiloop LQG regulators", IEEE Trans. Automatic
 * Control AC-22(2), 1977 — for R scalar and N = 0 the return difference satisfies
 * |1 + L(jω)| ≥ 1 (Kalman 1964, "When is a linear control system optimal?"), which gives gain
 * margin [1/2, ∞) and phase margin ≥ 60°; `loopMargins` evaluates it on a 40-point-per-decade
 * log grid with bisection of every crossing.
 *
 * Cost: the Riccati solve (≈ 200n³ continuous, ≈ 500n³ discrete) plus, for m = 1, O(n³) +
 * O(n²) per grid point (about 400 points).
 *
 * Accuracy: as the Riccati solvers (normalised residual ≤ √ε, stable closed loop checked).
 *
 * Errors: those of the Riccati solvers; "invalid-argument" for a sampleTime that is not a
 * positive finite number or null; "no-convergence" if a crossing refinement fails.
 *
 * Example:
 *   const d = lqr([[0, 1], [0, 0]], [[0], [1]], [[1, 0], [0, 2]], [[1]]);
 *   // d.K ≈ [[1, 2]], d.margins.phaseMarginDeg ≥ 60, d.residual < 1e-14
 */
export function lqr(
  A: MatrixInput, B: MatrixInput, Q: MatrixInput, R: MatrixInput, N?: MatrixInput | null, sampleTime?: number | null,
): LqrResult {
  const period = checkSampleTime(sampleTime);
  const solution = period === null ? solveContinuousRiccati(A, B, Q, R, N) : solveDiscreteRiccati(A, B, Q, R, N);
  let margins: LoopMarginReport | null = null;
  const Am = asMatrix(A, "A");
  const Bm = asMatrix(B, "B");
  if (period === null && Bm.columns === 1) {
    const hasCross = N !== null && N !== undefined && asMatrix(N, "N").to1DArray().some((v) => v !== 0);
    margins = loopMargins(Am, Bm, solution.K, solution.closedLoopPoles, !hasCross);
    if (margins.guaranteeApplies && !margins.guaranteeHolds) {
      solution.warnings.push(
        `The computed loop misses the LQR margin guarantee (min |1+L| = ${margins.minReturnDifference.toPrecision(6)}); the solution may be inaccurate`,
      );
    }
  }
  return { ...solution, sampleTime: period, margins };
}

/**
 * Computes: for each ρ in `rhoValues`, the LQR gain and closed-loop poles with R = ρ·R₀ — for a
 * single input the closed-loop poles trace the symmetric root locus as ρ goes from large
 * (expensive control: poles at the stable mirror images of the open-loop poles) to small.
 *
 * Requires: every ρ positive and finite; the other inputs as `lqr`.
 *
 * Method: one Riccati solve per ρ (symmetric root locus: Kalman 1964; see also Bryson & Ho,
 * "Applied Optimal Control", 1975, §5.5).
 *
 * Cost: len(rhoValues) Riccati solves. Accuracy: each solve is verified as in `lqr`.
 *
 * Errors: "empty" (no ρ), "invalid-argument" (ρ not positive finite, bad sampleTime), and
 * those of the Riccati solvers (naming the failing ρ in details.rho).
 *
 * Example:
 *   const sweep = lqrWeightSweep([[1]], [[1]], [[1]], [[1]], [1e-4, 1, 1e4]);
 *   // poles −√(1 + 1/ρ): [−100.005, −1.414, −1.00005]; each solve's residual is checked
 */
export function lqrWeightSweep(
  A: MatrixInput, B: MatrixInput, Q: MatrixInput, R0: MatrixInput, rhoValues: number[], sampleTime?: number | null,
): Array<{ rho: number; closedLoopPoles: Complex[]; K: number[][] }> {
  const period = checkSampleTime(sampleTime);
  if (!Array.isArray(rhoValues) || rhoValues.length === 0) {
    throw new EngineError("empty", "rhoValues is empty; give at least one positive weight factor ρ", { argument: "rhoValues" });
  }
  rhoValues.forEach((rho, i) => {
    if (typeof rho !== "number" || !Number.isFinite(rho) || rho <= 0) {
      throw new EngineError("invalid-argument", `rhoValues[${i}] must be a positive finite number (it is ${String(rho)})`, {
        argument: "rhoValues", index: i,
      });
    }
  });
  const R = asMatrix(R0, "R0");
  return rhoValues.map((rho) => {
    const scaled = R.clone().mul(rho);
    try {
      const s = period === null ? solveContinuousRiccati(A, B, Q, scaled) : solveDiscreteRiccati(A, B, Q, scaled);
      return { rho, closedLoopPoles: s.closedLoopPoles, K: s.K.to2DArray() };
    } catch (error) {
      if (error instanceof EngineError) throw new EngineError(error.kind, `With R = ${rho}·R0: ${error.message}`, { ...error.details, rho });
      throw error;
    }
  });
}
