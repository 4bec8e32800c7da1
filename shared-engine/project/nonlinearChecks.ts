/**
 * The pipeline's nonlinear steps: report the operating point and linearization of a nonlinear
 * plant, simulate the nonlinear plant under the designed state feedback (`nonlinearCheck`),
 * and sweep its parameters with the gain fixed (`robustness`).
 *
 * Sign convention (do not "simplify"): the design layer integrates xᵢ' = r − y and applies
 * u = −Kx·x − Ki·xᵢ; the nonlinear simulator and the sweep integrate e = y − r and apply
 * u = u0 + sat(−K(x − x0) − Ki_sim·∫e). The same control law therefore needs Ki_sim = −Ki.
 */
import type { Matrix } from "ml-matrix";
import { robustnessSweep, simulateClosedLoop } from "../nonlinear";
import type { BuiltNonlinearPlant } from "./buildPlant";
import type { VariantSpec } from "./format";
import type { PlantReport, VariantResult } from "./result";

/** Default bound of the "nonlinear-agrees" check: divergence ≤ 10 % of the predicted excursion (common practice for a small-signal validity check). */
export const NONLINEAR_AGREEMENT_DEFAULT = 0.1;

const byName = (names: readonly string[], values: readonly number[]): Record<string, number> =>
  Object.fromEntries(names.map((name, i) => [name, values[i]!]));

/**
 * Computes: the `operatingPoint` ({states, inputs, disturbances, outputs} by name, residual,
 *   iterations) and `linearization` ({A, B, C, D, F, E}) fields of a plant report.
 * Requires: a plant built by `buildNonlinearPlant`.
 * Method: copies of the solved point and the Jacobians. Cost: O(n² + n·m + ...).
 * Accuracy: as `buildNonlinearPlant`. Errors: none.
 * Example: nonlinearPlantFields(built).operatingPoint.inputs.requested_consumers // 40 (queue example)
 */
export function nonlinearPlantFields(built: BuiltNonlinearPlant): Pick<PlantReport, "operatingPoint" | "linearization"> {
  const { point, linearization } = built;
  const m = linearization.model;
  return {
    operatingPoint: {
      states: byName(point.names.states, point.states),
      inputs: byName(point.names.inputs, point.inputs),
      disturbances: byName(point.names.disturbances, point.disturbances),
      outputs: byName(point.names.outputs, point.outputs),
      residual: point.residual,
      iterations: point.iterations,
    },
    linearization: {
      A: m.A.to2DArray(), B: m.B.to2DArray(), C: m.C.to2DArray(),
      D: m.D.to2DArray(), F: m.F.to2DArray(), E: m.E.to2DArray(),
    },
  };
}

export interface FeedbackGains {
  /** m×n gain on the plant states (u = −K x − Ki xᵢ, design convention). */
  K: Matrix;
  /** m×r gain on the integrators xᵢ' = r − y (design convention), when integral action is on. */
  Ki?: Matrix;
  /** Names of the integrated outputs, in the order of Ki's columns. */
  integratedOutputs: string[];
}

/**
 * Computes: `result.nonlinear` and the check "nonlinear-agrees": the nonlinear plant under
 *   u = u0 + sat(−K(x − x0) − Ki_sim·∫(y − r)), Ki_sim = −Ki (see the file comment), states
 *   measured, continuous or sampled at the variant's `discretize.sampleTime` (zero-order hold,
 *   rate limits applied), beside the linearized loop's prediction.
 * Requires: a variant with `nonlinearCheck` and a state-feedback design on a nonlinear plant.
 * Method: `simulateClosedLoop` (Dormand–Prince 5(4) for the plant, exact matrix exponentials
 *   for the prediction). The check passes when the run did not stop early and
 *   max|y − y_lin| ≤ relativeTolerance·max|y_lin − y0| (relativeTolerance default 0.1); with
 *   no predicted excursion the bound is 1e-9·(1 + max|y0|).
 * Cost: as `simulateClosedLoop`.
 * Accuracy: the simulator's (rtol 1e-8, atol 1e-10).
 * Errors: "invalid-argument" (names in the scenario, set-point step on an output without
 *   integral action, times), "no-convergence", "cancelled", from the simulator.
 * Example: a +1 msg set-point step on the queue example agrees with the linear step to < 1e-3 relative.
 */
