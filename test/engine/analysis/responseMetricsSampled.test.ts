// responseMetrics on sampled responses (option sampleTime): every metric read at the sample
// instants k·T, and the pipeline, the disturbance step and the analysis.step request passing the
// loop's sample period. References: hand-derived first-order sequences, and a second-order loop
// simulated by scipy.signal.dlsim (test/fixtures/analysis/generate_sampled_metrics.py, versions
// in the fixture).
import { readFileSync } from "node:fs";
import { describe, expect, it } from "vitest";
import { dispatch } from "../../../shared-engine/api";
import type { StepResult } from "../../../shared-engine/api/analysisContractTypes";
import { responseMetrics } from "../../../shared-engine/analysis/responseMetrics";
import { stepResponse } from "../../../shared-engine/analysis/timeResponse";
import { createStateSpace } from "../../../shared-engine/model";
import { evaluateProject, evaluateVariant, loadProjectText, type PlantSpec } from "../../../shared-engine/project";
import { MAX_METRIC_INSTANTS, metricInstants } from "../../../shared-engine/project/responseResults";
import { expectEngineError, expectMatrixClose, expectRelativeClose } from "../../helpers/assertions";

interface SampledFixture {
  versions: Record<string, string>;
  source: string;
  sampleTime: number;
  A: number[][];
  B: number[][];
  C: number[][];
  time: number[];
  y: number[];
  peakIndex: number;
  peak: number;
  peakTimeSec: number;
  overshootPct: number;
  settlingTimeSec: number;
  riseTimeSec: number;
}
const fixture = JSON.parse(readFileSync("test/fixtures/analysis/sampled_metrics.json", "utf8")) as SampledFixture;

/** True when t is a whole number of periods T (to 1e-9 relative, as the time grids are checked). */
const onInstant = (t: number, T: number): boolean => Math.abs(t / T - Math.round(t / T)) <= 1e-9 * Math.max(1, t / T);

describe("responseMetrics at the sample instants of a first-order sampled response", () => {
  // y[k] = 1 − a^k with a = e^{−T/τ} (the step of x[k+1] = a x[k] + (1 − a) u, y = x), final value 1.
  // Hand-derived: |y[k] − 1| = a^k ≤ 0.02 first at k = ⌈ln 0.02 / ln a⌉, and stays there (a^k
  // decreases), so the settling time is that k times T; y[k] ≥ 0.1 first at k = ⌈ln 0.9 / ln a⌉,
  // y[k] ≥ 0.9 first at k = ⌈ln 0.1 / ln a⌉; the response is monotone: no overshoot, the peak
  // is the last sample.
  for (const [T, tau] of [[0.5, 2], [1, 7.3], [0.1, 0.35]] as const) {
    it(`gives settling ⌈ln 0.02/ln a⌉·T, rise between the first samples past 10 % and 90 %, no overshoot (T = ${T}, τ = ${tau})`, () => {
      const a = Math.exp(-T / tau);
      const N = Math.ceil((12 * tau) / T);
      const time = Array.from({ length: N }, (_, k) => k * T);
      const y = time.map((_, k) => 1 - a ** k);
      const m = responseMetrics(time, y, { finalValue: 1, reference: 1, sampleTime: T });
      const kSettle = Math.ceil(Math.log(0.02) / Math.log(a));
      const kLow = Math.ceil(Math.log(0.9) / Math.log(a));
      const kHigh = Math.ceil(Math.log(0.1) / Math.log(a));
      expect(m.settlingTimeSec).toBe(time[kSettle]);
      expect(m.riseTimeSec).toBe(time[kHigh]! - time[kLow]!);
      expect(m.overshootPct).toBe(0);
      expect(m.peak).toBe(y[N - 1]);
      expect(m.peakTimeSec).toBe(time[N - 1]);
      expect(m.status).toBe("settled");
      expect(m.notes).toContain(`metrics read at the sample instants (T = ${T} s)`);
    });
  }

  it("agrees with the sampled model simulated by stepResponse (exact sampled simulation)", () => {
    const T = 0.5;
    const a = Math.exp(-T / 2);
    const model = createStateSpace({ A: [[a]], B: [[1 - a]], C: [[1]], sampleTime: T });
    const r = stepResponse(model, Array.from({ length: 60 }, (_, k) => k * T));
    const m = responseMetrics(r.time, r.outputs[0]!, { finalValue: 1, sampleTime: T });
    // ln 0.02 / ln a = 4 ln 50 = 15.65: k = 16 (hand-derived as above).
    expect(m.settlingTimeSec).toBe(8);
    expect(m.riseTimeSec).toBe(5 - 0.5); // k = ⌈0.42⌉ = 1 and ⌈9.21⌉ = 10
  });
});

