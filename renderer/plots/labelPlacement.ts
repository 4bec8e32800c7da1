/**
 * Label placement for plot annotations: estimated text boxes, overlap tests and a greedy pass
 * that puts each label at its first candidate position that stays inside the frame, clears the
 * labels already placed and (when it can) does not cross the drawn curves. Pure, so tests check
 * the layout without a DOM or a font.
 */

/** An axis-aligned box in SVG user units (y grows downward). */
export interface Box {
  x: number;
  y: number;
  width: number;
  height: number;
}

/** Advance of one character in the plots' monospaced annotation font, per px of font size (0.6 em, plus a little slack). */
const CHAR_EM = 0.62;

/** Estimated box of a one-line text at `fontSize` px in the monospaced annotation font. */
export function textSize(text: string, fontSize: number): { width: number; height: number } {
  return { width: Math.ceil([...text].length * CHAR_EM * fontSize) + 2, height: Math.ceil(fontSize * 1.2) };
}

/** True when the two boxes share any area (touching edges do not count), with `gap` extra clearance. */
export function boxesOverlap(a: Box, b: Box, gap = 0): boolean {
  return a.x < b.x + b.width + gap && b.x < a.x + a.width + gap && a.y < b.y + b.height + gap && b.y < a.y + a.height + gap;
}

/** True when `inner` lies wholly inside `outer`. */
export function boxInside(inner: Box, outer: Box): boolean {
  const eps = 1e-9;
  return inner.x >= outer.x - eps && inner.y >= outer.y - eps && inner.x + inner.width <= outer.x + outer.width + eps && inner.y + inner.height <= outer.y + outer.height + eps;
}

/** True when the segment (x1,y1)–(x2,y2) passes through the box (exact for straight segments). */
export function segmentHitsBox(x1: number, y1: number, x2: number, y2: number, b: Box): boolean {
  const lo = Math.max(Math.min(x1, x2), b.x);
  const hi = Math.min(Math.max(x1, x2), b.x + b.width);
  if (lo > hi) return false;
  let ya: number, yb: number;
  if (x1 === x2) { ya = y1; yb = y2; } else {
    const at = (x: number) => y1 + ((x - x1) / (x2 - x1)) * (y2 - y1);
    ya = at(lo); yb = at(hi);
  }
  return Math.max(ya, yb) >= b.y && Math.min(ya, yb) <= b.y + b.height;
}

/** True when any segment of the polyline passes through the box. */
export function polylineHitsBox(points: readonly (readonly [number, number])[], b: Box): boolean {
  for (let k = 1; k < points.length; k++) {
    const p = points[k - 1]!, q = points[k]!;
    if (segmentHitsBox(p[0], p[1], q[0], q[1], b)) return true;
  }
  return false;
}

export interface LabelRequest {
  text: string;
  width: number;
  height: number;
  /** Preferred top-left corners, best first. */
  candidates: readonly { x: number; y: number }[];
}

export interface Obstacles {
  /** Boxes a label must not cover (marks). */
  boxes?: readonly Box[];
  /** Curves a label should not cross (avoided when any position allows it). */
  lines?: readonly (readonly (readonly [number, number])[])[];
}

/**
 * Greedy placement, in request order. Positions tried: each candidate, clamped into the frame,
 * then each candidate moved up and down by whole label rows (stacking). The first position that
 * is inside the frame, overlaps no placed label (with `gap` clearance) and no obstacle box, and
 * crosses no obstacle line wins; failing that, the first that only crossing a line spoils. A
 * label that fits nowhere (a tiny frame) gets null and is not drawn.
 */
export function placeLabels(requests: readonly LabelRequest[], frame: Box, obstacles: Obstacles = {}, gap = 2): (Box | null)[] {
  const placed: Box[] = [];
  const out: (Box | null)[] = [];
  const clamp = (v: number, lo: number, hi: number) => Math.min(Math.max(v, lo), Math.max(lo, hi));
  for (const r of requests) {
    const rows = Math.max(1, Math.ceil(frame.height / (r.height + gap)));
    const tries: Box[] = [];
    for (const c of r.candidates) tries.push({ x: c.x, y: c.y, width: r.width, height: r.height });
    for (let k = 1; k <= rows; k++) {
      for (const c of r.candidates) {
        tries.push({ x: c.x, y: c.y + k * (r.height + gap), width: r.width, height: r.height });
        tries.push({ x: c.x, y: c.y - k * (r.height + gap), width: r.width, height: r.height });
      }
    }
    let fallback: Box | null = null;
    let chosen: Box | null = null;
    for (const t of tries) {
      const b = { ...t, x: clamp(t.x, frame.x + 1, frame.x + frame.width - t.width - 1), y: clamp(t.y, frame.y + 1, frame.y + frame.height - t.height - 1) };
      if (!boxInside(b, frame)) continue;
      if (placed.some((p) => boxesOverlap(p, b, gap))) continue;
      if ((obstacles.boxes ?? []).some((o) => boxesOverlap(o, b))) continue;
      if ((obstacles.lines ?? []).some((l) => polylineHitsBox(l, b))) { fallback ??= b; continue; }
      chosen = b;
      break;
    }
    chosen ??= fallback;
    if (chosen) placed.push(chosen);
    out.push(chosen);
  }
  return out;
}
