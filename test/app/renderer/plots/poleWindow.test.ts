// The zoom rule of the pole maps (renderer/plots/poleWindow.ts): which pole sets get a zoom
// panel and the bounds of its window, on sampled and continuous examples derived by hand.
import { describe, expect, it } from "vitest";
import { boundaryInWindow, foldedClusters, LINK_FRACTION, nearestBoundaryPoint, poleZoomWindow, WINDOW_PAD } from "../../../../renderer/plots/poleWindow";
import { poleZeroDomain } from "../../../../renderer/plots/poleZeroModel";
import type { Domain, PlotComplex } from "../../../../renderer/plots/plotTypes";
import { equalAspect } from "../../../../renderer/plots/viewport";
import { expectAtMost, expectRelativeClose } from "../../../helpers/assertions";

const c = (re: number, im = 0): PlotComplex => ({ re, im });
const pair = (re: number, im: number): PlotComplex[] => [c(re, im), c(re, -im)];
/** z = e^{sT}. */
const sampledPole = (s: PlotComplex, T: number): PlotComplex => {
  const m = Math.exp(s.re * T);
  return { re: m * Math.cos(s.im * T), im: m * Math.sin(s.im * T) };
};
const closeDomain = (actual: Domain, expected: Domain, tol: number, what: string) => {
  expectAtMost(Math.abs(actual[0] - expected[0]), tol, `${what} low end`);
  expectAtMost(Math.abs(actual[1] - expected[1]), tol, `${what} high end`);
};

