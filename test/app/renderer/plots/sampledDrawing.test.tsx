// Sampled time responses drawn as what they are: held control inputs as stairs, outputs of a
// discrete model as markers at the sample instants, markers only when the data skip samples;
// read-outs and CSV give the sample values. Geometry checked against hand-derived paths.
import { renderToStaticMarkup } from "react-dom/server";
import { describe, expect, it } from "vitest";
import { ResponsePlot, responseCsv, responseReadout, sampledCaptions, wrapWords } from "../../../../renderer/plots/ResponsePlot";
import { responseModel, type ResponseSeries } from "../../../../renderer/plots/responseModel";
import { polylinePath } from "../../../../renderer/plots/polylinePath";
import {
  listsEverySample,
  markerAt,
  markerRadius,
  markersPath,
  panelDrawing,
  readoutIndex,
  sampledCaption,
  sampledMode,
  stairsPath,
} from "../../../../renderer/plots/sampledDrawing";
import { toCsv } from "../../../../renderer/plots/toCsv";

const count = (text: string, pattern: RegExp) => (text.match(pattern) ?? []).length;

/** Straight-line segments of an M/L path as [x1, y1, x2, y2] (a new M starts a new run). */
function segments(path: string): [number, number, number, number][] {
  const out: [number, number, number, number][] = [];
  let at: [number, number] | null = null;
  for (const [, cmd, xs, ys] of path.matchAll(/([ML])(-?[\d.]+),(-?[\d.]+)/g)) {
    const p: [number, number] = [Number(xs), Number(ys)];
    if (cmd === "L" && at) out.push([at[0], at[1], p[0], p[1]]);
    at = p;
  }
  return out;
}

// Pixel maps chosen so the hand derivation is exact: x = 10 + 100 t, y = 200 − 50 v.
const px = (t: number) => 10 + 100 * t;
const py = (v: number) => 200 - 50 * v;

/** Held input u = 1, 3, 2 at t = 0, 1, 2 (T = 1 s) and a discrete output at the same instants. */
const HELD: ResponseSeries = {
  name: "sampled",
  time: [0, 1, 2],
  output: [[0, 0.5, 0.75]],
  control: [[1, 3, 2]],
  sampled: { period: 1 },
};
const layout = { width: 600, top: 30, height: 400, left: 60, right: 20, gap: 20 };

describe("staircase of a held signal", () => {
  it("holds each of 3 samples to the next instant: horizontal, then vertical, at the sample x positions (hand-derived)", () => {
    const path = stairsPath([0, 1, 2], [1, 3, 2], 1, px, py);
    // t: 0, 1, 2, 3 → x: 10, 110, 210, 310; u: 1, 3, 2 → y: 150, 50, 100. The last sample is held
    // for one more period (to t = 3), as the hold applies it.
    expect(path).toBe("M10,150L110,150L110,50L210,50L210,100L310,100");
    const segs = segments(path);
    expect(segs).toHaveLength(5);
    segs.forEach(([x1, y1, x2, y2], i) => {
      if (i % 2 === 0) expect(y1).toBe(y2); // held: horizontal
      else expect(x1).toBe(x2); // new sample: vertical
    });
    expect(segs.filter((_, i) => i % 2 === 1).map((s) => s[0])).toEqual([110, 210]); // steps at t = 1 and 2
  });

  it("ends a run at a missing sample (held up to that instant) and starts again at the next one", () => {
    expect(stairsPath([0, 1, 2, 3], [1, null, 2, 2], 1, px, py)).toBe("M10,150L110,150M210,100L310,100L310,100L410,100");
    expect(stairsPath([], [], 1, px, py)).toBe("");
  });
});

