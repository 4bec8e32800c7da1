import { describe, expect, it } from "vitest";
import fc from "fast-check";
import { Matrix } from "ml-matrix";
import {
  append,
  augmentStates,
  createStateSpace,
  dimensions,
  feedback,
  parallel,
  realizeTransferFunction,
  series,
  uniqueNames,
  type StateSpace,
} from "../../../shared-engine/model";
import { cadd, cdiv, cmul, type Complex } from "../../../shared-engine/linalg/complex";
import { expectMatrixClose } from "../../helpers/assertions";
import { evaluateChannel, expectComplexClose, expectEngineError, TEST_POINTS } from "./modelTestUtils";

const lag = (a: number, k = 1, sampleTime: number | null = null) => realizeTransferFunction({ num: [k], den: [1, a], sampleTime });
const one: Complex = { re: 1, im: 0 };

/** Random SISO model with disturbance channel from an integer pool (bounded, scaled). */
const sisoModel = fc
  .tuple(fc.integer({ min: 1, max: 3 }), fc.array(fc.integer({ min: -20, max: 20 }), { minLength: 20, maxLength: 20 }))
  .map(([n, pool]): StateSpace => {
    const v = pool.map((k) => k / 10);
    const A = Array.from({ length: n }, (_, i) => Array.from({ length: n }, (_, j) => v[i * 3 + j]! - (i === j ? 2.5 : 0)));
    return createStateSpace({
      A,
      B: Array.from({ length: n }, (_, i) => [v[9 + i]!]),
      C: [Array.from({ length: n }, (_, j) => v[12 + j]!)],
      D: [[v[15]! / 4]],
      F: Array.from({ length: n }, (_, i) => [v[16 + i]!]),
      E: [[v[19]!]],
    });
  });

describe("uniqueNames", () => {
  it("keeps first occurrences and suffixes later duplicates without colliding", () => {
    expect(uniqueNames(["x1", "x2", "x1", "x1_2", "x1"])).toEqual(["x1", "x2", "x1_3", "x1_2", "x1_4"]);
  });
});

describe("series", () => {
  it("multiplies transfer functions and applies the block formulas to the disturbance channels (property)", () => {
    fc.assert(
      fc.property(sisoModel, sisoModel, (g1, g2) => {
        const s12 = series(g1, g2);
        expect(dimensions(s12)).toEqual({ n: g1.A.rows + g2.A.rows, m: 1, p: 1, q: 2 });
        for (const s of TEST_POINTS) {
          expectComplexClose(evaluateChannel(s12, s), cmul(evaluateChannel(g2, s), evaluateChannel(g1, s)), 1e-11, "G2·G1");
          // w₁ enters through G1's disturbance path, then G2: check with the E/F columns as inputs
          const w1 = { A: s12.A, B: s12.F, C: s12.C, D: s12.E };
          const g1w = evaluateChannel({ A: g1.A, B: g1.F, C: g1.C, D: g1.E }, s);
          expectComplexClose(evaluateChannel(w1, s, 0), cmul(evaluateChannel(g2, s), g1w), 1e-11, "w₁ → y");
          const g2w = evaluateChannel({ A: g2.A, B: g2.F, C: g2.C, D: g2.E }, s);
          expectComplexClose(evaluateChannel(w1, s, 1), g2w, 1e-11, "w₂ → y");
        }
      }),
      { seed: 31337, numRuns: 100 },
    );
  });

  it("keeps names, making duplicated state names unique", () => {
    const s12 = series(lag(1), lag(2));
    expect(s12.names.states).toEqual(["x1", "x1_2"]);
    expect(s12.names.inputs).toEqual(["u1"]);
  });

  it("rejects mismatched signal counts and sample times", () => {
    const two = realizeTransferFunction([[{ num: [1], den: [1, 1], sampleTime: null }], [{ num: [1], den: [1, 2], sampleTime: null }]]);
    expectEngineError(() => series(two, two), "shape-mismatch", /first has 2 outputs, second has 1 inputs/);
    expectEngineError(() => series(lag(1), lag(0.5, 1, 0.1)), "invalid-argument", /first model is continuous, second is sampled at 0.1 s/);
  });
});

