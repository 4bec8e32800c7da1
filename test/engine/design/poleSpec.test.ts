import { describe, expect, test } from "vitest";
import { normalizePoleSet, parsePoleSpec, maxRelativePoleError } from "../../../shared-engine/design/poleSpec";
import { EngineError } from "../../../shared-engine/errors";

function kindOf(f: () => unknown): string {
  try { f(); } catch (e) { if (e instanceof EngineError) return `${e.kind}: ${e.message}`; throw e; }
  return "no error";
}

describe("poleSpec", () => {
  test("parses numbers and {re, im} objects from JSON into complex poles", () => {
    expect(parsePoleSpec(JSON.parse('[-10, {"re": -2, "im": 4}, {"re": -2, "im": -4}, {"re": -1}]'))).toEqual([
      { re: -10, im: 0 }, { re: -2, im: 4 }, { re: -2, im: -4 }, { re: -1, im: 0 },
    ]);
  });

  test("a malformed entry is refused naming its path", () => {
    expect(kindOf(() => parsePoleSpec("abc"))).toContain("validation: poles must be an array");
    expect(kindOf(() => parsePoleSpec([1, { re: "x" }], "plants[0].poles"))).toContain("plants[0].poles[1].re must be a finite number");
    expect(kindOf(() => parsePoleSpec([{ re: 1, imag: 2 }]))).toContain('unknown field "imag"');
    expect(kindOf(() => parsePoleSpec([null]))).toContain("poles[0] must be a number or an object");
  });

  test("normalising puts each conjugate pair together, +im first, with exact conjugates", () => {
    const set = normalizePoleSet([{ re: -2, im: -4 }, { re: -10, im: 0 }, { re: -2, im: 4 }], 3, "poles");
    expect(set.ordered).toEqual([{ re: -2, im: 4 }, { re: -2, im: -4 }, { re: -10, im: 0 }]);
    expect(set.maxMultiplicity).toBe(1);
  });

  test("an unpaired complex pole is named; a wrong count is refused", () => {
    expect(kindOf(() => normalizePoleSet([{ re: -1, im: 1 }, { re: -1, im: 1 }], 2, "poles"))).toContain("poles[0] = -1+1j has no conjugate partner");
    expect(kindOf(() => normalizePoleSet([{ re: -1, im: 0 }], 2, "poles"))).toContain("must have exactly 2 entries");
    expect(kindOf(() => normalizePoleSet([{ re: Infinity, im: 0 }], 1, "poles"))).toContain("non-finite");
  });

  test("the relative pole error matches each requested pole to one achieved pole", () => {
    // hand computed: |−1.001 − (−1)| / max(1, 1) = 1e-3; |−20.02 − (−20)| / 20 = 1e-3
    expect(maxRelativePoleError([{ re: -1, im: 0 }, { re: -20, im: 0 }], [{ re: -20.02, im: 0 }, { re: -1.001, im: 0 }])).toBeCloseTo(1e-3, 12);
  });
});
