// Guides of a z-plane window (renderer/plots/zoomGuides.ts) and PoleZeroMap's `view`,
// `outline` and `caption` props: curves exact at a zoom of a few thousandths, labels inside the
// window and clear of each other and of the poles.
import { scaleLinear } from "d3";
import { renderToStaticMarkup } from "react-dom/server";
import { describe, expect, it } from "vitest";
import { boxesOverlap, boxInside, type Box } from "../../../../renderer/plots/labelPlacement";
import { PoleZeroMap } from "../../../../renderer/plots/PoleZeroMap";
import { glyphBox } from "../../../../renderer/plots/poleZeroModel";
import type { Domain, PlotComplex } from "../../../../renderer/plots/plotTypes";
import { naturalFrequencyCurve, sampledWindowGuides, unitArc, windowFrequencyRange, zetaCurve } from "../../../../renderer/plots/zoomGuides";
import { expectAtMost, expectRelativeClose } from "../../../helpers/assertions";

/** Numbers of an SVG path's absolute M/L commands, as [x, y] runs (one per M). */
function pathRuns(d: string): [number, number][][] {
  const runs: [number, number][][] = [];
  for (const m of d.matchAll(/([ML])(-?[\d.]+),(-?[\d.]+)/g)) {
    if (m[1] === "M") runs.push([]);
    runs[runs.length - 1]!.push([Number(m[2]), Number(m[3])]);
  }
  return runs;
}

// A window 0.012 wide at z = 0.995 (the slow loop of poleWindow.test.ts, T = 0.01 s), 480 × 480 px.
const T = 0.01;
const windowX: Domain = [0.989, 1.001];
const windowY: Domain = [-0.006, 0.006];
const x = scaleLinear().domain(windowX).range([50, 530]);
const y = scaleLinear().domain(windowY).range([530, 50]);
const pxPerUnit = 480 / 0.012;
const frame: Box = { x: 50, y: 50, width: 480, height: 480 };
const poles: PlotComplex[] = [{ re: 0.995, im: 0.004975 }, { re: 0.995, im: -0.004975 }, { re: 0.99005, im: 0 }, { re: 0.999, im: 0 }];
const marks = poles.map((p) => glyphBox(x(p.re), y(p.im)));
const guides = sampledWindowGuides(x, y, T, marks);

describe("z-plane guides for a window near z = 1", () => {
  it("samples the unit circle over the window's angles only, every chord within a quarter pixel of the circle", () => {
    const arc = unitArc(windowX, windowY);
    for (const p of arc) expectAtMost(Math.abs(Math.hypot(p.re, p.im) - 1), 1e-15, "|z| on the arc");
    const angles = arc.map((p) => Math.atan2(p.im, p.re));
    // The window subtends angles up to ±atan(0.006 / 0.989) (its upper-left and lower-left corners).
    expectRelativeClose(Math.max(...angles), Math.atan2(0.006, 0.989), 1e-12, "largest angle");
    expectRelativeClose(Math.min(...angles), -Math.atan2(0.006, 0.989), 1e-12, "least angle");
    const unit = guides.find((g) => g.kind === "unit")!;
    const runs = pathRuns(unit.path);
    expect(runs.length).toBe(1);
    for (const run of runs) {
      for (let k = 1; k < run.length; k++) {
        const mid = { re: x.invert((run[k - 1]![0] + run[k]![0]) / 2), im: y.invert((run[k - 1]![1] + run[k]![1]) / 2) };
        expectAtMost(Math.abs(1 - Math.hypot(mid.re, mid.im)) * pxPerUnit, 0.25, `chord ${k} of the unit circle (px)`);
      }
    }
  });

  it("puts every point of a ζ curve on ln|z| = −ζ/√(1−ζ²)·arg z (the image of the ζ ray)", () => {
    for (const zeta of [0.1, 0.5, 0.9]) {
      const r = zeta / Math.sqrt(1 - zeta * zeta);
      for (const p of zetaCurve(zeta).slice(1)) {
        // ln|z| near z = 1 carries an absolute rounding error of a few ε: 1e-15 absolute at least.
        expectRelativeClose(Math.log(Math.hypot(p.re, p.im)), -r * Math.atan2(p.im, p.re), 1e-9, `ζ ${zeta} curve`, 1e-6);
      }
    }
  });

  it("draws each ζ curve through the window with chords within a quarter pixel of the curve", () => {
    for (const zeta of [0.1, 0.5, 0.9]) {
      const r = zeta / Math.sqrt(1 - zeta * zeta);
      const pts = zetaCurve(zeta);
      let inside = 0;
      for (let k = 2; k < pts.length; k++) {
        const a = pts[k - 1]!, b = pts[k]!;
        if (!(x(b.re) >= 50 && x(b.re) <= 530 && y(b.im) >= 50 && y(b.im) <= 530)) continue;
        inside += 1;
        // The curve at the geometric mid-parameter against the chord's midpoint.
        const ta = Math.atan2(a.im, a.re), tb = Math.atan2(b.im, b.re), t = Math.sqrt(ta * tb);
        const onCurve = { re: Math.exp(-r * t) * Math.cos(t), im: Math.exp(-r * t) * Math.sin(t) };
        const gap = Math.hypot((a.re + b.re) / 2 - onCurve.re, (a.im + b.im) / 2 - onCurve.im) * pxPerUnit;
        expectAtMost(gap, 0.25, `ζ ${zeta} chord ${k} (px)`);
      }
      expect(inside, `points of ζ ${zeta} inside the window`).toBeGreaterThan(20);
    }
    expect(guides.filter((g) => g.kind === "zeta").map((g) => g.value)).toEqual([0.1, 0.2, 0.3, 0.4, 0.5, 0.6, 0.7, 0.8, 0.9]);
  });

  it("draws constant-ωn curves for round ωn across the window's natural frequencies", () => {
    const [lo, hi] = windowFrequencyRange(windowX, windowY, T);
    expect(lo).toBe(0);
    // Farthest corner from z = 1: 0.989 ± 0.006j, |ln z|/T = |ln 0.989 + j·atan(0.006/0.989)|/0.01 ≈ 1.265 rad/s.
    expectRelativeClose(hi, Math.hypot(Math.log(Math.hypot(0.989, 0.006)), Math.atan2(0.006, 0.989)) / T, 1e-12, "largest ωn");
    const wn = guides.filter((g) => g.kind === "wn").map((g) => g.value);
    expect(wn).toEqual([0.2, 0.4, 0.6, 0.8, 1, 1.2]);
    for (const w of wn) {
      for (const p of naturalFrequencyCurve(w * T)) {
        expectRelativeClose(Math.hypot(Math.log(Math.hypot(p.re, p.im)), Math.atan2(p.im, p.re)) / T, w, 1e-12, `ωn ${w} curve`);
      }
    }
  });

  it("labels inside the window, clear of the poles and of each other, every other ζ only", () => {
    const labelled = guides.filter((g) => g.labelBox);
    expect(labelled.some((g) => g.kind === "unit")).toBe(true);
    expect(labelled.filter((g) => g.kind === "zeta").every((g) => Math.round(g.value * 10) % 2 === 1)).toBe(true);
    expect(labelled.filter((g) => g.kind === "zeta").length).toBeGreaterThanOrEqual(3);
    expect(labelled.filter((g) => g.kind === "wn").length).toBeGreaterThanOrEqual(3);
    for (const g of labelled) {
      expect(boxInside(g.labelBox!, frame), `${g.kind} ${g.value} inside`).toBe(true);
      for (const m of marks) expect(boxesOverlap(g.labelBox!, m), `${g.kind} ${g.value} clear of the poles`).toBe(false);
    }
    for (let i = 0; i < labelled.length; i++) {
      for (let j = i + 1; j < labelled.length; j++) expect(boxesOverlap(labelled[i]!.labelBox!, labelled[j]!.labelBox!)).toBe(false);
    }
  });
});

