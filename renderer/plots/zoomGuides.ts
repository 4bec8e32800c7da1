/**
 * z-plane guides for an explicit view window (PoleZeroMap's `view` prop), exact at any zoom.
 *
 * The full map's guides (poleZeroModel.ts) sample the unit circle with 128 chords and the
 * constant-ζ curves with 60 points over 0 ≤ ωd·T ≤ π; inside a window a few thousandths wide
 * near z = 1 (a slow sampled loop) one chord's sag is several pixels and the ζ curves show as
 * straight chords. Here every curve is sampled for the window:
 * - the unit circle only over the angles the window subtends, 400 chords (sag below
 *   (Δθ)²/8 ≤ 8·10⁻⁶ of the radius, and a far smaller fraction of any window that is small);
 * - the ζ curves z = e^{t(−ζ/√(1−ζ²) + j)} on a geometric grid t = π·10^{−7(1−k/N)}, N = 560
 *   (successive points 3 % apart in t, so a chord never strays visibly from the curve at any
 *   window 10⁻⁷ of the circle or wider);
 * - constant-ωn curves for "nice" ωn (d3 ticks) spanning the natural frequencies |ln z|/T
 *   present in the window, instead of the full map's fixed kπ/(10T);
 * Only the pieces of each curve near the window are kept, so the SVG stays small. Labels sit
 * inside the window, clear of the poles and of each other (ζ at the last point of its curve in
 * the window, every other ζ only; ωn on the other half plane; |z| = 1 beside its arc); a label that fits nowhere is
 * left out. Pure, so tests check the geometry without a DOM.
 */
import { scaleLinear, type ScaleLinear } from "d3";
import { tickLabel } from "./axisModel";
import { boxesOverlap, boxInside, textSize, type Box } from "./labelPlacement";
import type { GuideCurve } from "./poleZeroModel";
import { GUIDE_FONT, LABEL_GAP, ZETA_GUIDES } from "./poleZeroModel";
import type { Domain, PlotComplex } from "./plotTypes";

const fmt = (v: number) => Number(v.toFixed(2));
/**
 * ζ values labelled, in order of preference: every other one (as the full z-plane map), since
 * near z = 1 all nine curves fan out of one point and nine labels crowd the window's edge.
 */
const ZETA_LABELLED = [0.9, 0.7, 0.5, 0.3, 0.1];

type Scale = ScaleLinear<number, number>;

/** SVG path of the polyline's pieces whose segments touch the window grown by half its size on each side. */
export function windowedPath(points: readonly PlotComplex[], x: Scale, y: Scale): string {
  const [x0, x1] = x.domain() as Domain;
  const [y0, y1] = y.domain() as Domain;
  const gx = (x1 - x0) / 2, gy = (y1 - y0) / 2;
  const lo = { re: Math.min(x0, x1) - gx, im: Math.min(y0, y1) - gy };
  const hi = { re: Math.max(x0, x1) + gx, im: Math.max(y0, y1) + gy };
  const touches = (p: PlotComplex, q: PlotComplex) =>
    Math.max(p.re, q.re) >= lo.re && Math.min(p.re, q.re) <= hi.re && Math.max(p.im, q.im) >= lo.im && Math.min(p.im, q.im) <= hi.im;
  let d = "";
  let open = false;
  for (let k = 1; k < points.length; k++) {
    const p = points[k - 1]!, q = points[k]!;
    if (!touches(p, q)) { open = false; continue; }
    if (!open) d += `M${fmt(x(p.re))},${fmt(y(p.im))}`;
    d += `L${fmt(x(q.re))},${fmt(y(q.im))}`;
    open = true;
  }
  return d;
}

const mirror = (pts: readonly PlotComplex[]) => pts.map((p) => ({ re: p.re, im: -p.im }));
const expSample = (re: number, im: number): PlotComplex => {
  const m = Math.exp(re);
  return { re: m * Math.cos(im), im: m * Math.sin(im) };
};

