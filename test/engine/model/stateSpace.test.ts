import { describe, expect, it } from "vitest";
import { Matrix } from "ml-matrix";
import {
  createStateSpace,
  dimensions,
  isDiscrete,
  stateSpaceFromMatrices,
  stateSpaceToSpec,
  type StateSpaceSpec,
} from "../../../shared-engine/model";
import { expectEngineError } from "./modelTestUtils";

const doubleIntegrator: StateSpaceSpec = { A: [[0, 1], [0, 0]], B: [[0], [1]], C: [[1, 0]] };

describe("createStateSpace", () => {
  it("fills D with zeros, F with n×0, E with p×0 and default names and units", () => {
    const m = createStateSpace(doubleIntegrator);
    expect(dimensions(m)).toEqual({ n: 2, m: 1, p: 1, q: 0 });
    expect(m.D.to2DArray()).toEqual([[0]]);
    expect([m.F.rows, m.F.columns]).toEqual([2, 0]);
    expect([m.E.rows, m.E.columns]).toEqual([1, 0]);
    expect(m.names).toEqual({ states: ["x1", "x2"], inputs: ["u1"], outputs: ["y1"], disturbances: [] });
    expect(m.units.states).toEqual(["", ""]);
    expect(m.sampleTime).toBeNull();
    expect(isDiscrete(m)).toBe(false);
  });

  it("keeps disturbance channels and given names", () => {
    const m = createStateSpace({
      ...doubleIntegrator,
      F: [[1], [0]],
      E: [[0.5]],
      sampleTime: 0.1,
      names: { states: ["position", "velocity"], disturbances: ["force"] },
      units: { states: ["m", "m/s"] },
    });
    expect(dimensions(m).q).toBe(1);
    expect(m.E.get(0, 0)).toBe(0.5);
    expect(m.names.states).toEqual(["position", "velocity"]);
    expect(m.names.inputs).toEqual(["u1"]);
    expect(m.units.states).toEqual(["m", "m/s"]);
    expect(isDiscrete(m)).toBe(true);
  });

  it("defaults F to zeros when only E is given (disturbance reaching the outputs only)", () => {
    const m = createStateSpace({ ...doubleIntegrator, E: [[2, 3]] });
    expect(m.F.to2DArray()).toEqual([[0, 0], [0, 0]]);
  });

  it("accepts a static gain with no states when D fixes the signal counts", () => {
    const m = createStateSpace({ A: [], B: [], C: [], D: [[2, 3]] });
    expect(dimensions(m)).toEqual({ n: 0, m: 2, p: 1, q: 0 });
    const again = createStateSpace(stateSpaceToSpec(m));
    expect(dimensions(again)).toEqual({ n: 0, m: 2, p: 1, q: 0 });
  });

  it("round-trips through the plain spec form without sharing arrays", () => {
    const spec: StateSpaceSpec = { ...doubleIntegrator, F: [[1], [2]], E: [[3]], sampleTime: 0.5, names: { outputs: ["angle"] } };
    const m = createStateSpace(spec);
    spec.A[0]![0] = 99;
    expect(m.A.get(0, 0)).toBe(0);
    const back = stateSpaceToSpec(m);
    back.A[0]![1] = 42;
    back.names!.states![0] = "changed";
    expect(m.A.get(0, 1)).toBe(1);
    expect(m.names.states[0]).toBe("x1");
    expect(stateSpaceToSpec(createStateSpace(stateSpaceToSpec(m)))).toEqual(stateSpaceToSpec(m));
  });

  it("copies Matrix inputs so later changes to them do not reach the model", () => {
    const A = new Matrix([[1]]);
    const m = stateSpaceFromMatrices({ A, B: [[1]], C: [[1]] });
    A.set(0, 0, 5);
    expect(m.A.get(0, 0)).toBe(1);
    expect(Object.isFrozen(m)).toBe(true);
    expect(Object.isFrozen(m.names.states)).toBe(true);
  });
});