describe("drawing mode of a sampled series", () => {
  it("recognises a grid listing every sample, within rounding of k·T", () => {
    expect(listsEverySample(Array.from({ length: 50 }, (_, k) => k * 0.1), 0.1)).toBe(true);
    expect(listsEverySample([0, 5, 10], 1)).toBe(false);
    expect(listsEverySample([0, 1, 3], 1)).toBe(false);
    expect(listsEverySample([4], 1)).toBe(true);
  });

  it("draws continuous series as curves, every-sample series as stairs and markers, skipped samples as markers only", () => {
    expect(sampledMode({ time: [0, 1, 2] })).toBe("curve");
    expect(sampledMode({ time: [0, 1, 2], sampled: null })).toBe("curve");
    expect(sampledMode({ time: [0, 1, 2], sampled: { period: 0 } })).toBe("curve");
    expect(sampledMode(HELD)).toBe("stairs");
    expect(sampledMode({ time: [0, 5, 10], sampled: { period: 1 } })).toBe("markers");
    expect(panelDrawing(HELD, "outputs")).toBe("join-and-markers");
    expect(panelDrawing(HELD, "control")).toBe("stairs");
    expect(panelDrawing({ time: [0, 5, 10], sampled: { period: 1 } }, "control")).toBe("markers");
    // A sampled controller on a continuous plant: outputs stay curves.
    expect(panelDrawing({ ...HELD, sampled: { period: 1, outputs: "continuous" } }, "outputs")).toBe("curve");
    expect(panelDrawing({ ...HELD, sampled: { period: 1, outputs: "continuous" } }, "control")).toBe("stairs");
  });

  it("says in the caption what is drawn, and that a grid skipping samples is drawn as markers only", () => {
    expect(sampledCaption({ time: [0, 1] })).toBe("");
    expect(sampledCaption(HELD)).toBe("T = 1 s: inputs held (stairs), outputs at the sample instants (markers)");
    expect(sampledCaption({ time: [0, 5, 10, 15], sampled: { period: 1 } })).toBe("T = 1 s, data every 5 s: markers only (the samples between are not listed)");
    expect(sampledCaption({ time: [0, 5, 10, 20], sampled: { period: 1 } })).toBe("T = 1 s, data at the listed instants: markers only (the samples between are not listed)");
    expect(sampledCaption({ time: [0, 5, 10], sampled: { period: 1, outputs: "continuous" } })).toBe("T = 1 s, data every 5 s: inputs as markers only (the samples between are not listed)");
  });
});

describe("markers at the sample instants", () => {
  it("draws one marker per defined sample in view, each a closed sub-path at its sample", () => {
    const m = markersPath([0, 1, 2, 3], [1, null, 2, 4], [0, 2.5], "square", 2, px, py);
    expect(m.count).toBe(2); // t = 1 has no value, t = 3 is out of view
    expect(m.path).toBe("M8,148L12,148L12,152L8,152ZM208,98L212,98L212,102L208,102Z");
    expect(markerAt("circle", 2, 10, 20)).toBe("M8,20a2,2 0 1,0 4,0a2,2 0 1,0 -4,0Z");
    expect(count(markerAt("plus", 2, 0, 0), /M/g)).toBe(2);
  });

  it("sizes markers from the on-screen spacing of the samples, between 1.2 and 3 px", () => {
    expect(markerRadius(1)).toBe(1.2);
    expect(markerRadius(5)).toBe(2);
    expect(markerRadius(100)).toBe(3);
    expect(markerRadius(Infinity)).toBe(3);
  });
});

describe("sampled series in the response model", () => {
  it("draws the held input of a 3-sample series as stairs with its steps at x(1) and x(2), and the outputs as 3 markers", () => {
    const m = responseModel({ series: [HELD], ...layout });
    const u = m.control!.paths[0]!;
    expect(u.drawing).toBe("stairs");
    expect(u.markers).toBeNull();
    expect(u.path).toBe(stairsPath(HELD.time, HELD.control![0]!, 1, m.x, m.control!.y));
    const segs = segments(u.path);
    const r2 = (v: number) => Math.round(v * 100) / 100;
    expect(segs.filter((_, i) => i % 2 === 1).map((s) => s[0])).toEqual([r2(m.x(1)), r2(m.x(2))]);
    segs.forEach(([x1, y1, x2, y2], i) => expect(i % 2 === 0 ? y1 === y2 : x1 === x2).toBe(true));
    const y = m.outputs.paths[0]!;
    expect(y.drawing).toBe("join-and-markers");
    expect(y.markers!.count).toBe(3);
  });

  it("draws a series whose times skip samples as markers only, in both panels", () => {
    const skipped: ResponseSeries = { ...HELD, time: [0, 5, 10], sampled: { period: 1 } };
    const m = responseModel({ series: [skipped], ...layout });
    for (const p of [m.outputs.paths[0]!, m.control!.paths[0]!]) {
      expect(p.drawing).toBe("markers");
      expect(p.path).toBe("");
      expect(p.markers!.count).toBe(3);
    }
  });

  it("leaves a continuous series as before: its samples joined by a polyline, no markers", () => {
    const continuous: ResponseSeries = { ...HELD, sampled: null };
    const m = responseModel({ series: [continuous], ...layout });
    const p = m.control!.paths[0]!;
    expect(p.drawing).toBe("curve");
    expect(p.markers).toBeNull();
    const r2 = (v: number) => Number(v.toFixed(2));
    expect(p.path).toBe(polylinePath(3, () => true, (k) => r2(m.x(HELD.time[k]!)), (k) => r2(m.control!.y(HELD.control![0]![k]!))));
  });
});

