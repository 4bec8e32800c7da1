/**
 * Pole-zero map model: equal-aspect scales, the guide geometry (damping-ratio rays and
 * natural-frequency circles in the s-plane; unit circle with constant-ζ and constant-ωn curves
 * in the z-plane) and the marks. Pure; PoleZeroMap.tsx draws it.
 */
import { line, scaleLinear, type ScaleLinear } from "d3";
import { linearTicks, tickLabel, type AxisModel } from "./axisModel";
import { seriesStyle, type SeriesStyle } from "./palette";
import { conjugatePartners, isDragHandle } from "./poleDrag";
import type { Domain, Margins, PlotComplex } from "./plotTypes";
import { equalAspect } from "./viewport";

export interface PoleZeroSeries {
  name: string;
  poles: readonly PlotComplex[];
  zeros?: readonly PlotComplex[];
  /** Palette slot (default: position in the list), so a variant keeps its look everywhere. */
  styleIndex?: number;
}

export interface GuideCurve {
  /** "zeta" (damping ratio) or "wn" (natural frequency) or "unit" (the unit circle). */
  kind: "zeta" | "wn" | "unit";
  value: number;
  path: string;
  label: string;
  labelX: number;
  labelY: number;
}

export interface PoleMark {
  seriesIndex: number;
  index: number;
  re: number;
  im: number;
  x: number;
  y: number;
  draggable: boolean;
}

export interface PoleZeroModel {
  x: ScaleLinear<number, number>;
  y: ScaleLinear<number, number>;
  xAxis: AxisModel;
  yAxis: AxisModel;
  plot: { left: number; top: number; width: number; height: number };
  guides: GuideCurve[];
  series: { name: string; style: SeriesStyle; poles: PoleMark[]; zeros: PoleMark[] }[];
}

/** Least distance (SVG units) between two ζ labels of the s-plane map. */
export const MIN_LABEL_GAP = 22;

export const ZETA_GUIDES = [0.1, 0.2, 0.3, 0.4, 0.5, 0.6, 0.7, 0.8, 0.9];

/** The domain that holds every pole and zero (and the origin, and the unit circle when sampled), padded. */
export function poleZeroDomain(series: readonly PoleZeroSeries[], sampled: boolean): { x: Domain; y: Domain } {
  let xLo = sampled ? -1 : 0, xHi = sampled ? 1 : 0, yLo = sampled ? -1 : 0, yHi = sampled ? 1 : 0;
  for (const s of series) {
    for (const p of [...s.poles, ...(s.zeros ?? [])]) {
      if (!Number.isFinite(p.re) || !Number.isFinite(p.im)) continue;
      xLo = Math.min(xLo, p.re); xHi = Math.max(xHi, p.re);
      yLo = Math.min(yLo, p.im, -Math.abs(p.im)); yHi = Math.max(yHi, p.im, Math.abs(p.im));
    }
  }
  const span = Math.max(xHi - xLo, yHi - yLo, 1e-12) || 1;
  const pad = 0.15 * span;
  if (xHi - xLo === 0 && yHi - yLo === 0) return { x: [-1, 1], y: [-1, 1] };
  return { x: [xLo - pad, xHi + pad], y: [yLo - pad, yHi + pad] };
}

const fmt = (v: number) => Number(v.toFixed(2));

/** Continuous-time guides: rays at ζ from the origin into the left half plane, circles |s| = ωn. */
function continuousGuides(x: ScaleLinear<number, number>, y: ScaleLinear<number, number>): GuideCurve[] {
  const [x0, x1] = x.domain() as Domain;
  const [y0, y1] = y.domain() as Domain;
  const reach = Math.max(Math.hypot(x0, y0), Math.hypot(x0, y1), Math.hypot(x1, y0), Math.hypot(x1, y1));
  const guides: GuideCurve[] = [];
  if (x0 >= 0) return guides; // no left half plane in view
  const labelSide = y1 > 0 ? 1 : -1;
  for (const zeta of ZETA_GUIDES) {
    const c = Math.sqrt(1 - zeta * zeta);
    // Ray s = r(−ζ ± j√(1−ζ²)), r ≥ 0 (the locus of constant damping ratio).
    const path = `M${fmt(x(-zeta * reach))},${fmt(y(c * reach))}L${fmt(x(0))},${fmt(y(0))}L${fmt(x(-zeta * reach))},${fmt(y(-c * reach))}`;
    // Labels sit on one quarter circle inside the view, so they spread by angle (arccos ζ steps
    // of at least 5°) instead of piling up where the steep rays leave the top edge.
    const t = 0.88 * Math.min(-x0, labelSide > 0 ? y1 : -y0);
    guides.push({ kind: "zeta", value: zeta, path, label: `ζ ${zeta}`, labelX: fmt(x(-zeta * t)), labelY: fmt(y(labelSide * c * t)) });
  }
  // Near the imaginary axis the rays bunch up (arccos ζ steps shrink to 5°): walking from ζ = 0.9
  // toward 0.1, a label closer than MIN_LABEL_GAP to the last kept one is left out.
  let last: GuideCurve | null = null;
  for (let i = guides.length - 1; i >= 0; i--) {
    const g = guides[i]!;
    if (last && Math.hypot(g.labelX - last.labelX, g.labelY - last.labelY) < MIN_LABEL_GAP) g.label = "";
    else last = g;
  }
  const radii = scaleLinear().domain([0, reach]).ticks(5).filter((r) => r > 0);
  for (const wn of radii) {
    // Left half circle from +jωn to −jωn.
    const path = `M${fmt(x(0))},${fmt(y(wn))}A${fmt(x(wn) - x(0))},${fmt(y(0) - y(wn))} 0 0,0 ${fmt(x(0))},${fmt(y(-wn))}`;
    const a = (200 * Math.PI) / 180; // label just below the negative real axis
    guides.push({ kind: "wn", value: wn, path, label: `ωn ${tickLabel(wn)}`, labelX: fmt(x(wn * Math.cos(a))), labelY: fmt(y(wn * Math.sin(a))) });
  }
  return guides;
}

