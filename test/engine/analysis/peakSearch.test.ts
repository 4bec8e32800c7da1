import { readFileSync } from "node:fs";
import { describe, expect, it } from "vitest";
import { maximiseOnInterval, type MaximiseOptions } from "../../../shared-engine/analysis/peakSearch";
import { loopMargins } from "../../../shared-engine/analysis/margins";
import { loopMargins as lqrLoopMargins } from "../../../shared-engine/design/lqrMargins";
import { eigenvalues } from "../../../shared-engine/linalg";
import { Matrix } from "ml-matrix";
import { createStateSpace } from "../../../shared-engine/model";
import { expectAtMost, expectRelativeClose } from "../../helpers/assertions";
import { expectEngineError } from "../model/modelTestUtils";

/** f with a counter of its evaluations. */
function counted(f: (x: number) => number): { f: (x: number) => number; count: () => number } {
  let n = 0;
  return { f: (x) => { n++; return f(x); }, count: () => n };
}

/**
 * Plain golden-section search for a maximum (Kiefer 1953), the method the margin routines used
 * before: stops when the bracket is at most `width` wide; returns the best point and how many
 * evaluations it made. Kept here only to count evaluations against.
 */
function goldenSection(f: (x: number) => number, a0: number, b0: number, width: number): { x: number; value: number; evaluations: number } {
  const g = (Math.sqrt(5) - 1) / 2;
  let a = a0, b = b0;
  let x1 = b - g * (b - a), x2 = a + g * (b - a);
  let f1 = f(x1), f2 = f(x2);
  let evaluations = 2;
  let best = f1 >= f2 ? { x: x1, value: f1 } : { x: x2, value: f2 };
  while (b - a > width) {
    if (f1 >= f2) {
      b = x2; x2 = x1; f2 = f1;
      x1 = b - g * (b - a); f1 = f(x1); evaluations++;
      if (f1 > best.value) best = { x: x1, value: f1 };
    } else {
      a = x1; x1 = x2; f1 = f2;
      x2 = a + g * (b - a); f2 = f(x2); evaluations++;
      if (f2 > best.value) best = { x: x2, value: f2 };
    }
  }
  return { ...best, evaluations };
}

/** Tolerance giving Brent's search the same final bracket width as golden section's `width` (b − a ≤ 4·tol). */
const toleranceFor = (width: number): number => width / 4;

// Second-order resonance |1/(1 − ω² + 2jζω)| with ζ = 0.01: maximum at ω = √(1 − 2ζ²) with
// value 1/(2ζ√(1 − ζ²)) (standard second-order result, common practice).
const ZETA = 0.01;
const resonance = (w: number): number => 1 / Math.hypot(1 - w * w, 2 * ZETA * w);
const RESONANCE_PEAK_AT = Math.sqrt(1 - 2 * ZETA * ZETA);
const RESONANCE_PEAK = 1 / (2 * ZETA * Math.sqrt(1 - ZETA * ZETA));

