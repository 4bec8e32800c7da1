import { renderToStaticMarkup } from "react-dom/server";
import { describe, expect, it } from "vitest";
import { leftTitleX } from "../../../../renderer/plots/Axis";
import { BodePlot } from "../../../../renderer/plots/BodePlot";
import { textSize } from "../../../../renderer/plots/labelPlacement";
import { ParameterLocusPlot } from "../../../../renderer/plots/ParameterLocusPlot";
import { PoleZeroMap } from "../../../../renderer/plots/PoleZeroMap";
import { ResponsePlot } from "../../../../renderer/plots/ResponsePlot";
import { RootLocusPlot } from "../../../../renderer/plots/RootLocusPlot";

const count = (html: string, pattern: RegExp) => (html.match(pattern) ?? []).length;

const pzSeries = [
  { name: "Variant A", poles: [{ re: -1, im: 2 }, { re: -1, im: -2 }, { re: -3, im: 0 }], zeros: [{ re: -2, im: 0 }] },
  { name: "Variant B", poles: [{ re: -2, im: 1 }, { re: -2, im: -1 }] },
];

describe("rendered plot structure", () => {
  it("renders a pole-zero map with one × per pole, one ○ per zero, a legend entry per series, and no NaN", () => {
    const html = renderToStaticMarkup(<PoleZeroMap series={pzSeries} />);
    expect(count(html, /class="lw-pole"/g)).toBe(5);
    expect(count(html, /class="lw-zero"/g)).toBe(1);
    expect(html).toContain(">Variant A</text>");
    expect(html).toContain(">Variant B</text>");
    expect(count(html, /class="lw-guide lw-guide-zeta"/g)).toBe(9);
    expect(html).not.toMatch(/NaN/);
    expect(html).toContain("Reset view");
    // The legend shows the pole glyph (×), with the series tag from the second series on.
    expect(count(html, /class="lw-legend-pole"/g)).toBe(2);
  });

  it("gives focusable drag handles to real poles and upper pair members only when a drag callback is given", () => {
    expect(renderToStaticMarkup(<PoleZeroMap series={pzSeries} />)).not.toContain("lw-pole-handle");
    const html = renderToStaticMarkup(<PoleZeroMap series={pzSeries} onDragPole={() => undefined} />);
    // A: upper member of the pair and the real pole; B: upper member.
    expect(count(html, /class="lw-pole-handle"[^>]*tabindex="0"/g)).toBe(3);
    expect(html).toContain('aria-label="Variant A pole 1 at -1 + 2j; arrow keys move it"');
    expect(html).toContain('aria-label="Variant A pole 3 at -3; arrow keys move it"');
  });

  it("draws the unit circle and no damping rays for a sampled system", () => {
    const html = renderToStaticMarkup(<PoleZeroMap series={[{ name: "z", poles: [{ re: 0.5, im: 0.2 }, { re: 0.5, im: -0.2 }] }]} sampleTime={0.05} />);
    expect(count(html, /lw-guide-unit/g)).toBe(1);
    expect(count(html, /class="lw-guide lw-guide-wn"/g)).toBe(9);
    expect(html).toContain("Real part of z");
  });

  it("leaves out buttons, handles and the read-out in the print variant", () => {
    const html = renderToStaticMarkup(<PoleZeroMap series={pzSeries} variant="print" onDragPole={() => undefined} />);
    expect(html).not.toContain("<button");
    expect(html).not.toContain("lw-pole-handle");
    expect(html).not.toContain("lw-readout");
    expect(html).toContain("lw-plot-print");
  });

  it("renders a Bode plot with two panels, labelled axes, margin annotations and three export buttons", () => {
    const freqs = Array.from({ length: 200 }, (_, k) => 10 ** (-2 + (4 * k) / 199));
    const html = renderToStaticMarkup(
      <BodePlot series={[{
        name: "Loop",
        frequency: freqs,
        magnitudeDb: freqs.map((w) => -30 * Math.log10(1 + w * w)),
        phaseDeg: freqs.map((w) => (-3 * Math.atan(w) * 180) / Math.PI),
        margins: { gainDb: 18.0618, phaseDeg: null, gainCrossover: null, phaseCrossover: Math.sqrt(3) },
      }]} />,
    );
    expect(html).toContain("lw-panel-magnitude");
    expect(html).toContain("lw-panel-phase");
    expect(html).toContain("Magnitude (dB)");
    expect(html).toContain("Phase (deg)");
    expect(html).toContain("Frequency (rad/s)");
    expect(html).toContain("GM 18.1 dB at 1.73 rad/s");
    expect(count(html, /<button/g)).toBe(4); // reset + SVG, PNG, CSV
    expect(html).not.toMatch(/NaN/);
  });

  it("renders a response with a control panel, dashed limit lines and metric labels", () => {
    const time = Array.from({ length: 101 }, (_, k) => k * 0.05);
    const html = renderToStaticMarkup(
      <ResponsePlot series={[{
        name: "A", time, output: [time.map((t) => 1 - Math.exp(-t))], control: [time.map((t) => Math.exp(-t))],
        controlLimits: { lower: -0.5, upper: 0.8 },
        metrics: { riseTime: 2.197, settlingTime: 3.9, overshootPct: 0, peak: 0.993, peakTime: 5, steadyStateValue: 1 },
      }]} />,
    );
    expect(html).toContain("lw-panel-control");
    expect(count(html, /class="lw-limit-line"/g)).toBe(2);
    expect(html).toContain("upper limit 0.8");
    expect(html).toContain("rise 2.197 s");
    expect(html).toContain("settled (±2 %) 3.9 s");
    expect(html).toContain("Time (s)");
  });

  it("renders a root locus with asymptotes dashed, crossings labelled with their gain, and open-loop marks", () => {
    const gains = [0, 1, 2, 4];
    const html = renderToStaticMarkup(
      <RootLocusPlot locus={{
        gains,
        branches: [gains.map((k) => ({ re: -1, im: Math.sqrt(Math.max(k, 0)) })), gains.map((k) => ({ re: -1, im: -Math.sqrt(Math.max(k, 0)) }))],
        asymptotes: { centroid: -1, anglesDeg: [90, 270] },
        crossings: [{ point: { re: 0, im: 1.5 }, gain: 2.25 }],
        openLoopPoles: [{ re: -1, im: 0 }, { re: -1, im: 0 }],
        openLoopZeros: [],
      }} />,
    );
    expect(count(html, /class="lw-asymptote"/g)).toBe(2);
    expect(html).toContain("k = 2.25");
    expect(count(html, /class="lw-series-line"/g)).toBe(2);
  });

  it("renders a parameter locus with start and end marks named in the legend", () => {
    const values = [1, 2, 3];
    const html = renderToStaticMarkup(
      <ParameterLocusPlot parameterName="Mass m" parameterUnit="kg" symbol="m" locus={{ values, branches: [values.map((v) => ({ re: -v, im: 0 }))] }} />,
    );
    expect(html).toContain("start (m = 1)");
    expect(html).toContain("end (m = 3)");
    expect(html).toContain("Poles as Mass m varies");
  });

  it("draws each metric annotation once, as laid out by the model, in the outputs panel", () => {
    const time = Array.from({ length: 101 }, (_, k) => k * 0.1);
    const y = time.map((t) => 1 - Math.exp(-t) * Math.cos(2 * t));
    const html = renderToStaticMarkup(
      <ResponsePlot variant="print" series={[{ name: "A", time, output: [y], metrics: { settlingTime: 3.9, peak: Math.max(...y), peakTime: 1.2, overshootPct: 10, steadyStateValue: 1 } }]} />,
    );
    expect(count(html, /class="lw-metric-label lw-metric-(settling|peak|rise)"/g)).toBe(3);
    expect(html).not.toMatch(/NaN/);
  });

  it("moves a left axis title clear of wide tick labels, but keeps it inside the SVG", () => {
    const model = (labels: string[]) => ({ kind: "linear" as const, domain: [0, 1] as [number, number], range: [100, 0] as [number, number], ticks: labels.map((label, i) => ({ value: i, position: i * 10, label, major: true })) });
    expect(leftTitleX(model(["0", "1"]), 62)).toBe(18);
    const wide = leftTitleX(model(["−0.004", "−0.002", "0"]), 80);
    // The title's descenders (about 3 units right of its baseline) stay left of the widest label.
    expect(wide + 3).toBeLessThan(80 - 8 - textSize("−0.004", 10.5).width);
    expect(leftTitleX(model(["−0.0000125"]), 62)).toBe(10);
  });
});
