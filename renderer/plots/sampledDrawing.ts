/**
 * How a sampled time response is drawn. Pure, so tests check the geometry without a DOM.
 *
 * A controller that runs every T seconds computes its input at the sample instants kT and holds
 * it until the next instant (zero-order hold); the output of a discrete model exists only at the
 * instants. So a series marked `sampled: { period: T }` is drawn by what it is:
 *
 * - **Every sample listed** (successive times one period apart, "stairs" mode): the control input
 *   is a staircase, each value held from its instant to the next (the last one for one more
 *   period, as the hold applies it); the outputs are markers at the instants, joined by a thin,
 *   faint line that only guides the eye from one sample to the next (it is no value between them).
 * - **Not every sample listed** (e.g. a step grid every 5 s on a loop sampled every 1 s,
 *   "markers" mode): the held value changes at instants the data do not list, so a staircase
 *   would have the wrong width and a join would hide the skipped samples (a loop ringing at
 *   z = −1 looks flat when every second sample is drawn joined). Outputs and control inputs are
 *   markers only, and the legend says so.
 * - A sampled controller on a continuous plant (`outputs: "continuous"`, e.g. a nonlinear
 *   simulation): the outputs stay curves; only the control input follows the rules above.
 *
 * Markers use the series' own marker shape (palette.ts), so a sampled series keeps its look
 * without colour. Their size follows the sample spacing on screen (between 1.2 and 3 px half-size).
 */
import type { MarkerShape } from "./palette";
import { toHundredths } from "./polylinePath";
import { isDrawable } from "./plotTypes";

/** The sampled option of a series: the period T (s) of the sample instants. */
export interface SampledOption {
  period: number;
  /**
   * "samples" (default): the outputs exist only at the sample instants (a discrete model).
   * "continuous": the outputs are a continuous plant's, seen at the listed times (a sampled
   * controller on a continuous plant): drawn as curves; only the control input is held.
   */
  outputs?: "samples" | "continuous";
}

/** "curve": joined samples (continuous); "stairs": every sample listed; "markers": some skipped. */
export type SampledMode = "curve" | "stairs" | "markers";

/** Relative tolerance on a step of one period (JSON round trips: 0.1·k is not exactly k/10). */
const PERIOD_TOLERANCE = 1e-6;

/** True when successive times are one period apart (within 1e-6·T); one or no time: true. */
export function listsEverySample(time: readonly number[], period: number): boolean {
  for (let k = 1; k < time.length; k++) {
    if (Math.abs(time[k]! - time[k - 1]! - period) > PERIOD_TOLERANCE * period) return false;
  }
  return true;
}

/** The drawing mode of a series with an optional `sampled` option (a period ≤ 0 counts as none). */
export function sampledMode(s: { time: readonly number[]; sampled?: SampledOption | null }): SampledMode {
  const T = s.sampled?.period;
  if (!isDrawable(T) || T <= 0) return "curve";
  return listsEverySample(s.time, T) ? "stairs" : "markers";
}

/** How one panel draws a series: outputs and control inputs differ in stairs mode. */
export function panelDrawing(s: { time: readonly number[]; sampled?: SampledOption | null }, panel: "outputs" | "control"): "curve" | "join-and-markers" | "stairs" | "markers" {
  const mode = sampledMode(s);
  if (mode === "curve") return "curve";
  if (panel === "outputs" && s.sampled?.outputs === "continuous") return "curve";
  if (mode === "markers") return "markers";
  return panel === "outputs" ? "join-and-markers" : "stairs";
}

/** "1 s", "0.05 s" (six significant digits, as the comparison prints periods). */
const seconds = (v: number): string => `${Number(v.toPrecision(6))} s`;

/**
 * The figure's caption for a sampled series ("" for a continuous one), printed beside its marker
 * under the legend: the period and what is drawn, e.g. "T = 1 s: inputs held (stairs), outputs at
 * the sample instants (markers)" or "T = 1 s, data every 5 s: markers only (the samples between
 * are not listed)".
 */
export function sampledCaption(s: { time: readonly number[]; sampled?: SampledOption | null }): string {
  const mode = sampledMode(s);
  if (mode === "curve") return "";
  const T = `T = ${seconds(s.sampled!.period)}`;
  const continuousOutputs = s.sampled!.outputs === "continuous";
  if (mode === "stairs") return continuousOutputs ? `${T}: inputs held (stairs); outputs of the continuous plant` : `${T}: inputs held (stairs), outputs at the sample instants (markers)`;
  const grid = uniformStepText(s.time);
  const where = grid ? `every ${grid}` : "at the listed instants";
  const what = continuousOutputs ? "inputs as markers only" : "markers only";
  return `${T}, data ${where}: ${what} (the samples between are not listed)`;
}

/** "5 s" when the listed times are uniformly spaced (three or more), else "". */
function uniformStepText(time: readonly number[]): string {
  if (time.length < 3) return "";
  const h = time[1]! - time[0]!;
  if (!(h > 0)) return "";
  return listsEverySample(time, h) ? seconds(h) : "";
}

const round3 = (v: number): number => Math.round(v * 1000) / 1000;
const point = (x: number, y: number): string => `${round3(toHundredths(x))},${round3(toHundredths(y))}`;