/** Points of the unit circle over the angles the window subtends (the whole circle when it holds the origin). */
export function unitArc(x: Domain, y: Domain, chords = 400): PlotComplex[] {
  let from = -Math.PI, to = Math.PI;
  if (!(x[0] <= 0 && x[1] >= 0 && y[0] <= 0 && y[1] >= 0)) {
    const centre = Math.atan2((y[0] + y[1]) / 2, (x[0] + x[1]) / 2);
    const wrap = (a: number) => Math.atan2(Math.sin(a - centre), Math.cos(a - centre));
    const offsets = [[x[0], y[0]], [x[0], y[1]], [x[1], y[0]], [x[1], y[1]]].map(([a, b]) => wrap(Math.atan2(b!, a!)));
    from = centre + Math.min(...offsets);
    to = centre + Math.max(...offsets);
  }
  const pts: PlotComplex[] = [];
  for (let k = 0; k <= chords; k++) {
    const a = from + ((to - from) * k) / chords;
    pts.push({ re: Math.cos(a), im: Math.sin(a) });
  }
  return pts;
}

/** The constant-ζ curve z = e^{t(−ζ/√(1−ζ²) + j)}, 0 ≤ t ≤ π, on the geometric grid of the file comment (first point z = 1). */
export function zetaCurve(zeta: number, steps = 560): PlotComplex[] {
  const r = zeta / Math.sqrt(1 - zeta * zeta);
  const pts: PlotComplex[] = [{ re: 1, im: 0 }];
  for (let k = 0; k <= steps; k++) {
    const t = Math.PI * 10 ** (-7 * (1 - k / steps));
    pts.push(expSample(-r * t, t));
  }
  return pts;
}

/** The constant-ωn curve z = e^{ωT(−cos φ + j sin φ)}, 0 ≤ φ ≤ π/2 (upper half). */
export function naturalFrequencyCurve(omegaT: number, steps = 200): PlotComplex[] {
  const pts: PlotComplex[] = [];
  for (let k = 0; k <= steps; k++) {
    const phi = (k * Math.PI) / 2 / steps;
    pts.push(expSample(-omegaT * Math.cos(phi), omegaT * Math.sin(phi)));
  }
  return pts;
}

/** Natural frequencies |ln z|/T (rad/s) over a 9 × 9 grid of the window: their least and largest. */
export function windowFrequencyRange(x: Domain, y: Domain, sampleTime: number): Domain {
  let lo = Infinity, hi = 0;
  for (let i = 0; i <= 8; i++) {
    for (let j = 0; j <= 8; j++) {
      const re = x[0] + ((x[1] - x[0]) * i) / 8, im = y[0] + ((y[1] - y[0]) * j) / 8;
      const r = Math.hypot(re, im);
      if (!(r > 0)) continue;
      const w = Math.hypot(Math.log(r), Math.atan2(im, re)) / sampleTime;
      lo = Math.min(lo, w); hi = Math.max(hi, w);
    }
  }
  // A window around z = 1 holds ωn = 0 itself.
  if (x[0] <= 1 && x[1] >= 1 && y[0] <= 0 && y[1] >= 0) lo = 0;
  return [Number.isFinite(lo) ? lo : 0, hi];
}

