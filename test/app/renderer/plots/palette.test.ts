import { describe, expect, it } from "vitest";
import { layoutLegend, legendFor } from "../../../../renderer/plots/legendModel";
import { markerPath, OKABE_ITO, seriesStyle } from "../../../../renderer/plots/palette";

describe("series styles", () => {
  it("uses the Okabe–Ito hues (without black) in a fixed order", () => {
    // Okabe & Ito, "Color Universal Design" (2008): the eight colours, in RGB hex.
    const published = ["#E69F00", "#56B4E9", "#009E73", "#F0E442", "#0072B2", "#D55E00", "#CC79A7"];
    expect([...OKABE_ITO].sort()).toEqual([...published].sort());
    expect(seriesStyle(0).color).toBe("#0072B2");
    expect(seriesStyle(3)).toEqual(seriesStyle(3));
  });

  it("gives the first 14 series pairwise distinct (colour, marker, dash) triples, each differing from its neighbours in marker and dash too", () => {
    const key = (i: number) => { const s = seriesStyle(i); return `${s.color}|${s.marker}|${s.dash}`; };
    const keys = Array.from({ length: 14 }, (_, i) => key(i));
    expect(new Set(keys).size).toBe(14);
    for (let i = 0; i < 7; i++) {
      expect(seriesStyle(i).marker).not.toBe(seriesStyle(i + 7).marker);
      expect(seriesStyle(i).dash).not.toBe(seriesStyle(i + 7).dash);
    }
    for (let i = 1; i < 7; i++) {
      expect(seriesStyle(i).marker).not.toBe(seriesStyle(i - 1).marker);
      expect(seriesStyle(i).dash).not.toBe(seriesStyle(i - 1).dash);
    }
  });

  it("draws every marker as a closed or stroked path with finite coordinates", () => {
    for (const shape of ["circle", "square", "diamond", "triangle", "triangle-down", "plus", "star"] as const) {
      const d = markerPath(shape, 4);
      expect(d.startsWith("M")).toBe(true);
      expect(d).not.toMatch(/NaN|Infinity/);
    }
  });
});

describe("legend layout", () => {
  it("wraps entries into a new row when the next entry would exceed the width", () => {
    const entries = legendFor([{ name: "Variant A — LQR" }, { name: "Variant B — placement" }, { name: "C" }]);
    const one = layoutLegend(entries, 2000);
    expect(one.height).toBe(16);
    expect(one.entries.map((e) => e.y)).toEqual([0, 0, 0]);
    const narrow = layoutLegend(entries, 200);
    expect(narrow.entries[1]!.y).toBeGreaterThan(0);
    expect(narrow.entries[1]!.x).toBe(0);
    expect(layoutLegend([], 100).height).toBe(0);
  });

  it("keeps a variant's style when it is given a fixed palette slot", () => {
    const e = legendFor([{ name: "B", styleIndex: 1 }]);
    expect(e[0]!.style).toEqual(seriesStyle(1));
  });
});
