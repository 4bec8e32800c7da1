import { describe, expect, it } from "vitest";
import { createZeroPoleGain, polynomialFromRoots, realizeZeroPoleGainMatrix, zeroPoleGainToTransferFunction, type ZeroPoleGain } from "../../../shared-engine/model";
import { dcGain } from "../../../shared-engine/analysis/dcGain";
import { cdiv, cmul, csub, type Complex } from "../../../shared-engine/linalg/complex";
import { expectMatrixClose } from "../../helpers/assertions";
import fixtures from "../../fixtures/model/zpk_mimo.json";
import { evaluateChannel, expectComplexClose, expectEngineError } from "./modelTestUtils";

const c = (re: number, im = 0): Complex => ({ re, im });
const zpk = (zeros: Complex[], poles: Complex[], gain: number, sampleTime: number | null = null): ZeroPoleGain => ({ zeros, poles, gain, sampleTime });

/** k·∏(s − zᵢ)/∏(s − pⱼ) evaluated directly, factor by factor (no polynomial is formed). */
function zpkAt(entry: ZeroPoleGain, s: Complex): Complex {
  let v = c(entry.gain);
  for (const z of entry.zeros) v = cmul(v, csub(s, z));
  for (const p of entry.poles) v = cdiv(v, csub(s, p));
  return v;
}

// G = [[2/(s+1), 1.5(s+3)/((s+1)²+4)], [0.5((s+0.5)²+1)/((s+2)(s+4)(s+1)), −0.8]].
const PLANT: ZeroPoleGain[][] = [
  [zpk([], [c(-1)], 2), zpk([c(-3)], [c(-1, 2), c(-1, -2)], 1.5)],
  [zpk([c(-0.5, 1), c(-0.5, -1)], [c(-2), c(-4), c(-1)], 0.5), zpk([], [], -0.8)],
];

type FixtureSpec = number | { re: number; im: number };
const toComplex = (v: FixtureSpec): Complex => (typeof v === "number" ? c(v) : v);

