import { describe, expect, it } from "vitest";
import { boxesOverlap, boxInside, placeLabels, polylineHitsBox, segmentHitsBox } from "../../../../renderer/plots/labelPlacement";
import { firstCrossing, METRIC_FONT, OVERLAY_DASH, peakMarkBox, responseModel, type ResponseSeries } from "../../../../renderer/plots/responseModel";
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

/** Unit step response of ωn²/(s² + 2ζωn s + ωn²) (closed form) with its metrics read off the samples. */
function secondOrder(name: string, zeta: number, wn: number, tEnd: number, n = 400, styleIndex?: number): ResponseSeries {
  const t = Array.from({ length: n + 1 }, (_, k) => (k * tEnd) / n);
  const wd = wn * Math.sqrt(1 - zeta * zeta);
  const y = t.map((s) => 1 - Math.exp(-zeta * wn * s) * (Math.cos(wd * s) + (zeta / Math.sqrt(1 - zeta * zeta)) * Math.sin(wd * s)));
  let kp = 0;
  y.forEach((v, k) => { if (v > y[kp]!) kp = k; });
  let ks = -1;
  y.forEach((v, k) => { if (Math.abs(v - 1) > 0.02) ks = k; });
  return {
    name, time: t, output: [y], control: [y.map((v) => 1 - v)], styleIndex,
    metrics: { settlingTime: ks + 1 < t.length ? t[ks + 1]! : null, peak: y[kp]!, peakTime: t[kp]!, overshootPct: Math.max(0, (y[kp]! - 1) * 100), steadyStateValue: 1 },
  };
}

describe("metric label layout", () => {
  const cases: [string, ResponseSeries[], Partial<typeof layout>][] = [
    // The design sheet's case: settles (38.5 s) just before a 1.7 % peak (54 s), both at the top.
    ["sheet-like, settles before a small peak", [secondOrder("pole placement", 0.8, 0.1, 150, 30)], {}],
    ["first-order lag", [firstOrder], {}],
    ["20 % overshoot", [secondOrder("underdamped", 0.45, 2, 10)], {}],
    ["three variants", [secondOrder("a", 0.8, 0.1, 150, 60), secondOrder("b", 0.6, 0.12, 150, 60), secondOrder("c", 0.9, 0.08, 150, 60)], {}],
    ["narrow and short", [secondOrder("a", 0.7, 1, 12), secondOrder("b", 0.5, 1.5, 12)], { width: 320, height: 260 }],
  ];
  for (const [what, series, over] of cases) {
    it(`keeps every label inside the outputs panel, clear of the others and of the peak marks: ${what}`, () => {
      const m = responseModel({ series, ...layout, ...over });
      const frame = { x: m.left, y: m.outputs.top, width: m.width, height: m.outputs.height };
      const expected = m.metrics.reduce((n, mm) => n + (mm.rise ? 1 : 0) + (mm.settling ? 1 : 0) + (mm.peak ? 1 : 0), 0);
      expect(m.labels).toHaveLength(expected);
      for (const l of m.labels) {
        expect(boxInside(l.box, frame), `${l.text} inside`).toBe(true);
        // The text starts inside its box and its baseline leaves room for the glyphs above it.
        expect(l.x).toBeGreaterThanOrEqual(l.box.x);
        expect(l.y - l.box.y).toBeGreaterThanOrEqual(0.75 * METRIC_FONT);
        for (const mm of m.metrics) if (mm.peak) expect(boxesOverlap(l.box, peakMarkBox(mm.peak.x, mm.peak.y)), `${l.text} over a peak mark`).toBe(false);
      }
      for (let i = 0; i < m.labels.length; i++) for (let j = i + 1; j < m.labels.length; j++) {
        expect(boxesOverlap(m.labels[i]!.box, m.labels[j]!.box), `"${m.labels[i]!.text}" vs "${m.labels[j]!.text}"`).toBe(false);
      }
    });
  }

  it("keeps a single series' labels next to their marks and off the curve (the sheet's case)", () => {
    const m = responseModel({ series: [secondOrder("pole placement", 0.8, 0.1, 150, 30)], ...layout });
    const mk = m.metrics[0]!;
    const curve = m.outputs.paths[0]!.path;
    const pts = [...curve.matchAll(/[ML](-?[\d.]+),(-?[\d.]+)/g)].map((g) => [Number(g[1]), Number(g[2])] as [number, number]);
    const byKind = Object.fromEntries(m.labels.map((l) => [l.kind, l.box]));
    for (const b of Object.values(byKind)) expect(polylineHitsBox(pts, b)).toBe(false);
    // Settling text starts just right of the settling line; peak text just right of its triangle;
    // rise text at the foot of its band (here inside it: right of it, it would cross the settling line).
    expectAtMost(Math.abs(byKind.settling!.x - (mk.settling!.x! + 3)), 0.01, "settling beside its line");
    expectAtMost(Math.abs(byKind.peak!.x - (mk.peak!.x + 6)), 0.01, "peak beside its mark");
    expectAtMost(Math.abs(byKind.rise!.x - (mk.rise!.x1 + 3)), 0.01, "rise in its band");
    expect(byKind.rise!.y + byKind.rise!.height).toBeGreaterThan(m.outputs.top + m.outputs.height - 6);
  });
});

