import { describe, expect, it } from "vitest";
import { dispatch } from "../../../../shared-engine/api/dispatcher";
import type { DesignRunResult, VariantResult } from "../../../../shared-engine/api/contract";
import { buildComparisonTable, formatNumber, poleDamping, type ComparedVariant } from "../../../../renderer/state/compare/compareTable";
import { sampleProject } from "../../db/sampleProject";

async function evaluatedSample(): Promise<ComparedVariant[]> {
  const run = (await dispatch("project.evaluate", { project: sampleProject() })) as DesignRunResult;
  return run.variants.map((result, styleIndex) => ({ variantId: result.id, name: result.name, styleIndex, result }));
}

function stub(id: string, fields: Partial<VariantResult>): ComparedVariant {
  return { variantId: id, name: id, styleIndex: 0, result: { id, name: id, checks: [], warnings: [], ...fields } };
}

const row = (table: ReturnType<typeof buildComparisonTable>, key: string) => table.rows.find((r) => r.key === key)!;

describe("comparison table", () => {
  it("marks the lower overshoot, the higher phase margin and the lower gain norm as better, with the rule stated", async () => {
    const variants = await evaluatedSample();
    const table = buildComparisonTable(variants, sampleProject().requirements);
    const overshoot = row(table, "overshootPct");
    expect(overshoot.ruleText).toBe("lower is better");
    const [a, b] = variants.map((v) => v.result!.step!.overshootPct);
    expect(overshoot.cells.map((c) => c.best)).toEqual([a! < b!, b! < a!]);
    const gainNorm = row(table, "gainNorm");
    const [ga, gb] = variants.map((v) => v.result!.design!.gainNorm);
    expect(gainNorm.cells.map((c) => c.best)).toEqual([ga! < gb!, gb! < ga!]);
    expect(row(table, "phaseMarginDeg").rule).toBe("higher");
    for (const r of table.rows) expect(r.ruleText.length).toBeGreaterThan(0);
  });

  it("shows each requirement beside the row it checks, with the engine's pass/fail per variant", async () => {
    const variants = await evaluatedSample();
    const table = buildComparisonTable(variants, sampleProject().requirements);
    const overshoot = row(table, "overshootPct");
    expect(overshoot.requirements.map((r) => r.text)).toEqual(["step overshoot ≤ 5 %"]);
    const expected = variants.map((v) => (v.result!.checks.find((c) => c.name === "requirement:os")!.passed ? "pass" : "fail"));
    expect(overshoot.requirements[0]!.outcomes.map((o) => o.status)).toEqual(expected);
    expect(row(table, "settlingTime").requirements[0]!.id).toBe("ts");
    expect(row(table, "phaseMarginDeg").requirements[0]!.id).toBe("pm");
  });

  it("shows poles with damping ratio and natural frequency, one entry per conjugate pair", () => {
    // s = −3 ± 4j: ωn = 5, ζ = 3/5 (textbook identity ωn = |s|, ζ = −Re s/|s|).
    const table = buildComparisonTable([stub("a", { closedLoopPoles: [{ re: -3, im: 4 }, { re: -3, im: -4 }, { re: -1, im: 0 }] }), stub("b", { closedLoopPoles: [{ re: -2, im: 0 }] })]);
    const poles = row(table, "closedLoopPoles");
    expect(poles.cells[0]!.text).toBe("−3 ± 4j (ζ 0.6, ωn 5); −1 (ζ 1, ωn 1)");
    // The slowest pole decides: −1 (a) is slower than −2 (b), so b is better.
    expect(poles.cells.map((c) => c.best)).toEqual([false, true]);
  });

  it("maps sampled poles through s = ln(z)/T for damping", () => {
    // z = e^{sT} with s = −1, T = 0.1: a real pole with ζ = 1 and ωn = 1 (definition of the z-transform map).
    const { zeta, wn } = poleDamping({ re: Math.exp(-0.1), im: 0 }, 0.1);
    expect(zeta).toBeCloseTo(1, 12);
    expect(wn).toBeCloseTo(1, 12);
  });

  it("ranks an unbounded margin (no crossing) above any finite one, and marks nothing when all values are equal", () => {
    const margins = (gainDb: number | null) => ({ loop: "plant-input" as const, gainDb, phaseDeg: 60, gainCrossover: 1, phaseCrossover: null, delayMargin: 1, sensitivityPeak: 1.2, complementarySensitivityPeak: 1, closedLoopStable: true });
    const table = buildComparisonTable([stub("a", { margins: margins(12) }), stub("b", { margins: margins(null) })]);
    expect(row(table, "gainMarginDb").cells.map((c) => [c.text, c.best])).toEqual([
      ["12", false],
      ["∞ (no crossing)", true],
    ]);
    expect(row(table, "phaseMarginDeg").cells.every((c) => !c.best)).toBe(true);
  });

  it("ranks a step that never settles last and a variant that failed to design as absent", () => {
    const step = (settlingTime: number | null) => ({ loop: "closed-loop" as const, input: "r", time: [0], output: [[0]], outputNames: ["y"], riseTime: 1, settlingTime, overshootPct: 0, peak: 1, peakTime: 1, steadyStateValue: 1, steadyStateError: 0, status: "ok" });
    const failed: ComparedVariant = { variantId: "c", name: "c", styleIndex: 2, result: { id: "c", name: "c", checks: [], warnings: [], error: { kind: "singular", message: "no design", details: {} } } };
    const table = buildComparisonTable([stub("a", { step: step(null) }), stub("b", { step: step(3) }), failed]);
    expect(row(table, "settlingTime").cells.map((c) => [c.text, c.best])).toEqual([
      ["does not settle", false],
      ["3", true],
      ["—", false],
    ]);
    expect(table.columns[2]!.error).toBe("no design");
  });

  it("formats numbers with four significant digits and a true minus sign, never NaN", () => {
    expect(formatNumber(-1.23456)).toBe("−1.235");
    expect(formatNumber(2.5e-7)).toBe("2.500e−7");
    expect(formatNumber(null)).toBe("—");
    expect(formatNumber(Number.POSITIVE_INFINITY)).toBe("∞");
  });
});
