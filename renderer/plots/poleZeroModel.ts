/**
 * Pole-zero map model: equal-aspect scales, the guide geometry (damping-ratio rays and
 * natural-frequency circles in the s-plane; unit circle with constant-ζ and constant-ωn curves
 * in the z-plane) and the marks. Pure; PoleZeroMap.tsx draws it.
 */
import { line, scaleLinear, type ScaleLinear } from "d3";
import { linearTicks, tickLabel, type AxisModel } from "./axisModel";
import { boxesOverlap, boxInside, textSize, type Box } from "./labelPlacement";
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
  /** Estimated box of the label text (absent when the label is empty). */
  labelBox?: Box;
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

/** Font size (px) of guide labels (plots.css .lw-guide-label). */
export const GUIDE_FONT = 9.5;
/** Box of a pole/zero glyph at (x, y) with its tag marker (PoleZeroMark.tsx: size 5, tag up-right), kept free of guide labels. */
export function glyphBox(x: number, y: number): Box {
  return { x: x - 6, y: y - 11, width: 17, height: 17 };
}
/** Least clearance (SVG units) between two guide label boxes. */
export const LABEL_GAP = 3;

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

/**
 * Where the ray from (ox, oy) along unit vector (ux, uy) last holds a w × h box centred on it
 * wholly inside `frame` (inset by `margin`): the box centre at the ray's outer end, or null when
 * the ray never carries the box inside the frame.
 */
export function rayEndLabelCentre(ox: number, oy: number, ux: number, uy: number, w: number, h: number, frame: Box, margin = 2): { x: number; y: number } | null {
  const x0 = frame.x + w / 2 + margin, x1 = frame.x + frame.width - w / 2 - margin;
  const y0 = frame.y + h / 2 + margin, y1 = frame.y + frame.height - h / 2 - margin;
  if (x0 > x1 || y0 > y1) return null;
  let tIn = 0, tOut = Infinity;
  for (const [o, u, lo, hi] of [[ox, ux, x0, x1], [oy, uy, y0, y1]] as const) {
    if (Math.abs(u) < 1e-12) { if (o < lo || o > hi) return null; continue; }
    const ta = (lo - o) / u, tb = (hi - o) / u;
    tIn = Math.max(tIn, Math.min(ta, tb));
    tOut = Math.min(tOut, Math.max(ta, tb));
  }
  if (!(tOut >= tIn) || !Number.isFinite(tOut)) return null;
  return { x: ox + tOut * ux, y: oy + tOut * uy };
}

/** Label box for text starting at (x, baseline y) in the guide font, and back. */
const guideBox = (text: string, cx: number, cy: number): Box => {
  const { width, height } = textSize(text, GUIDE_FONT);
  return { x: cx - width / 2, y: cy - height / 2, width, height };
};
const baselineOf = (b: Box) => b.y + GUIDE_FONT * 0.9;

/** ζ labels are kept in this order of preference, so a crowded map keeps evenly spread round values. */
const ZETA_LABEL_PRIORITY = [0.9, 0.7, 0.5, 0.3, 0.1, 0.8, 0.6, 0.4, 0.2];

/**
 * Continuous-time guides: rays at ζ from the origin into the left half plane, circles |s| = ωn.
 * Each ζ label sits at the outer end of its ray, just inside the frame (where the rays are far
 * apart, not near the origin where they meet); a label whose box would overlap one already kept
 * (priority ZETA_LABEL_PRIORITY) is left out. ωn labels go on the other half of their circle,
 * at the first angle where they fit inside the frame and clear every other label. No guide label
 * covers a pole or zero glyph (`marks`).
 */
