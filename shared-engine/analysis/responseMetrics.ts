/**
 * Transient metrics of one response given by its samples (rise, settling, overshoot, peak,
 * steady state, integral of absolute error), with the degenerate cases reported as a status,
 * never as NaN. A continuous response is read between its samples (interpolation); the response
 * of a sampled loop (option `sampleTime`) only at its sample instants.
 */
import { EngineError } from "../errors";

export interface ResponseMetrics {
  /** 10 % → 90 % rise time (interpolated; sampled: between sample instants), seconds; null when undefined (see status). */
  riseTimeSec: number | null;
  /** Time after which the response stays within the band (interpolated; sampled: a sample instant), seconds from time[0]. */
  settlingTimeSec: number | null;
  /** (peak − final)/|final| · 100 in the direction of the final value; 0 when there is none. */
  overshootPct: number;
  /** Extreme value in the direction of the change (parabolic refinement between samples; sampled: the extreme sample). */
  peak: number;
  peakTimeSec: number;
  /** The final value used (finalValue option, else the last sample); null when unstable. */
  steadyStateValue: number | null;
  /** reference − steadyStateValue; null without a reference or when unstable. */
  steadyStateError: number | null;
  /** ∫|r − y| dt by the trapezoid rule (split at sign changes); r = reference or final value. */
  integralAbsoluteError: number;
  /** max |input| when the input samples were given. */
  peakInput?: number;
  status: "settled" | "not-settled-within-horizon" | "unstable" | "zero-final-value";
  notes: string[];
}

export interface ResponseMetricsOptions {
  reference?: number;
  /** Half-width of the settling band as a fraction of |final value| (default 0.02). */
  settlingBand?: number;
  /** The true steady-state value (DC gain × step size) of a stable system. */
  finalValue?: number;
  /** Input samples on the same grid, for peakInput. */
  input?: number[];
  /** false when the system is known to be unstable (status "unstable"). Default: not known. */
  stable?: boolean;
  /**
   * Sample period T (s) when y is the response of a sampled (discrete-time) loop: y exists only
   * at the instants k·T, and every metric is then read at those instants (see responseMetrics).
   * Every time must be a whole multiple of T. Absent (or null): a continuous response.
   */
  sampleTime?: number | null;
}

/** Rise-time levels as fractions of the change (common practice: 10 % and 90 %). */
const RISE_LOW = 0.1;
const RISE_HIGH = 0.9;
/** Without finalValue, "settled" needs the last 10 % of the horizon inside the band. */
const SETTLED_TAIL = 0.1;
/** Relative tolerance for "t is a whole multiple of T" (as analysis/timeGrid.ts checks grids). */
const SAMPLE_ALIGNMENT_TOL = 1e-9;

