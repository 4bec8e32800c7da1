import { describe, expect, it } from "vitest";
import {
  addInputDelay,
  append,
  createStateSpace,
  dimensions,
  discretize,
  feedback,
  parallel,
  series,
  stateSpaceToTransferFunction,
} from "../../../shared-engine/model";
import { expectMatrixClose } from "../../helpers/assertions";

describe("degenerate models pass through every operation", () => {
  const autonomous = createStateSpace({ A: [[-1, 0], [0, -2]], B: [[], []], C: [[1, 1]] }); // no inputs
  const gain = (k: number, sampleTime: number | null = null) => createStateSpace({ A: [], B: [], C: [], D: [[k]], sampleTime });

  it("discretizes a model with no inputs and no disturbances", () => {
    expect(dimensions(autonomous)).toEqual({ n: 2, m: 0, p: 1, q: 0 });
    const zoh = discretize(autonomous, 0.5, { method: "zoh" });
    expectMatrixClose(zoh.A, [[Math.exp(-0.5), 0], [0, Math.exp(-1)]], 1e-15, "e^{AT} (closed form)");
    expect([zoh.B.rows, zoh.B.columns]).toEqual([2, 0]);
    const tustin = discretize(autonomous, 0.5, { method: "tustin" });
    expect([tustin.F.rows, tustin.F.columns]).toEqual([2, 0]);
  });

  it("connects static gains: series multiplies, parallel adds, feedback gives k/(1+k·h)", () => {
    expect(series(gain(2), gain(3)).D.get(0, 0)).toBe(6);
    expect(parallel(gain(2), gain(3)).D.get(0, 0)).toBe(5);
    expect(feedback(gain(4), gain(0.5)).D.get(0, 0)).toBeCloseTo(4 / 3, 15);
    expect(dimensions(append(gain(1), autonomous))).toEqual({ n: 2, m: 1, p: 2, q: 0 });
  });

  it("delays a sampled static gain by zero samples without adding states", () => {
    expect(dimensions(addInputDelay(gain(2, 0.1), 0)).n).toBe(0);
  });

  it("converts a static gain and a 1×1 model to transfer functions", () => {
    expect(stateSpaceToTransferFunction(gain(7))).toEqual({ num: [7], den: [1], sampleTime: null });
    const g = stateSpaceToTransferFunction(createStateSpace({ A: [[-2]], B: [[3]], C: [[4]] }));
    expect(g.num[0]).toBeCloseTo(12, 14);
    expect(g.den).toEqual([1, 2]);
  });
});