describe("zoom rule on a slow sampled loop (T = 0.01 s, time constants 1 to 10 s)", () => {
  // Continuous cloud: real poles s = −1/τ for τ = 1, 2, 5, 10 s and a pair s = −0.5 ± 0.5j (τ = 2 s).
  // Hand derivation, z = e^{sT} with T = 0.01 s: the real poles map to z = e^{−T/τ} =
  // e^{−0.01} = 0.990050, e^{−0.005} = 0.995012, e^{−0.002} = 0.998002, e^{−0.001} = 0.999000;
  // the pair to z = e^{−0.005}(cos 0.005 ± j sin 0.005) = 0.995000 ± 0.004975j.
  const T = 0.01;
  const continuous = [c(-1), c(-0.5), c(-0.2), c(-0.1), ...pair(-0.5, 0.5)];
  const poles = continuous.map((s) => sampledPole(s, T));
  // The full z-plane map holds the unit circle: [−1, 1] padded by 15 % of its span 2 → [−1.3, 1.3] (poleZeroDomain).
  const full = { x: [-1.3, 1.3] as Domain, y: [-1.3, 1.3] as Domain };

  it("maps the cloud where the hand derivation puts it", () => {
    const expected = [0.990050, 0.995012, 0.998002, 0.999000, 0.995000, 0.995000];
    poles.forEach((z, i) => expectAtMost(Math.abs(z.re - expected[i]!), 5e-7, `Re z of pole ${i + 1}`));
    expectAtMost(Math.abs(poles[4]!.im - 0.004975), 5e-7, "Im z of the pair");
    const d = poleZeroDomain([{ name: "cloud", poles }], true);
    expect(d).toEqual(full);
  });

  it("zooms: the cloud spans under 1 % of the full view both ways", () => {
    const w = poleZoomWindow({ poles, sampled: true, full, aspect: 1 });
    expect(w).not.toBeNull();
    expect(w!.count).toBe(6);
    expect(w!.total).toBe(6);
    // Nearest the unit circle: z = e^{−0.001}, 1 − |z| = 1 − e^{−0.001} = 0.0009995.
    expect(w!.nearest).toEqual(poles[3]);
    expectRelativeClose(w!.margin, 0.0009995, 1e-4, "1 − |z|");
  });

  it("stretches the window to the unit circle (closer than the cloud is wide) and pads it by 15 %", () => {
    const w = poleZoomWindow({ poles, sampled: true, full, aspect: 1 })!;
    // Box of the cloud: Re from e^{−0.01} to e^{−0.001}, Im ±0.004975; the gap to the circle
    // (0.0009995) is below the cloud's extent, so Re reaches 1 (the radial projection of
    // e^{−0.001}). Extent 1 − e^{−0.01} = 0.0099502 (the larger), pad 0.15 × that = 0.0014925:
    // Re from 0.990050 − 0.0014925 = 0.988557 to 1.0014925; Im ±(0.004975 + 0.0014925) = ±0.0064675,
    // widened to the same span as Re for the square panel (aspect 1): ±0.0064676.
    const extent = 1 - Math.exp(-0.01);
    const pad = WINDOW_PAD * extent;
    closeDomain(w.x, [Math.exp(-0.01) - pad, 1 + pad], 1e-12, "window Re");
    closeDomain(w.x, [0.988557, 1.0014925], 5e-7, "window Re (hand values)");
    closeDomain(w.y, [-(extent / 2 + pad), extent / 2 + pad], 1e-12, "window Im");
    closeDomain(w.y, [-0.0064676, 0.0064676], 5e-7, "window Im (hand values)");
    expect(w.boundaryInView).toBe(true);
    // Magnification: full span 2.6 over window span 0.0129353.
    expectRelativeClose(w.magnification, 2.6 / (extent + 2 * pad), 1e-12, "magnification");
    expect(w.magnification).toBeGreaterThan(200);
  });

  it("widens a window to the panel's aspect ratio away from the unit circle, toward the origin", () => {
    const square = poleZoomWindow({ poles, sampled: true, full, aspect: 1 })!;
    const wide = poleZoomWindow({ poles, sampled: true, full, aspect: 2 })!;
    // The square window's Im was widened by 4e-8 a side to match Re (spans 0.00995017 vs 0.00995008); the wide one keeps it.
    closeDomain(wide.y, square.y, 1e-7, "window Im");
    expectRelativeClose(wide.x[1] - wide.x[0], 2 * (wide.y[1] - wide.y[0]), 1e-12, "width = 2 × height");
    // The right end stays 1 + pad; the extra width goes left.
    expectRelativeClose(wide.x[1], square.x[1], 1e-15, "right end");
    expect(wide.x[0]).toBeLessThan(square.x[0]);
    expect(wide.boundaryInView).toBe(true);
  });

  it("draws no zoom for a fast loop whose poles spread over the disc", () => {
    // z = 0.5, 0.2 ± 0.5j, −0.3: the box spans 0.8 × 1.0, far over 10 % of 2.6.
    expect(poleZoomWindow({ poles: [c(0.5), ...pair(0.2, 0.5), c(-0.3)], sampled: true, full, aspect: 1.5 })).toBeNull();
  });

  it("leaves the circle outside the window when the cloud keeps well inside it", () => {
    // A cloud around z = 0.9 of extent 0.01: the gap 0.095 exceeds 3 extents, so no stretch.
    const cloud = [c(0.895), c(0.905), ...pair(0.9, 0.004)];
    const w = poleZoomWindow({ poles: cloud, sampled: true, full, aspect: 1 })!;
    expect(w).not.toBeNull();
    expect(w.boundaryInView).toBe(false);
    closeDomain(w.x, [0.895 - 0.0015, 0.905 + 0.0015], 1e-12, "window Re");
    expectRelativeClose(w.margin, 1 - 0.905, 1e-12, "1 − |z|");
  });
});

