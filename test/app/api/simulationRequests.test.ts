// The "analysis.simulate" and "analysis.initial" requests: hand-worked responses (a first-order
// lag driven by a ramp, an undamped oscillator released from an offset, a sampled lag), and
// field-named refusals of bad times, sequences, initial states and oversize requests.
import { describe, expect, it } from "vitest";
import { dispatch, ENGINE_METHODS, type EngineMethod, type EngineResult } from "../../../shared-engine/api";
import { EngineError } from "../../../shared-engine/errors";
import { expectAtMost, expectRelativeClose } from "../../helpers/assertions";

async function call<M extends EngineMethod>(method: M, params: unknown): Promise<EngineResult<M>> {
  const result = (await dispatch(method, params)) as EngineResult<M>;
  expect(JSON.parse(JSON.stringify(result))).toEqual(result);
  return result;
}

async function failure(method: string, params: unknown): Promise<EngineError> {
  try {
    await dispatch(method, params);
  } catch (error) {
    expect(error).toBeInstanceOf(EngineError);
    return error as EngineError;
  }
  throw new Error(`${method} was expected to fail`);
}

const LAG = { A: [[-1]], B: [[1]], C: [[1]], names: { states: ["x"], inputs: ["u"], outputs: ["y"] } };
const grid = (count: number, step: number) => Array.from({ length: count }, (_, k) => k * step);

describe("analysis.simulate", () => {
  it("is listed among the engine methods", () => {
    expect(ENGINE_METHODS).toContain("analysis.simulate");
    expect(ENGINE_METHODS).toContain("analysis.initial");
  });

  it("drives the lag ẋ = −x + u with the ramp u = t to y = t − 1 + e^(−t) when the input moves linearly between samples", async () => {
    const times = grid(41, 0.125);
    const r = await call("analysis.simulate", { model: LAG, times, u: times.map((t) => [t]), hold: "foh" });
    // Hand-worked: y' = −y + t, y(0) = 0 ⇒ y = t − 1 + e^(−t) (first-order linear ODE, integrating factor).
    let worst = 0;
    times.forEach((t, k) => (worst = Math.max(worst, Math.abs(r.outputs[0]![k]! - (t - 1 + Math.exp(-t))))));
    expectAtMost(worst, 1e-12, "largest |y − (t − 1 + e^(−t))|");
    expect(r.outputNames).toEqual(["y"]);
    expect(r.inputNames).toEqual(["u"]);
    expect(r.inputs[0]).toEqual(times);
  });

  it("holds the ramp between samples by default, following x_{k+1} = e^(−h)x_k + (1 − e^(−h))u_k", async () => {
    const h = 0.25;
    const times = grid(17, h);
    const r = await call("analysis.simulate", { model: LAG, times, u: times.map((t) => [t]) });
    // Hand-worked zero-order-hold recursion of ẋ = −x + u over one step h.
    let x = 0;
    times.forEach((t, k) => {
      expectRelativeClose(r.outputs[0]![k]!, x, 1e-12, `y at t = ${t}`, 1);
      x = Math.exp(-h) * x + (1 - Math.exp(-h)) * t;
    });
  });

  it("starts from x0 and adds the disturbance through F and E", async () => {
    const model = { ...LAG, F: [[2]], E: [[0.5]] };
    const times = grid(11, 0.1);
    const r = await call("analysis.simulate", { model, times, u: times.map(() => [0]), w: times.map(() => [1]), x0: [3] });
    // Hand-worked: ẋ = −x + 2, x(0) = 3 ⇒ x = 2 + e^(−t); y = x + 0.5·w.
    times.forEach((t, k) => expectRelativeClose(r.outputs[0]![k]!, 2 + Math.exp(-t) + 0.5, 1e-13, `y at t = ${t}`));
    expect(r.disturbances?.[0]).toEqual(times.map(() => 1));
  });

  it("runs a sampled lag x[k+1] = 0.5x[k] + u[k] on multiples of T, gaps included", async () => {
    const model = { A: [[0.5]], B: [[1]], C: [[1]], sampleTime: 0.1 };
    const r = await call("analysis.simulate", { model, times: [0, 0.1, 0.2, 0.4], u: [[1], [1], [1], [1]] });
    // Hand-worked: 0, 1, 1.5, then two held samples: 1.75, 1.875.
    [0, 1, 1.5, 1.875].forEach((v, k) => expectRelativeClose(r.outputs[0]![k]!, v, 1e-14, `y[${k}]`, 1));
  });

  it("refuses times that do not increase, naming the field and the index", async () => {
    const e = await failure("analysis.simulate", { model: LAG, times: [0, 1, 1], u: [[0], [0], [0]] });
    expect(e.kind).toBe("invalid-argument");
    expect(e.details.field).toBe("times");
    expect(e.message).toMatch(/times\[2\]/);
  });

  it("refuses sampled-model times that are not multiples of the period", async () => {
    const e = await failure("analysis.simulate", { model: { A: [[0.5]], B: [[1]], C: [[1]], sampleTime: 0.1 }, times: [0, 0.15], u: [[0], [0]] });
    expect(e.details.field).toBe("times");
    expect(e.message).toMatch(/not a multiple of the sample period 0\.1/);
  });

  it("refuses a sequence with the wrong number of rows or entries, or a non-number, naming u and the cell", async () => {
    const rows = await failure("analysis.simulate", { model: LAG, times: [0, 1], u: [[0]] });
    expect([rows.kind, rows.details.field]).toEqual(["shape-mismatch", "u"]);
    const width = await failure("analysis.simulate", { model: LAG, times: [0, 1], u: [[0], [0, 1]] });
    expect(width.message).toMatch(/u\[1\] has 2 entries; the model has 1 input/);
    const cell = await failure("analysis.simulate", { model: LAG, times: [0, 1], u: [[0], ["1"]] });
    expect(cell.details).toMatchObject({ field: "u", row: 1, col: 0 });
    const w = await failure("analysis.simulate", { model: LAG, times: [0, 1], u: [[0], [0]], w: [[1], [1]] });
    expect(w.message).toMatch(/w\[0\] has 1 entries; the model has 0 disturbance/);
  });

  it("refuses an x0 of the wrong length and a first-order hold on a sampled model", async () => {
    const x0 = await failure("analysis.simulate", { model: LAG, times: [0, 1], u: [[0], [0]], x0: [1, 2] });
    expect([x0.kind, x0.details.field]).toEqual(["shape-mismatch", "x0"]);
    const hold = await failure("analysis.simulate", { model: { ...LAG, sampleTime: 1 }, times: [0, 1], u: [[0], [0]], hold: "foh" });
    expect(hold.details.field).toBe("hold");
  });

  it("refuses a response larger than the size limit before computing it", async () => {
    const big = Array.from({ length: 120 }, (_, i) => Array.from({ length: 120 }, (_, j) => (i === j ? -1 : 0)));
    const model = { A: big, B: big.map((r) => [r[0]!]), C: big };
    const times = grid(30_000, 0.01); // 30 000 samples × 241 signals > 5 000 000
    const e = await failure("analysis.simulate", { model, times, u: times.map(() => [0]) });
    expect(e.details.field).toBe("times");
    expect(e.message).toMatch(/too large a response/);
  });
});