function continuousGuides(x: ScaleLinear<number, number>, y: ScaleLinear<number, number>, marks: readonly Box[] = []): GuideCurve[] {
  const [x0, x1] = x.domain() as Domain;
  const [y0, y1] = y.domain() as Domain;
  const reach = Math.max(Math.hypot(x0, y0), Math.hypot(x0, y1), Math.hypot(x1, y0), Math.hypot(x1, y1));
  const guides: GuideCurve[] = [];
  if (x0 >= 0) return guides; // no left half plane in view
  const [left, right] = x.range() as Domain;
  const [bottom, top] = y.range() as Domain;
  const frame: Box = { x: Math.min(left, right), y: Math.min(top, bottom), width: Math.abs(right - left), height: Math.abs(bottom - top) };
  const labelSide = y1 > 0 ? 1 : -1;
  const ox = x(0), oy = y(0);
  const zetaGuides: GuideCurve[] = [];
  for (const zeta of ZETA_GUIDES) {
    const c = Math.sqrt(1 - zeta * zeta);
    // Ray s = r(−ζ ± j√(1−ζ²)), r ≥ 0 (the locus of constant damping ratio).
    const path = `M${fmt(x(-zeta * reach))},${fmt(y(c * reach))}L${fmt(ox)},${fmt(oy)}L${fmt(x(-zeta * reach))},${fmt(y(-c * reach))}`;
    const dx = x(-zeta) - ox, dy = y(labelSide * c) - oy, len = Math.hypot(dx, dy);
    const text = `ζ ${zeta}`;
    const size = textSize(text, GUIDE_FONT);
    const centre = len > 0 ? rayEndLabelCentre(ox, oy, dx / len, dy / len, size.width, size.height, frame) : null;
    const g: GuideCurve = { kind: "zeta", value: zeta, path, label: "", labelX: fmt(ox), labelY: fmt(oy) };
    if (centre) {
      const box = guideBox(text, centre.x, centre.y);
      Object.assign(g, { label: text, labelX: fmt(box.x + 1), labelY: fmt(baselineOf(box)), labelBox: box });
    }
    zetaGuides.push(g);
  }
  const kept: Box[] = [...marks];
  for (const zeta of ZETA_LABEL_PRIORITY) {
    const g = zetaGuides.find((z) => z.value === zeta)!;
    if (!g.labelBox) continue;
    if (kept.some((b) => boxesOverlap(b, g.labelBox!, LABEL_GAP))) { g.label = ""; delete g.labelBox; } else kept.push(g.labelBox);
  }
  guides.push(...zetaGuides);
  const radii = scaleLinear().domain([0, reach]).ticks(5).filter((r) => r > 0);
  for (const wn of radii) {
    // Left half circle from +jωn to −jωn.
    const path = `M${fmt(x(0))},${fmt(y(wn))}A${fmt(x(wn) - x(0))},${fmt(y(0) - y(wn))} 0 0,0 ${fmt(x(0))},${fmt(y(-wn))}`;
    const text = `ωn ${tickLabel(wn)}`;
    const g: GuideCurve = { kind: "wn", value: wn, path, label: "", labelX: fmt(x(-wn)), labelY: fmt(y(0)) };
    // On the half opposite the ζ labels, starting just off the negative real axis.
    for (let deg = 12; deg <= 80; deg += 8) {
      const a = Math.PI + (labelSide * deg * Math.PI) / 180;
      const px = x(wn * Math.cos(a)), py = y(wn * Math.sin(a));
      const { width, height } = textSize(text, GUIDE_FONT);
      const box: Box = { x: px + 2, y: labelSide > 0 ? py : py - height, width, height };
      if (!boxInside(box, frame) || kept.some((b) => boxesOverlap(b, box, LABEL_GAP))) continue;
      kept.push(box);
      Object.assign(g, { label: text, labelX: fmt(box.x + 1), labelY: fmt(baselineOf(box)), labelBox: box });
      break;
    }
    guides.push(g);
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
 * frequency), the images of the quarter circles |sT| = ωn·T in the left half plane. Labels
 * that would leave the frame, cover a pole or zero, or overlap a label already placed are left out.
 */
function sampledGuides(x: ScaleLinear<number, number>, y: ScaleLinear<number, number>, sampleTime: number, marks: readonly Box[] = []): GuideCurve[] {
  const toPath = (pts: PlotComplex[], mirror: boolean) => {
    const l = line<PlotComplex>().x((p) => fmt(x(p.re))).y((p) => fmt(y(mirror ? -p.im : p.im)));
    return (l(pts) ?? "");
  };
  const guides: GuideCurve[] = [];
  const [left, right] = x.range() as Domain;
  const [bottom, top] = y.range() as Domain;
  const frame: Box = { x: Math.min(left, right), y: Math.min(top, bottom), width: Math.abs(right - left), height: Math.abs(bottom - top) };
  const kept: Box[] = [...marks];
  /** Labels `g` with `text` in `box` when the box is inside the frame and clear of every kept label. */
  const label = (g: GuideCurve, text: string, box: Box) => {
    if (!boxInside(box, frame) || kept.some((b) => boxesOverlap(b, box, LABEL_GAP))) return;
    kept.push(box);
    Object.assign(g, { label: text, labelX: fmt(box.x + 1), labelY: fmt(baselineOf(box)), labelBox: box });
  };
  const sized = (text: string) => textSize(text, GUIDE_FONT);
  const unit = zCurve(128, (t) => ({ re: 0, im: 2 * Math.PI * t }));
  const unitGuide: GuideCurve = { kind: "unit", value: 1, path: toPath(unit, false) + "Z", label: "", labelX: 0, labelY: 0 };
  const ua = { x: x(1.02 * Math.cos(-0.7)), y: y(1.02 * Math.sin(-0.7)) };
  label(unitGuide, "|z| = 1", { x: ua.x, y: ua.y - sized("|z| = 1").height / 2, ...sized("|z| = 1") });
  guides.push(unitGuide);
  for (const zeta of ZETA_GUIDES) {
    const r = zeta / Math.sqrt(1 - zeta * zeta);
    const pts = zCurve(60, (t) => ({ re: -r * Math.PI * t, im: Math.PI * t }));
    // Label where the curve crosses the imaginary axis (ωd·T = π/2); every other ζ only, since
    // the curves converge toward z = 1 and nine labels would overlap.
    const mid = pts[30]!;
    const g: GuideCurve = { kind: "zeta", value: zeta, path: toPath(pts, false) + toPath(pts, true), label: "", labelX: 0, labelY: 0 };
    const text = `ζ ${zeta}`;
    if (Math.round(zeta * 10) % 2 === 1) label(g, text, { x: x(mid.re) + 2, y: y(mid.im) - 2 - sized(text).height * 0.75, ...sized(text) });
    guides.push(g);
  }
  for (let k = 1; k <= 9; k++) {
    const wT = (k * Math.PI) / 10;
    // sT = ωn·T·(−cos φ + j sin φ), φ from 0 (ζ = 1) to π/2 (ζ = 0).
    const pts = zCurve(40, (t) => ({ re: -wT * Math.cos((t * Math.PI) / 2), im: wT * Math.sin((t * Math.PI) / 2) }));
    const end = pts[pts.length - 1]!;
    const g: GuideCurve = { kind: "wn", value: wT / sampleTime, path: toPath(pts, false) + toPath(pts, true), label: "", labelX: 0, labelY: 0 };
    // Outside the unit circle where the curve ends on it: right of the end point on the right
    // half, left of it on the left half, so labels stay off the grid of curves.
    const text = `ωn ${tickLabel(wT / sampleTime)}`;
    const size = sized(text);
    const ex = x(end.re), ey = y(end.im);
    const box = wT < Math.PI / 2 - 1e-9 ? { x: ex + 3, y: ey - size.height, ...size }
      : wT > Math.PI / 2 + 1e-9 ? { x: ex - 3 - size.width, y: ey - size.height, ...size }
      : { x: ex - size.width / 2, y: ey - size.height - 3, ...size };
    label(g, text, box);
    guides.push(g);
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
  const glyphs: Box[] = [];
  for (const s of series) {
    for (const p of [...s.poles, ...(s.zeros ?? [])]) {
      const px = x(p.re), py = y(p.im);
      if (Number.isFinite(px) && Number.isFinite(py)) glyphs.push(glyphBox(px, py));
    }
  }
  const guides = sampled ? sampledGuides(x, y, input.sampleTime as number, glyphs) : continuousGuides(x, y, glyphs);
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
