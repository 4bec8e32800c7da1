import { describe, expect, it } from "vitest";
import { createStateSpace } from "../../../shared-engine/model";
import { responseMetrics } from "../../../shared-engine/analysis/responseMetrics";
import { impulseResponse, stepResponse } from "../../../shared-engine/analysis/timeResponse";
import { expectAtMost, expectRelativeClose, expectEngineError as expectKind } from "../../helpers/assertions";

const secondOrder = (wn: number, zeta: number) =>
  createStateSpace({ A: [[0, 1], [-wn * wn, -2 * zeta * wn]], B: [[0], [wn * wn]], C: [[1, 0]] });

const grid = (end: number, count: number): number[] => Array.from({ length: count }, (_, k) => (end * k) / (count - 1));

describe("responseMetrics on closed-form responses", () => {
  for (const [wn, zeta] of [[2, 0.3], [1, 0.5], [5, 0.7]] as const) {
    it(`matches overshoot e^{−ζπ/√(1−ζ²)} and peak time π/(ωn√(1−ζ²)) for ωn = ${wn}, ζ = ${zeta} (common textbook results)`, () => {
      const r = stepResponse(secondOrder(wn, zeta), { horizonSec: 12 / (zeta * wn), points: 4001 });
      const m = responseMetrics(r.time, r.outputs[0]!, { finalValue: 1, reference: 1 });
      const root = Math.sqrt(1 - zeta * zeta);
      expectRelativeClose(m.overshootPct, 100 * Math.exp((-zeta * Math.PI) / root), 1e-6, "overshoot %");
      expectRelativeClose(m.peakTimeSec, Math.PI / (wn * root), 1e-4, "peak time");
      expectRelativeClose(m.peak, 1 + Math.exp((-zeta * Math.PI) / root), 1e-7, "peak value");
      expect(m.status).toBe("settled");
      expect(m.steadyStateError).toBe(0);
    });
  }

  it("gives rise time ln 9/a, settling time ln 50/a and IAE 1/a for 1 − e^{−at} (closed form)", () => {
    const a = 2;
    const t = grid(6, 6001);
    const y = t.map((tk) => 1 - Math.exp(-a * tk));
    const m = responseMetrics(t, y, { finalValue: 1, reference: 1 });
    expectRelativeClose(m.riseTimeSec!, Math.log(9) / a, 1e-6, "rise time");
    expectRelativeClose(m.settlingTimeSec!, Math.log(50) / a, 1e-6, "settling time (2 % band)");
    expectRelativeClose(m.integralAbsoluteError, (1 - Math.exp(-12)) / a, 1e-6, "IAE ∫e^{−at}dt over [0, 6]");
    expect(m.overshootPct).toBe(0);
    expect(m.notes).toContain("no overshoot");
    const wide = responseMetrics(t, y, { finalValue: 1, settlingBand: 0.05 });
    expectRelativeClose(wide.settlingTimeSec!, Math.log(20) / a, 1e-6, "settling time (5 % band)");
  });

  it("treats a negative final value symmetrically: overshoot of −(1 − e^{−t}cos…) equals that of the positive response", () => {
    const r = stepResponse(secondOrder(2, 0.3), { horizonSec: 20, points: 2001 });
    const y = r.outputs[0]!;
    const plus = responseMetrics(r.time, y, { finalValue: 1 });
    const minus = responseMetrics(r.time, y.map((v) => -v), { finalValue: -1 });
    expectRelativeClose(minus.overshootPct, plus.overshootPct, 1e-12, "overshoot");
    expectRelativeClose(minus.riseTimeSec!, plus.riseTimeSec!, 1e-12, "rise time");
    expectRelativeClose(minus.peak, -plus.peak, 1e-12, "peak");
  });

  it("reports the steady-state error against the reference: a/(s+a+1) settles at a/(a+1) (DC gain)", () => {
    const a = 3;
    const model = createStateSpace({ A: [[-(a + 1)]], B: [[a]], C: [[1]] });
    const r = stepResponse(model, { horizonSec: 5, points: 1001 });
    const m = responseMetrics(r.time, r.outputs[0]!, { finalValue: a / (a + 1), reference: 1, input: r.inputs[0] });
    expectRelativeClose(m.steadyStateError!, 1 / (a + 1), 1e-14, "r − y_f");
    expect(m.peakInput).toBe(1);
  });
});

describe("responseMetrics degenerate cases", () => {
  it("reports a zero final value for an impulse response and settles it within 2 % of the peak deviation", () => {
    const r = impulseResponse(createStateSpace({ A: [[-1]], B: [[1]], C: [[1]] }), { horizonSec: 10, points: 10001 });
    const m = responseMetrics(r.time, r.outputs[0]!, { finalValue: 0 });
    expect(m.status).toBe("zero-final-value");
    expect(m.riseTimeSec).toBeNull();
    expect(m.overshootPct).toBe(0);
    expectRelativeClose(m.settlingTimeSec!, Math.log(50), 1e-6, "e^{−t} = 0.02 at t = ln 50 (closed form)");
  });

  it("reports not-settled-within-horizon when the last sample is outside the band", () => {
    const r = stepResponse(secondOrder(1, 0.05), { horizonSec: 10, points: 501 });
    const m = responseMetrics(r.time, r.outputs[0]!, { finalValue: 1 });
    expect(m.status).toBe("not-settled-within-horizon");
    expect(m.settlingTimeSec).toBeNull();
    expect(m.overshootPct).toBeGreaterThan(80); // e^{−0.05π/√(1−0.0025)} ≈ 85 % (textbook formula)
  });

  it("without finalValue uses the last sample and flags a response that left the band late", () => {
    const t = grid(10, 101);
    const y = t.map((tk) => (tk < 9.5 ? 0 : 1));
    const m = responseMetrics(t, y);
    expect(m.status).toBe("not-settled-within-horizon");
    expect(m.notes.join(" ")).toMatch(/last sample/);
  });

  it("reports an unstable system with null steady state, rise and settling times", () => {
    const t = grid(3, 31);
    const y = t.map((tk) => Math.exp(tk) - 1);
    const m = responseMetrics(t, y, { stable: false, reference: 1 });
    expect(m.status).toBe("unstable");
    expect([m.steadyStateValue, m.steadyStateError, m.riseTimeSec, m.settlingTimeSec]).toEqual([null, null, null, null]);
    expectRelativeClose(m.peak, Math.exp(3) - 1, 1e-15, "peak is the last sample");
  });

  it("settles at time zero a response that never leaves the band", () => {
    const m = responseMetrics([0, 1, 2], [1, 1.01, 1], { finalValue: 1 });
    expect(m.settlingTimeSec).toBe(0);
    expectAtMost(m.overshootPct, 1.0000001, "overshoot of a 1 % bump");
  });

  it("rejects NaN samples, mismatched lengths, unordered times and a bad band", () => {
    expectKind(() => responseMetrics([0, 1], [0, NaN]), "non-finite", /sample 1/);
    expectKind(() => responseMetrics([0, 1, 2], [0, 1]), "invalid-argument", /one sample per time/);
    expectKind(() => responseMetrics([0, 2, 1], [0, 1, 1]), "invalid-argument", /strictly increasing/);
    expectKind(() => responseMetrics([0, 1], [0, 1], { settlingBand: 1.5 }), "invalid-argument", /settlingBand/);
    expectKind(() => responseMetrics([0], [0]), "empty");
    expectKind(() => responseMetrics([0, 1], [0, 1], { finalValue: Infinity }), "non-finite", /finalValue/);
  });
});
