/**
 * Time grids of the responses: the default horizon read from the poles of a model, the grid
 * built from `{ horizonSec, points }`, and the checks every explicit grid passes (finite,
 * strictly increasing, on the sample instants of a sampled model).
 */
import { EngineError } from "../errors";
import { eigenvalues } from "../linalg";
import type { StateSpace } from "../model";

/** An explicit list of sample times in seconds, or a horizon and point count to build one from. */
export type TimeGrid = number[] | { horizonSec?: number; points?: number };

/** Most samples a generated grid may have (guards against a horizon of 10⁹ sample periods). */
const MAX_SAMPLES = 1_000_000;
/** Default number of points of a continuous grid. */
const DEFAULT_POINTS = 501;
/** Relative tolerance for "this time is an integer multiple of T" (sampled models). */
const SAMPLE_ALIGNMENT_TOL = 1e-9;

/**
 * Computes: a horizon t_end (seconds) long enough to show the whole transient of `model`:
 *   - each stable pole λ contributes 7/σ with σ = −Re λ (continuous) or σ = −ln|z|/T (sampled):
 *     7 time constants, after which the mode has decayed to e⁻⁷ ≈ 0.09 % (so the ±2 % settling
 *     band is reached inside the horizon even with a 20× residue);
 *   - each undamped oscillation (pole on the stability boundary, ω ≠ 0) contributes 5 periods;
 *   - each unstable pole contributes 5/σ (the mode grows by e⁵ ≈ 150, enough to show the
 *     divergence without overflowing the plot);
 *   - a sampled deadbeat pole (z = 0) contributes n samples.
 *   The horizon is the largest contribution when the model is stable; when it is unstable the
 *   fastest-growing mode decides (min of the stable horizon and 5/σ_max). Models with no time
 *   scale at all (n = 0, or only poles at s = 0 / z = 1) get 10 s (a convention). Sampled
 *   horizons are rounded up to a multiple of T and are at least 10 T.
 * Requires: a validated model. Method: eigenvalues of A (balanced Francis QR).
 * Cost: one eigenvalue problem, about 10 n³ flops. Accuracy: a heuristic; no residual.
 * Errors: "no-convergence" from the eigenvalue routine.
 * Example: defaultHorizon(1/(s+2) realisation) === 3.5 (7 time constants of 0.5 s).
 */
export function defaultHorizon(model: StateSpace): number {
  const n = model.A.rows;
  const T = model.sampleTime;
  const poles = n === 0 ? [] : eigenvalues(model.A);
  let stable = 0;
  let growth = 0;
  for (const p of poles) {
    let sigma: number;
    let omega: number;
    if (T === null) {
      sigma = -p.re;
      omega = Math.abs(p.im);
    } else {
      const r = Math.hypot(p.re, p.im);
      if (r === 0) {
        stable = Math.max(stable, n * T);
        continue;
      }
      sigma = -Math.log(r) / T;
      omega = Math.abs(Math.atan2(p.im, p.re)) / T;
    }
    const scale = T === null ? Math.max(Math.hypot(p.re, p.im), 1e-300) : 1 / T;
    if (sigma > 1e-9 * scale) stable = Math.max(stable, 7 / sigma);
    else if (sigma < -1e-9 * scale) growth = Math.max(growth, -sigma);
    else if (omega > 0) stable = Math.max(stable, (5 * 2 * Math.PI) / omega);
  }
  let horizon = stable > 0 ? stable : 10;
  if (growth > 0) horizon = stable > 0 ? Math.min(stable, 5 / growth) : 5 / growth;
  if (T !== null) horizon = Math.max(10, Math.ceil(horizon / T - 1e-9)) * T;
  return horizon;
}

/**
 * Computes: the sample times of a response: `times` itself when it is a list, otherwise the grid
 *   of `{ horizonSec, points }` (horizon default `defaultHorizon(model)`): continuous models get
 *   `points` (default 501) equally spaced times from 0 to the horizon, the last exactly the
 *   horizon; sampled models get t_k = k·T up to the horizon rounded up to a sample, at least 2
 *   samples, at most `points`.
 * Requires: a validated model. Method: direct construction. Cost: O(points), plus
 *   `defaultHorizon` when no horizon is given.
 * Errors: "invalid-argument" (times neither a list nor an object; horizonSec not finite
 *   positive; points not an integer from 2 to 10⁶; a sampled horizon over 10⁶ samples). An
 *   explicit list is returned unchecked: `checkTimes` checks it.
 * Example: resolveGrid(1/(s+1) realisation, { horizonSec: 1, points: 3 }) → [0, 0.5, 1].
 */
