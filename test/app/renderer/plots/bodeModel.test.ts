import { describe, expect, it } from "vitest";
import { bodeModel, bodeReadout, interpolateAtFrequency, nearestFrequencyIndex, phaseReference, type BodeSeries } from "../../../../renderer/plots/bodeModel";
import { phaseTicks } from "../../../../renderer/plots/axisModel";
import { expectAtMost, expectRelativeClose } from "../../../helpers/assertions";

/** L(s) = 1/(s(s+1)): |L| and ∠L in closed form (textbook integrator-plus-lag, analytic). */
function integratorLag(freqs: number[]): BodeSeries {
  return {
    name: "1/(s(s+1))",
    frequency: freqs,
    magnitudeDb: freqs.map((w) => -20 * Math.log10(w * Math.hypot(1, w))),
    phaseDeg: freqs.map((w) => -90 - (Math.atan(w) * 180) / Math.PI),
  };
}
const logspace = (a: number, b: number, n: number) => Array.from({ length: n }, (_, k) => 10 ** (a + ((b - a) * k) / (n - 1)));
const layout = { width: 600, top: 40, panelHeight: 180, gap: 20, left: 60, right: 20 };

describe("Bode model", () => {
  it("spans whole decades around the data on a shared log frequency axis", () => {
    const m = bodeModel({ series: [integratorLag(logspace(-1.5, 1.3, 50))], ...layout });
    expect(m.x.domain()).toEqual([0.01, 100]);
    expect(m.xAxis.ticks.filter((t) => t.major).map((t) => t.value)).toEqual([0.01, 0.1, 1, 10, 100]);
    expectRelativeClose(m.x(1), layout.left + (layout.width - layout.left - layout.right) / 2, 1e-12, "1 rad/s mid-axis");
  });

  it("draws a null magnitude (an unbounded response) as a gap: the path restarts after it", () => {
    const s: BodeSeries = { name: "resonant", frequency: [0.1, 1, 10, 100], magnitudeDb: [0, 10, null, -40], phaseDeg: [0, -10, null, -180] };
    const m = bodeModel({ series: [s], ...layout });
    const pieces = m.series[0]!.magnitudePath.split("M").filter(Boolean);
    expect(pieces).toHaveLength(2);
    expect(m.series[0]!.magnitudePath).not.toMatch(/NaN/);
    expect(m.series[0]!.phasePath.split("M").filter(Boolean)).toHaveLength(2);
  });

  it("marks the phase margin at the gain crossover, from the −180° line to the phase curve", () => {
    // For 1/(s(s+1)): |L(jω)| = 1 at ω² = (√5 − 1)/2, PM = 180° − 90° − atan ω (closed form).
    const wc = Math.sqrt((Math.sqrt(5) - 1) / 2);
    const pm = 90 - (Math.atan(wc) * 180) / Math.PI;
    const s = { ...integratorLag(logspace(-2, 2, 401)), margins: { gainDb: null, phaseDeg: pm, gainCrossover: wc, phaseCrossover: null } };
    const m = bodeModel({ series: [s], ...layout });
    expect(m.marks).toHaveLength(1);
    const mark = m.marks[0]!;
    expect(mark.kind).toBe("phase");
    expect(mark.panel).toBe("phase");
    expectRelativeClose(m.phase.y.invert(mark.y1), -180, 1e-12, "bar starts at −180°");
    expectAtMost(Math.abs(m.phase.y.invert(mark.y2) - (-180 + pm)), 0.01, "bar ends on the phase curve");
    expect(mark.label).toBe(`PM ${Number(pm.toFixed(1))}° at ${Number(wc.toPrecision(3))} rad/s`);
    expectRelativeClose(mark.x, m.x(wc), 1e-12, "x of the crossover");
  });

  it("marks the gain margin at the phase crossover, from the curve up to 0 dB", () => {
    // L(s) = 1/(s+1)^3: phase −180° at ω = √3, |L| = 1/8 there, GM = 20·log10 8 dB (closed form).
    const freqs = logspace(-2, 2, 801);
    const s: BodeSeries = {
      name: "1/(s+1)^3",
      frequency: freqs,
      magnitudeDb: freqs.map((w) => -30 * Math.log10(1 + w * w)),
      phaseDeg: freqs.map((w) => (-3 * Math.atan(w) * 180) / Math.PI),
      margins: { gainDb: 20 * Math.log10(8), phaseDeg: null, gainCrossover: null, phaseCrossover: Math.sqrt(3) },
    };
    const m = bodeModel({ series: [s], ...layout });
    const gm = m.marks.find((k) => k.kind === "gain")!;
    expect(gm.panel).toBe("magnitude");
    expectRelativeClose(m.magnitude.y.invert(gm.y1), 0, 1e-9, "bar ends at 0 dB", 1);
    expectAtMost(Math.abs(m.magnitude.y.invert(gm.y2) + 20 * Math.log10(8)), 0.01, "bar starts on the curve");
    expect(gm.label).toBe("GM 18.1 dB at 1.73 rad/s");
    expect(m.zeroDbY).not.toBeNull();
  });

  it("chooses the −180° reference by whole turns when the phase is unwrapped below −360°", () => {
    expect(phaseReference(-170)).toBe(-180);
    expect(phaseReference(-500)).toBe(-540);
    expect(phaseReference(-100)).toBe(-180);
    expect(phaseReference(170)).toBe(180);
  });

  it("interpolates linearly in log-frequency and refuses to bridge a gap", () => {
    expectRelativeClose(interpolateAtFrequency([1, 100], [0, -40], 10)!, -20, 1e-12, "mid-decade");
    expect(interpolateAtFrequency([1, 10, 100], [0, null, -40], 5)).toBeNull();
    expect(interpolateAtFrequency([1, 10], [0, 1], 1000)).toBeNull();
  });

  it("reads out the nearest sample with every digit and says unbounded for nulls", () => {
    const s: BodeSeries = { name: "A", frequency: [1, 10, 100], magnitudeDb: [0.123456789012345, null, -3], phaseDeg: [-90.00000000000001, -180, -270] };
    expect(nearestFrequencyIndex(s.frequency, 2.9)).toBe(0);
    expect(nearestFrequencyIndex(s.frequency, 3.3)).toBe(1);
    const r = bodeReadout([s], 1.2)[0]!;
    expect(r).toEqual({ name: "A", frequency: "1", magnitudeDb: "0.123456789012345", phaseDeg: "−90.00000000000001" });
    expect(bodeReadout([s], 12)[0]!.magnitudeDb).toBe("unbounded");
  });

  describe("phase axis ticks", () => {
    const freqs = logspace(-3, 3, 301);
    const deg = (r: number) => (r * 180) / Math.PI;
    const cases: [string, (w: number) => number, number][] = [
      ["first-order lag, 0…−90°", (w) => -deg(Math.atan(w)), 45],
      ["integrator plus lag, −90…−180°", (w) => -90 - deg(Math.atan(w)), 45],
      ["third-order lag, 0…−270°", (w) => -3 * deg(Math.atan(w)), 90],
      ["lag with a partial lead, 0…−55°", (w) => -deg(Math.atan(w)) + deg(Math.atan(w / 5)) * 0.6, 30],
      ["two lags, 0…−180°", (w) => -2 * deg(Math.atan(w)), 45],
    ];
    for (const [what, phase, typicalStep] of cases) {
      for (const panelHeight of [110, 180]) {
        it(`labels at least 3 ticks in steps of 15/30/45/90°: ${what}, ${panelHeight}-unit panel`, () => {
          const s: BodeSeries = { name: what, frequency: freqs, magnitudeDb: freqs.map(() => 0), phaseDeg: freqs.map(phase) };
          const m = bodeModel({ series: [s], ...layout, panelHeight });
          const ticks = m.phase.axis.ticks.filter((t) => t.label !== "");
          const [lo, hi] = m.phase.y.domain() as [number, number];
          expect(ticks.length).toBeGreaterThanOrEqual(3);
          expect(ticks.length).toBeLessThanOrEqual(7);
          for (const t of ticks) {
            expect(t.value).toBeGreaterThanOrEqual(Math.min(lo, hi));
            expect(t.value).toBeLessThanOrEqual(Math.max(lo, hi));
            expect(t.label).toBe(String(t.value).replace("-", "−"));
          }
          const steps = new Set(ticks.slice(1).map((t, i) => t.value - ticks[i]!.value));
          expect(steps.size).toBe(1);
          const step = [...steps][0]!;
          expect([15, 30, 45, 90]).toContain(step);
          if (panelHeight === 180) expect(step).toBe(typicalStep);
          // Ticks are multiples of the step, so 0° and −90°/−180° lines fall on ticks when in range.
          for (const t of ticks) expect(Math.abs(t.value % step)).toBe(0);
        });
      }
    }

    it("picks 30° when 45° would give only two ticks, and falls back to plain ticks for a few degrees", () => {
      expect(phaseTicks([-65, 5], [0, 100]).ticks.map((t) => t.value)).toEqual([-60, -30, 0]);
      expect(phaseTicks([-35, 5], [0, 100]).ticks.map((t) => t.value)).toEqual([-30, -15, 0]);
      expect(phaseTicks([-300, 20], [0, 100], 3, 5).ticks.map((t) => t.value)).toEqual([-270, -180, -90, 0]);
      expect(phaseTicks([-12, 2], [0, 100]).ticks.length).toBeGreaterThanOrEqual(3);
      expect(phaseTicks([-760, 20], [0, 100]).ticks.map((t) => t.value)).toEqual([-720, -540, -360, -180, 0]);
    });
  });
});