describe("zoom rule in continuous time", () => {
  it("zooms on the slow cloud when one fast pole sets the axis range", () => {
    // Cloud −1 ± 0.5j, −1.5 ± 0.8j, −2 and one fast pole at −100. poleZeroDomain: Re [−100, 0],
    // Im [−0.8, 0.8], padded by 0.15 × 100 → Re [−115, 15]; a square plot widens Im to [−65, 65].
    const poles = [...pair(-1, 0.5), ...pair(-1.5, 0.8), c(-2), c(-100)];
    const d = poleZeroDomain([{ name: "loop", poles }], false);
    closeDomain(d.x, [-115, 15], 1e-12, "full Re");
    const full = equalAspect(d.x, d.y, 400, 400);
    closeDomain(full.y, [-65, 65], 1e-12, "full Im");
    const w = poleZoomWindow({ poles, sampled: false, full, aspect: 1 })!;
    expect(w).not.toBeNull();
    // The fast pole lies 98 away, beyond the link distance 0.1 × 130 = 13: 5 of 6 poles.
    expect(LINK_FRACTION * 130).toBe(13);
    expect(w.count).toBe(5);
    expect(w.total).toBe(6);
    expect(w.nearest).toEqual(c(-1, 0.5));
    expect(w.margin).toBe(1);
    // Box Re [−2, −1], Im [−0.8, 0.8]; the axis is 1 away (≤ 3 × extent 1.6): Re stretched to 0.
    // Extent 2, pad 0.3: Re [−2.3, 0.3], Im [−1.1, 1.1] widened to the square: [−1.3, 1.3].
    closeDomain(w.x, [-2.3, 0.3], 1e-12, "window Re");
    closeDomain(w.y, [-1.3, 1.3], 1e-12, "window Im");
    expect(w.boundaryInView).toBe(true);
    expectRelativeClose(w.magnification, 50, 1e-12, "magnification 130 / 2.6");
    // A panel three times wider than tall: Im stays [−1.1, 1.1], Re grows to 6.6 wide to the left.
    const wide = poleZoomWindow({ poles, sampled: false, full, aspect: 3 })!;
    closeDomain(wide.y, [-1.1, 1.1], 1e-12, "wide window Im");
    closeDomain(wide.x, [0.3 - 6.6, 0.3], 1e-12, "wide window Re");
  });

  it("draws no zoom when the poles fill the view", () => {
    const poles = [...pair(-1, 2), c(-3), c(-0.5)];
    const d = poleZeroDomain([{ name: "loop", poles }], false);
    expect(poleZoomWindow({ poles, sampled: false, full: equalAspect(d.x, d.y, 560, 380), aspect: 1.5 })).toBeNull();
  });

  it("keeps the imaginary axis out of a window far to its left and reports the distance", () => {
    // Cloud near s = −10 (extent 0.4) with a fast pole at −1000: the gap 9.8 exceeds 3 × 0.4.
    const poles = [...pair(-10, 0.2), c(-10.2), c(-9.8), c(-1000)];
    const full = equalAspect([-1150, 150], [-1, 1], 500, 300);
    const w = poleZoomWindow({ poles, sampled: false, full, aspect: 5 / 3 })!;
    expect(w.count).toBe(4);
    expect(w.boundaryInView).toBe(false);
    expect(w.margin).toBeCloseTo(9.8, 12);
  });

  it("zooms on the closed-loop poles given as anchors, not on an unstable plant pole", () => {
    // Closed loop near −1 (at −0.9, 0.9 from the axis, within 3 × extent 0.6: stretched to it);
    // plant poles +30 (unstable) and −1.2; observer −60, −70 (fast).
    // Full Re [−70, 30] padded by 15 → extent 130, link 13: +30 and the observer stand apart.
    const closedLoop = [...pair(-1, 0.3), c(-0.9)];
    const others = [c(30), c(-1.2), c(-60), c(-70)];
    const d = poleZeroDomain([{ name: "all", poles: [...closedLoop, ...others] }], false);
    const full = equalAspect(d.x, d.y, 560, 300);
    const w = poleZoomWindow({ poles: others, anchors: closedLoop, sampled: false, full, aspect: 2 })!;
    expect(w).not.toBeNull();
    expect(w.nearest).toEqual(c(-0.9));
    // The cluster: the three closed-loop poles and the plant pole −1.2.
    expect(w.count).toBe(4);
    expect(w.total).toBe(7);
    // Without anchors the most unstable pole (+30) picks its cluster: itself alone, nothing to zoom.
    expect(poleZoomWindow({ poles: [...closedLoop, ...others], sampled: false, full, aspect: 2 })).toBeNull();
  });
});

