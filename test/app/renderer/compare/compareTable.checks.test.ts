// Comparison rows for the disturbance step, the robustness sweep and the nonlinear check.
import { readFileSync } from "node:fs";
import { fileURLToPath } from "node:url";
import { describe, expect, it } from "vitest";
import type { VariantResult } from "../../../../shared-engine/api/contract";
import { evaluateProject, loadProjectText } from "../../../../shared-engine/project";
import { buildComparisonTable, type ComparedVariant } from "../../../../renderer/state/compare/compareTable";

function evaluated(file: string): ComparedVariant[] {
  const loaded = loadProjectText(readFileSync(fileURLToPath(new URL(`../../../../assets/examples/${file}`, import.meta.url)), "utf8"));
  return evaluateProject(loaded).variants.map((result, styleIndex) => ({ variantId: result.id, name: result.name, styleIndex, result }));
}

function stub(id: string, fields: Partial<VariantResult>): ComparedVariant {
  return { variantId: id, name: id, styleIndex: 0, result: { id, name: id, checks: [], warnings: [], ...fields } };
}

const row = (table: ReturnType<typeof buildComparisonTable>, key: string) => table.rows.find((r) => r.key === key);

type Disturbance = NonNullable<VariantResult["disturbanceStep"]>;
const disturbance = (peakDeviation: number, settlingTime: number | null, steadyStateValue: number | null): Disturbance => ({
  loop: "closed-loop", disturbance: "w", size: 1, time: [0], output: [[0]], outputNames: ["y"], peakDeviation, peakTime: 1, steadyStateValue, settlingTime,
  status: steadyStateValue === null ? "unstable" : settlingTime === null ? "not-settled-within-horizon" : "settled",
});
type Robustness = NonNullable<VariantResult["robustness"]>;
const robustness = (allStable: boolean, worstPhaseMarginDeg: number | null, failedSamples = allStable ? 0 : 3): Robustness => ({
  parameterNames: ["p"], samples: 9, allStable, failedSamples, worstGainMarginDb: null, worstPhaseMarginDeg, poleCloud: [], sampleTime: null, largestRealPart: -1, largestPoleMagnitude: null, marginsNote: "",
});
type Nonlinear = NonNullable<VariantResult["nonlinear"]>;
const nonlinear = (size: number): Nonlinear => ({
  time: [0], outputNames: ["y"], inputNames: ["u"], output: [[0]], linearOutput: [[0]], input: [[0]], largestDivergence: { time: 5, output: "y", size }, linearExcursion: 10,
  saturated: false, stoppedEarly: null, controller: "continuous", warnings: [],
});
const singleInputGain = { K: [[1, 2]] };