/**
 * Computes, for samples y_k at times t_k (t₀ is the start of the response), with y_f the final
 *   value and Δ = y_f − y₀ (y₀ = y[0], usually 0 so Δ = y_f):
 *   - rise time: t(y₀ + 0.9Δ) − t(y₀ + 0.1Δ), first crossings, linearly interpolated;
 *   - settling time: the last time |y − y_f| > band·|y_f| (band 0.02 by default), interpolated
 *     at the band edge and measured from t₀; t₀ itself when the response never leaves the band;
 *   - overshoot: (peak − y_f)/|y_f|·100 with peak the extreme of y in the direction of Δ
 *     (max y for Δ > 0, min y for Δ < 0; sign(Δ)·(peak − y_f) when it is positive), else 0;
 *   - peak and peak time: the extreme sample refined by the parabola through it and its two
 *     neighbours (exact for a locally quadratic response; within the sample range); with a zero
 *     final value, the sample of largest |y − y_f| in either direction;
 *   - steady-state value: finalValue (pass the DC gain of a stable system) or else the last
 *     sample; steady-state error: reference − y_f;
 *   - IAE: ∫|r − y|dt by the trapezoid rule, each interval split at a sign change of r − y,
 *     with r = reference (or y_f when no reference is given);
 *   - status: "unstable" when `stable` is false (rise, settling, steady state are null);
 *     "zero-final-value" when |y_f| ≤ 1e-12·max|y| (rise time and overshoot have no meaning;
 *     the settling time then uses the band ±band·max|y − y_f|, common practice for regulation
 *     and impulse responses); "not-settled-within-horizon" when the last sample is outside the
 *     band or, without finalValue, when the response left the band in the last 10 % of the
 *     horizon; "settled" otherwise.
 *   Sampled responses (`sampleTime` = T given): the output of a sampled loop exists only at the
 *   instants k·T, so no time between samples is reported and nothing is interpolated:
 *   - peak = the extreme sample itself, peak time its instant (no parabolic refinement);
 *   - settling time = the first sample instant after which every sample stays within the band
 *     (t_{k+1} − t₀ with k the last sample outside it; 0 when none is outside);
 *   - rise time = t_j − t_i with t_i the first sample at or beyond the 10 % level and t_j the
 *     first sample at or beyond the 90 % level: a whole number of periods. Interpolating the
 *     crossings (as for a continuous response) would place them at instants where the sampled
 *     loop has no output, and at a coarse T its error is of the order of T anyway;
 *   - overshoot, steady state and status from those samples as above; IAE keeps the trapezoid
 *     rule over the given samples (the summed error of the sequence, weighted by the spacing).
 *   The metrics can only be as fine as the grid: when the times skip sample instants (a gap
 *   wider than T), a note says so; pass every instant for the metrics of the sampled response.
 *   Without `sampleTime` the results are exactly (bit for bit) those described above.
 * Requires: time finite, strictly increasing, same length as y (≥ 2); y finite; with
 *   `sampleTime` = T: T finite positive and every time a whole multiple of T (to 1e-9 relative).
 * Method: one pass per quantity; definitions as above (rise and settling as in K. Ogata,
 *   "Modern Control Engineering", 5th ed., §5-3, from memory; 10–90 % and ±2 % are common
 *   practice; reading them at the sample instants of a sampled loop is common practice too).
 * Cost: O(N) time, O(1) extra memory. Accuracy: continuous: interpolation error O(h²·|y''|) in
 *   the times; sampled: exact at the sample instants given (times are grid values).
 * Errors: "invalid-argument" (lengths, ordering, band not in (0, 1), sampleTime not positive, a
 *   time off the sample instants), "non-finite" (NaN or Infinity in the samples or options),
 *   "empty" (fewer than 2 samples).
 * Example: y = 1 − e^{−t} on a fine grid with finalValue 1: riseTimeSec ≈ ln 9 ≈ 2.197,
 *   settlingTimeSec ≈ ln 50 ≈ 3.912, overshootPct 0; check |rise − ln 9| < 1e-4. Sampled:
 *   y_k = 1 − 0.5^k at t_k = k (T = 1, k = 0..10) with finalValue 1 and sampleTime 1:
 *   settlingTimeSec = 6 (0.5⁶ ≤ 0.02 < 0.5⁵), riseTimeSec = 4 − 1 = 3 (first samples ≥ 0.1 and
 *   ≥ 0.9 are k = 1 and k = 4).
 */
export function responseMetrics(time: number[], y: number[], options: ResponseMetricsOptions = {}): ResponseMetrics {
  checkSeries(time, y, options);
  const N = y.length;
  const t0 = time[0]!;
  const notes: string[] = [];
  const T = options.sampleTime ?? null;
  const sampled = T !== null;
  if (sampled) {
    notes.push(`metrics read at the sample instants (T = ${T} s)`);
    if (skipsSamples(time, T)) notes.push("the times skip sample instants: the metrics are those of the given samples only");
  }
  const band = options.settlingBand ?? 0.02;
  const last = y[N - 1]!;
  const yf = options.finalValue ?? last;
  if (options.finalValue === undefined) notes.push("final value taken from the last sample; pass finalValue (DC gain) for a stable system");
  const reference = options.reference ?? yf;
  const iae = integralAbsoluteError(time, y, reference);
  const peakInput = options.input ? options.input.reduce((mx, v) => Math.max(mx, Math.abs(v)), 0) : undefined;
  const y0 = y[0]!;
  const delta = yf - y0;
  const direction = delta >= 0 ? 1 : -1;
  const maxAbs = y.reduce((mx, v) => Math.max(mx, Math.abs(v)), 0);
  // A regulation response (final value zero, e.g. a disturbance step rejected by integral
  // action): the peak is the largest deviation either way, not the extreme towards y_f.
  const zeroFinal = Math.abs(yf) <= 1e-12 * maxAbs || yf === 0;
  const peakAt = zeroFinal ? largestDeviationIndex(y, yf) : extremeIndex(y, direction);
  const { value: peak, time: peakTime } = sampled ? { value: y[peakAt]!, time: time[peakAt]! } : refinePeak(time, y, peakAt);
  const base = {
    peak,
    peakTimeSec: peakTime - t0,
    integralAbsoluteError: iae,
    ...(peakInput === undefined ? {} : { peakInput }),
    notes,
  };

  if (options.stable === false) {
    notes.push("the system is unstable: no steady state, rise or settling time");
    return { ...base, riseTimeSec: null, settlingTimeSec: null, overshootPct: 0, steadyStateValue: null, steadyStateError: null, status: "unstable" };
  }
  const steadyStateError = options.reference === undefined ? null : options.reference - yf;
  if (zeroFinal) {
    const spread = y.reduce((mx, v) => Math.max(mx, Math.abs(v - yf)), 0);
    const settling = settlingTime(time, y, yf, band * spread, sampled);
    notes.push(`final value is zero: no rise time or overshoot; settling band is ±${band * 100} % of the largest deviation`);
    return { ...base, riseTimeSec: null, settlingTimeSec: settling, overshootPct: 0, steadyStateValue: yf, steadyStateError, status: "zero-final-value" };
  }

  const halfWidth = band * Math.abs(yf);
  const settling = settlingTime(time, y, yf, halfWidth, sampled);
  let status: ResponseMetrics["status"] = "settled";
  if (settling === null) {
    status = "not-settled-within-horizon";
    notes.push(`the response is still outside ±${band * 100} % of the final value at the end of the horizon`);
  } else if (options.finalValue === undefined && settling > (1 - SETTLED_TAIL) * (time[N - 1]! - t0)) {
    status = "not-settled-within-horizon";
    notes.push("the response left the settling band during the last 10 % of the horizon; lengthen it");
  }
  const rise = riseTime(time, y, y0 + RISE_LOW * delta, y0 + RISE_HIGH * delta, direction, sampled);
  if (rise === null) notes.push("the response never reaches 90 % of the final value within the horizon");
  const overshootRaw = (direction * (peak - yf)) / Math.abs(yf);
  const overshootPct = overshootRaw > 0 ? overshootRaw * 100 : 0;
  if (overshootPct === 0) notes.push("no overshoot");
  return {
    ...base,
    riseTimeSec: rise,
    settlingTimeSec: settling === null ? null : settling,
    overshootPct,
    steadyStateValue: yf,
    steadyStateError,
    status,
  };
}