describe("zoom rule: degenerate input", () => {
  const full = { x: [-1.3, 1.3] as Domain, y: [-1.3, 1.3] as Domain };
  it("returns null for no poles, one pole, repeated copies of one pole, or only non-finite values", () => {
    expect(poleZoomWindow({ poles: [], sampled: true, full, aspect: 1 })).toBeNull();
    expect(poleZoomWindow({ poles: [c(0.99)], sampled: true, full, aspect: 1 })).toBeNull();
    expect(poleZoomWindow({ poles: [c(0.99), c(0.99), c(0.99)], sampled: true, full, aspect: 1 })).toBeNull();
    expect(poleZoomWindow({ poles: [c(Number.NaN), c(Infinity, 1)], sampled: true, full, aspect: 1 })).toBeNull();
  });
  it("ignores non-finite poles among finite ones", () => {
    const w = poleZoomWindow({ poles: [c(0.99), c(0.995), c(Number.NaN)], sampled: true, full, aspect: 1 })!;
    expect(w.total).toBe(2);
    expect(Number.isFinite(w.x[0]) && Number.isFinite(w.y[1])).toBe(true);
  });
  it("returns null for a full view of no extent", () => {
    expect(poleZoomWindow({ poles: [c(0.5), c(0.6)], sampled: true, full: { x: [0, 0], y: [0, 0] }, aspect: 1 })).toBeNull();
  });
});

describe("zoom rule helpers", () => {
  it("keeps both halves of a conjugate pair in one cluster however far apart they are", () => {
    const labels = foldedClusters([...pair(-1, 10), c(-1.5, 9.8), c(-50)], 1);
    expect(labels[0]).toBe(labels[1]);
    expect(labels[2]).toBe(labels[0]);
    expect(labels[3]).not.toBe(labels[0]);
  });
  it("links a chain of close points into one cluster (single linkage)", () => {
    const chain = Array.from({ length: 20 }, (_, k) => c(-k * 0.9));
    const labels = foldedClusters(chain, 1);
    expect(new Set(labels).size).toBe(1);
    expect(new Set(foldedClusters(chain, 0.8)).size).toBe(20);
  });
  it("tells whether the unit circle or the imaginary axis crosses a window", () => {
    expect(boundaryInWindow([0.5, 0.6], [0, 0.1], true)).toBe(false);
    expect(boundaryInWindow([0.95, 1.05], [-0.05, 0.05], true)).toBe(true);
    expect(boundaryInWindow([-0.1, 0.1], [-0.1, 0.1], true)).toBe(false);
    expect(boundaryInWindow([1.1, 1.2], [0, 0.1], true)).toBe(false);
    expect(boundaryInWindow([-2, 2], [-2, 2], true)).toBe(true);
    expect(boundaryInWindow([-3, -1], [-1, 1], false)).toBe(false);
    expect(boundaryInWindow([-3, 0.5], [-1, 1], false)).toBe(true);
  });
  it("finds the nearest boundary point: (0, Im s) or z/|z|", () => {
    expect(nearestBoundaryPoint(c(-2, 3), false)).toEqual(c(0, 3));
    const b = nearestBoundaryPoint(c(0.3, 0.4), true);
    expectRelativeClose(b.re, 0.6, 1e-15, "Re");
    expectRelativeClose(b.im, 0.8, 1e-15, "Im");
    expect(nearestBoundaryPoint(c(0), true)).toEqual(c(1));
  });
});
