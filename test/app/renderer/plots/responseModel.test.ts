import { describe, expect, it } from "vitest";
import { firstCrossing, OVERLAY_DASH, responseModel, type ResponseSeries } from "../../../../renderer/plots/responseModel";
import { expectAtMost, expectRelativeClose } from "../../../helpers/assertions";

const time = Array.from({ length: 801 }, (_, k) => k * 0.01);
/** y = 1 − e^{−t}: 10 % at ln(10/9), 90 % at ln 10, rise time ln 9 (first-order lag, analytic). */
const firstOrder: ResponseSeries = {
  name: "lag",
  time,
  output: [time.map((t) => 1 - Math.exp(-t))],
  control: [time.map((t) => 2 * Math.exp(-t))],
  metrics: { riseTime: Math.log(9), settlingTime: Math.log(50), overshootPct: 0, peak: 1 - Math.exp(-8), peakTime: 8, steadyStateValue: 1 },
  controlLimits: { lower: -1, upper: 1.5 },
};
const layout = { width: 600, top: 30, height: 400, left: 60, right: 20, gap: 20 };

describe("time-response model", () => {
  it("finds threshold crossings by linear interpolation between samples", () => {
    expect(firstCrossing([0, 1, 2], [0, 0.5, 1], 0.75)).toBe(1.5);
    expect(firstCrossing([0, 1, 2], [1, 0.5, 0], 0.25)).toBe(1.5);
    expect(firstCrossing([0, 1], [0, 0.5], 2)).toBeNull();
    expect(firstCrossing([0, 1, 2], [null, 0, 1], 0.5)).toBe(1.5);
  });

  it("places the rise-time band between the 10 % and 90 % crossings", () => {
    const m = responseModel({ series: [firstOrder], ...layout });
    const rise = m.metrics[0]!.rise!;
    expectAtMost(Math.abs(m.x.invert(rise.x1) - Math.log(10 / 9)), 1e-4, "t10");
    expectAtMost(Math.abs(m.x.invert(rise.x2) - Math.log(10)), 1e-4, "t90");
    expect(rise.label).toBe("rise 2.197 s");
  });

  it("draws the settling band as ±2 % of the final value and marks the settling time", () => {
    const m = responseModel({ series: [firstOrder], ...layout });
    const s = m.metrics[0]!.settling!;
    expectRelativeClose(m.outputs.y.invert(s.y1), 1.02, 1e-12, "upper edge");
    expectRelativeClose(m.outputs.y.invert(s.y2), 0.98, 1e-12, "lower edge");
    expectRelativeClose(m.x.invert(s.x!), Math.log(50), 1e-12, "settling time");
    expect(m.metrics[0]!.peak!.label).toBe("peak 0.9997, overshoot 0 %");
  });

  it("puts the control input in a second panel with its limits as lines at the limit values", () => {
    const m = responseModel({ series: [firstOrder], ...layout });
    expect(m.control).not.toBeNull();
    expect(m.control!.top).toBeGreaterThan(m.outputs.top + m.outputs.height);
    expect(m.limits.map((l) => [l.kind, l.value])).toEqual([["lower", -1], ["upper", 1.5]]);
    for (const l of m.limits) expectRelativeClose(m.control!.y.invert(l.y), l.value, 1e-12, `${l.kind} limit`);
  });

  it("uses one panel when no series has a control input", () => {
    const m = responseModel({ series: [{ name: "open loop", time: [0, 1], output: [[0, 1]] }], ...layout });
    expect(m.control).toBeNull();
    expect(m.outputs.height).toBe(layout.height);
  });

  it("draws an overlay dashed in the colour of the series it overlays and gives it no metric marks", () => {
    const overlay: ResponseSeries = { ...firstOrder, name: "nonlinear", overlay: true, styleIndex: 0 };
    const m = responseModel({ series: [firstOrder, overlay], ...layout });
    const paths = m.outputs.paths;
    expect(paths[1]!.style.color).toBe(paths[0]!.style.color);
    expect(paths[1]!.dash).toBe(OVERLAY_DASH);
    expect(m.metrics).toHaveLength(1);
  });

  it("leaves gaps for null samples instead of drawing through them", () => {
    const m = responseModel({ series: [{ name: "gap", time: [0, 1, 2, 3], output: [[0, 1, null, 1]] }], ...layout });
    expect(m.outputs.paths[0]!.path.split("M").filter(Boolean)).toHaveLength(2);
  });
});
