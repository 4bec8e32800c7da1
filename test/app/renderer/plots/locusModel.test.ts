import { describe, expect, it } from "vitest";
import { locusModel, nearestLocusPoint, type LocusData } from "../../../../renderer/plots/locusModel";
import { expectRelativeClose } from "../../../helpers/assertions";

/**
 * Root locus of L(s) = 1/(s(s+2)): closed-loop poles s = −1 ± √(1 − k) (closed form of
 * s² + 2s + k = 0); asymptotes from the centroid −1 at ±90° (textbook construction, from memory).
 */
function locus(): LocusData {
  const gains = Array.from({ length: 41 }, (_, i) => i * 0.1);
  const root = (k: number, sign: number) => (k <= 1 ? { re: -1 + sign * Math.sqrt(1 - k), im: 0 } : { re: -1, im: sign * Math.sqrt(k - 1) });
  return {
    parameter: gains,
    branches: [gains.map((k) => root(k, 1)), gains.map((k) => root(k, -1))],
    openLoopPoles: [{ re: 0, im: 0 }, { re: -2, im: 0 }],
    openLoopZeros: [],
    asymptotes: { centroid: -1, anglesDeg: [90, 270] },
    crossings: [{ point: { re: 0, im: 0 }, value: 0 }],
  };
}
const margins = { top: 20, right: 10, bottom: 40, left: 50 };

describe("locus model", () => {
  const m = locusModel({ data: locus(), width: 500, height: 400, margins, parameterSymbol: "k" });

  it("draws one path per branch and every open-loop pole", () => {
    expect(m.branchPaths).toHaveLength(2);
    expect(m.poles).toHaveLength(2);
    expect(m.zeros).toHaveLength(0);
  });

  it("starts the asymptotes at the centroid and points them along their angles", () => {
    expect(m.asymptotes).toHaveLength(2);
    for (const a of m.asymptotes) {
      expectRelativeClose(m.x.invert(a.x1), -1, 1e-3, "centroid");
      const dx = m.x.invert(a.x2) - m.x.invert(a.x1);
      const dy = m.y.invert(a.y2) - m.y.invert(a.y1);
      const angle = ((Math.atan2(dy, dx) * 180) / Math.PI + 360) % 360;
      expectRelativeClose(angle, a.angleDeg, 1e-3, "asymptote angle");
    }
  });

  it("labels stability-boundary crossings with their parameter value", () => {
    expect(m.crossings[0]!.label).toBe("k = 0");
  });

  it("finds the gain of the locus point nearest to a query point", () => {
    // s = −1 + j√2.2 lies on the locus at k = 1 + 2.2 = 3.2 (closed form above); the query is
    // 0.003 off it, while the neighbouring grid points (k = 3.1, 3.3) are ≥ 0.016 away.
    const n = nearestLocusPoint(locus(), { re: -0.997, im: Math.sqrt(2.2) + 0.001 })!;
    expect(n.branch).toBe(0);
    expect(n.index).toBe(32);
    expectRelativeClose(n.value, 3.2, 1e-12, "nearest computed gain");
    expect(nearestLocusPoint({ parameter: [], branches: [] }, { re: 0, im: 0 })).toBeNull();
  });

  it("draws a unit circle for a sampled loop and none for a continuous one", () => {
    expect(m.unitCircle).toBe("");
    const z = locusModel({ data: locus(), sampleTime: 0.1, width: 500, height: 400, margins, parameterSymbol: "k" });
    expect(z.unitCircle).toMatch(/^M.*A.*A.*Z$/);
  });
});