describe("label placement", () => {
  const frame = { x: 0, y: 0, width: 200, height: 100 };
  it("stacks labels that want the same spot into rows", () => {
    const req = { text: "x", width: 80, height: 12, candidates: [{ x: 10, y: 10 }] };
    const boxes = placeLabels([req, req, req], frame);
    expect(boxes.map((b) => b!.y)).toEqual([10, 24, 38]);
    expect(boxes.every((b) => b!.x === 10)).toBe(true);
  });

  it("moves a label that would leave the frame inside it", () => {
    const [b] = placeLabels([{ text: "x", width: 80, height: 12, candidates: [{ x: 170, y: -20 }] }], frame);
    expect(boxInside(b!, frame)).toBe(true);
    expect(b!.x + b!.width).toBeLessThanOrEqual(200);
  });

  it("avoids a curve when another row is free, and gives up (null) when nothing fits", () => {
    const line: [number, number][] = [[0, 16], [200, 16]];
    const [b] = placeLabels([{ text: "x", width: 50, height: 12, candidates: [{ x: 10, y: 10 }] }], frame, { lines: [line] });
    expect(polylineHitsBox(line, b!)).toBe(false);
    expect(placeLabels([{ text: "x", width: 300, height: 12, candidates: [{ x: 0, y: 0 }] }], frame)).toEqual([null]);
  });

  it("tests segments against boxes exactly", () => {
    const box = { x: 10, y: 10, width: 10, height: 10 };
    expect(segmentHitsBox(0, 0, 30, 30, box)).toBe(true);
    expect(segmentHitsBox(0, 0, 30, 5, box)).toBe(false);
    expect(segmentHitsBox(15, 0, 15, 9, box)).toBe(false);
    expect(segmentHitsBox(15, 0, 15, 30, box)).toBe(true);
  });
});

describe("input limit labels", () => {
  it("stay inside the control panel when the limits sit on its edges", () => {
    const model = responseModel({
      series: [{ name: "a", time: [0, 1, 2], output: [[0, 1, 1]], control: [[1, 120, 60]], controlLimits: { lower: 1, upper: 120 } }],
      ...layout,
    });
    const top = model.control!.top;
    const bottom = top + model.control!.height;
    for (const l of model.limits) {
      // Baseline within the panel and the ~10 px text above it too.
      expect(l.labelY).toBeLessThanOrEqual(bottom);
      expect(l.labelY - 10).toBeGreaterThanOrEqual(top);
    }
  });
});
