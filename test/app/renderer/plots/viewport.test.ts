import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { equalAspect, panDomain, valueAtFraction, zoomDomain } from "../../../../renderer/plots/viewport";
import { expectRelativeClose } from "../../../helpers/assertions";

describe("zoom and pan", () => {
  it("keeps the anchor at the same fraction of the axis while zooming a linear axis", () => {
    fc.assert(
      fc.property(fc.integer({ min: -1000, max: 1000 }), fc.integer({ min: 1, max: 1000 }), fc.integer({ min: 0, max: 100 }), fc.integer({ min: 2, max: 30 }), (a, w, pct, f10) => {
        const d: [number, number] = [a / 10, a / 10 + w / 10];
        const anchor = d[0] + (pct / 100) * (d[1] - d[0]);
        const z = zoomDomain(d, anchor, f10 / 10);
        expectRelativeClose((anchor - z[0]) / (z[1] - z[0]), pct / 100, 1e-9, "anchor fraction", 1);
        expectRelativeClose(z[1] - z[0], (d[1] - d[0]) * (f10 / 10), 1e-9, "new span");
      }),
      { seed: 4242, numRuns: 200 },
    );
  });

  it("zooms a log axis in decades about the anchor", () => {
    const z = zoomDomain([1, 1000], 10, 0.5, "log");
    expectRelativeClose(z[0], 10 ** 0.5, 1e-12, "low end");
    expectRelativeClose(z[1], 10 ** 2, 1e-12, "high end");
  });

  it("never collapses a domain below a relative width of 1e-9, however often it is zoomed", () => {
    let d: [number, number] = [5, 6];
    for (let i = 0; i < 400; i++) d = zoomDomain(d, 5.5, 0.5);
    expect(d[1] - d[0]).toBeGreaterThan(0);
    expect(d[1] - d[0]).toBeGreaterThanOrEqual(5.5 * 1e-9 * 0.999);
  });

  it("pans by a fraction of the span, in decades on a log axis", () => {
    expect(panDomain([0, 10], 0.25)).toEqual([2.5, 12.5]);
    const p = panDomain([1, 100], -0.5, "log");
    expectRelativeClose(p[0], 0.1, 1e-12, "low");
    expectRelativeClose(p[1], 10, 1e-12, "high");
    expectRelativeClose(valueAtFraction([1, 100], 0.5, "log"), 10, 1e-12, "geometric midpoint");
  });

  it("makes one data unit equally long on both axes without cutting the requested view", () => {
    const v = equalAspect([-4, 1], [-1, 1], 400, 200);
    expectRelativeClose((v.x[1] - v.x[0]) / 400, (v.y[1] - v.y[0]) / 200, 1e-12, "units per pixel");
    expect(v.x[0]).toBeLessThanOrEqual(-4);
    expect(v.x[1]).toBeGreaterThanOrEqual(1);
    expect(v.y[0]).toBeLessThanOrEqual(-1);
    expect(v.y[1]).toBeGreaterThanOrEqual(1);
  });
});