describe("responseMetrics at the sample instants of a second-order sampled response (scipy dlsim fixture)", () => {
  const T = fixture.sampleTime;

  it("our sampled simulation reproduces scipy.signal.dlsim", () => {
    // Source: fixture.source (scipy fixture.versions.scipy).
    const model = createStateSpace({ A: fixture.A, B: fixture.B, C: fixture.C, sampleTime: T });
    const r = stepResponse(model, fixture.time);
    expectMatrixClose([r.outputs[0]!], [fixture.y], 1e-12, "y[k]");
  });

  it("reports the largest sample as the peak, at its sample instant, and the fixture's settling and rise", () => {
    const m = responseMetrics(fixture.time, fixture.y, { finalValue: 1, reference: 1, sampleTime: T });
    // Source: numpy on the dlsim sequence (generate_sampled_metrics.py).
    expect(m.peak).toBe(fixture.peak);
    expect(m.peakTimeSec).toBe(fixture.peakTimeSec);
    expectRelativeClose(m.overshootPct, fixture.overshootPct, 1e-12, "overshoot %");
    expect(m.settlingTimeSec).toBe(fixture.settlingTimeSec);
    expect(m.riseTimeSec).toBe(fixture.riseTimeSec);
    expect(m.status).toBe("settled");
  });

  it("differs from the continuous reading, which refines the peak and interpolates between samples", () => {
    const continuous = responseMetrics(fixture.time, fixture.y, { finalValue: 1, reference: 1 });
    expect(onInstant(continuous.peakTimeSec, T)).toBe(false);
    expect(continuous.peak).toBeGreaterThan(fixture.peak);
    // Passing no sample period (or null) is the continuous reading, unchanged.
    expect(responseMetrics(fixture.time, fixture.y, { finalValue: 1, reference: 1, sampleTime: null })).toEqual(continuous);
  });

  it("reads a grid that skips sample instants at its samples only, and says so", () => {
    const every3 = fixture.time.filter((_, k) => k % 3 === 0);
    const y3 = fixture.y.filter((_, k) => k % 3 === 0);
    const m = responseMetrics(every3, y3, { finalValue: 1, sampleTime: T });
    expect(onInstant(m.peakTimeSec, 3 * T)).toBe(true);
    expect(m.notes).toContain("the times skip sample instants: the metrics are those of the given samples only");
  });

  it("rejects a sample period that is not positive and times off the sample instants", () => {
    expectEngineError(() => responseMetrics([0, 1], [0, 1], { sampleTime: 0 }), "invalid-argument", /sampleTime/);
    expectEngineError(() => responseMetrics([0, 1], [0, 1], { sampleTime: Number.NaN }), "invalid-argument", /sampleTime/);
    expectEngineError(() => responseMetrics([0, 0.5, 1.25], [0, 1, 1], { sampleTime: 0.5 }), "invalid-argument", /time\[2\] = 1.25 s is not a multiple/);
  });
});

