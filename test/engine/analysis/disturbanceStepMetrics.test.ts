// Metrics of a disturbance step through `analysis.step`: the final value is the DC gain of the
// disturbance channel, so a disturbance rejected by integral action reads as a regulation
// response (peak = largest deviation, settling band relative to it), not against the last
// sample's rounding-level value.
import { describe, expect, it } from "vitest";
import { dispatch } from "../../../shared-engine/api";
import type { StepResult } from "../../../shared-engine/api/analysisContractTypes";

const context = { isCancelled: () => false, reportProgress: () => {} };

describe("analysis.step from a disturbance", () => {
  it("reads a disturbance rejected by integral action as a regulation response (hand-derived y = t·e^{−t})", async () => {
    // Plant x' = −x + u + w, y = x, with u = −x + ξ and ξ' = −y: the closed loop
    // A = [[−2, 1], [−1, 0]], F = [1; 0], C = [1, 0] has Y(s)/W(s) = s/(s + 1)², so a unit
    // disturbance step gives y(t) = t·e^{−t} (hand-derived): final value 0, largest deviation
    // 1/e at t = 1, and |y| ≤ 0.02/e from the later root of t·e^{−t} = 0.02/e (t ≈ 6.55) on.
    const model = { A: [[-2, 1], [-1, 0]], B: [[0], [0]], C: [[1, 0]], F: [[1], [0]], sampleTime: null };
    const times = Array.from({ length: 2001 }, (_, k) => k * 0.01);
    const r = (await dispatch("analysis.step", { model, from: "disturbance", input: 0, times }, context)) as StepResult;
    const m = r.metrics[0]!;
    expect(m.status).toBe("zero-final-value");
    expect(Math.abs(m.steadyStateValue!)).toBeLessThan(1e-15);
    expect(m.peak).toBeCloseTo(1 / Math.E, 6);
    expect(m.peakTimeSec).toBeCloseTo(1, 3);
    // The later root of t·e^{−t} = 0.02/e by Newton's method, as the reference settling time.
    let t = 7;
    for (let k = 0; k < 50; k++) t -= (t * Math.exp(-t) - 0.02 / Math.E) / ((1 - t) * Math.exp(-t));
    expect(m.settlingTimeSec).toBeCloseTo(t, 3);
  });

  it("reports the largest deviation when the disturbance pushes the output down", async () => {
    // The same loop with F = [−1; 0]: y = −t·e^{−t}, largest deviation −1/e at t = 1.
    const model = { A: [[-2, 1], [-1, 0]], B: [[0], [0]], C: [[1, 0]], F: [[-1], [0]], sampleTime: null };
    const times = Array.from({ length: 1001 }, (_, k) => k * 0.01);
    const r = (await dispatch("analysis.step", { model, from: "disturbance", input: 0, times }, context)) as StepResult;
    expect(r.metrics[0]!.peak).toBeCloseTo(-1 / Math.E, 6);
    expect(r.metrics[0]!.peakTimeSec).toBeCloseTo(1, 3);
  });
});
