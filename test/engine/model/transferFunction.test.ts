import { describe, expect, it } from "vitest";
import fc from "fast-check";
import { Matrix } from "ml-matrix";
import {
  createStateSpace,
  createTransferFunction,
  evaluateTransferFunction,
  realizeTransferFunction,
  stateSpaceToTransferFunction,
  type TransferFunction,
} from "../../../shared-engine/model";
import { expectMatrixClose, expectAtMost } from "../../helpers/assertions";
import fixtures from "../../fixtures/model/discretize.json";
import { evaluateChannel, expectComplexClose, expectEngineError, TEST_POINTS } from "./modelTestUtils";

const tf = (num: number[], den: number[], sampleTime: number | null = null): TransferFunction => ({ num, den, sampleTime });

describe("createTransferFunction", () => {
  it("trims leading numerator zeros and keeps the denominator", () => {
    const g = createTransferFunction([0, 0, 2], [1, 3]);
    expect(g.num).toEqual([2]);
    expect(g.den).toEqual([1, 3]);
    expect(g.sampleTime).toBeNull();
  });
  it("rejects a zero leading denominator coefficient saying so (issue bad-input catalogue)", () => {
    expectEngineError(() => createTransferFunction([1], [0, 1, 2]), "invalid-argument", /denominator leading coefficient is zero/);
  });
  it("rejects an improper transfer function naming both degrees (issue bad-input catalogue)", () => {
    expectEngineError(() => createTransferFunction([1, 0, 0, 0], [1, 2, 3]), "invalid-argument", /^improper transfer function \(numerator degree 3 > denominator degree 2\)$/);
  });
  it("rejects NaN, Infinity, empty coefficient lists and bad sample periods", () => {
    expectEngineError(() => createTransferFunction([NaN], [1, 2]), "non-finite", /numerator coefficient 0 is NaN/);
    expectEngineError(() => createTransferFunction([1], [1, Infinity]), "non-finite", /denominator coefficient 1 is Infinity/);
    expectEngineError(() => createTransferFunction([], [1]), "empty", /numerator has no coefficients/);
    expectEngineError(() => createTransferFunction([1], [1, 1], 0), "invalid-argument", /sampleTime is 0/);
    expectEngineError(() => createTransferFunction([1], [1, 1], -Infinity), "non-finite", /sampleTime is -Infinity/);
  });
});

describe("realizeTransferFunction", () => {
  it("builds the controller canonical form exactly as the tf2ss fixtures when balancing is off", () => {
    for (const c of fixtures.tf2ss) {
      // source: c.source (scipy.signal.tf2ss), see test/fixtures/model/generate_discretize.py
      const nums = c.num.length > 1 ? c.num : [c.num[0]!];
      const model = realizeTransferFunction(nums.map((num) => [tf(num, c.den)]), { balance: false });
      expectMatrixClose(model.A, c.A, 1e-15, `A for ${c.source}`);
      expectMatrixClose(model.B, c.B, 1e-15, `B for ${c.source}`);
      expectMatrixClose(model.C, c.C, 1e-15, `C for ${c.source}`);
      expectMatrixClose(model.D, c.D, 1e-15, `D for ${c.source}`);
    }
  });

  it("keeps the transfer function when balancing the widely scaled case", () => {
    const g = tf([1e3, 1e6], [1, 1e3, 1e6, 1e9]);
    const model = realizeTransferFunction(g);
    const raw = realizeTransferFunction(g, { balance: false });
    expect(model.A.norm("frobenius")).toBeLessThan(raw.A.norm("frobenius"));
    for (const s of [{ re: 10, im: 300 }, { re: -50, im: 1000 }]) {
      expectComplexClose(evaluateChannel(model, s), evaluateTransferFunction(g, s), 1e-12, `G(${s.re}+${s.im}j)`, 0);
    }
  });

  it("realizes a 2×2 transfer matrix whose every entry matches at test points, sharing equal denominators in a column", () => {
    const G = [
      [tf([1], [1, 1]), tf([2, 1], [1, 3, 2])],
      [tf([3], [2, 2]), tf([1, 0, 0], [1, 0.5, 4])],
    ];
    const model = realizeTransferFunction(G);
    // column 1 shares the monic denominator s + 1 (1 state); column 2 needs 2 + 2 states
    expect(model.A.rows).toBe(5);
    for (let i = 0; i < 2; i++) {
      for (let j = 0; j < 2; j++) {
        for (const s of TEST_POINTS) {
          expectComplexClose(evaluateChannel(model, s, j, i), evaluateTransferFunction(G[i]![j]!, s), 1e-13, `G${i + 1}${j + 1}`);
        }
      }
    }
  });

  it("realizes a constant as a static gain with no states, and a zero numerator as a zero gain", () => {
    expect(realizeTransferFunction(tf([4], [2])).D.get(0, 0)).toBe(2);
    expect(realizeTransferFunction(tf([4], [2])).A.rows).toBe(0);
    expect(realizeTransferFunction(tf([0], [1, 2])).A.rows).toBe(0);
  });

  it("keeps the sample time and rejects mixed sample times in a matrix", () => {
    expect(realizeTransferFunction(tf([1], [1, -0.5], 0.1)).sampleTime).toBe(0.1);
    expectEngineError(() => realizeTransferFunction([[tf([1], [1, 1]), tf([1], [1, -0.5], 0.1)]]), "invalid-argument", /entry \(1, 2\) is sampled at 0.1 s but entry \(1, 1\) is continuous/);
    expectEngineError(() => realizeTransferFunction([[tf([1], [1, 1])], []]), "shape-mismatch", /row 2 has 0 entries/);
    expectEngineError(() => realizeTransferFunction([[tf([1], [1, 1]), tf([1, 2, 3], [1, 1])]]), "invalid-argument", /improper transfer function \(numerator degree 2 > denominator degree 1\) in transfer matrix entry \(1, 2\)/);
  });

  it("matches the transfer function at test points for random proper transfer functions (property)", () => {
    const coefficient = fc.integer({ min: -40, max: 40 }).map((k) => k / 8);
    fc.assert(
      fc.property(fc.integer({ min: 1, max: 6 }), fc.array(coefficient, { minLength: 7, maxLength: 7 }), fc.array(coefficient, { minLength: 7, maxLength: 7 }), fc.integer({ min: 1, max: 16 }), (order, numRaw, denRaw, lead) => {
        const den = [lead / 4, ...denRaw.slice(0, order)];
        const num = numRaw.slice(0, order + 1);
        const g = tf(num, den);
        const model = realizeTransferFunction(g);
        for (const s of TEST_POINTS) {
          const expected = evaluateTransferFunction(g, s);
          if (!Number.isFinite(expected.re) || Math.hypot(expected.re, expected.im) > 1e6) continue; // at a pole
          expectComplexClose(evaluateChannel(model, s), expected, 1e-10, "G(s)");
        }
      }),
      { seed: 4242, numRuns: 150 },
    );
  });
});

