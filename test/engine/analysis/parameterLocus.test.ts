import { describe, expect, it } from "vitest";
import fc from "fast-check";
import { eigenvalues } from "../../../shared-engine/linalg";
import { parameterLocus } from "../../../shared-engine/analysis/parameterLocus";
import { matchPoles } from "../../../shared-engine/analysis/poleTracker";
import { expectAtMost, expectComplexSetsClose, expectRelativeClose, expectEngineError as expectKind } from "../../helpers/assertions";

describe("parameterLocus", () => {
  it("traces s² + 2s + k over k ∈ [0, 2]: roots −1 ± √(1 − k), meeting at k = 1 (closed form)", () => {
    const locus = parameterLocus((k) => [[0, 1], [-k, -2]], [0, 2]);
    expect(locus.values[0]).toBe(0);
    expect(locus.values.at(-1)).toBe(2);
    expect(locus.values.length).toBeGreaterThanOrEqual(101);
    locus.values.forEach((k, i) => {
      const root = Math.sqrt(Math.abs(1 - k));
      const expected = k <= 1 ? [{ re: -1 + root, im: 0 }, { re: -1 - root, im: 0 }] : [{ re: -1, im: root }, { re: -1, im: -root }];
      // Near the double root the computed roots carry O(√ε) error (defective eigenvalue).
      expectComplexSetsClose([locus.branches[0]![i]!, locus.branches[1]![i]!], expected, 1e-7, `roots at k = ${k}`);
    });
    // Continuity: the branch starting at 0 is the one that reaches −1 + j or −1 − j without jumps.
    for (const branch of locus.branches) {
      for (let i = 1; i < branch.length; i++) expectAtMost(Math.hypot(branch[i]!.re - branch[i - 1]!.re, branch[i]!.im - branch[i - 1]!.im), 0.1, `step ${i}`);
    }
  });

  it("keeps crossing branches straight: eig(diag(v, −v)) gives the branches v and −v through v = 0, not a bounce", () => {
    const locus = parameterLocus((v) => [[v, 0.0], [0, -v]], [-1, 1], { points: 41 });
    const startsNegative = locus.branches.find((b) => b[0]!.re < 0)!;
    locus.values.forEach((v, i) => expectRelativeClose(startsNegative[i]!.re, v, 1e-12, `branch value at v = ${v}`, 1));
  });

  it("steps in the logarithm on a log scale and reaches both ends exactly", () => {
    const locus = parameterLocus((q) => [[-q]], [1e-3, 1e3], { scale: "log", points: 61 });
    expect(locus.values[0]).toBe(1e-3);
    expect(locus.values.at(-1)).toBe(1e3);
    expect(locus.values.length).toBeGreaterThanOrEqual(61);
    const ratios = locus.values.slice(1).map((v, i) => v / locus.values[i]!);
    expectAtMost(Math.max(...ratios), Math.pow(1e6, 1 / 60) * (1 + 1e-12), "largest ratio between neighbours");
    expectRelativeClose(locus.branches[0]!.at(-1)!.re, -1e3, 1e-15, "eigenvalue at the end");
  });

  it("returns the eigenvalues of M(v) at every value as a complete set (property, seed 99)", () => {
    const entry = fc.integer({ min: -10, max: 10 });
    fc.assert(
      fc.property(fc.array(entry, { minLength: 9, maxLength: 9 }), fc.array(entry, { minLength: 9, maxLength: 9 }), (m0, m1) => {
        const M = (v: number): number[][] => [0, 1, 2].map((i) => [0, 1, 2].map((j) => m0[3 * i + j]! / 5 + (v * m1[3 * i + j]!) / 5));
        const locus = parameterLocus(M, [-1, 1], { points: 21 });
        for (let i = 0; i < locus.values.length; i += 5) {
          expectComplexSetsClose(locus.branches.map((b) => b[i]!), eigenvalues(M(locus.values[i]!)), 1e-12, `eigenvalues at ${locus.values[i]}`);
        }
        expect(new Set(locus.branches.map((b) => b.length))).toEqual(new Set([locus.values.length]));
      }),
      { seed: 99, numRuns: 30 },
    );
  });

  it("rejects a bad range, a log scale through zero, a matrix that changes size and NaN entries", () => {
    const M = (k: number) => [[-k]];
    expectKind(() => parameterLocus(M, [1, 1]), "invalid-argument", /increasing/);
    expectKind(() => parameterLocus(M, [0, Infinity]), "non-finite", /finite/);
    expectKind(() => parameterLocus(M, [0, 1], { scale: "log" }), "invalid-argument", /positive range/);
    expectKind(() => parameterLocus(M, [0, 1], { points: 1 }), "invalid-argument", /points/);
    expectKind(() => parameterLocus((k) => (k > 0.5 ? [[1, 0], [0, 1]] : [[1]]), [0, 1]), "invalid-argument", /size must not change/);
    expectKind(() => parameterLocus((k) => [[k > 0.5 ? NaN : 1]], [0, 1]), "non-finite", /\[0\]\[0\] is NaN/);
    expectKind(() => parameterLocus(() => [[1, 2]], [0, 1]), "invalid-argument", /square/);
  });
});

describe("matchPoles", () => {
  it("finds the least-total-distance assignment when nearest neighbours collide (Hungarian path)", () => {
    // Previous points 0 and 1 both have 0.6 as nearest new point. Pairing (0 → −0.5, 1 → 0.6)
    // costs 0.5 + 0.4 = 0.9, pairing (0 → 0.6, 1 → −0.5) costs 0.6 + 1.5 = 2.1 (worked by hand).
    const matched = matchPoles([{ re: 0, im: 0 }, { re: 1, im: 0 }], [{ re: 0.6, im: 0 }, { re: -0.5, im: 0 }]);
    expect(matched.map((p) => p.re)).toEqual([-0.5, 0.6]);
  });

  it("agrees with brute force over all permutations for 4 points (property, seed 7)", () => {
    const coord = fc.integer({ min: -20, max: 20 });
    const point = fc.record({ re: coord, im: coord });
    fc.assert(
      fc.property(fc.array(point, { minLength: 4, maxLength: 4 }), fc.array(point, { minLength: 4, maxLength: 4 }), (prev, next) => {
        const cost = (a: { re: number; im: number }[]) => a.reduce((s, p, i) => s + Math.hypot(p.re - prev[i]!.re, p.im - prev[i]!.im), 0);
        let best = Infinity;
        const permute = (rest: typeof next, chosen: typeof next): void => {
          if (rest.length === 0) best = Math.min(best, cost(chosen));
          rest.forEach((p, i) => permute([...rest.slice(0, i), ...rest.slice(i + 1)], [...chosen, p]));
        };
        permute(next, []);
        expectRelativeClose(cost(matchPoles(prev, next)), best, 1e-12, "total distance", 1);
      }),
      { seed: 7, numRuns: 200 },
    );
  });
});
