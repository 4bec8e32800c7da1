import { describe, expect, it } from "vitest";
import fc from "fast-check";
import { createStateSpace, type StateSpace } from "../../../shared-engine/model";
import { loopMargins } from "../../../shared-engine/analysis/margins";
import { lqr } from "../../../shared-engine/design/lqr";
import { diskMarginFromPeak } from "../../../shared-engine/analysis/diskMargin";
import { frequencyResponse } from "../../../shared-engine/analysis/frequencyResponse";
import { expectAtMost, expectRelativeClose } from "../../helpers/assertions";
import { expectEngineError } from "../model/modelTestUtils";

const deg = (rad: number): number => (rad * 180) / Math.PI;

/** L = k/(s(s+1)(s+2)) in controller form: s³ + 3s² + 2s. */
function typeOneThirdOrder(k: number): StateSpace {
  return createStateSpace({ A: [[0, 1, 0], [0, 0, 1], [0, -2, -3]], B: [[0], [0], [1]], C: [[k, 0, 0]] });
}

/** Increasing function root by plain bisection (independent of the engine's Brent search). */
function bisect(f: (x: number) => number, lo: number, hi: number): number {
  for (let i = 0; i < 200; i++) {
    const mid = 0.5 * (lo + hi);
    if (f(mid) > 0) hi = mid;
    else lo = mid;
  }
  return 0.5 * (lo + hi);
}

function expectNoNonFinite(value: unknown, path = "result"): void {
  if (typeof value === "number") {
    if (!Number.isFinite(value)) expect.fail(`${path} is ${value}`);
  } else if (Array.isArray(value)) value.forEach((v, i) => expectNoNonFinite(v, `${path}[${i}]`));
  else if (value !== null && typeof value === "object") for (const [k, v] of Object.entries(value)) expectNoNonFinite(v, `${path}.${k}`);
}

