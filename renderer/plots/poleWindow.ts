/**
 * The zoom rule for pole maps: when the poles that matter (a robustness cloud, the nominal
 * closed loop) crowd into a speck of the full view, a second panel fitted to them shows their
 * spread and how near they come to the stability boundary. Pure; the design sheet calls it and
 * draws the window with PoleZeroMap's `view` prop.
 *
 * The rule (WARNING: the design sheet and its tests depend on these numbers):
 * 1. Cluster. Poles are folded into the upper half plane (re, |im|), so a conjugate pair is one
 *    group however far apart its halves lie, and linked when closer than LINK_FRACTION (10 %) of
 *    the full view's larger extent (single linkage: a chain of close poles is one cluster).
 * 2. Pick. The dominant cluster is the one holding the anchor pole nearest the stability
 *    boundary: largest real part (continuous time) or largest |z| (sampled). Anchors default to
 *    every pole; the sheet's pole-zero map passes the closed-loop poles, so an unstable plant
 *    pole does not steal the zoom.
 * 3. Decide. A zoom is drawn when the cluster's bounding box (both halves of each pair) spans
 *    less than ZOOM_FRACTION (10 %) of the full view's width AND less than 10 % of its height,
 *    and holds at least two distinct poles (a single point has no spread to show).
 * 4. Fit. When the boundary (imaginary axis, unit circle) lies no farther from the cluster than
 *    STRETCH_RATIO (3) times the cluster's larger extent, the box is stretched to reach it, so
 *    the panel shows the gap (the cluster then still fills at least a quarter of the window);
 *    then the box is padded by WINDOW_PAD (15 %) of its larger extent on every side and widened
 *    to the panel's aspect ratio (equal scales on both axes, as every pole map): the real axis
 *    grows away from the boundary (to the left in the s-plane, toward the origin in the
 *    z-plane), where the faster poles lie; the imaginary axis grows evenly about its centre.
 */
import type { Domain, PlotComplex } from "./plotTypes";
import { equalAspect } from "./viewport";

/** Poles closer than this fraction of the full view's larger extent belong to one cluster. */
export const LINK_FRACTION = 0.1;
/** A cluster narrower than this fraction of the full view in both directions gets a zoom. */
export const ZOOM_FRACTION = 0.1;
/** Padding of the zoom window, as a fraction of the cluster's larger extent, on each side. */
export const WINDOW_PAD = 0.15;
/** The window reaches the boundary when the gap to it is at most this many cluster extents. */
export const STRETCH_RATIO = 3;

export interface PoleWindowInput {
  /** Candidate poles (non-finite entries are ignored). */
  poles: readonly PlotComplex[];
  /** Poles whose cluster is the one zoomed (the boundary-nearest of them picks it); they join the candidates. Default: `poles`. */
  anchors?: readonly PlotComplex[];
  sampled: boolean;
  /** The full map's view (data units), as drawn. */
  full: { x: Domain; y: Domain };
  /** Width / height (px) of the zoom panel's plot area, so the window has equal scales. */
  aspect: number;
}

export interface PoleWindow {
  /** The window, already at the panel's aspect ratio. */
  x: Domain;
  y: Domain;
  /** Distinct poles in the zoomed cluster, and distinct candidate poles in all. */
  count: number;
  total: number;
  /** The cluster's pole nearest the stability boundary. */
  nearest: PlotComplex;
  /** Its margin to the boundary: −Re s (continuous) or 1 − |z| (sampled); negative when unstable. */
  margin: number;
  /** Whether the boundary (imaginary axis or unit circle) passes through the window. */
  boundaryInView: boolean;
  /** Magnification of the window over the full view (the smaller of the width and height ratios). */
  magnification: number;
}

const finite = (p: PlotComplex) => Number.isFinite(p.re) && Number.isFinite(p.im);
/** Margin of a pole to the stability boundary (larger is safer). */
export const stabilityMargin = (p: PlotComplex, sampled: boolean): number => (sampled ? 1 - Math.hypot(p.re, p.im) : -p.re);

/**
 * Single-linkage clusters of points folded to the upper half plane, linked when closer than
 * `link`: a grid of cells `link` wide, each point compared with the 3 × 3 cells around it, and a
 * union-find (with path halving) over the links. Returns a cluster label per point: equal labels,
 * same cluster. Single linkage as in R. Sibson, "SLINK: an optimally efficient algorithm for the
 * single-link cluster method", The Computer Journal 16(1), 1973 (from memory; cut at a fixed
 * distance, which is what the grid makes cheap); union-find after R. E. Tarjan, "Efficiency of a
 * good but not linear set union algorithm", J. ACM 22(2), 1975 (from memory).
 * Cost O(n) for spread-out points, O(n²) at worst (every point in one cell).
 * Example: foldedClusters([{re: −1, im: 10}, {re: −1, im: −10}, {re: −50, im: 0}], 1) → [0, 0, 2].
 */