const count = (html: string, pattern: RegExp) => (html.match(pattern) ?? []).length;

describe("PoleZeroMap with an explicit view window", () => {
  const series = [{ name: "cloud", poles }];

  it("shows the window (equal scales) with the window's guides and the caption, and no boundary arrow when the circle crosses it", () => {
    const html = renderToStaticMarkup(<PoleZeroMap variant="print" series={series} sampleTime={T} view={{ x: windowX, y: windowY }} caption={["first line", "second line"]} />);
    expect(count(html, /class="lw-pole"/g)).toBe(4);
    // Ticks of the zoomed axis (0.99, 0.995, 1), not of the full map (−1, 0, 1).
    expect(html).toMatch(/>0\.995</);
    expect(html).not.toMatch(/>−1</);
    expect(html).toContain('class="lw-plot-caption"');
    expect(html).toContain(">second line</text>");
    expect(html).not.toContain("boundary-marker");
    // The panel is wider than tall, so the window widens and its round ωn values differ from the square case's.
    expect(count(html, /class="lw-guide lw-guide-wn"/g)).toBeGreaterThanOrEqual(3);
    expect(html).not.toMatch(/NaN/);
  });

  it("marks the boundary with an arrow and its name when it lies outside the window", () => {
    const inner = [{ name: "inner", poles: [{ re: 0.9, im: 0.004 }, { re: 0.9, im: -0.004 }, { re: 0.895, im: 0 }] }];
    const html = renderToStaticMarkup(<PoleZeroMap variant="print" series={inner} sampleTime={T} view={{ x: [0.89, 0.91], y: [-0.01, 0.01] }} />);
    expect(html).toContain('data-testid="boundary-marker"');
    expect(html).toContain(">unit circle</text>");
    const s = renderToStaticMarkup(<PoleZeroMap variant="print" series={[{ name: "s", poles: [{ re: -10, im: 0.2 }, { re: -10, im: -0.2 }] }]} view={{ x: [-10.5, -9.5], y: [-0.5, 0.5] }} />);
    expect(s).toContain(">imaginary axis</text>");
  });

  it("outlines a window on the full map with its label, at least 10 px wide", () => {
    const html = renderToStaticMarkup(<PoleZeroMap variant="print" series={series} sampleTime={T} outline={{ x: windowX, y: windowY, label: "zoomed in the next figure" }} />);
    expect(html).toContain('data-testid="zoom-outline"');
    expect(html).toContain(">zoomed in the next figure</text>");
    const rect = /data-testid="zoom-outline"><rect x="([\d.]+)" y="([\d.]+)" width="([\d.]+)" height="([\d.]+)"/.exec(html)!;
    expect(Number(rect[3])).toBeGreaterThanOrEqual(10);
    expect(Number(rect[4])).toBeGreaterThanOrEqual(10);
  });
});