function checkSeries(time: number[], y: number[], options: ResponseMetricsOptions): void {
  if (!Array.isArray(time) || !Array.isArray(y)) throw new EngineError("invalid-argument", "time and y must be lists of numbers", {});
  if (time.length < 2) throw new EngineError("empty", `time has ${time.length} samples; metrics need at least 2`, { argument: "time" });
  if (time.length !== y.length) {
    throw new EngineError("invalid-argument", `y must have one sample per time (time has ${time.length}, y has ${y.length})`, { argument: "y" });
  }
  for (let k = 0; k < y.length; k++) {
    if (!Number.isFinite(time[k]) || !Number.isFinite(y[k])) {
      throw new EngineError("non-finite", `sample ${k} is (t = ${time[k]}, y = ${y[k]}); metrics need finite samples`, { index: k });
    }
    if (k > 0 && !(time[k]! > time[k - 1]!)) {
      throw new EngineError("invalid-argument", `time must be strictly increasing (time[${k - 1}] = ${time[k - 1]}, time[${k}] = ${time[k]})`, { index: k });
    }
  }
  const band = options.settlingBand ?? 0.02;
  if (!(band > 0 && band < 1)) throw new EngineError("invalid-argument", `settlingBand must lie in (0, 1) (a fraction of the final value), not ${band}`, { argument: "settlingBand" });
  for (const key of ["reference", "finalValue"] as const) {
    const v = options[key];
    if (v !== undefined && !Number.isFinite(v)) throw new EngineError("non-finite", `${key} is ${v}; it must be a finite number`, { argument: key });
  }
  const T = options.sampleTime;
  if (T !== undefined && T !== null) {
    if (typeof T !== "number" || !(T > 0) || !Number.isFinite(T)) {
      throw new EngineError("invalid-argument", `sampleTime must be a finite positive number of seconds, not ${T}`, { argument: "sampleTime" });
    }
    for (let k = 0; k < time.length; k++) {
      const ratio = time[k]! / T;
      if (Math.abs(ratio - Math.round(ratio)) > SAMPLE_ALIGNMENT_TOL * Math.max(1, Math.abs(ratio))) {
        throw new EngineError("invalid-argument", `time[${k}] = ${time[k]} s is not a multiple of the sample period ${T} s; a sampled response exists only at its sample instants`, {
          argument: "time",
          index: k,
        });
      }
    }
  }
  if (options.input !== undefined) {
    if (!Array.isArray(options.input) || options.input.length !== y.length) {
      throw new EngineError("invalid-argument", `input must have one sample per time (${y.length})`, { argument: "input" });
    }
    options.input.forEach((v, k) => {
      if (!Number.isFinite(v)) throw new EngineError("non-finite", `input[${k}] is ${v}; samples must be finite`, { argument: "input", index: k });
    });
  }
}