describe("sampled loops in the project pipeline and the analysis.step request", () => {
  const demoText = readFileSync("assets/examples/queue-backlog.loopwright.json", "utf8");
  const demo = evaluateProject(loadProjectText(demoText), { variant: "lqr-integral-1s" }).variants[0]!;
  const T = demo.closedLoop!.sampleTime!;

  it("reads the demo's sampled step metrics on every sample instant, though the step grid skips most", () => {
    expect(demo.error).toBeUndefined();
    expect(T).toBe(1);
    const s = demo.step!;
    const last = s.time[s.time.length - 1]!;
    expect(s.time.length).toBeLessThan(last / T + 1);
    for (const t of [s.peakTime, s.settlingTime!, s.riseTime!]) expect(onInstant(t, T)).toBe(true);
    // The largest sample of the whole sequence, simulated independently on every instant.
    const cl = demo.closedLoop!;
    const loop = createStateSpace({ A: cl.A, B: cl.B, C: cl.C, D: cl.D, F: cl.F, E: cl.E, sampleTime: T });
    const dense = stepResponse(loop, Array.from({ length: last / T + 1 }, (_, k) => k * T));
    const y = dense.outputs[0]!;
    const k = y.indexOf(Math.max(...y));
    expect(s.peakTime).toBe(dense.time[k]);
    expectRelativeClose(s.peak, y[k]!, 1e-12, "peak sample");
  });

  it("gives the demo's disturbance step (as the workbench asks for it) a peak time that is a whole number of periods", async () => {
    const cl = demo.closedLoop!;
    // As renderer/state/workspace/responses.ts builds it: the closed loop, disturbance 0, k·T to the step horizon.
    const horizon = demo.step!.time[demo.step!.time.length - 1]!;
    const times = Array.from({ length: horizon / T + 1 }, (_, k) => k * T);
    const r = (await dispatch("analysis.step", { model: { ...cl }, from: "disturbance", input: 0, times }, { isCancelled: () => false, reportProgress: () => {} })) as StepResult;
    const m = r.metrics[0]!;
    expect(onInstant(m.peakTimeSec, T)).toBe(true);
    const y = r.outputs[0]!;
    const k = r.time.indexOf(m.peakTimeSec);
    expect(m.peak).toBe(y[k]);
    // The final value is the disturbance channel's DC gain, zero under integral action, so the
    // peak is the sample of largest deviation either way (no refined value between samples).
    expect(Math.abs(m.steadyStateValue!)).toBeLessThan(1e-9 * Math.max(...y.map(Math.abs)));
    const extreme = y.reduce((best, v) => (Math.abs(v) > Math.abs(best) ? v : best), y[0]!);
    expect(m.peak).toBe(extreme);
    if (m.settlingTimeSec !== null) expect(onInstant(m.settlingTimeSec, T)).toBe(true);
  });

  it("reads the sampled disturbance step of the rack example at the sample instants", () => {
    const text = readFileSync("assets/examples/rack-temperature.loopwright.json", "utf8");
    const v = evaluateProject(loadProjectText(text), { variant: "observer-sampled" }).variants[0]!;
    expect(v.error).toBeUndefined();
    const d = v.disturbanceStep!;
    const Ts = v.closedLoop!.sampleTime!;
    expect(onInstant(d.peakTime, Ts)).toBe(true);
    expect(onInstant(d.settlingTime!, Ts)).toBe(true);
  });

  it("lists every sample instant of a grid that skips some, and gives up beyond MAX_METRIC_INSTANTS", () => {
    expect(metricInstants([0, 2, 5], 1)).toEqual([0, 1, 2, 3, 4, 5]);
    expect(metricInstants([3, 4], 1)).toEqual([3, 4]);
    expect(metricInstants([0, MAX_METRIC_INSTANTS * 0.5], 0.5)).toBeNull();
  });

  it("reads a sampled step whose grid spans more instants than that at its given times, with a warning", () => {
    // x[k+1] = 0.5 x[k] + 0.5 u[k], y = x: a sampled lag, on the grid [0, T, 2T, 10⁶ T] only.
    const plant: PlantSpec = { id: "lag", model: { type: "state-space", A: [[0.5]], B: [[0.5]], C: [[1]], sampleTime: 0.01 } };
    const r = evaluateVariant(plant, { id: "v", plant: "lag", step: { times: [0, 0.01, 0.02, 10_000] } });
    expect(r.error).toBeUndefined();
    expect(r.warnings.some((w) => /step: the metrics are read at the 4 given times only/.test(w))).toBe(true);
    // y = 1 − 0.5^k at k = 0, 1, 2, 10⁶ (hand-derived); the peak is the last given sample.
    expect(r.step!.peakTime).toBe(10_000);
    expect(r.step!.settlingTime).toBe(10_000);
  });

  it("simulates the skipped instants of a grid that does not start at 0 with the general simulator", () => {
    // The step starts at the first time t₀ = 1 s: y = 1 − 0.5^(t − t₀) at t = 1..9 (hand-derived);
    // 0.5^6 = 0.0156 ≤ 0.02 < 0.5^5, so settled 6 s after t₀; rise from k = 1 (0.5) to k = 4 (0.9375).
    const plant: PlantSpec = { id: "lag", model: { type: "state-space", A: [[0.5]], B: [[0.5]], C: [[1]], sampleTime: 1 } };
    const r = evaluateVariant(plant, { id: "v", plant: "lag", step: { times: [1, 5, 9] } });
    expect(r.error).toBeUndefined();
    expect(r.step!.settlingTime).toBe(6);
    expect(r.step!.riseTime).toBe(3);
    expect(r.step!.peakTime).toBe(8);
  });
});