/**
 * SVG path of a held signal: from each defined sample (t_k, v_k) a horizontal segment to the
 * next instant t_{k+1}, then a vertical one to v_{k+1}; the last defined sample of a run is held
 * to the next listed instant (before a gap) or for one more period (the final sample, as the hold
 * applies it). `x` and `y` map data to pixels; coordinates rounded as polylinePath's.
 * Example: t = [0, 1, 2], v = [a, b, c], T = 1 → M x0,a L x1,a L x1,b L x2,b L x2,c L x3,c.
 */
export function stairsPath(time: readonly number[], values: readonly (number | null)[], period: number, x: (t: number) => number, y: (v: number) => number): string {
  let out = "";
  let held: number | null = null; // value of the previous defined sample in the current run
  for (let k = 0; k < time.length; k++) {
    const t = time[k];
    const v = values[k];
    if (!isDrawable(t) || !isDrawable(v)) {
      // A gap: the previous value was held up to this instant, then the data stop.
      if (held !== null && isDrawable(t)) out += `L${point(x(t), y(held))}`;
      held = null;
      continue;
    }
    if (held === null) out += `M${point(x(t), y(v))}`;
    else out += `L${point(x(t), y(held))}L${point(x(t), y(v))}`;
    held = v;
  }
  const last = time[time.length - 1];
  if (held !== null && isDrawable(last)) out += `L${point(x(last + period), y(held))}`;
  return out;
}

/** Vertices of a marker of half-size r centred at the origin (palette.ts markerPath's shapes). */
function markerVertices(shape: Exclude<MarkerShape, "circle" | "plus">, r: number): [number, number][] {
  switch (shape) {
    case "square":
      return [[-r, -r], [r, -r], [r, r], [-r, r]];
    case "diamond":
      return [[0, -r * 1.25], [r, 0], [0, r * 1.25], [-r, 0]];
    case "triangle":
      return [[0, -r * 1.15], [r * 1.1, r * 0.8], [-r * 1.1, r * 0.8]];
    case "triangle-down":
      return [[0, r * 1.15], [r * 1.1, -r * 0.8], [-r * 1.1, -r * 0.8]];
    case "star":
      return Array.from({ length: 10 }, (_, k) => {
        const rad = k % 2 === 0 ? r * 1.2 : r * 0.5;
        const a = -Math.PI / 2 + (k * Math.PI) / 5;
        return [rad * Math.cos(a), rad * Math.sin(a)] as [number, number];
      });
  }
}

/** One marker of `shape` and half-size r at (cx, cy), as a closed sub-path (plus: two strokes). */
export function markerAt(shape: MarkerShape, r: number, cx: number, cy: number): string {
  const f = (v: number) => round3(v);
  if (shape === "circle") return `M${f(cx - r)},${f(cy)}a${f(r)},${f(r)} 0 1,0 ${f(2 * r)},0a${f(r)},${f(r)} 0 1,0 ${f(-2 * r)},0Z`;
  if (shape === "plus") return `M${f(cx - r)},${f(cy)}h${f(2 * r)}M${f(cx)},${f(cy - r)}v${f(2 * r)}`;
  const v = markerVertices(shape, r);
  return v.map(([dx, dy], i) => `${i === 0 ? "M" : "L"}${f(cx + dx)},${f(cy + dy)}`).join("") + "Z";
}

/** Half-size of the markers for samples `spacingPx` apart on screen: 0.4·spacing within [1.2, 3]. */
export function markerRadius(spacingPx: number): number {
  return Math.min(3, Math.max(1.2, 0.4 * spacingPx));
}

/** Smallest positive spacing (data units) of successive times; Infinity with fewer than two. */
export function smallestSpacing(time: readonly number[]): number {
  let h = Infinity;
  for (let k = 1; k < time.length; k++) {
    const d = time[k]! - time[k - 1]!;
    if (d > 0 && d < h) h = d;
  }
  return h;
}

/**
 * Markers at the defined samples whose time lies in `view` (data units), as one path: the count
 * drawn and the path. One <path> per channel keeps thousands of samples cheap to draw.
 */
export function markersPath(
  time: readonly number[],
  values: readonly (number | null)[],
  view: readonly [number, number],
  shape: MarkerShape,
  radius: number,
  x: (t: number) => number,
  y: (v: number) => number,
): { path: string; count: number } {
  let path = "";
  let count = 0;
  for (let k = 0; k < time.length; k++) {
    const t = time[k];
    const v = values[k];
    if (!isDrawable(t) || !isDrawable(v) || t < view[0] || t > view[1]) continue;
    path += markerAt(shape, radius, toHundredths(x(t)), toHundredths(y(v)));
    count += 1;
  }
  return { path, count };
}

/**
 * Index of the sample a read-out at time t shows: in stairs mode the sample whose hold interval
 * [t_k, t_{k+1}) contains t (the first one before t_0); otherwise the nearest sample. −1 when
 * there are no samples.
 */
export function readoutIndex(time: readonly number[], t: number, held: boolean): number {
  if (time.length === 0) return -1;
  let best = 0;
  if (held) {
    for (let k = 1; k < time.length; k++) if (time[k]! <= t) best = k;
    return best;
  }
  for (let k = 1; k < time.length; k++) if (Math.abs(time[k]! - t) < Math.abs(time[best]! - t)) best = k;
  return best;
}