describe("comparison rows for disturbance, robustness and nonlinear checks", () => {
  it("marks the rack variant with integral action as better on every disturbance row, with the rule stated", () => {
    const variants = evaluated("rack-temperature.loopwright.json");
    const table = buildComparisonTable(variants);
    const [integral, sampled] = variants.map((v) => v.result!.disturbanceStep!);
    // The pipeline's own results on the shipped example decide; the rule is what is tested.
    expect(Math.abs(integral!.peakDeviation)).toBeLessThan(Math.abs(sampled!.peakDeviation));
    const peak = row(table, "disturbancePeakDeviation")!;
    expect(peak.ruleText).toMatch(/lower \|·\| is better/);
    expect(peak.cells.map((c) => c.best)).toEqual([true, false]);
    const settle = row(table, "disturbanceSettlingTime")!;
    expect(settle.rule).toBe("lower");
    expect(settle.cells.map((c) => c.best)).toEqual([integral!.settlingTime! < sampled!.settlingTime!, sampled!.settlingTime! < integral!.settlingTime!]);
    const final = row(table, "disturbanceFinalValue")!;
    expect(final.ruleText).toMatch(/closer to 0 is better/);
    expect(final.cells.map((c) => c.best)).toEqual([true, false]);
  });

  it("ranks the peak deviation by magnitude: −3 loses to +2", () => {
    const table = buildComparisonTable([stub("a", { disturbanceStep: disturbance(-3, 5, 0) }), stub("b", { disturbanceStep: disturbance(2, 5, 0) })]);
    expect(row(table, "disturbancePeakDeviation")!.cells.map((c) => [c.text, c.best])).toEqual([
      ["−3", false],
      ["2", true],
    ]);
  });

  it("ranks a disturbance response that never settles or is unstable last", () => {
    const table = buildComparisonTable([stub("a", { disturbanceStep: disturbance(1, null, 0.5) }), stub("b", { disturbanceStep: disturbance(1, 9, null) })]);
    expect(row(table, "disturbanceSettlingTime")!.cells.map((c) => [c.text, c.best])).toEqual([
      ["does not settle", false],
      ["9", true],
    ]);
    expect(row(table, "disturbanceFinalValue")!.cells.map((c) => [c.text, c.best])).toEqual([
      ["0.5", true],
      ["unstable", false],
    ]);
  });

  it("prefers the variant stable at every sample and the higher worst phase margin", () => {
    const table = buildComparisonTable([
      stub("a", { gain: singleInputGain, robustness: robustness(false, 70) }),
      stub("b", { gain: singleInputGain, robustness: robustness(true, 40) }),
      stub("c", { gain: singleInputGain, robustness: robustness(true, 55) }),
    ]);
    expect(row(table, "robustAllStable")!.cells.map((c) => [c.text, c.best])).toEqual([
      ["no (3 of 9 failed)", false],
      ["yes (9 samples)", true],
      ["yes (9 samples)", true],
    ]);
    const pm = row(table, "robustWorstPhaseMarginDeg")!;
    expect(pm.rule).toBe("higher");
    expect(pm.cells.map((c) => c.best)).toEqual([true, false, false]);
  });

  it("reads a missing worst phase margin as unbounded for one input, and as not computed for several", () => {
    const table = buildComparisonTable([
      stub("one", { gain: singleInputGain, robustness: robustness(true, null) }),
      stub("two", { gain: { K: [[1, 0], [0, 1]] }, robustness: robustness(true, null) }),
      stub("finite", { gain: singleInputGain, robustness: robustness(true, 50) }),
    ]);
    expect(row(table, "robustWorstPhaseMarginDeg")!.cells.map((c) => [c.text, c.best])).toEqual([
      ["∞ (no crossing)", true],
      ["not computed", false],
      ["50", false],
    ]);
  });

  it("prefers the smaller nonlinear divergence and names where it happened", () => {
    const table = buildComparisonTable([stub("a", { nonlinear: nonlinear(10) }), stub("b", { nonlinear: nonlinear(5) })]);
    const div = row(table, "nonlinearLargestDivergence")!;
    expect(div.ruleText).toMatch(/^lower is better/);
    expect(div.cells.map((c) => [c.text, c.best])).toEqual([
      ["10 (y at 5 s)", false],
      ["5 (y at 5 s)", true],
    ]);
  });

  it("shows the new rows only when some variant has the metric", () => {
    const variants = evaluated("queue-backlog.loopwright.json");
    const table = buildComparisonTable(variants);
    expect(row(table, "disturbancePeakDeviation")).toBeUndefined();
    expect(row(table, "nonlinearLargestDivergence")!.cells.map((c) => c.text !== "—")).toEqual(variants.map((v) => v.result!.nonlinear !== undefined));
    expect(row(table, "robustAllStable")!.cells.map((c) => c.text)).toEqual(variants.map((v) => (v.result!.robustness ? "yes (25 samples)" : "—")));
    const plain = buildComparisonTable([stub("a", {}), stub("b", {})]);
    for (const key of ["disturbancePeakDeviation", "disturbanceSettlingTime", "disturbanceFinalValue", "robustAllStable", "robustWorstPhaseMarginDeg", "nonlinearLargestDivergence"]) {
      expect(row(plain, key)).toBeUndefined();
    }
  });
});
