/**
 * The disturbance-rejection response of a variant: a step of one disturbance w_j (through F
 * and E) from rest, through the closed loop when there is one, with the metrics a reviewer reads
 * for rejection: peak deviation and its time, the final value (zero with integral action on
 * that output), and the time after which the output stays within ±2 % of the peak deviation
 * around its final value. A sampled loop's metrics are read at its sample instants, on every
 * instant from the first to the last time (the reported arrays stay on the given times): the
 * peak is the largest sample and the settling time the first instant after which every sample
 * stays within the band.
 */
import { EngineError } from "../errors";
import type { StateSpace } from "../model";
import { dcGain } from "../analysis/dcGain";
import { poles } from "../analysis/poles";
import { stepResponse } from "../analysis/timeResponse";
import type { VariantSpec } from "./format";
import type { VariantResult } from "./result";
import { isStable } from "./resultJson";
import { metricInstants } from "./responseResults";

/** Half-width of the settling band, relative to the peak deviation (common practice: 2 %). */
export const DISTURBANCE_SETTLING_BAND = 0.02;

export function disturbanceStep(
  system: StateSpace,
  plant: StateSpace,
  spec: NonNullable<VariantSpec["disturbanceStep"]>,
  closed: boolean,
  path: string,
): NonNullable<VariantResult["disturbanceStep"]> {
  const q = plant.F.columns;
  if (q === 0) throw new EngineError("invalid-argument", `${path}: the plant has no disturbance inputs (F has no columns)`, {});
  const which = spec.disturbance ?? 0;
  const index = typeof which === "number" ? which : plant.names.disturbances.indexOf(which);
  if (index < 0 || index >= q) {
    throw new EngineError("invalid-argument", `${path}.disturbance: names no disturbance (${JSON.stringify(which)}); disturbances are: ${plant.names.disturbances.join(", ")}`, {});
  }
  const size = spec.size ?? 1;
  const resp = stepResponse(system, spec.times, { input: index, from: "disturbance" });
  const p = plant.C.rows;
  const m = plant.B.columns;
  const T = system.sampleTime;
  const stable = isStable(poles(system), T);
  // Sampled: the metrics see every sample instant, not only the requested times.
  const instants = T === null ? null : metricInstants(spec.times, T);
  const metricResp = instants !== null && instants.length > resp.time.length ? stepResponse(system, instants, { input: index, from: "disturbance" }) : resp;
  const time = metricResp.time;
  const y = metricResp.outputs[0]!.map((v) => v * size);
  const dc = stable ? dcGain({ ...system, B: system.F, D: system.E }) : null;
  const finalValue = dc && dc.gain ? dc.gain[0]![index]! * size : null;
  let peakIndex = 0;
  y.forEach((v, k) => {
    if (Math.abs(v) > Math.abs(y[peakIndex]!)) peakIndex = k;
  });
  const peakDeviation = y[peakIndex]!;
  let settlingTime: number | null = null;
  let status: "settled" | "not-settled-within-horizon" | "unstable" = stable ? "settled" : "unstable";
  if (stable && finalValue !== null) {
    const band = DISTURBANCE_SETTLING_BAND * Math.max(Math.abs(peakDeviation), Math.abs(finalValue));
    let last = -1;
    y.forEach((v, k) => {
      if (Math.abs(v - finalValue) > band) last = k;
    });
    if (last === y.length - 1) {
      status = "not-settled-within-horizon";
    } else if (last < 0) {
      settlingTime = time[0]!;
    } else if (T !== null) {
      settlingTime = time[last + 1]!; // the first sample instant after which every sample is inside
    } else {
      // Interpolate the last exit from the band between samples last and last + 1.
      const t0 = time[last]!, t1 = time[last + 1]!;
      const e0 = Math.abs(y[last]! - finalValue) - band, e1 = Math.abs(y[last + 1]! - finalValue) - band;
      settlingTime = e0 === e1 ? t1 : t0 + ((t1 - t0) * e0) / (e0 - e1);
    }
  }
  return {
    loop: closed ? "closed-loop" : "open-loop",
    disturbance: plant.names.disturbances[index] ?? `w${index + 1}`,
    size,
    time: resp.time,
    output: resp.outputs.slice(0, p).map((row) => row.map((v) => v * size)),
    outputNames: [...plant.names.outputs],
    ...(closed ? { control: resp.outputs.slice(p, p + m).map((row) => row.map((v) => v * size)) } : {}),
    peakDeviation,
    peakTime: time[peakIndex]!,
    steadyStateValue: finalValue,
    settlingTime,
    status,
  };
}