describe("maximiseOnInterval on functions with known maxima", () => {
  it("finds the maximum of −(x − 2)² on [0, 5] within 2·tol in far fewer evaluations than golden section", () => {
    // Maximum at x = 2, value 0 (by inspection).
    const width = 5e-12;
    const brent = counted((x) => -((x - 2) ** 2));
    const r = maximiseOnInterval(brent.f, 0, 5, { tolerance: toleranceFor(width), what: "parabola" });
    expectAtMost(Math.abs(r.x - 2), 2 * toleranceFor(width), "|x − 2|");
    expectAtMost(-r.value, 1e-24, "−f(x)");
    const golden = goldenSection((x) => -((x - 2) ** 2), 0, 5, width);
    expect(r.evaluations).toBe(brent.count());
    // A parabola is fitted exactly by the first parabolic step.
    expect(brent.count()).toBeLessThanOrEqual(8);
    expect(golden.evaluations).toBeGreaterThanOrEqual(55);
  });

  it("finds the maximum 1 of sin on [0, π] at π/2 with fewer evaluations than golden section", () => {
    // sin has its maximum 1 at π/2 (by inspection). Within √(2ε) of π/2, sin x rounds to 1, so
    // the location is only determined to about 2e-8.
    const width = 1e-12 * Math.PI;
    const brent = counted(Math.sin);
    const r = maximiseOnInterval(brent.f, 0, Math.PI, { tolerance: toleranceFor(width), what: "sin" });
    expect(r.value).toBe(1);
    expectAtMost(Math.abs(r.x - Math.PI / 2), 1e-7, "|x − π/2|");
    const golden = goldenSection(Math.sin, 0, Math.PI, width);
    expect(brent.count()).toBeLessThan(golden.evaluations);
  });

  it("finds the narrow resonance peak 1/(2ζ√(1 − ζ²)) at √(1 − 2ζ²) (ζ = 0.01) from a cold start with under half golden section's evaluations", () => {
    const width = 1e-12 * 1.5;
    const brent = counted(resonance);
    const r = maximiseOnInterval(brent.f, 0.5, 1.5, { tolerance: toleranceFor(width), what: "resonance" });
    const golden = goldenSection(resonance, 0.5, 1.5, width);
    expectRelativeClose(r.value, RESONANCE_PEAK, 1e-14, "peak value");
    expectRelativeClose(r.x, RESONANCE_PEAK_AT, 1e-8, "peak frequency");
    expectRelativeClose(golden.value, RESONANCE_PEAK, 1e-14, "golden-section peak value");
    expect(brent.count()).toBeLessThanOrEqual(golden.evaluations / 2);
  });

  it("refines the resonance from its grid maximum (warm start) with under a third of golden section's evaluations", () => {
    // The grid of loopMargins: logarithmic, 800 points over four decades.
    const grid = Array.from({ length: 800 }, (_, k) => 0.01 * 10 ** ((4 * k) / 799));
    const values = grid.map(resonance);
    let k = 0;
    for (let i = 1; i < grid.length; i++) if (values[i]! > values[k]!) k = i;
    const a = grid[k - 1]!, b = grid[k + 1]!;
    const width = 1e-12 * b;
    const brent = counted(resonance);
    const r = maximiseOnInterval(brent.f, a, b, {
      tolerance: toleranceFor(width),
      what: "resonance",
      start: { x: grid[k]!, value: values[k]! },
      endValues: { a: values[k - 1]!, b: values[k + 1]! },
    });
    const golden = goldenSection(resonance, a, b, width);
    expectRelativeClose(r.value, RESONANCE_PEAK, 1e-14, "peak value");
    expectRelativeClose(r.x, RESONANCE_PEAK_AT, 1e-8, "peak frequency");
    expect(brent.count()).toBeLessThanOrEqual(golden.evaluations / 3);
  });

  it("stops at a relative tolerance of √ε (Brent's usual floor) after a handful of evaluations", () => {
    const brent = counted(resonance);
    const r = maximiseOnInterval(brent.f, 0.5, 1.5, { tolerance: 1e-300, relativeTolerance: Math.sqrt(Number.EPSILON), what: "resonance" });
    expectRelativeClose(r.x, RESONANCE_PEAK_AT, 4 * Math.sqrt(Number.EPSILON), "peak frequency");
    expectRelativeClose(r.value, RESONANCE_PEAK, 1e-12, "peak value");
    expect(brent.count()).toBeLessThanOrEqual(20);
  });

  it("converges to an end of the interval when f is monotone there, never evaluating outside it", () => {
    const seen: number[] = [];
    const r = maximiseOnInterval((x) => { seen.push(x); return Math.exp(-x); }, 0, 1, { tolerance: 0.25e-12, what: "exp(−x)" });
    expectAtMost(r.x, 1e-12, "x (maximum at the left end 0)");
    expect(seen.every((x) => x > 0 && x < 1)).toBe(true);
  });

  it("never returns less than the given start value", () => {
    // A start exactly at the maximum: every other point is worse.
    const r = maximiseOnInterval((x) => -Math.abs(x - 0.3), 0, 1, { tolerance: 1e-10, what: "|x − 0.3|", start: { x: 0.3, value: 0 } });
    expect(r.value).toBe(0);
    expect(r.x).toBe(0.3);
  });
});

describe("maximiseOnInterval errors", () => {
  const base: MaximiseOptions = { tolerance: 1e-10, what: "test quantity" };

  it("reports NaN and Infinity from f as non-finite errors with the point", () => {
    expectEngineError(() => maximiseOnInterval(() => NaN, 0, 1, base), "non-finite", /test quantity: the searched function is NaN at x = /);
    expectEngineError(() => maximiseOnInterval((x) => (x > 0.5 ? Infinity : x), 0, 1, base), "non-finite", /is Infinity at x = /);
    expectEngineError(() => maximiseOnInterval(() => -Infinity, 0, 1, base), "non-finite", /is -Infinity/);
  });

  it("throws no-convergence with the iteration count when the cap is reached", () => {
    expectEngineError(() => maximiseOnInterval(Math.sin, 0, Math.PI, { ...base, maxIterations: 3 }), "no-convergence", /within 3 iterations/);
  });

  it("rejects a bad interval, tolerance, cap, start or end values", () => {
    expectEngineError(() => maximiseOnInterval(Math.sin, 1, 1, base), "invalid-argument", /a < b/);
    expectEngineError(() => maximiseOnInterval(Math.sin, 0, Infinity, base), "invalid-argument", /finite/);
    expectEngineError(() => maximiseOnInterval(Math.sin, 0, 1, { ...base, tolerance: 0 }), "invalid-argument", /tolerance must be positive/);
    expectEngineError(() => maximiseOnInterval(Math.sin, 0, 1, { ...base, relativeTolerance: NaN }), "invalid-argument", /relativeTolerance/);
    expectEngineError(() => maximiseOnInterval(Math.sin, 0, 1, { ...base, maxIterations: 0 }), "invalid-argument", /maxIterations/);
    expectEngineError(() => maximiseOnInterval(Math.sin, 0, 1, { ...base, start: { x: 1, value: 0 } }), "invalid-argument", /strictly inside/);
    expectEngineError(() => maximiseOnInterval(Math.sin, 0, 1, { ...base, endValues: { a: 0, b: 0 } }), "invalid-argument", /need a start/);
    expectEngineError(
      () => maximiseOnInterval(Math.sin, 0, 1, { ...base, start: { x: 0.5, value: 0 }, endValues: { a: 1, b: 0 } }),
      "invalid-argument",
      /not above the start value/,
    );
  });
});