/** z = exp(sT) sampled along a curve in sT given as (σ(θ), ω(θ)). */
function zCurve(points: number, sT: (t: number) => PlotComplex): PlotComplex[] {
  const out: PlotComplex[] = [];
  for (let k = 0; k <= points; k++) {
    const s = sT(k / points);
    const m = Math.exp(s.re);
    out.push({ re: m * Math.cos(s.im), im: m * Math.sin(s.im) });
  }
  return out;
}

/**
 * Sampled-time guides (z = e^{sT}): the unit circle; constant-ζ curves, the images of the ζ rays
 * for 0 ≤ ωd·T ≤ π; constant-ωn curves for ωn·T = kπ/10, k = 1…9 (fractions of the Nyquist
 * frequency), the images of the quarter circles |sT| = ωn·T in the left half plane.
 */
function sampledGuides(x: ScaleLinear<number, number>, y: ScaleLinear<number, number>, sampleTime: number): GuideCurve[] {
  const toPath = (pts: PlotComplex[], mirror: boolean) => {
    const l = line<PlotComplex>().x((p) => fmt(x(p.re))).y((p) => fmt(y(mirror ? -p.im : p.im)));
    return (l(pts) ?? "");
  };
  const guides: GuideCurve[] = [];
  const unit = zCurve(128, (t) => ({ re: 0, im: 2 * Math.PI * t }));
  guides.push({ kind: "unit", value: 1, path: toPath(unit, false) + "Z", label: "|z| = 1", labelX: fmt(x(1.02 * Math.cos(-0.7))), labelY: fmt(y(1.02 * Math.sin(-0.7))) });
  for (const zeta of ZETA_GUIDES) {
    const r = zeta / Math.sqrt(1 - zeta * zeta);
    const pts = zCurve(60, (t) => ({ re: -r * Math.PI * t, im: Math.PI * t }));
    // Label where the curve crosses the imaginary axis (ωd·T = π/2); every other ζ only, since
    // the curves converge toward z = 1 and nine labels would overlap.
    const mid = pts[30]!;
    const labelled = Math.round(zeta * 10) % 2 === 1;
    guides.push({ kind: "zeta", value: zeta, path: toPath(pts, false) + toPath(pts, true), label: labelled ? `ζ ${zeta}` : "", labelX: fmt(x(mid.re) + 2), labelY: fmt(y(mid.im) - 2) });
  }
  for (let k = 1; k <= 9; k++) {
    const wT = (k * Math.PI) / 10;
    // sT = ωn·T·(−cos φ + j sin φ), φ from 0 (ζ = 1) to π/2 (ζ = 0).
    const pts = zCurve(40, (t) => ({ re: -wT * Math.cos((t * Math.PI) / 2), im: wT * Math.sin((t * Math.PI) / 2) }));
    const end = pts[pts.length - 1]!;
    guides.push({ kind: "wn", value: wT / sampleTime, path: toPath(pts, false) + toPath(pts, true), label: `ωn ${tickLabel(wT / sampleTime)}`, labelX: fmt(x(end.re)), labelY: fmt(y(end.im) - 4) });
  }
  return guides;
}

export interface PoleZeroModelInput {
  series: readonly PoleZeroSeries[];
  /** Sample period in seconds for a sampled system; null/undefined: continuous time. */
  sampleTime?: number | null;
  width: number;
  height: number;
  margins: Margins;
  /** Current (zoomed) view; default: every pole and zero. */
  view?: { x: Domain; y: Domain };
  /** Whether poles get drag handles. */
  draggable?: boolean;
}

export function poleZeroModel(input: PoleZeroModelInput): PoleZeroModel {
  const { series, width, height, margins: m } = input;
  const sampled = typeof input.sampleTime === "number" && input.sampleTime > 0;
  const plot = { left: m.left, top: m.top, width: width - m.left - m.right, height: height - m.top - m.bottom };
  const base = input.view ?? poleZeroDomain(series, sampled);
  const fitted = equalAspect(base.x, base.y, plot.width, plot.height);
  const x = scaleLinear().domain(fitted.x).range([plot.left, plot.left + plot.width]);
  const y = scaleLinear().domain(fitted.y).range([plot.top + plot.height, plot.top]);
  const guides = sampled ? sampledGuides(x, y, input.sampleTime as number) : continuousGuides(x, y);
  const marks = series.map((s, si) => {
    const partners = conjugatePartners(s.poles);
    const mark = (p: PlotComplex, i: number, pole: boolean): PoleMark => ({
      seriesIndex: si, index: i, re: p.re, im: p.im, x: x(p.re), y: y(p.im),
      draggable: pole && input.draggable === true && isDragHandle(s.poles, i, partners),
    });
    return {
      name: s.name,
      style: seriesStyle(s.styleIndex ?? si),
      poles: s.poles.map((p, i) => mark(p, i, true)).filter((p) => Number.isFinite(p.x) && Number.isFinite(p.y)),
      zeros: (s.zeros ?? []).map((p, i) => mark(p, i, false)).filter((p) => Number.isFinite(p.x) && Number.isFinite(p.y)),
    };
  });
  return {
    x, y, plot, guides, series: marks,
    xAxis: linearTicks(fitted.x, [plot.left, plot.left + plot.width], Math.max(3, Math.round(plot.width / 90))),
    yAxis: linearTicks(fitted.y, [plot.top + plot.height, plot.top], Math.max(3, Math.round(plot.height / 60))),
  };
}
