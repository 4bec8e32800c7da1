/**
 * The Bode and step entries of a VariantResult, built the same way by the full pipeline and by
 * the drag preview (which computes the step samples by its own fast path, then reports them here).
 */
import { EngineError } from "../errors";
import type { Complex } from "../linalg";
import type { StateSpace } from "../model";
import { frequencyResponse } from "../analysis/frequencyResponse";
import { responseMetrics } from "../analysis/responseMetrics";
import { stepResponse } from "../analysis/timeResponse";
import { dcGain } from "../analysis/dcGain";
import { atPath } from "./buildPlant";
import type { VariantResult } from "./result";
import { isStable } from "./resultJson";
import { uniformStep } from "./uniformStep";

/** The samples of a step response as the simulators return them (outputs: one row per output). */
export interface StepSamples {
  time: number[];
  outputs: number[][];
  warnings: readonly string[];
}

/**
 * Fills `result.bode`: the frequency response at `frequencies` of `inputLoop` (the loop broken
 * at the first plant input) when there is a feedback design, else of the plant `model` from its
 * first input to its first output. Unbounded grid points (a pole on the stability boundary)
 * become a warning; errors carry the path `<vpath>.bode`.
 */
export function addBodeResult(model: StateSpace, inputLoop: StateSpace | null, frequencies: number[], vpath: string, result: VariantResult): void {
  const T = model.sampleTime;
  const system = inputLoop ?? model;
  const fr = atPath(`${vpath}.bode`, () => frequencyResponse(system, frequencies));
  result.bode = {
    loop: inputLoop ? "plant-input" : "plant",
    input: model.names.inputs[0] ?? "u1",
    output: inputLoop ? model.names.inputs[0] ?? "u1" : model.names.outputs[0] ?? "y1",
    frequency: [...fr.frequencyRadPerSec],
    magnitudeDb: fr.magnitudeDb.map((k) => k[0]![0]!),
    phaseDeg: fr.phaseDeg.map((k) => k[0]![0]!),
  };
  if (fr.unbounded.length > 0) result.warnings.push(`Bode: the response is unbounded at ${fr.unbounded.length} grid frequencies (a pole on the ${T === null ? "imaginary axis" : "unit circle"}); those points are null`);
}

/**
 * Fills `result.step` from the step samples `resp` of `system` on its input 0: the plant outputs
 * (the first p rows), the control signals when `closed` (the servo loop's extra outputs) and the
 * response metrics, the final value taken from the DC gain when `loopPoles` (the poles of
 * `system`) are all stable. The simulator's warnings are added with the prefix "step: ".
 * A sampled loop's metrics are read at its sample instants (responseMetrics with sampleTime), on
 * every instant from the first to the last time (`metricInstants`) even when `resp.time` skips
 * some: peak, settling and rise are then those of the whole output sequence. The reported
 * time and output arrays stay those of `resp`.
 */
export function addStepResult(model: StateSpace, system: StateSpace, resp: StepSamples, loopPoles: readonly Complex[], closed: boolean, result: VariantResult): void {
  const p = model.C.rows;
  const m = model.B.columns;
  const y0 = resp.outputs[0]!;
  const stable = isStable(loopPoles, model.sampleTime);
  const dc = stable ? dcGain(system) : null;
  const finalValue = dc && dc.gain ? dc.gain[0]![0]! : undefined;
  const control = closed ? resp.outputs.slice(p, p + m) : undefined;
  const T = system.sampleTime;
  let metricTime = resp.time;
  let metricY = y0;
  let metricInput = control?.[0];
  if (T !== null) {
    const instants = metricInstants(resp.time, T);
    if (instants === null) {
      result.warnings.push(`step: the metrics are read at the ${resp.time.length} given times only (every sample instant to ${resp.time[resp.time.length - 1]} s would be more than ${MAX_METRIC_INSTANTS} samples)`);
    } else if (instants.length > resp.time.length) {
      // The fast uniform-grid recursion when the grid starts at 0, else the general simulator.
      const dense = uniformStep(system, instants, loopPoles) ?? stepResponse(system, instants, { input: 0 });
      metricTime = dense.time;
      metricY = dense.outputs[0]!;
      metricInput = closed ? dense.outputs[p] : undefined;
    }
  }
  const metrics = responseMetrics(metricTime, metricY, {
    reference: closed ? 1 : undefined,
    finalValue,
    stable,
    input: metricInput,
    ...(T !== null ? { sampleTime: T } : {}),
  });
  result.step = {
    loop: closed ? "closed-loop" : "open-loop",
    input: system.names.inputs[0] ?? "r1",
    time: resp.time,
    output: resp.outputs.slice(0, p),
    outputNames: [...model.names.outputs],
    ...(control ? { control } : {}),
    riseTime: metrics.riseTimeSec,
    settlingTime: metrics.settlingTimeSec,
    overshootPct: metrics.overshootPct,
    peak: metrics.peak,
    peakTime: metrics.peakTimeSec,
    steadyStateValue: metrics.steadyStateValue,
    steadyStateError: closed ? metrics.steadyStateError : null,
    ...(metrics.peakInput !== undefined ? { peakInput: metrics.peakInput } : {}),
    status: metrics.status,
  };
  result.warnings.push(...resp.warnings.map((w) => `step: ${w}`));
}

/**
 * Most sample instants the metrics of a sampled response are computed on. The drag preview runs
 * this too (the step by uniformStep: 10⁵ steps of a 3-state loop take a few milliseconds);
 * beyond, the given times are used and a warning says so.
 */
export const MAX_METRIC_INSTANTS = 100_000;

/**
 * Every sample instant k·T from times[0] to the last time (times on the instants, as
 * checkSampleTimes ensures), or `times` itself when it already has them all; null when there
 * would be more than MAX_METRIC_INSTANTS.
 */
export function metricInstants(times: readonly number[], T: number): number[] | null {
  const first = Math.round(times[0]! / T);
  const count = Math.round(times[times.length - 1]! / T) - first + 1;
  if (count === times.length) return [...times];
  if (count > MAX_METRIC_INSTANTS) return null;
  return Array.from({ length: count }, (_, k) => (first + k) * T);
}

/** A sampled loop's response exists only at whole sample periods (T null: nothing to check). */
export function checkSampleTimes(times: readonly number[], T: number | null, path: string): void {
  if (T === null) return;
  for (const t of times) {
    const k = t / T;
    if (Math.abs(k - Math.round(k)) > 1e-9 * Math.max(1, k)) {
      throw new EngineError("invalid-argument", `${path}: ${t} s is not a whole number of sample periods (T = ${T} s) of the sampled loop`, {});
    }
  }
}
