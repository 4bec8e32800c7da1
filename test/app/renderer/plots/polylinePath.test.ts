// polylinePath must write exactly what d3's line() (linear curve) writes, so the plots' SVG and
// exports do not change; d3 itself is the reference here.
import { line } from "d3";
import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { polylinePath, toHundredths } from "../../../../renderer/plots/polylinePath";

const viaD3 = (xs: number[], ys: (number | null)[]) =>
  line<number>()
    .defined((k) => ys[k] !== null)
    .x((k) => xs[k]!)
    .y((k) => ys[k] as number)(xs.map((_, k) => k)) ?? "";
const viaPolyline = (xs: number[], ys: (number | null)[]) => polylinePath(xs.length, (k) => ys[k] !== null, (k) => xs[k]!, (k) => ys[k] as number);

describe("polylinePath", () => {
  it("writes the same path data as d3's line for runs with gaps, single points and negative zero", () => {
    const cases: [number[], (number | null)[]][] = [
      [[], []],
      [[1], [2]], // one point: "M1,2Z"
      [[0, 1, 2, 3, 4], [1, null, 3, 4, null]], // a single point then a run
      [[0, 1, 2], [null, null, null]],
      [[-0, 1.25, 2.5], [-0, -3.75, 1e-7]],
    ];
    for (const [xs, ys] of cases) expect(viaPolyline(xs, ys)).toBe(viaD3(xs, ys));
    expect(viaPolyline([1], [2])).toBe("M1,2Z");
  });

  it("matches d3's line on generated curves with gaps", () => {
    // Values on a 0.0001 grid, finer than d3's 3-digit rounding (integers scaled, never raw doubles).
    const point = fc.option(fc.integer({ min: -10_000_000, max: 10_000_000 }).map((v) => v / 10_000), { freq: 6 });
    fc.assert(
      fc.property(fc.array(point, { maxLength: 60 }), (ys) => {
        const xs = ys.map((_, k) => k * 1.5);
        expect(viaPolyline(xs, ys)).toBe(viaD3(xs, ys));
      }),
      { seed: 20261202, numRuns: 300 },
    );
  });

  it("rounds to hundredths exactly as Number(v.toFixed(2)) does, ties and signs included", () => {
    // Ties of the decimal text (x.xx5), whose binary value lies just below or above the tie.
    for (const v of [1.005, 0.145, 2.675, -1.005, -0.145, 0.125, -0.125, 1e-7, -1e-7, 0, -0, 123456.785, 1e12 + 0.005, NaN, Infinity]) {
      expect(Object.is(toHundredths(v), Number(v.toFixed(2))) || (Number.isNaN(v) && Number.isNaN(toHundredths(v)))).toBe(true);
    }
    fc.assert(
      fc.property(fc.integer({ min: -2_000_000_000, max: 2_000_000_000 }), fc.integer({ min: 1, max: 4 }), (k, digits) => {
        const v = k / 10 ** (digits + 1); // pixel-like values with up to 5 decimals, many exact ties
        expect(toHundredths(v)).toBe(Number(v.toFixed(2)));
      }),
      { seed: 4242, numRuns: 2000 },
    );
  });
});