describe("createStateSpace rejects bad input with a specific error (issue bad-input catalogue)", () => {
  it("rejects a non-square A", () => {
    expectEngineError(() => createStateSpace({ A: [[1, 2]], B: [[1]], C: [[1, 0]] }), "shape-mismatch", /A must be square \(it is 1×2\)/);
  });
  it("rejects B with the wrong number of rows", () => {
    expectEngineError(
      () => createStateSpace({ A: [[0, 1], [0, 0]], B: [[1], [2], [3]], C: [[1, 0]] }),
      "shape-mismatch",
      /B must have as many rows as A \(A is 2×2, B is 3×1\)/,
    );
  });
  it("rejects C with the wrong number of columns", () => {
    expectEngineError(() => createStateSpace({ ...doubleIntegrator, C: [[1, 0, 0]] }), "shape-mismatch", /C must have as many columns as A \(A is 2×2, C is 1×3\)/);
  });
  it("rejects D of the wrong shape", () => {
    expectEngineError(() => createStateSpace({ ...doubleIntegrator, D: [[0, 0]] }), "shape-mismatch", /D must be 1×1.*D is 1×2/);
  });
  it("rejects F with the wrong number of rows", () => {
    expectEngineError(() => createStateSpace({ ...doubleIntegrator, F: [[1]] }), "shape-mismatch", /F must have as many rows as A \(A is 2×2, F is 1×1\)/);
  });
  it("rejects E whose columns do not match F", () => {
    expectEngineError(() => createStateSpace({ ...doubleIntegrator, F: [[1], [0]], E: [[1, 2]] }), "shape-mismatch", /E must be 1×1.*E is 1×2/);
  });
  it("rejects ragged rows", () => {
    expectEngineError(() => createStateSpace({ A: [[0, 1], [0]], B: [[0], [1]], C: [[1, 0]] }), "shape-mismatch", /A row 2 has 1 entries/);
  });
  it("rejects NaN and Infinity entries naming the entry", () => {
    expectEngineError(() => createStateSpace({ ...doubleIntegrator, A: [[0, NaN], [0, 0]] }), "non-finite", /A\[0\]\[1\] is NaN/);
    expectEngineError(() => createStateSpace({ ...doubleIntegrator, D: [[Infinity]] }), "non-finite", /D\[0\]\[0\] is Infinity/);
    expectEngineError(() => createStateSpace({ ...doubleIntegrator, F: [[0], [-Infinity]] }), "non-finite", /F\[1\]\[0\] is -Infinity/);
  });
  it("rejects non-positive and non-finite sample periods", () => {
    expectEngineError(() => createStateSpace({ ...doubleIntegrator, sampleTime: 0 }), "invalid-argument", /sampleTime is 0; .* positive/);
    expectEngineError(() => createStateSpace({ ...doubleIntegrator, sampleTime: -0.1 }), "invalid-argument", /sampleTime is -0.1/);
    expectEngineError(() => createStateSpace({ ...doubleIntegrator, sampleTime: NaN }), "non-finite", /sampleTime is NaN/);
    expectEngineError(() => createStateSpace({ ...doubleIntegrator, sampleTime: Infinity }), "non-finite", /sampleTime is Infinity/);
  });
  it("rejects duplicate, empty and miscounted names", () => {
    expectEngineError(() => createStateSpace({ ...doubleIntegrator, names: { states: ["x1", "x1"] } }), "invalid-argument", /duplicate state name 'x1'/);
    expectEngineError(() => createStateSpace({ ...doubleIntegrator, names: { inputs: [" "] } }), "invalid-argument", /input name 1 is empty/);
    expectEngineError(() => createStateSpace({ ...doubleIntegrator, names: { outputs: ["a", "b"] } }), "invalid-argument", /names.outputs has 2 entries but the model has 1 outputs/);
    expectEngineError(() => createStateSpace({ ...doubleIntegrator, units: { states: ["m"] } }), "invalid-argument", /units.states has 1 entries/);
  });
  it("rejects a missing matrix", () => {
    expectEngineError(() => createStateSpace({ A: [[1]], B: [[1]] } as unknown as StateSpaceSpec), "invalid-argument", /missing matrix C/);
  });
});
