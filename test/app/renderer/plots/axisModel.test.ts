import { describe, expect, it } from "vitest";
import { decadeDomain, linearTicks, logTicks, niceDomain, steppedTicks, tickLabel } from "../../../../renderer/plots/axisModel";
import { expectRelativeClose } from "../../../helpers/assertions";

describe("log axis ticks", () => {
  it("puts a labelled major tick on every decade of a three-decade span, with minor ticks 2…9 between", () => {
    const m = logTicks([0.1, 100], [0, 300]);
    const majors = m.ticks.filter((t) => t.major);
    expect(majors.map((t) => t.value)).toEqual([0.1, 1, 10, 100]);
    expect(majors.map((t) => t.label)).toEqual(["0.1", "1", "10", "100"]);
    // Decades are equally spaced on a log axis: 100 user units each.
    majors.forEach((t, i) => expectRelativeClose(t.position, 100 * i, 1e-12, `decade ${i}`, 1));
    const minors = m.ticks.filter((t) => !t.major);
    expect(minors).toHaveLength(8 * 3);
    expect(minors.every((t) => t.label === "")).toBe(true);
    // 2 lies log10(2) of a decade above 1 (definition of a log scale).
    const two = m.ticks.find((t) => t.value === 2)!;
    expectRelativeClose(two.position, 100 + 100 * Math.log10(2), 1e-12, "position of 2");
  });

  it("drops minor ticks and labels every other decade when the span exceeds six decades", () => {
    const m = logTicks([1e-4, 1e4], [0, 800]);
    expect(m.ticks.every((t) => t.major)).toBe(true);
    expect(m.ticks).toHaveLength(9);
    const labelled = m.ticks.filter((t) => t.label !== "").map((t) => t.value);
    expect(labelled).toEqual([1e-4, 1e-2, 1, 1e2, 1e4]);
  });

  it("labels 1-2-5 style values inside a domain narrower than one decade", () => {
    const m = logTicks([2, 8], [0, 100]);
    expect(m.ticks.length).toBeGreaterThanOrEqual(3);
    expect(m.ticks.every((t) => t.label !== "" && t.value >= 2 && t.value <= 8)).toBe(true);
  });

  it("labels enough ticks on a zoomed axis spanning less than one decade across a decade boundary", () => {
    const m = logTicks([0.5, 2], [0, 100]);
    expect(m.ticks.filter((t) => t.label !== "").length).toBeGreaterThanOrEqual(3);
    const two = logTicks([0.3, 30], [0, 100]).ticks.filter((t) => t.label !== "").map((t) => t.value);
    expect(two).toEqual([0.5, 1, 2, 5, 10, 20]);
  });

  it("rejects a domain that is not strictly positive and increasing", () => {
    expect(() => logTicks([0, 10], [0, 1])).toThrow(/0 < low < high/);
    expect(() => logTicks([10, 1], [0, 1])).toThrow(/0 < low < high/);
  });

  it("fits decade-aligned domains around positive frequencies and ignores zero, negative and non-finite ones", () => {
    expect(decadeDomain([0.03, 2, 450])).toEqual([0.01, 1000]);
    expect(decadeDomain([0, -1, Infinity, 5])).toEqual([1, 10]);
    expect(decadeDomain([])).toEqual([1, 10]);
  });
});

describe("linear axis ticks", () => {
  it("chooses 1-2-5 steps and labels zero as 0 (not a rounding residue)", () => {
    const m = linearTicks([-0.3, 0.9], [0, 120], 6);
    expect(m.ticks.map((t) => t.label)).toEqual(["−0.2", "0", "0.2", "0.4", "0.6", "0.8"]);
  });

  it("snaps stepped phase ticks to multiples of 45° and widens the step when too dense", () => {
    expect(steppedTicks([-200, 10], [0, 1], 45).ticks.map((t) => t.value)).toEqual([-180, -135, -90, -45, 0]);
    const wide = steppedTicks([-720, 0], [0, 1], 45, 9).ticks.map((t) => t.value);
    expect(wide).toEqual([-720, -630, -540, -450, -360, -270, -180, -90, 0]);
  });

  it("gives a constant or empty data set a domain of nonzero width", () => {
    const d = niceDomain([3, 3, null, NaN]);
    expect(d[0]).toBeLessThan(3);
    expect(d[1]).toBeGreaterThan(3);
    expect(niceDomain([])).toEqual([-1, 1]);
    expect(niceDomain([null, Infinity])).toEqual([-1, 1]);
  });

  it("includes the requested values (0 dB, limits) in the domain", () => {
    const d = niceDomain([5, 7], 0, [0]);
    expect(d[0]).toBeLessThanOrEqual(0);
    expect(d[1]).toBeGreaterThanOrEqual(7);
  });

  it("prints tick labels with a true minus sign and without floating-point noise", () => {
    expect(tickLabel(0.1 + 0.2)).toBe("0.3");
    expect(tickLabel(-2.5)).toBe("−2.5");
    expect(tickLabel(1e-15)).toBe("0");
  });
});