describe("read-outs and CSV of sampled series", () => {
  it("reads the held sample on a staircase, the nearest sample otherwise, never an interpolated value", () => {
    expect(readoutIndex([0, 1, 2], 1.9, true)).toBe(1);
    expect(readoutIndex([0, 1, 2], -0.5, true)).toBe(0);
    expect(readoutIndex([0, 1, 2], 1.9, false)).toBe(2);
    expect(readoutIndex([], 1, true)).toBe(-1);
    const [held] = responseReadout([{ ...HELD, controlNames: ["u"], outputNames: ["y"] }], 1.9);
    expect(held).toEqual({ name: "sampled", time: "1", sample: 1, values: ["y 0.5", "u 3"] });
    const [skipped] = responseReadout([{ ...HELD, time: [0, 5, 10], outputNames: ["y"], controlNames: ["u"] }], 3.9);
    expect(skipped).toEqual({ name: "sampled", time: "5", sample: 5, values: ["y 0.5", "u 3"] });
    const [continuous] = responseReadout([{ ...HELD, sampled: null, outputNames: ["y"], controlNames: ["u"] }], 1.9);
    expect(continuous).toEqual({ name: "sampled", time: "2", values: ["y 0.75", "u 2"] });
  });

  it("exports one CSV row per sample with the sample values, headed as sample times", () => {
    const csv = toCsv(responseCsv([{ ...HELD, outputNames: ["y"], controlNames: ["u"] }]));
    expect(csv).toBe("sampled sample time (s),sampled y,sampled u\r\n0,0,1\r\n1,0.5,3\r\n2,0.75,2\r\n");
    // Continuous series keep their header.
    expect(responseCsv([{ ...HELD, sampled: null }])[0]!.quantity).toBe("sampled time");
  });
});

describe("rendered sampled response", () => {
  it("renders stairs, markers with their count, and the caption beside the series' marker", () => {
    const html = renderToStaticMarkup(<ResponsePlot series={[HELD, { name: "continuous", time: [0, 1, 2], output: [[0, 1, 1]], control: [[1, 0, 0]], styleIndex: 1 }]} />);
    expect(count(html, /lw-series-stairs/g)).toBe(1);
    expect(count(html, /lw-sample-join/g)).toBe(1);
    expect(html).toContain('class="lw-sample-markers" data-count="3"');
    expect(count(html, /class="lw-sample-markers"/g)).toBe(1);
    expect(html).toContain(">T = 1 s: inputs held (stairs), outputs at the sample instants (markers)</text>");
    expect(count(html, /class="lw-sampled-caption"/g)).toBe(1);
    expect(html).not.toMatch(/NaN/);
  });

  it("shows a markers-only series in the legend by its marker alone and draws no line for it", () => {
    const skipped: ResponseSeries = { ...HELD, time: [0, 5, 10] };
    const html = renderToStaticMarkup(<ResponsePlot variant="print" series={[skipped]} />);
    expect(count(html, /class="lw-legend-markers"/g)).toBe(1);
    expect(count(html, /class="lw-legend-line"/g)).toBe(0);
    expect(count(html, /lw-series-line/g)).toBe(0);
    expect(count(html, /class="lw-sample-markers" data-count="3"/g)).toBe(2);
    expect(sampledCaptions([skipped])).toEqual([{ seriesIndex: 0, name: "sampled", text: "T = 1 s, data every 5 s: markers only (the samples between are not listed)" }]);
  });

  it("wraps a caption that is wider than a narrow figure onto more lines, each within the width", () => {
    const text = sampledCaption(HELD);
    expect(wrapWords(text, 10_000, 10.5)).toEqual([text]);
    const lines = wrapWords(text, 200, 10.5);
    expect(lines.length).toBeGreaterThan(1);
    expect(lines.join(" ")).toBe(text);
    const html = renderToStaticMarkup(<ResponsePlot width={320} series={[HELD]} />);
    expect(count(html, /class="lw-sampled-caption"/g)).toBe(wrapWords(text, 320 - 52, 10.5).length);
  });
});