export function runNonlinearCheck(built: BuiltNonlinearPlant, variant: VariantSpec, gains: FeedbackGains, result: VariantResult): void {
  const spec = variant.nonlinearCheck!;
  const { plant, point } = built;
  const warnings: string[] = [];
  if (variant.observer) warnings.push("the observer is not simulated: the nonlinear check feeds back the measured states");
  if (variant.discretize && variant.discretize.method !== "zoh") {
    warnings.push(`the gain was designed on a ${variant.discretize.method} model; the simulation holds the input over each sample (zero-order hold)`);
  }
  const sampleTime = variant.discretize?.sampleTime ?? null;
  const sim = simulateClosedLoop({
    plant,
    operatingPoint: point,
    K: gains.K,
    integral: gains.Ki
      ? { outputs: gains.integratedOutputs, Ki: gains.Ki.clone().mul(-1), antiWindup: variant.integralAction?.antiWindup ?? "back-calculation" }
      : undefined,
    sampleTime,
    scenario: spec.scenario,
    times: spec.times,
  });
  warnings.push(...sim.warnings);
  const transpose = (rows: number[][], count: number): number[][] =>
    Array.from({ length: count }, (_, j) => rows.map((row) => row[j]!));
  const p = plant.p;
  let excursion = 0;
  sim.linear.outputs.forEach((row) => row.forEach((v, j) => { excursion = Math.max(excursion, Math.abs(v - point.outputs[j]!)); }));
  const relative = spec.relativeTolerance ?? NONLINEAR_AGREEMENT_DEFAULT;
  const y0Scale = Math.max(0, ...point.outputs.map(Math.abs));
  const limit = excursion > 0 ? relative * excursion : 1e-9 * (1 + y0Scale);
  const divergence = sim.largestDivergence?.size ?? 0;
  const passed = sim.stoppedEarly === null && divergence <= limit;
  result.nonlinear = {
    time: sim.time,
    outputNames: [...sim.names.outputs],
    inputNames: [...sim.names.inputs],
    output: transpose(sim.outputs, p),
    linearOutput: transpose(sim.linear.outputs.slice(0, sim.time.length), p),
    input: transpose(sim.inputs, plant.m),
    largestDivergence: sim.largestDivergence,
    linearExcursion: excursion,
    saturated: sim.saturated,
    stoppedEarly: sim.stoppedEarly,
    controller: sampleTime === null ? "continuous" : sampleTime,
    warnings,
  };
  result.checks.push({
    name: "nonlinear-agrees",
    passed,
    detail: sim.stoppedEarly
      ? `the nonlinear simulation stopped at t = ${sim.stoppedEarly.time} s: ${sim.stoppedEarly.reason}`
      : `largest |y − y_linear| = ${divergence.toExponential(3)}${sim.largestDivergence ? ` (${sim.largestDivergence.output} at t = ${sim.largestDivergence.time} s)` : ""}; allowed ${relative} × the predicted excursion ${excursion.toExponential(3)}${sim.saturated ? "; an input saturated" : ""}`,
    value: divergence,
    limit,
  });
  result.warnings.push(...warnings.map((w) => `nonlinear check: ${w}`));
}

/**
 * Computes: `result.robustness` and the check "robust-stability": the fixed gain [K Ki] on the
 *   re-solved, re-linearized plant at each parameter sample (grid or seeded random); with
 *   `discretize`, the controller sampled at its period and the plant seen through a
 *   zero-order hold (the law the nonlinear check simulates).
 * Requires: a state-feedback design on a nonlinear plant.
 * Method: `robustnessSweep` with Ki_sim = −Ki (see the file comment). The check passes when
 *   every sample's operating point was solved and its closed loop is stable (continuous: value
 *   the largest real part, limit 0; sampled: value the largest |z|, limit 1).
 * Cost: per sample one Newton solve, one eigenvalue problem of size n + r, and for one input
 *   one margin computation.
 * Accuracy: poles as the eigenvalue routine (backward stable).
 * Errors: "invalid-argument" (unknown parameter, bad sampling), and the
 *   nominal operating point's errors.
 * Example: the queue example with μ and K ±20 % on a 5×5 grid: 25 samples, all stable.
 */
export function runRobustness(built: BuiltNonlinearPlant, variant: VariantSpec, gains: FeedbackGains, result: VariantResult): void {
  const spec = variant.robustness!;
  const sampleTime = variant.discretize?.sampleTime ?? null;
  if (variant.discretize && variant.discretize.method !== "zoh") {
    result.warnings.push(`robustness: the gain was designed on a ${variant.discretize.method} model; the sweep sees the plant through a zero-order hold`);
  }
  const sweep = robustnessSweep({
    sampleTime,
    plant: built.plant,
    operatingPoint: built.request,
    K: gains.K,
    integral: gains.Ki ? { outputs: gains.integratedOutputs, Ki: gains.Ki.clone().mul(-1) } : undefined,
    parameters: spec.parameters,
    sampling: spec.sampling,
  });
  const cloud = sweep.samples.flatMap((s) => s.poles.map((z) => ({ re: z.re, im: z.im })));
  const largestRealPart = cloud.length > 0 && sampleTime === null ? Math.max(...cloud.map((z) => z.re)) : null;
  const largestPoleMagnitude = cloud.length > 0 && sampleTime !== null ? Math.max(...cloud.map((z) => Math.hypot(z.re, z.im))) : null;
  const [measure, value, limit] = sampleTime === null ? ["largest real part", largestRealPart, 0] : ["largest pole magnitude", largestPoleMagnitude, 1];
  result.robustness = {
    parameterNames: sweep.parameterNames,
    samples: sweep.samples.length,
    allStable: sweep.allStable,
    failedSamples: sweep.failedSamples,
    worstGainMarginDb: sweep.worstGainMarginDb,
    worstPhaseMarginDeg: sweep.worstPhaseMarginDeg,
    poleCloud: cloud,
    sampleTime,
    largestRealPart,
    largestPoleMagnitude,
    marginsNote: sweep.marginsNote,
  };
  const unstable = sweep.samples.filter((s) => !s.stable && s.error === null).length;
  const firstError = sweep.samples.find((s) => s.error !== null)?.error;
  result.checks.push({
    name: "robust-stability",
    passed: sweep.allStable,
    detail: sweep.allStable
      ? `all ${sweep.samples.length} parameter samples (${sweep.parameterNames.join(", ")}) give a stable closed loop${sampleTime === null ? "" : ` sampled at ${sampleTime} s`} (${measure} ${value === null ? "none" : value.toExponential(3)})`
      : `${unstable} of ${sweep.samples.length} samples unstable, ${sweep.failedSamples} without an operating point${firstError ? ` (first: ${firstError.message})` : ""}`,
    ...(value !== null ? { value, limit } : {}),
  });
}
