/**
 * SVG path data of a polyline with gaps, character for character what d3's `line()` with the
 * default linear curve writes for the same points: each run of defined points starts with
 * `M x,y` and continues with `L x,y`; a run of a single point is closed (`Z`); no points → "".
 * Coordinates are rounded to 3 decimals as d3's line does by default (d3-shape 3, path digits 3).
 * Written out because a drag redraws 400–500-point curves every frame, and the generic
 * accessor-and-curve machinery cost more than the numbers themselves.
 */
const round3 = (v: number): number => Math.round(v * 1000) / 1000;

export function polylinePath(count: number, defined: (k: number) => boolean, xOf: (k: number) => number, yOf: (k: number) => number): string {
  let out = "";
  let run = 0; // points in the current run of defined points
  for (let k = 0; k < count; k++) {
    if (!defined(k)) {
      if (run === 1) out += "Z";
      run = 0;
      continue;
    }
    out += `${run === 0 ? "M" : "L"}${round3(+xOf(k))},${round3(+yOf(k))}`;
    run += 1;
  }
  if (run === 1) out += "Z";
  return out;
}

/**
 * Exactly `Number(v.toFixed(2))` (the plots' pixel rounding), without formatting a string in the
 * common case: away from a tie, the nearest hundredth of the computed v·100 is the nearest
 * hundredth of v, and n/100 is the same double as Number("n/100"). Near a tie (|v·100| small
 * enough that its rounding error is below 1e−6), and for large or non-finite v, toFixed decides.
 */
export function toHundredths(v: number): number {
  if (v === 0) return 0; // (−0).toFixed(2) is "0.00": +0
  const t = v * 100;
  if (Math.abs(t) < 1e9 && Math.abs(t - Math.floor(t) - 0.5) > 1e-6) return Math.round(t) / 100;
  return Number(v.toFixed(2));
}