interface PeakCase { peak: number; frequencyRadPerSec: number; frequencyFromPolynomialRadPerSec: number; frequencyFlatness: number }
const fixture = JSON.parse(readFileSync(new URL("../../fixtures/analysis/peaks.json", import.meta.url), "utf8")) as {
  loop: { A: number[][]; B: number[][]; C: number[][]; D: number[][] };
  peaks: Record<"S" | "T" | "diskS", PeakCase>;
};

describe("loopMargins peaks against scipy (test/fixtures/analysis/generate_peaks.py)", () => {
  // L(s) = 0.5(s + 1)/(s(s² + 0.2s + 4)): lightly damped closed-loop pair near 2.12 rad/s.
  const r = loopMargins(createStateSpace(fixture.loop));
  const check = (what: string, got: { value: number; frequencyRadPerSec: number }, ref: PeakCase): void => {
    // Values: scipy.optimize.minimize_scalar(method="bounded") on scipy.signal.freqresp; both
    // routes round differently, so 1e-12 relative.
    expectRelativeClose(got.value, ref.peak, 1e-12, `${what} peak value`);
    // Frequencies: the stationary point from the polynomial root (the fixture's second route).
    // Within `frequencyFlatness` (≈ 5e-10 relative here) of it the magnitude is flat to
    // rounding, so no search can place the peak closer than a few times that.
    expectRelativeClose(got.frequencyRadPerSec, ref.frequencyFromPolynomialRadPerSec, 10 * ref.frequencyFlatness, `${what} peak frequency`);
    // scipy's bounded search stops at √ε-relative steps: its frequency agrees to about 1e-8.
    expectRelativeClose(got.frequencyRadPerSec, ref.frequencyRadPerSec, 3e-8, `${what} peak frequency against minimize_scalar`);
  };

  it("matches the peak of |S| and its frequency", () => {
    expect(r.closedLoopStable).toBe(true);
    check("|S|", r.sensitivityPeak, fixture.peaks.S);
  });

  it("matches the peak of |T| and its frequency", () => {
    check("|T|", r.complementarySensitivityPeak, fixture.peaks.T);
  });

  it("matches the disk margin α = 1/max|S − ½| and the frequency of that peak", () => {
    expectRelativeClose(r.diskMargin.alpha, 1 / fixture.peaks.diskS.peak, 1e-12, "disk margin α");
    check("|S − ½|", { value: 1 / r.diskMargin.alpha, frequencyRadPerSec: r.diskMargin.frequencyRadPerSec }, fixture.peaks.diskS);
  });
});

describe("the return-difference minimum of the LQR loop check", () => {
  it("finds min |1 + L| = 1/2 at ω = 2 for L = −0.1s/(s² + 0.2s + 4), inside the grid", () => {
    // A = [[0, 1], [−4, −0.2]], B = [0; 1], K = [0, −0.1]: 1 + L = (s² + 0.1s + 4)/(s² + 0.2s + 4),
    // |1 + L(jω)|² = ((4 − ω²)² + 0.01ω²)/((4 − ω²)² + 0.04ω²), whose only stationary point at
    // ω > 0 is ω² = 4 (the derivative's numerator is (p − q)·y·(y + 2x), y = 4 − x, x = ω²),
    // where it equals 0.01/0.04 (worked by hand).
    const A = new Matrix([[0, 1], [-4, -0.2]]);
    const B = new Matrix([[0], [1]]);
    const K = new Matrix([[0, -0.1]]);
    const poles = eigenvalues(A.clone().sub(B.mmul(K))); // sub() works in place
    const r = lqrLoopMargins(A, B, K, poles, true);
    expectRelativeClose(r.minReturnDifference, 0.5, 1e-12, "min |1 + L|");
    expectRelativeClose(r.frequencyOfMinReturnDifferenceRadPerSec!, 2, 1e-7, "its frequency");
    expect(r.guaranteeHolds).toBe(false);
  });
});