/** Guides for a z-plane window (see the file comment); `marks` are the pole/zero glyph boxes labels keep clear of. */
export function sampledWindowGuides(x: Scale, y: Scale, sampleTime: number, marks: readonly Box[] = []): GuideCurve[] {
  const xd = x.domain() as Domain, yd = y.domain() as Domain;
  const [left, right] = x.range() as Domain;
  const [bottom, top] = y.range() as Domain;
  const frame: Box = { x: Math.min(left, right), y: Math.min(top, bottom), width: Math.abs(right - left), height: Math.abs(bottom - top) };
  const kept: Box[] = [...marks];
  const fits = (box: Box) => boxInside(box, { x: frame.x + 2, y: frame.y + 2, width: frame.width - 4, height: frame.height - 4 }) && !kept.some((b) => boxesOverlap(b, box, LABEL_GAP));
  const place = (g: GuideCurve, text: string, box: Box) => {
    kept.push(box);
    Object.assign(g, { label: text, labelX: fmt(box.x + 1), labelY: fmt(box.y + GUIDE_FONT * 0.9), labelBox: box });
  };
  const inFrame = (px: number, py: number) => px >= frame.x && px <= frame.x + frame.width && py >= frame.y && py <= frame.y + frame.height;
  const upper = yd[1] > 0 ? 1 : -1;
  const guides: GuideCurve[] = [];

  // Unit circle, labelled beside a visible point of its arc: outside it (away from the origin) where there is room, else inside.
  const arc = unitArc(xd, yd);
  const unit: GuideCurve = { kind: "unit", value: 1, path: windowedPath(arc, x, y), label: "", labelX: 0, labelY: 0 };
  const unitText = "|z| = 1", unitSize = textSize(unitText, GUIDE_FONT);
  const visibleArc = arc.filter((p) => inFrame(x(p.re), y(p.im)));
  for (const f of [0.5, 0.3, 0.7, 0.15, 0.85]) {
    const p = visibleArc[Math.round(f * (visibleArc.length - 1))];
    if (!p) break;
    const px = x(p.re), py = y(p.im);
    const outward = p.re >= 0 ? 1 : -1;
    const boxY = p.im >= 0 ? py - 4 - unitSize.height : py + 4;
    const outside = { x: outward > 0 ? px + 4 : px - 4 - unitSize.width, y: boxY, ...unitSize };
    const inside = { x: outward > 0 ? px - 4 - unitSize.width : px + 4, y: boxY, ...unitSize };
    const box = [outside, inside].find(fits);
    if (box) { place(unit, unitText, box); break; }
  }
  guides.push(unit);

  // Constant-ζ curves: label at the last point of the curve (largest ωd·T) where the label fits.
  const zetaGuides = ZETA_GUIDES.map((zeta) => {
    const pts = zetaCurve(zeta);
    return { zeta, pts, guide: { kind: "zeta", value: zeta, path: windowedPath(pts, x, y) + windowedPath(mirror(pts), x, y), label: "", labelX: 0, labelY: 0 } as GuideCurve };
  });
  for (const zeta of ZETA_LABELLED) {
    const z = zetaGuides.find((g) => g.zeta === zeta)!;
    const text = `ζ ${zeta}`, size = textSize(text, GUIDE_FONT);
    for (let k = z.pts.length - 1; k > 0; k--) {
      const p = z.pts[k]!;
      const px = x(p.re), py = y(upper * p.im);
      if (!inFrame(px, py)) continue;
      const box = { x: px - size.width / 2, y: py - size.height / 2, ...size };
      if (fits(box)) { place(z.guide, text, box); break; }
    }
  }
  guides.push(...zetaGuides.map((z) => z.guide));

  // Constant-ωn curves for nice values across the window's natural frequencies (below Nyquist).
  const [wLo, wHi] = windowFrequencyRange(xd, yd, sampleTime);
  const values = scaleLinear().domain([wLo, wHi]).ticks(4).filter((w) => w > 0 && w * sampleTime < Math.PI);
  for (const wn of values) {
    const pts = naturalFrequencyCurve(wn * sampleTime);
    const g: GuideCurve = { kind: "wn", value: wn, path: windowedPath(pts, x, y) + windowedPath(mirror(pts), x, y), label: "", labelX: 0, labelY: 0 };
    const text = `ωn ${tickLabel(wn)}`, size = textSize(text, GUIDE_FONT);
    // On the half plane opposite the ζ labels, from near the real axis outward.
    for (let k = 20; k <= 190; k += 10) {
      const p = pts[k]!;
      const px = x(p.re), py = y(-upper * p.im);
      if (!inFrame(px, py)) continue;
      const box = { x: px + 2, y: upper > 0 ? py : py - size.height, ...size };
      if (fits(box)) { place(g, text, box); break; }
    }
    guides.push(g);
  }
  return guides;
}