describe("stateSpaceToTransferFunction", () => {
  it("reproduces the ss2tf fixtures (numerator and denominator coefficients)", () => {
    for (const c of fixtures.ss2tf) {
      // source: c.source (scipy.signal.ss2tf), see test/fixtures/model/generate_discretize.py
      const model = createStateSpace({ A: c.A, B: c.B, C: c.C, D: c.D });
      const g = stateSpaceToTransferFunction(model);
      const n = c.den.length;
      const num = [...new Array<number>(n - g.num.length).fill(0), ...g.num];
      const scale = Math.max(...c.num.map(Math.abs));
      expectAtMost(Math.max(...num.map((x, k) => Math.abs(x - c.num[k]!))), 1e-13 * scale, `numerator of ${c.label}`);
      expectAtMost(Math.max(...g.den.map((x, k) => Math.abs(x - c.den[k]!))), 1e-13 * Math.max(...c.den.map(Math.abs)), `denominator of ${c.label}`);
    }
  });

  it("finds the relative degree of a chain exactly: no spurious leading numerator coefficients", () => {
    // (from the ss2tf fixture 'triangular chain'): G = 1/((s+1)(s+2)(s+3)), c·b = c·A·b = 0
    const model = createStateSpace({ A: [[-1, 1, 0], [0, -2, 1], [0, 0, -3]], B: [[0], [0], [1]], C: [[1, 0, 0]] });
    const g = stateSpaceToTransferFunction(model);
    expect(g.num.length).toBe(1);
    expect(g.num[0]).toBeCloseTo(1, 14);
  });

  it("returns the zero transfer function for a channel that no input reaches", () => {
    const model = createStateSpace({ A: [[-1, 0], [0, -2]], B: [[1], [0]], C: [[0, 1]] });
    expect(stateSpaceToTransferFunction(model).num).toEqual([0]);
  });

  it("round-trips random realizations: values at test points agree (property)", () => {
    const entry = fc.integer({ min: -20, max: 20 }).map((k) => k / 10);
    fc.assert(
      fc.property(fc.integer({ min: 1, max: 5 }), fc.array(entry, { minLength: 42, maxLength: 42 }), fc.boolean(), (n, pool, withD) => {
        const A = Matrix.zeros(n, n);
        for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) A.set(i, j, pool[i * n + j]! - (i === j ? 3 : 0));
        const B = pool.slice(25, 25 + n).map((x) => [x]);
        const C = [pool.slice(31, 31 + n)];
        const model = createStateSpace({ A: A.to2DArray(), B, C, D: [[withD ? pool[41]! : 0]] });
        const g = stateSpaceToTransferFunction(model);
        for (const s of TEST_POINTS) {
          const expected = evaluateChannel(model, s);
          expectComplexClose(evaluateTransferFunction(g, s), expected, 1e-8, "G(s) after conversion");
        }
      }),
      { seed: 777, numRuns: 200 },
    );
  });

  it("rejects channel indices out of range", () => {
    const model = createStateSpace({ A: [[-1]], B: [[1]], C: [[1]] });
    expectEngineError(() => stateSpaceToTransferFunction(model, 1, 0), "invalid-argument", /input index 1 is out of range \(the model has 1 inputs/);
  });
});
