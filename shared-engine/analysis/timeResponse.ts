/**
 * Time responses of linear state-space models to the standard test signals: the step, impulse
 * and initial-condition responses, each built as an input sequence (or initial state) for the
 * exact sampled simulation `simulateLinear`.
 *
 * The simulation itself lives in `simulateLinear.ts`, the time grids and the default horizon in
 * `timeGrid.ts`, the per-step transition matrices in `transitionMatrices.ts`; their public names
 * are re-exported here so that `analysis/timeResponse` stays one import path for all of them.
 */
import { EngineError } from "../errors";
import type { StateSpace } from "../model";
import { simulateLinear, type TimeResponse } from "./simulateLinear";
import { resolveGrid, type TimeGrid } from "./timeGrid";

export { simulateLinear, type SimulateOptions, type TimeResponse } from "./simulateLinear";
export { defaultHorizon, type TimeGrid } from "./timeGrid";

/**
 * Computes: the response to a unit step on input `input` (default 0) or on disturbance
 *   `input` when `from` is "disturbance", starting from x = 0: u_j(t) = 1 for t ≥ t₀.
 * Requires: input index in range; a grid as for `simulateLinear`, or `{ horizonSec, points }`
 *   (defaults: `defaultHorizon(model)` and 501 points; sampled models always use t_k = k·T up
 *   to the horizon, `points` then caps the number of samples).
 * Method: `simulateLinear` with a constant input, which is exact for a step (zero-order hold).
 * Cost/Accuracy: as `simulateLinear`; measured against scipy.signal.step / lsim / dstep
 *   fixtures: relative error ≤ 1e-12.
 * Errors: "invalid-argument" (bad index or grid), and those of `simulateLinear`.
 * Example: stepResponse(1/(s+1), [0, 1]).outputs[0][1] ≈ 1 − e⁻¹ (check |error| < 1e-15).
 */
export function stepResponse(model: StateSpace, times: TimeGrid, options: { input?: number; from?: "input" | "disturbance" } = {}): TimeResponse {
  const { index, fromDisturbance } = checkChannel(model, options);
  const t = resolveGrid(model, times);
  const width = fromDisturbance ? model.F.columns : model.B.columns;
  const unit = Array.from({ length: t.length }, () => Array.from({ length: width }, (_, j) => (j === index ? 1 : 0)));
  const zerosU = Array.from({ length: t.length }, () => new Array<number>(model.B.columns).fill(0));
  return fromDisturbance ? simulateLinear(model, t, zerosU, { w: unit }) : simulateLinear(model, t, unit);
}

/**
 * Computes: the impulse response from input (or disturbance) `input`.
 *   Continuous: y(t) = C e^{A(t − t₀)} b for t ≥ t₀ (x(t₀⁺) = b, the column of B or F); the
 *   D·δ(t) term cannot be sampled and is omitted (a warning says so when D ≠ 0).
 *   Sampled: the unit pulse u[0] = 1, u[k] = 0 afterwards, so y[0] = d and y[k] = C A^{k−1} b.
 * Requires/Cost/Errors: as `stepResponse`. Method: initial-state response (continuous) or
 *   `simulateLinear` with the pulse sequence (sampled).
 * Accuracy: measured against scipy.signal.impulse / dimpulse fixtures: relative ≤ 1e-12.
 * Example: impulseResponse(1/(s+1), [0, 1]).outputs[0][1] ≈ e⁻¹.
 */
export function impulseResponse(model: StateSpace, times: TimeGrid, options: { input?: number; from?: "input" | "disturbance" } = {}): TimeResponse {
  const { index, fromDisturbance } = checkChannel(model, options);
  const t = resolveGrid(model, times);
  const m = model.B.columns;
  const q = model.F.columns;
  if (model.sampleTime !== null) {
    const pulse = (width: number) => t.map((_, k) => Array.from({ length: width }, (_, j) => (k === 0 && j === index ? 1 : 0)));
    return fromDisturbance ? simulateLinear(model, t, pulse(0).map(() => new Array<number>(m).fill(0)), { w: pulse(q) }) : simulateLinear(model, t, pulse(m));
  }
  const G = fromDisturbance ? model.F : model.B;
  const H = fromDisturbance ? model.E : model.D;
  const x0 = Array.from({ length: model.A.rows }, (_, i) => G.get(i, index));
  const result = simulateLinear(model, t, t.map(() => new Array<number>(m).fill(0)), { x0 });
  let feedthrough = false;
  for (let i = 0; i < H.rows; i++) if (H.get(i, index) !== 0) feedthrough = true;
  if (feedthrough) result.warnings.push(`the direct term ${fromDisturbance ? "E" : "D"}·δ(t) of channel ${index + 1} is an impulse at t = ${t[0]} and is not included in the samples`);
  return result;
}

/**
 * Computes: the free response y(t) = C e^{A(t − t₀)} x0 (continuous) or C A^k x0 (sampled).
 * Requires: x0 of length n, finite. Method/Cost/Accuracy/Errors: as `simulateLinear` with u = 0.
 * Example: initialResponse(1/(s+1) realisation, [2], [0, 1]).states[0][1] ≈ 2e⁻¹.
 */
export function initialResponse(model: StateSpace, x0: number[], times: TimeGrid): TimeResponse {
  const t = resolveGrid(model, times);
  return simulateLinear(model, t, t.map(() => new Array<number>(model.B.columns).fill(0)), { x0 });
}

function checkChannel(model: StateSpace, options: { input?: number; from?: "input" | "disturbance" }): { index: number; fromDisturbance: boolean } {
  const from = options.from ?? "input";
  if (from !== "input" && from !== "disturbance") {
    throw new EngineError("invalid-argument", `from must be "input" or "disturbance", not '${String(from)}'`, { argument: "from" });
  }
  const count = from === "input" ? model.B.columns : model.F.columns;
  const index = options.input ?? 0;
  if (!Number.isInteger(index) || index < 0 || index >= count) {
    throw new EngineError("invalid-argument", `input must be an ${from} index from 0 to ${count - 1} (the model has ${count} ${from}s), not ${index}`, {
      argument: "input",
      index,
      count,
    });
  }
  return { index, fromDisturbance: from === "disturbance" };
}