export function foldedClusters(points: readonly PlotComplex[], link: number): number[] {
  const parent = points.map((_, i) => i);
  const find = (i: number): number => {
    while (parent[i] !== i) { parent[i] = parent[parent[i]!]!; i = parent[i]!; }
    return i;
  };
  const cells = new Map<string, number[]>();
  const cellOf = (v: number) => Math.floor(v / link);
  points.forEach((p, i) => {
    const key = `${cellOf(p.re)},${cellOf(Math.abs(p.im))}`;
    const list = cells.get(key);
    if (list) list.push(i); else cells.set(key, [i]);
  });
  points.forEach((p, i) => {
    const cx = cellOf(p.re), cy = cellOf(Math.abs(p.im));
    for (let dx = -1; dx <= 1; dx++) {
      for (let dy = -1; dy <= 1; dy++) {
        for (const j of cells.get(`${cx + dx},${cy + dy}`) ?? []) {
          if (j <= i) continue;
          const q = points[j]!;
          if (Math.hypot(p.re - q.re, Math.abs(p.im) - Math.abs(q.im)) < link) {
            const a = find(i), b = find(j);
            if (a !== b) parent[b] = a;
          }
        }
      }
    }
  });
  return points.map((_, i) => find(i));
}

/** Whether the stability boundary passes through the window. */
export function boundaryInWindow(x: Domain, y: Domain, sampled: boolean): boolean {
  if (!sampled) return x[0] <= 0 && x[1] >= 0;
  // The unit circle meets the rectangle when its nearest point is inside |z| ≤ 1 and its farthest outside.
  const nearX = Math.min(Math.max(0, x[0]), x[1]), nearY = Math.min(Math.max(0, y[0]), y[1]);
  const farX = Math.max(Math.abs(x[0]), Math.abs(x[1])), farY = Math.max(Math.abs(y[0]), Math.abs(y[1]));
  return Math.hypot(nearX, nearY) <= 1 && Math.hypot(farX, farY) >= 1;
}

/** The boundary point nearest to `p`: (0, Im p) in the s-plane, p/|p| on the unit circle (1 for p = 0). */
export function nearestBoundaryPoint(p: PlotComplex, sampled: boolean): PlotComplex {
  if (!sampled) return { re: 0, im: p.im };
  const r = Math.hypot(p.re, p.im);
  return r > 0 ? { re: p.re / r, im: p.im / r } : { re: 1, im: 0 };
}

/** The zoom window for `input` by the rule in the file comment, or null when no zoom is needed. */
export function poleZoomWindow(input: PoleWindowInput): PoleWindow | null {
  const { sampled, full } = input;
  const key = (p: PlotComplex) => `${p.re},${p.im}`;
  const seen = new Set<string>();
  const points: PlotComplex[] = [];
  for (const p of [...input.poles, ...(input.anchors ?? [])]) {
    if (!finite(p) || seen.has(key(p))) continue;
    seen.add(key(p));
    points.push(p);
  }
  const anchorKeys = new Set((input.anchors ?? input.poles).filter(finite).map(key));
  const fullWidth = full.x[1] - full.x[0], fullHeight = full.y[1] - full.y[0];
  const extent = Math.max(fullWidth, fullHeight);
  if (points.length < 2 || !(extent > 0) || anchorKeys.size === 0) return null;

  const labels = foldedClusters(points, LINK_FRACTION * extent);
  let pick = -1;
  points.forEach((p, i) => {
    if (anchorKeys.has(key(p)) && (pick < 0 || stabilityMargin(p, sampled) < stabilityMargin(points[pick]!, sampled))) pick = i;
  });
  const members = points.filter((_, i) => labels[i] === labels[pick]);
  let xLo = Infinity, xHi = -Infinity, yLo = Infinity, yHi = -Infinity;
  let nearest = members[0]!;
  for (const p of members) {
    xLo = Math.min(xLo, p.re); xHi = Math.max(xHi, p.re); yLo = Math.min(yLo, p.im); yHi = Math.max(yHi, p.im);
    if (stabilityMargin(p, sampled) < stabilityMargin(nearest, sampled)) nearest = p;
  }
  const span = Math.max(xHi - xLo, yHi - yLo);
  if (members.length < 2 || !(span > 1e-9 * extent)) return null;
  if (xHi - xLo >= ZOOM_FRACTION * fullWidth || yHi - yLo >= ZOOM_FRACTION * fullHeight) return null;

  const margin = stabilityMargin(nearest, sampled);
  if (margin > 0 && margin <= STRETCH_RATIO * span) {
    const b = nearestBoundaryPoint(nearest, sampled);
    xLo = Math.min(xLo, b.re); xHi = Math.max(xHi, b.re); yLo = Math.min(yLo, b.im); yHi = Math.max(yHi, b.im);
  }
  const pad = WINDOW_PAD * Math.max(xHi - xLo, yHi - yLo);
  const box: Domain = [xLo - pad, xHi + pad];
  const w = equalAspect(box, [yLo - pad, yHi + pad], input.aspect, 1);
  const grown = w.x[1] - w.x[0] - (box[1] - box[0]);
  if (grown > 0) {
    // Extra width goes away from the boundary: left in the s-plane, toward the origin in the z-plane.
    const left = !sampled || (box[0] + box[1]) / 2 > 0;
    w.x = left ? [box[0] - grown, box[1]] : [box[0], box[1] + grown];
  }
  return {
    x: w.x,
    y: w.y,
    count: members.length,
    total: points.length,
    nearest,
    margin,
    boundaryInView: boundaryInWindow(w.x, w.y, sampled),
    magnification: Math.min(fullWidth / (w.x[1] - w.x[0]), fullHeight / (w.y[1] - w.y[0])),
  };
}
