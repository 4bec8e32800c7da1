import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { diffSpecs, formatDiffValue } from "../../../../renderer/state/compare/specDiff";
import { sampleProject } from "../../db/sampleProject";

describe("variant specification diff", () => {
  it("lists every differing parameter by JSON path, leaving out id and name", () => {
    const [a, b] = sampleProject().variants;
    const paths = diffSpecs([a, b]).map((d) => d.path);
    expect(paths).toEqual(["baseline", "stateFeedback.Q", "stateFeedback.R", "stateFeedback.method", "stateFeedback.poles"]);
  });

  it("names single matrix entries when two specifications differ inside one matrix", () => {
    const [a] = sampleProject().variants;
    const b = structuredClone(a!);
    if (b.stateFeedback?.method === "lqr") b.stateFeedback.Q[1]![1] = 5;
    expect(diffSpecs([a, b])).toEqual([{ path: "stateFeedback.Q[1][1]", values: [1, 5] }]);
  });

  it("reports a field present in only some variants as absent in the others", () => {
    const diff = diffSpecs([{ id: "a", notes: "x" }, { id: "b" }, { id: "c", notes: "x" }]);
    expect(diff).toEqual([{ path: "notes", values: ["x", undefined, "x"] }]);
    expect(formatDiffValue(undefined)).toBe("absent");
  });

  it("compares long numeric grids as one value and summarises them", () => {
    const times = (n: number) => Array.from({ length: n }, (_, k) => k / 10);
    const diff = diffSpecs([{ step: { times: times(101) } }, { step: { times: times(201) } }]);
    expect(diff.map((d) => d.path)).toEqual(["step.times"]);
    expect(formatDiffValue(diff[0]!.values[1])).toBe("201 values, 0 … 20");
  });

  it("finds no differences between identical specifications and exactly the changed path after one change", () => {
    // Property test on generated nested specs; the seed is recorded.
    const leaf = fc.oneof(fc.integer({ min: -100, max: 100 }).map((k) => k / 4), fc.constantFrom("zoh", "tustin", "lqr"), fc.boolean());
    const spec = fc.dictionary(fc.constantFrom("a", "b", "c", "d"), fc.oneof(leaf, fc.array(leaf, { minLength: 1, maxLength: 4 }), fc.dictionary(fc.constantFrom("x", "y"), leaf)));
    fc.assert(
      fc.property(spec, (s) => {
        expect(diffSpecs([s, structuredClone(s)])).toEqual([]);
        const changed = { ...structuredClone(s), extra: 1 };
        expect(diffSpecs([s, changed])).toEqual([{ path: "extra", values: [undefined, 1] }]);
      }),
      { seed: 424242, numRuns: 200 },
    );
  });
});