describe("analysis.initial", () => {
  it("releases the oscillator ẍ = −4x from x = 1 as x = cos 2t, ẋ = −2 sin 2t", async () => {
    const model = { A: [[0, 1], [-4, 0]], B: [[0], [1]], C: [[1, 0]] };
    const times = grid(101, 0.05);
    const r = await call("analysis.initial", { model, x0: [1, 0], times });
    // Hand-worked: undamped oscillator with ω = 2 rad/s, released at rest from x = 1.
    let worst = 0;
    times.forEach((t, k) => {
      worst = Math.max(worst, Math.abs(r.states[0]![k]! - Math.cos(2 * t)), Math.abs(r.states[1]![k]! + 2 * Math.sin(2 * t)), Math.abs(r.outputs[0]![k]! - Math.cos(2 * t)));
    });
    expectAtMost(worst, 1e-12, "largest deviation from cos 2t / −2 sin 2t");
    expect(r.inputs[0]).toEqual(times.map(() => 0));
  });

  it("requires x0 with one entry per state", async () => {
    const e = await failure("analysis.initial", { model: LAG, times: [0, 1] });
    expect(e.details.field).toBe("x0");
    const n = await failure("analysis.initial", { model: LAG, times: [0, 1], x0: [Number.NaN] });
    expect([n.kind, n.details.field]).toEqual(["non-finite", "x0"]);
  });
});
