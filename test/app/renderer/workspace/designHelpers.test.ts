import fc from "fast-check";
import { describe, expect, it } from "vitest";
import {
  BODE_POINTS,
  STEP_SAMPLES,
  brysonWeights,
  partnerOf,
  setPoleKeepingPairs,
  sliderToWeight,
  variantForDisplay,
  weightToSlider,
} from "../../../../renderer/state/workspace/designHelpers";

describe("design helpers", () => {
  it("Bryson's rule weights each signal by one over its largest deviation squared (common practice)", () => {
    expect(brysonWeights([1000, 10, 0.5], "state")).toEqual([1e-6, 0.01, 4]);
    expect(() => brysonWeights([0], "state")).toThrow("state 1 must be a positive number");
  });

  it("the log slider reads back the weight it was set to within its 3-digit rounding (property)", () => {
    fc.assert(
      fc.property(fc.integer({ min: -6000, max: 6000 }), (k) => {
        const weight = 10 ** (k / 1000);
        const pos = weightToSlider(weight, -6, 6);
        const back = sliderToWeight(pos, -6, 6);
        // One slider step is 12 decades / 1000 = 0.012 decades ≈ 2.8 %; plus 3-digit rounding.
        expect(Math.abs(Math.log10(back) - Math.log10(weight))).toBeLessThanOrEqual(0.006 + 0.0023);
      }),
      { seed: 4242, numRuns: 300 },
    );
  });

  it("moving a complex pole moves its conjugate; making a real pole complex pairs it with a real neighbour", () => {
    const poles = [{ re: -1, im: 2 }, { re: -1, im: -2 }, { re: -3, im: 0 }, { re: -4, im: 0 }];
    expect(setPoleKeepingPairs(poles, 1, { re: -2, im: -5 })).toEqual([{ re: -2, im: 5 }, { re: -2, im: -5 }, { re: -3, im: 0 }, { re: -4, im: 0 }]);
    expect(setPoleKeepingPairs(poles, 2, { re: -3, im: 1 })).toEqual([{ re: -1, im: 2 }, { re: -1, im: -2 }, { re: -3, im: 1 }, { re: -3, im: -1 }]);
    const split = setPoleKeepingPairs(poles, 0, { re: -1, im: 0 });
    expect(split.slice(0, 2)).toEqual([{ re: -1, im: 0 }, { re: -1.5, im: 0 }]);
    expect(partnerOf(poles, 0)).toBe(1);
    expect(partnerOf(poles, 2)).toBe(-1);
  });

  it("the list stays closed under conjugation after any sequence of moves (property)", () => {
    const move = fc.record({ index: fc.integer({ min: 0, max: 5 }), re: fc.integer({ min: -50, max: 0 }), im: fc.integer({ min: -20, max: 20 }) });
    fc.assert(
      fc.property(fc.array(move, { maxLength: 12 }), (moves) => {
        let poles = [-1, -2, -3, -4, -5, -6].map((re) => ({ re, im: 0 }));
        for (const m of moves) poles = setPoleKeepingPairs(poles, m.index, { re: m.re / 10, im: m.im / 10 });
        for (const p of poles) if (p.im !== 0) expect(poles.some((q) => q.re === p.re && q.im === -p.im)).toBe(true);
        expect(poles.filter((p) => p.im > 0).length).toBe(poles.filter((p) => p.im < 0).length);
      }),
      { seed: 777, numRuns: 300 },
    );
  });

  it("asks for 500 step samples and 400 Bode points, sampled on the period for a sampled design", () => {
    const cont = variantForDisplay({ id: "v", plant: "p", step: { times: [0, 10, 20] } }, null);
    expect(cont.step!.times).toHaveLength(STEP_SAMPLES);
    expect(cont.step!.times.at(-1)).toBeCloseTo(20, 12);
    expect(cont.bode!.frequencies).toHaveLength(BODE_POINTS);
    const sampled = variantForDisplay({ id: "v", plant: "p", discretize: { sampleTime: 0.5, method: "zoh" }, step: { times: [0, 100] } }, null);
    expect(sampled.step!.times.slice(0, 3)).toEqual([0, 0.5, 1]);
    expect(sampled.bode!.frequencies.at(-1)!).toBeLessThan(Math.PI / 0.5);
  });
});