describe("realizeZeroPoleGainMatrix", () => {
  it("realizes a 2×2 grid whose response at several s equals k·∏(s − zᵢ)/∏(s − pⱼ) per entry", () => {
    const model = realizeZeroPoleGainMatrix(PLANT);
    expect([model.C.rows, model.B.columns]).toEqual([2, 2]);
    // Column 1 has poles {−1} and {−1, −2, −4} (4 states), column 2 the pair −1 ± 2j (2 states).
    expect(model.A.rows).toBe(6);
    const points = [c(0.3, 0.7), c(-0.05, 2.1), c(1.7, -0.4), c(0, 1), c(5, 0)];
    for (const s of points) {
      for (let i = 0; i < 2; i++) {
        for (let j = 0; j < 2; j++) expectComplexClose(evaluateChannel(model, s, j, i), zpkAt(PLANT[i]![j]!, s), 1e-13, `G${i + 1}${j + 1}(${s.re}+${s.im}j)`);
      }
    }
  });

  it("has the hand-derived DC gain matrix", () => {
    // Hand-derived: G11(0) = 2/1 = 2; G12(0) = 1.5·3/5 = 0.9; G21(0) = 0.5·(0.25 + 1)/(2·4·1) = 0.078125; G22 = −0.8.
    const g = dcGain(realizeZeroPoleGainMatrix(PLANT));
    expect(g.gain).not.toBeNull();
    expectMatrixClose(g.gain!, [[2, 0.9], [0.078125, -0.8]], 1e-14, "G(0)");
  });

  it("matches the scipy zpk2tf/freqresp fixtures (values at complex points, frequency response, DC gain)", () => {
    for (const fx of fixtures.cases) {
      const T = fx.sampleTime as number | null;
      const grid = fx.gain.map((row, i) => row.map((k, j) => zpk(fx.zeros[i]![j]!.map(toComplex), fx.poles[i]![j]!.map(toComplex), k, T)));
      const model = realizeZeroPoleGainMatrix(grid);
      expect(model.sampleTime).toBe(T);
      fx.entries.forEach((row, i) =>
        row.forEach((entry, j) => {
          // The expanded transfer function equals scipy.signal.zpk2tf's (ours is ordered, so compare to rounding).
          const tf = zeroPoleGainToTransferFunction(grid[i]![j]!);
          expectMatrixClose([tf.num], [entry.num], 1e-14, `${fx.name}: numerator (${i + 1}, ${j + 1})`);
          expectMatrixClose([tf.den], [entry.den], 1e-14, `${fx.name}: denominator (${i + 1}, ${j + 1})`);
          fx.points.forEach((s, k) => expectComplexClose(evaluateChannel(model, s, j, i), entry.values[k]!, 1e-12, `${fx.name}: G${i + 1}${j + 1} at point ${k}`));
          fx.frequenciesRadPerSec.forEach((w, k) => {
            const s = T === null ? c(0, w) : c(Math.cos(w * T), Math.sin(w * T));
            expectComplexClose(evaluateChannel(model, s, j, i), entry.response[k]!, 1e-12, `${fx.name}: G${i + 1}${j + 1} at ω = ${w}`);
          });
        }),
      );
      const g = dcGain(model);
      expect(g.gain).not.toBeNull();
      expectMatrixClose(g.gain!, fx.dcGain, 1e-12, `${fx.name}: DC gain`);
    }
  });

  it("gives entries of one input column that share their poles (in any order) one companion block", () => {
    const fx = fixtures.cases[1]!; // 2×3: each column's two entries have the same poles, listed differently
    const grid = fx.gain.map((row, i) => row.map((k, j) => zpk(fx.zeros[i]![j]!.map(toComplex), fx.poles[i]![j]!.map(toComplex), k)));
    // Degrees 2 + 1 + 2: one block per column, none duplicated.
    expect(realizeZeroPoleGainMatrix(grid).A.rows).toBe(5);
    // Orders whose expansions differ in the last bit when multiplied out as listed.
    const orders = [[-0.1, -0.7, -0.3], [-0.3, -0.1, -0.7]].map((r) => r.map((x) => c(x)));
    expect(polynomialFromRoots(orders[0]!)).not.toEqual(polynomialFromRoots(orders[1]!));
    expect(realizeZeroPoleGainMatrix([[zpk([], orders[0]!, 1)], [zpk([c(-2)], orders[1]!, 3)]]).A.rows).toBe(3);
  });

  it("names the entry in the errors of an unpaired complex zero, a non-finite gain, an improper entry and a ragged grid", () => {
    expectEngineError(() => realizeZeroPoleGainMatrix([[PLANT[0]![0]!, zpk([c(1, 1)], [c(-1), c(-2)], 1)]]), "invalid-argument", /^zero-pole-gain entry \(1, 2\) \(output 1, input 2\): zeros\[0\] = 1\+1j has no conjugate partner/);
    expectEngineError(() => realizeZeroPoleGainMatrix([[PLANT[0]![0]!], [zpk([], [c(-1)], Number.NaN)]]), "non-finite", /^zero-pole-gain entry \(2, 1\) \(output 2, input 1\): gain is NaN/);
    expectEngineError(() => realizeZeroPoleGainMatrix([[zpk([c(-1), c(-2)], [c(-3)], 1)]]), "invalid-argument", /entry \(1, 1\).*improper/);
    expectEngineError(() => realizeZeroPoleGainMatrix([PLANT[0]!, [PLANT[1]![0]!]]), "shape-mismatch", /row 2 has 1 entries but row 1 has 2/);
    expectEngineError(() => realizeZeroPoleGainMatrix([]), "empty", /empty/);
  });

  it("expands a zero gain to the zero polynomial, so the entry adds no states", () => {
    expect(zeroPoleGainToTransferFunction(createZeroPoleGain([c(-1)], [c(-2)], 0))).toEqual({ num: [0], den: [1, 2], sampleTime: null });
    const model = realizeZeroPoleGainMatrix([[zpk([], [c(-1)], 1), zpk([c(-1)], [c(-2)], 0)]]);
    expect(model.A.rows).toBe(1);
  });
});
