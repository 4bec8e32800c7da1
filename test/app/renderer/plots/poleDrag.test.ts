import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { arrowKeyDelta, conjugatePartners, constrainPoleTarget, isDragHandle, movePole, niceStep } from "../../../../renderer/plots/poleDrag";

const poles = [
  { re: -1, im: 2 },
  { re: -3, im: 0 },
  { re: -1, im: -2 },
  { re: -0.5, im: -0.25 },
  { re: -0.5, im: 0.25 },
];

describe("conjugate pairs", () => {
  it("pairs each upper pole with its mirror, in any order, and leaves real poles alone", () => {
    expect(conjugatePartners(poles)).toEqual([2, -1, 0, 4, 3]);
    expect([0, 1, 2, 3, 4].map((i) => isDragHandle(poles, i))).toEqual([true, true, false, false, true]);
  });

  it("treats an imaginary part at rounding level as real", () => {
    expect(conjugatePartners([{ re: -2, im: 1e-15 }, { re: -2, im: -1e-15 }])).toEqual([-1, -1]);
  });

  it("pairs a repeated pair one-to-one", () => {
    const twice = [{ re: -1, im: 1 }, { re: -1, im: 1 }, { re: -1, im: -1 }, { re: -1, im: -1 }];
    const p = conjugatePartners(twice);
    expect(new Set(p).size).toBe(4);
    p.forEach((j, i) => expect(p[j]).toBe(i));
  });
});

describe("dragging a pole", () => {
  it("moves the mirror of a dragged pair member to the conjugate location", () => {
    const out = movePole(poles, 0, { re: -2, im: 3 });
    expect(out[0]).toEqual({ re: -2, im: 3 });
    expect(out[2]).toEqual({ re: -2, im: -3 });
    expect(out[1]).toEqual(poles[1]);
    expect(poles[0]).toEqual({ re: -1, im: 2 }); // the input list is not changed
  });

  it("keeps a real pole on the real axis whatever the pointer's height", () => {
    expect(movePole(poles, 1, { re: -4, im: 1.7 })[1]).toEqual({ re: -4, im: 0 });
    expect(constrainPoleTarget(poles, 1, { re: 2, im: -5 })).toEqual({ re: 2, im: 0 });
  });

  it("turns a pair dragged across the real axis into a double real pole", () => {
    const out = movePole(poles, 4, { re: -0.7, im: -0.3 });
    expect(out[4]).toEqual({ re: -0.7, im: 0 });
    expect(Math.abs(out[3]!.im)).toBe(0);
    expect(out[3]!.re).toBe(-0.7);
  });

  it("keeps every pole set closed under conjugation (property)", () => {
    const pair = fc.tuple(fc.integer({ min: -200, max: 200 }), fc.integer({ min: 1, max: 200 })).map(([a, b]) => [{ re: a / 20, im: b / 20 }, { re: a / 20, im: -b / 20 }]);
    const real = fc.integer({ min: -200, max: 200 }).map((a) => [{ re: a / 20, im: 0 }]);
    fc.assert(
      fc.property(fc.array(fc.oneof(pair, real), { minLength: 1, maxLength: 5 }), fc.nat(), fc.integer({ min: -300, max: 300 }), fc.integer({ min: -300, max: 300 }), (groups, pick, tx, ty) => {
        const list = groups.flat();
        const index = pick % list.length;
        const out = movePole(list, index, { re: tx / 30, im: ty / 30 });
        const key = (p: { re: number; im: number }) => `${p.re}|${Math.abs(p.im)}`;
        const upper = out.filter((p) => p.im > 0).map(key).sort();
        const lower = out.filter((p) => p.im < 0).map(key).sort();
        expect(upper).toEqual(lower);
        expect(out).toHaveLength(list.length);
      }),
      { seed: 20240611, numRuns: 300 },
    );
  });

  it("rejects an index outside the list and a non-finite target", () => {
    expect(() => movePole(poles, 9, { re: 0, im: 0 })).toThrow(/outside/);
    expect(() => movePole(poles, 0, { re: NaN, im: 0 })).toThrow(/finite/);
  });
});

describe("keyboard moves", () => {
  it("maps arrow keys to real and imaginary steps, ten times larger with Shift", () => {
    expect(arrowKeyDelta("ArrowLeft", 0.1)).toEqual({ re: -0.1, im: 0 });
    expect(arrowKeyDelta("ArrowUp", 0.1, true)).toEqual({ re: 0, im: 1 });
    expect(arrowKeyDelta("Enter", 0.1)).toBeNull();
  });

  it("chooses a 1-2-5 step near one percent of the visible span", () => {
    expect(niceStep(10)).toBe(0.1);
    expect(niceStep(37)).toBe(0.2);
    expect(niceStep(600)).toBe(5);
    expect(niceStep(0)).toBe(0.01);
  });
});