/** True when two consecutive times are more than one period apart (both are multiples of T). */
function skipsSamples(time: number[], T: number): boolean {
  for (let k = 1; k < time.length; k++) if (Math.round((time[k]! - time[k - 1]!) / T) > 1) return true;
  return false;
}

function extremeIndex(y: number[], direction: number): number {
  let best = 0;
  for (let k = 1; k < y.length; k++) if (direction * y[k]! > direction * y[best]!) best = k;
  return best;
}

// Vertex of the parabola through (t_{k−1}, y_{k−1}), (t_k, y_k), (t_{k+1}, y_{k+1}), kept when it
// lies between the neighbours (non-uniform spacing handled by divided differences).
function refinePeak(time: number[], y: number[], k: number): { value: number; time: number } {
  const sample = { value: y[k]!, time: time[k]! };
  if (k === 0 || k === y.length - 1) return sample;
  const [ta, tb, tc] = [time[k - 1]!, time[k]!, time[k + 1]!];
  const [ya, yb, yc] = [y[k - 1]!, y[k]!, y[k + 1]!];
  const d1 = (yb - ya) / (tb - ta);
  const d2 = (yc - yb) / (tc - tb);
  const curvature = (d2 - d1) / (tc - ta); // y ≈ ya + d1(t − ta) + curvature(t − ta)(t − tb)
  if (curvature === 0) return sample;
  const tv = (ta + tb) / 2 - d1 / (2 * curvature);
  if (!(tv > ta && tv < tc)) return sample;
  const value = ya + d1 * (tv - ta) + curvature * (tv - ta) * (tv - tb);
  return Number.isFinite(value) ? { value, time: tv } : sample;
}

function crossingTime(ta: number, tb: number, ya: number, yb: number, level: number): number {
  return ya === yb ? ta : ta + ((level - ya) / (yb - ya)) * (tb - ta);
}

// Sampled: the crossing instants are the first samples at or beyond each level (no interpolation).
function riseTime(time: number[], y: number[], low: number, high: number, direction: number, sampled: boolean): number | null {
  let tLow: number | null = null;
  for (let k = 0; k < y.length; k++) {
    const v = direction * y[k]!;
    if (tLow === null && v >= direction * low) tLow = k === 0 || sampled ? time[k]! : crossingTime(time[k - 1]!, time[k]!, y[k - 1]!, y[k]!, low);
    if (tLow !== null && v >= direction * high) {
      const tHigh = k === 0 || sampled ? time[k]! : crossingTime(time[k - 1]!, time[k]!, y[k - 1]!, y[k]!, high);
      return tHigh - tLow;
    }
  }
  return null;
}

function settlingTime(time: number[], y: number[], yf: number, halfWidth: number, sampled: boolean): number | null {
  const N = y.length;
  const outside = (k: number): boolean => Math.abs(y[k]! - yf) > halfWidth;
  if (outside(N - 1)) return null;
  let k = N - 2;
  while (k >= 0 && !outside(k)) k--;
  if (k < 0) return 0;
  // Sampled: the first instant after which every sample is inside is the sample after the last exit.
  if (sampled) return time[k + 1]! - time[0]!;
  // y leaves the band between samples k (outside) and k+1 (inside): interpolate at the edge crossed.
  const edge = y[k]! > yf ? yf + halfWidth : yf - halfWidth;
  return crossingTime(time[k]!, time[k + 1]!, y[k]!, y[k + 1]!, edge) - time[0]!;
}

function integralAbsoluteError(time: number[], y: number[], r: number): number {
  let sum = 0;
  for (let k = 0; k + 1 < y.length; k++) {
    const a = r - y[k]!;
    const b = r - y[k + 1]!;
    const h = time[k + 1]! - time[k]!;
    if (a * b >= 0) sum += (h * (Math.abs(a) + Math.abs(b))) / 2;
    else {
      const f = Math.abs(a) / (Math.abs(a) + Math.abs(b)); // zero crossing of the linear interpolant
      sum += (h * (f * Math.abs(a) + (1 - f) * Math.abs(b))) / 2;
    }
  }
  return sum;
}

/** Index of the sample farthest from `level` (the first one on ties). */
function largestDeviationIndex(y: readonly number[], level: number): number {
  let best = 0;
  for (let k = 1; k < y.length; k++) if (Math.abs(y[k]! - level) > Math.abs(y[best]! - level)) best = k;
  return best;
}