export function resolveGrid(model: StateSpace, times: TimeGrid): number[] {
  if (Array.isArray(times)) return times;
  if (times === null || typeof times !== "object") {
    throw new EngineError("invalid-argument", "times must be a list of seconds or { horizonSec, points }", { argument: "times" });
  }
  const horizon = times.horizonSec ?? defaultHorizon(model);
  if (typeof horizon !== "number" || !Number.isFinite(horizon) || horizon <= 0) {
    throw new EngineError("invalid-argument", `horizonSec must be a finite positive number of seconds, not ${horizon}`, { argument: "horizonSec" });
  }
  const points = times.points;
  if (points !== undefined && (!Number.isInteger(points) || points < 2 || points > MAX_SAMPLES)) {
    throw new EngineError("invalid-argument", `points must be an integer from 2 to ${MAX_SAMPLES}, not ${points}`, { argument: "points" });
  }
  const T = model.sampleTime;
  if (T !== null) {
    let count = Math.ceil(horizon / T - 1e-9) + 1;
    if (points !== undefined) count = Math.min(count, points);
    if (count > MAX_SAMPLES) {
      throw new EngineError("invalid-argument", `a horizon of ${horizon} s is ${count} samples of ${T} s; at most ${MAX_SAMPLES} are allowed`, { argument: "horizonSec" });
    }
    return Array.from({ length: Math.max(count, 2) }, (_, k) => k * T);
  }
  const count = points ?? DEFAULT_POINTS;
  return Array.from({ length: count }, (_, k) => (k === count - 1 ? horizon : (horizon * k) / (count - 1)));
}

/**
 * Computes: `times` itself, after checking that it is a usable grid for a model of sample period
 *   T (null = continuous).
 * Requires: nothing; this is the check. Method: one pass. Cost: O(N).
 * Errors: "invalid-argument" (not a list, more than 10⁶ samples, not strictly increasing, a time
 *   that is not a multiple of T to 1e-9 relative), "empty" (no times), "non-finite" (a time that
 *   is not a finite number).
 * Example: checkTimes([0, 0.1, 0.2], 0.1) returns the same list; checkTimes([0, 0.05], 0.1) throws.
 */
export function checkTimes(times: number[], T: number | null): number[] {
  if (!Array.isArray(times)) throw new EngineError("invalid-argument", "times must be a list of seconds", { argument: "times" });
  if (times.length === 0) throw new EngineError("empty", "times is empty; at least one sample time is needed", { argument: "times" });
  if (times.length > MAX_SAMPLES) throw new EngineError("invalid-argument", `times has ${times.length} samples; at most ${MAX_SAMPLES} are allowed`, { argument: "times" });
  for (let k = 0; k < times.length; k++) {
    const v = times[k];
    if (typeof v !== "number" || !Number.isFinite(v)) {
      throw new EngineError("non-finite", `times[${k}] is ${v}; every time must be a finite number of seconds`, { argument: "times", index: k });
    }
    if (k > 0 && !(v > times[k - 1]!)) {
      throw new EngineError("invalid-argument", `times must be strictly increasing (times[${k - 1}] = ${times[k - 1]}, times[${k}] = ${v})`, { argument: "times", index: k });
    }
    if (T !== null) {
      const ratio = v / T;
      if (Math.abs(ratio - Math.round(ratio)) > SAMPLE_ALIGNMENT_TOL * Math.max(1, Math.abs(ratio))) {
        throw new EngineError("invalid-argument", `times[${k}] = ${v} s is not a multiple of the sample period ${T} s; a sampled model is defined only at its sample instants`, {
          argument: "times",
          index: k,
          sampleTime: T,
        });
      }
    }
  }
  return times;
}