describe("loopMargins on loops with closed-form margins", () => {
  for (const k of [1, 2, 4]) {
    it(`finds the phase crossover at √2 rad/s and GM = 20·log10(6/${k}) dB for L = ${k}/(s(s+1)(s+2))`, () => {
      // L(j√2) = −k/6 (common textbook result, worked by hand)
      const r = loopMargins(typeOneThirdOrder(k));
      expect(r.phaseCrossoversRadPerSec.length).toBe(1);
      expectRelativeClose(r.phaseCrossoverRadPerSec!, Math.SQRT2, 1e-12, "phase crossover");
      expectRelativeClose(r.gainMarginDb!, 20 * Math.log10(6 / k), 1e-11, "gain margin (dB)");
      // Gain crossover: ω²(ω² + 1)(ω² + 4) = k², PM = 90° − atan ω − atan(ω/2) (worked by hand)
      const x = bisect((v) => v * (v + 1) * (v + 4) - k * k, 0, 10);
      const wc = Math.sqrt(x);
      expectRelativeClose(r.gainCrossoverRadPerSec!, wc, 1e-12, "gain crossover");
      expectRelativeClose(r.phaseMarginDeg!, 90 - deg(Math.atan(wc)) - deg(Math.atan(wc / 2)), 1e-11, "phase margin");
      expectRelativeClose(r.delayMarginSec!, ((90 - deg(Math.atan(wc)) - deg(Math.atan(wc / 2))) * Math.PI) / 180 / wc, 1e-11, "delay margin");
      expect(r.closedLoopStable).toBe(true);
      expect(r.delayMarginSamples).toBeNull();
      expectNoNonFinite(r);
    });
  }

  it("reports a negative gain margin, a negative phase margin and an unstable closed loop for L = 10/(s(s+1)(s+2))", () => {
    // Routh: s³ + 3s² + 2s + k is stable only for k < 6 (worked by hand)
    const r = loopMargins(typeOneThirdOrder(10));
    expectRelativeClose(r.gainMarginDb!, 20 * Math.log10(0.6), 1e-11, "gain margin (dB)");
    expect(r.phaseMarginDeg!).toBeLessThan(0);
    expect(r.closedLoopStable).toBe(false);
    expect(r.delayMarginSec).toBe(0);
    expect(r.diskMargin.alpha).toBe(0);
    expect(r.warnings.some((w) => /unstable/.test(w))).toBe(true);
  });

  for (const k of [2, 5, 100]) {
    it(`gives infinite GM and PM = 180° − atan(√(k² − 1)) for the first-order loop ${k}/(s + 1)`, () => {
      // |L| = 1 ⇔ ω = √(k² − 1); ∠L = −atan ω; phase never reaches −180° (worked by hand)
      const L = createStateSpace({ A: [[-1]], B: [[1]], C: [[k]] });
      const r = loopMargins(L);
      expect(r.gainMarginDb).toBeNull();
      expect(r.phaseCrossoversRadPerSec).toEqual([]);
      const wc = Math.sqrt(k * k - 1);
      expectRelativeClose(r.gainCrossoverRadPerSec!, wc, 1e-12, "gain crossover");
      expectRelativeClose(r.phaseMarginDeg!, 180 - deg(Math.atan(wc)), 1e-12, "phase margin");
      // |S − ½| = |jω + 1 − k|/(2|jω + 1 + k|) < ½ with supremum ½ as ω → ∞: α = 2, gain range [0, ∞) (worked by hand)
      expectRelativeClose(r.diskMargin.alpha, 2, 1e-12, "disk margin α");
      expect(r.diskMargin.gainRange).toEqual([0, null]);
      expect(r.diskMargin.gainRangeDb).toEqual([null, null]);
      // Ms: |S| = |jω + 1|/|jω + 1 + k| < 1 → 1 as ω → ∞; Mt = |T(0)| = k/(1 + k) (worked by hand)
      expectRelativeClose(r.sensitivityPeak.value, 1, 1e-12, "Ms");
      expectRelativeClose(r.complementarySensitivityPeak.value, k / (1 + k), 1e-12, "Mt");
      // T = k/(s + 1 + k): bandwidth 1 + k rad/s (worked by hand)
      expectRelativeClose(r.closedLoopBandwidthRadPerSec!, 1 + k, 1e-12, "bandwidth");
      expectNoNonFinite(r);
    });
  }

  it("reports no gain crossover (null PM) for 0.5/(s + 1), whose gain never reaches 1", () => {
    const r = loopMargins(createStateSpace({ A: [[-1]], B: [[1]], C: [[0.5]] }));
    expect(r.phaseMarginDeg).toBeNull();
    expect(r.delayMarginSec).toBeNull();
    expect(r.warnings.some((w) => /no gain crossover/.test(w))).toBe(true);
  });

  it("finds the crossover of a pure integrator 1000/s far outside the natural-frequency range, with bandwidth 1000", () => {
    // T = k/(s + k): PM = 90°, bandwidth k (worked by hand)
    const r = loopMargins(createStateSpace({ A: [[0]], B: [[1]], C: [[1000]] }));
    expectRelativeClose(r.gainCrossoverRadPerSec!, 1000, 1e-12, "gain crossover");
    expectRelativeClose(r.phaseMarginDeg!, 90, 1e-12, "phase margin");
    expectRelativeClose(r.closedLoopBandwidthRadPerSec!, 1000, 1e-12, "bandwidth");
    expectRelativeClose(r.complementarySensitivityPeak.value, 1, 1e-12, "Mt");
  });

  it("matches the hand-worked margins of the sampled integrator kT/(z − 1), with the phase crossover at Nyquist", () => {
    // L(−1) = −kT/2 → GM = 20·log10(2/(kT)); |e^{jθ} − 1| = 2 sin(θ/2) = kT at the gain crossover;
    // ∠L = −(90° + θ/2) → PM = 90° − θ/2; closed-loop pole 1 − kT (worked by hand)
    const T = 0.1;
    const k = 5;
    const r = loopMargins(createStateSpace({ A: [[1]], B: [[T]], C: [[k]], sampleTime: T }));
    expect(r.closedLoopStable).toBe(true);
    expectRelativeClose(r.phaseCrossoverRadPerSec!, Math.PI / T, 1e-15, "phase crossover at Nyquist");
    expectRelativeClose(r.gainMarginDb!, 20 * Math.log10(2 / (k * T)), 1e-12, "gain margin (dB)");
    const theta = 2 * Math.asin((k * T) / 2);
    expectRelativeClose(r.gainCrossoverRadPerSec!, theta / T, 1e-12, "gain crossover");
    expectRelativeClose(r.phaseMarginDeg!, 90 - deg(theta / 2), 1e-12, "phase margin");
    expectRelativeClose(r.delayMarginSamples!, (Math.PI / 2 - theta / 2) / theta, 1e-12, "delay margin in samples");
    expectRelativeClose(r.delayMarginSec!, r.delayMarginSamples! * T, 1e-15, "delay margin in seconds");
  });

  it("reports the lower gain margin at ω = 0 and PM = 60° for the open-loop unstable loop 2/(s − 1)", () => {
    // Closed loop s + 1: stable; gain may fall to ½ (s − 1 + 2g stable ⇔ g > ½) → GM = −6.02 dB at ω = 0;
    // |L| = 1 at ω = √3, ∠L = −180° + atan √3 → PM = 60°; S = (s − 1)/(s + 1) is all-pass: Ms = 1;
    // T = 2/(s + 1): Mt = 2, bandwidth 1; |S − ½| = |s − 3|/(2|s + 1|) peaks at ω = 0 with 3/2 → α = 2/3 (worked by hand)
    const r = loopMargins(createStateSpace({ A: [[1]], B: [[1]], C: [[2]] }));
    expect(r.closedLoopStable).toBe(true);
    expect(r.phaseCrossoverRadPerSec).toBe(0);
    expectRelativeClose(r.gainMarginDb!, 20 * Math.log10(0.5), 1e-14, "gain margin (dB)");
    expectRelativeClose(r.gainCrossoverRadPerSec!, Math.sqrt(3), 1e-12, "gain crossover");
    expectRelativeClose(r.phaseMarginDeg!, 60, 1e-12, "phase margin");
    expectRelativeClose(r.sensitivityPeak.value, 1, 1e-12, "Ms");
    expectRelativeClose(r.complementarySensitivityPeak.value, 2, 1e-12, "Mt");
    expectRelativeClose(r.closedLoopBandwidthRadPerSec!, 1, 1e-12, "bandwidth");
    expectRelativeClose(r.diskMargin.alpha, 2 / 3, 1e-12, "disk margin α");
    expectRelativeClose(r.diskMargin.gainRange[0], 0.5, 1e-12, "disk lower gain");
    expect(r.warnings).toEqual([]);
  });

  it("decides closed-loop stability from A − B(1 + D)⁻¹C when D ≠ 0", () => {
    // L = d + 1/(s − 1): 1 + L = 0 ⇔ s = 1 − 1/(1 + d) (worked by hand): d = −0.5 → s = −1, d = 1 → s = 0.5
    const loop = (d: number) => createStateSpace({ A: [[1]], B: [[1]], C: [[1]], D: [[d]] });
    expect(loopMargins(loop(-0.5)).closedLoopStable).toBe(true);
    expect(loopMargins(loop(1)).closedLoopStable).toBe(false);
    expect(loopMargins(loop(0)).closedLoopStable).toBe(false); // closed-loop pole exactly at s = 0
    expectEngineError(() => loopMargins(loop(-1)), "singular", /1 \+ D is 0/);
  });

  it("the delay margin makes L·e^{−jωτ} pass through −1 at the critical gain crossover", () => {
    const r = loopMargins(typeOneThirdOrder(2));
    const w = r.gainCrossoverRadPerSec!;
    const g = frequencyResponse(typeOneThirdOrder(2), [w]).values[0]![0]![0]!;
    const phi = -w * r.delayMarginSec!;
    const re = 1 + g.re * Math.cos(phi) - g.im * Math.sin(phi);
    const im = g.re * Math.sin(phi) + g.im * Math.cos(phi);
    expectAtMost(Math.hypot(re, im), 1e-12, "|1 + L(jω)e^{−jωτ}|");
  });

  it("skips an open-loop pole on the axis when it falls on a user grid and still returns finite data", () => {
    // L = 0.5/(s² + 1) with ω = 1 on the grid
    const L = createStateSpace({ A: [[0, 1], [-1, 0]], B: [[0], [1]], C: [[0.5, 0]] });
    const r = loopMargins(L, { grid: [0, 0.5, 1, 1.5, 2, 10] });
    expect(r.warnings.some((w) => /unbounded/.test(w))).toBe(true);
    expectNoNonFinite(r);
  });

  it("rejects loops that are not SISO and grids with bad frequencies", () => {
    const mimo = createStateSpace({ A: [[-1]], B: [[1, 1]], C: [[1]] });
    expectEngineError(() => loopMargins(mimo), "shape-mismatch", /single-input single-output \(it has 2 inputs/);
    const L = typeOneThirdOrder(1);
    expectEngineError(() => loopMargins(L, { grid: [1] }), "invalid-argument", /at least 2/);
    expectEngineError(() => loopMargins(L, { grid: [-1, 1] }), "invalid-argument", /≥ 0/);
    expectEngineError(() => loopMargins(L, { grid: [1, NaN] }), "non-finite", /options\.grid\[1\]/);
  });
});

describe("diskMarginFromPeak", () => {
  it("gives α = 1, gain range [1/3, 3] and ±2·atan(½) for ‖S − ½‖∞ = 1 (Seiler, Packard & Gahinet 2020, σ = 0 disk)", () => {
    const d = diskMarginFromPeak(1, 2, true);
    expect(d.alpha).toBe(1);
    expectRelativeClose(d.gainRange[0], 1 / 3, 1e-15, "lower gain");
    expectRelativeClose(d.gainRange[1]!, 3, 1e-15, "upper gain");
    expectRelativeClose(d.phaseDeg, deg(2 * Math.atan(0.5)), 1e-15, "phase");
    expectEngineError(() => diskMarginFromPeak(0, 1, true), "invalid-argument", /positive and finite/);
  });
});

describe("loopMargins properties on random stable loops", () => {
  // Series of first-order a/(s + a) and second-order ω²/(s² + 2ζωs + ω²) blocks, times a gain k.
  const block = fc.record({
    second: fc.boolean(),
    a: fc.integer({ min: 1, max: 50 }).map((v) => v / 10),
    zeta: fc.integer({ min: 5, max: 100 }).map((v) => v / 100),
  });
  const loopArb = fc.record({ blocks: fc.array(block, { minLength: 1, maxLength: 3 }), k: fc.integer({ min: 1, max: 80 }).map((v) => v / 10) });

  function build({ blocks, k }: { blocks: { second: boolean; a: number; zeta: number }[]; k: number }): StateSpace {
    const n = blocks.reduce((s, b) => s + (b.second ? 2 : 1), 0);
    const A = Array.from({ length: n }, () => new Array<number>(n).fill(0));
    const B = Array.from({ length: n }, () => [0]);
    let offset = 0;
    let prevOut = -1; // state index holding the previous block's output
    for (const b of blocks) {
      const gainIn = b.second ? b.a * b.a : b.a;
      const entry = b.second ? offset + 1 : offset;
      if (b.second) {
        A[offset]![offset + 1] = 1;
        A[offset + 1]![offset] = -b.a * b.a;
        A[offset + 1]![offset + 1] = -2 * b.zeta * b.a;
      } else A[offset]![offset] = -b.a;
      if (prevOut < 0) B[entry]![0] = gainIn;
      else A[entry]![prevOut] = gainIn;
      prevOut = offset;
      offset += b.second ? 2 : 1;
    }
    const C = [new Array<number>(n).fill(0)];
    C[0]![prevOut] = k;
    return createStateSpace({ A, B, C });
  }

  it("satisfies |1 + L| ≥ 1/Ms at phase crossovers (GM ≥ Ms/(Ms − 1)) and PM ≥ 2·arcsin(1/(2Ms)) (common practice)", () => {
    fc.assert(
      fc.property(loopArb, (spec) => {
        const r = loopMargins(build(spec));
        expectNoNonFinite(r);
        const Ms = r.sensitivityPeak.value;
        expect(Ms).toBeGreaterThanOrEqual(1 - 1e-12);
        for (const g of r.gainMargins) {
          const ratio = 10 ** (g.gainDb / 20);
          if (g.gainDb > 0) expect(ratio).toBeGreaterThanOrEqual((Ms / (Ms - 1)) * (1 - 1e-9));
          else expect(ratio).toBeLessThanOrEqual((Ms / (Ms + 1)) * (1 + 1e-9));
        }
        for (const p of r.phaseMargins) expect(Math.abs(p.phaseDeg)).toBeGreaterThanOrEqual(deg(2 * Math.asin(1 / (2 * Ms))) - 1e-9);
      }),
      { seed: 20240612, numRuns: 60 },
    );
  });

  it("keeps every classical gain margin outside the disk margin's gain range and every phase margin above its phase", () => {
    fc.assert(
      fc.property(loopArb, (spec) => {
        const r = loopMargins(build(spec));
        if (!r.closedLoopStable) return;
        const [lo, hi] = r.diskMargin.gainRange;
        for (const g of r.gainMargins) {
          const ratio = 10 ** (g.gainDb / 20);
          const inside = ratio > lo * (1 + 1e-9) && (hi === null || ratio < hi * (1 - 1e-9));
          expect(inside, `GM ratio ${ratio} inside disk range [${lo}, ${hi}]`).toBe(false);
        }
        for (const p of r.phaseMargins) expect(Math.abs(p.phaseDeg)).toBeGreaterThanOrEqual(r.diskMargin.phaseDeg - 1e-7);
      }),
      { seed: 777, numRuns: 60 },
    );
  });
});

describe("critical phase margin convention", () => {
  // Plant of Doyle 1978 ("Guaranteed margins for LQG regulators", IEEE TAC 23(4); recalled from
  // memory): two unstable poles at +1. Its LQR loop K(sI − A)⁻¹B is stable when closed and, by
  // Safonov & Athans 1977, keeps at least 60° of phase margin — yet one of its gain crossovers
  // has 180° + ∠L = −117.6° on the wrapped branch. The critical margin is the crossover nearest
  // −1 in angle, signed by closed-loop stability.
  it("reports the LQR-guaranteed margin for an open-loop-unstable loop that is stable when closed", () => {
    const A = [[1, 1], [0, 1]];
    const B = [[0], [1]];
    const r = lqr(A, B, [[1, 0], [0, 1]], [[1]]);
    const m = loopMargins(createStateSpace({ A, B, C: r.K.to2DArray(), D: [[0]] }));
    expect(m.closedLoopStable).toBe(true);
    expect(m.phaseMargins.some((p) => p.phaseDeg < 0)).toBe(true);
    expect(m.phaseMarginDeg!).toBeGreaterThanOrEqual(60);
    expect(m.phaseMarginDeg).toBe(Math.min(...m.phaseMargins.map((p) => Math.abs(p.phaseDeg))));
  });

  it("signs the critical phase margin negative when the closed loop is unstable", () => {
    // k/(s(s+1)(s+2)) with k = 10 > 6 is unstable in closed loop (worked by hand: Routh array).
    const m = loopMargins(createStateSpace({ A: [[0, 1, 0], [0, 0, 1], [0, -2, -3]], B: [[0], [0], [10]], C: [[1, 0, 0]], D: [[0]] }));
    expect(m.closedLoopStable).toBe(false);
    expect(m.phaseMarginDeg!).toBeLessThan(0);
  });
});