describe("parallel and append", () => {
  it("parallel adds transfer functions (property)", () => {
    fc.assert(
      fc.property(sisoModel, sisoModel, (g1, g2) => {
        const sum = parallel(g1, g2);
        for (const s of TEST_POINTS) expectComplexClose(evaluateChannel(sum, s), cadd(evaluateChannel(g1, s), evaluateChannel(g2, s)), 1e-11, "G1 + G2");
      }),
      { seed: 2718, numRuns: 60 },
    );
  });

  it("append builds the block-diagonal system with unique names", () => {
    const both = append(lag(1), lag(2, 3));
    expect(dimensions(both)).toEqual({ n: 2, m: 2, p: 2, q: 0 });
    expect(both.names.inputs).toEqual(["u1", "u1_2"]);
    expect(both.D.to2DArray()).toEqual([[0, 0], [0, 0]]);
    const s = TEST_POINTS[0]!;
    expectComplexClose(evaluateChannel(both, s, 1, 1), cdiv({ re: 3, im: 0 }, cadd(s, { re: 2, im: 0 })), 1e-14, "G22");
    expectComplexClose(evaluateChannel(both, s, 1, 0), { re: 0, im: 0 }, 1e-14, "G12");
  });

  it("parallel rejects different input counts", () => {
    expectEngineError(() => parallel(lag(1), append(lag(1), lag(2))), "shape-mismatch", /equal input and output counts/);
  });
});

describe("feedback", () => {
  it("negative feedback of 1/s with unit gain gives 1/(s+1) (closed form)", () => {
    const integrator = createStateSpace({ A: [[0]], B: [[1]], C: [[1]] });
    const unit = createStateSpace({ A: [], B: [], C: [], D: [[1]] });
    const loop = feedback(integrator, unit);
    expectMatrixClose(loop.A, [[-1]], 1e-15, "A of the closed loop");
  });

  it("gives G/(1 − sign·G·H) for random loops without algebraic loops (property)", () => {
    fc.assert(
      fc.property(sisoModel, sisoModel, fc.constantFrom(1 as const, -1 as const), (g, h, sign) => {
        const loop = feedback(g, h, sign);
        for (const s of TEST_POINTS) {
          const G = evaluateChannel(g, s);
          const H = evaluateChannel(h, s);
          const denom = cadd(one, cmul({ re: -sign, im: 0 }, cmul(G, H)));
          if (Math.hypot(denom.re, denom.im) < 1e-3) continue; // closed-loop pole near the test point
          expectComplexClose(evaluateChannel(loop, s), cdiv(G, denom), 1e-9, "closed loop");
          const Gw = evaluateChannel({ A: g.A, B: g.F, C: g.C, D: g.E }, s);
          expectComplexClose(evaluateChannel({ A: loop.A, B: loop.F, C: loop.C, D: loop.E }, s, 0), cdiv(Gw, denom), 1e-9, "w₁ → y closed loop");
        }
      }),
      { seed: 1618, numRuns: 100 },
    );
  });

  it("rejects an algebraic loop where I − sign·D₂D₁ is singular", () => {
    const direct = createStateSpace({ A: [[-1]], B: [[1]], C: [[1]], D: [[1]] });
    const unit = createStateSpace({ A: [], B: [], C: [], D: [[1]] });
    expectEngineError(() => feedback(direct, unit, 1), "singular", /algebraic loop: I − D₂·D₁ is singular/);
    expectEngineError(() => feedback(direct, createStateSpace({ A: [], B: [], C: [], D: [[-1]] }), -1), "singular", /algebraic loop/);
  });

  it("rejects a sign other than ±1 and mismatched dimensions", () => {
    expectEngineError(() => feedback(lag(1), lag(2), 2 as unknown as 1), "invalid-argument", /sign must be \+1 or −1/);
    expectEngineError(() => feedback(lag(1), append(lag(1), lag(2))), "shape-mismatch", /feedback path has 2 inputs and 2 outputs/);
  });
});

describe("augmentStates", () => {
  it("appends the states to the outputs with their names and units", () => {
    const model = createStateSpace({ A: [[0, 1], [0, 0]], B: [[0], [1]], C: [[1, 0]], F: [[0], [1]], names: { states: ["pos", "vel"], outputs: ["pos"] }, units: { states: ["m", "m/s"] } });
    const aug = augmentStates(model);
    expect(aug.names.outputs).toEqual(["pos", "pos_2", "vel"]);
    expect(aug.units.outputs).toEqual(["", "m", "m/s"]);
    expectMatrixClose(aug.C, [[1, 0], [1, 0], [0, 1]], 0, "C");
    expectMatrixClose(aug.D, Matrix.zeros(3, 1), 0, "D");
    expect([aug.E.rows, aug.E.columns]).toEqual([3, 1]);
  });
});
