// The Responses panel's state: the closed-loop model built from a design result, the requests
// it sends (disturbance step, initial offsets, input sequence), hand-worked answers through the
// in-process dispatcher, latest-wins, and a pasted sequence on the demo's sampled design.
import { describe, expect, it } from "vitest";
import type { PlantSpec, VariantResult, VariantSpec } from "../../../../shared-engine/api/contract";
import { parseInputSequence } from "../../../../renderer/state/workspace/inputSequence";
import {
  createResponsesController,
  disturbanceStepFromResult,
  disturbanceStepRequest,
  initialRequest,
  inputLimitsOf,
  responseModelOf,
  responseTimes,
  sequenceRequest,
} from "../../../../renderer/state/workspace/responses";
import { activeVariantOf } from "../../../../renderer/state/workspace";
import { expectAtMost, expectMatrixClose } from "../../../helpers/assertions";
import { inProcessBridge, openDemoStore } from "./nonlinearTestSupport";

// ẋ = −x + u + w, y = x, with K = [1]: closed loop ẋ = −2x + r + w (hand-worked).
const LAG_PLANT: PlantSpec = { id: "lag", model: { type: "state-space", A: [[-1]], B: [[1]], C: [[1]], F: [[1]], sampleTime: null, names: { states: ["x"], inputs: ["u"], outputs: ["y"], disturbances: ["w"] } } };
const VARIANT: VariantSpec = { id: "v", plant: "lag", stateFeedback: { method: "poles", poles: [-2] } };
const RESULT = { id: "v", name: "v", gain: { K: [[1]] }, checks: [], warnings: [] } as VariantResult;

function sequence(text: string, inputs: number, sampleTime: number | null) {
  const r = parseInputSequence(text, { inputs, sampleTime });
  if (!r.ok) throw new Error(r.error.message);
  return r.sequence;
}

describe("response models and requests", () => {
  it("closes the loop as A − BK with the control input appended as an output", () => {
    const rm = responseModelOf(LAG_PLANT, VARIANT, RESULT, "closed-loop");
    expectMatrixClose(rm.model.A, [[-2]], 0, "A − BK");
    expectMatrixClose(rm.model.C, [[1], [-1]], 0, "[C − DK; −K]");
    expectMatrixClose(rm.model.D!, [[0], [1]], 0, "[DN; N]");
    expectMatrixClose(rm.model.E!, [[0], [0]], 0, "[E; 0]");
    expect(rm.plantOutputs).toBe(1);
    expect(rm.model.names?.inputs).toEqual(["r_u"]);
  });

  it("uses the plant alone for the open-loop target and asks for K before closing the loop", () => {
    const rm = responseModelOf(LAG_PLANT, VARIANT, null, "plant");
    expectMatrixClose(rm.model.A, [[-1]], 0, "A");
    expect(() => responseModelOf(LAG_PLANT, VARIANT, null, "closed-loop")).toThrow(/needs the design's state-feedback gain K/);
    expect(() => responseModelOf(undefined, VARIANT, null, "plant")).toThrow(/state-space form/);
  });

  it("notes that integrators and observers are left out of the loop", () => {
    const rm = responseModelOf(LAG_PLANT, { ...VARIANT, integralAction: { outputs: [0] }, observer: { method: "poles", poles: [-5] } }, RESULT, "closed-loop");
    expect(rm.notes.join(" ")).toMatch(/integrators of this design are left out.*observer of this design is left out/);
  });

  it("builds time grids of 501 points (continuous) or every sample instant (sampled)", () => {
    const t = responseTimes(5, null);
    expect([t.length, t[0], t.at(-1)]).toEqual([501, 0, 5]);
    expect(responseTimes(1, 0.25)).toEqual([0, 0.25, 0.5, 0.75, 1]);
    expect(() => responseTimes(0, null)).toThrow(/positive/);
  });

  it("builds a disturbance step request from the disturbance channel and refuses a plant without one", () => {
    const rm = responseModelOf(LAG_PLANT, VARIANT, RESULT, "closed-loop");
    const p = disturbanceStepRequest(rm, 0, 4);
    expect([p.from, p.input, p.times?.length]).toEqual(["disturbance", 0, 501]);
    const bare = responseModelOf({ ...LAG_PLANT, model: { ...LAG_PLANT.model, F: undefined, names: undefined } as PlantSpec["model"] }, VARIANT, RESULT, "closed-loop");
    expect(() => disturbanceStepRequest(bare, 0, 4)).toThrow(/no disturbance inputs/);
  });

  it("refuses initial offsets that are all zero, not finite, or one per state short", () => {
    const rm = responseModelOf(LAG_PLANT, VARIANT, RESULT, "closed-loop");
    expect(initialRequest(rm, [2], 1).x0).toEqual([2]);
    expect(() => initialRequest(rm, [0], 1)).toThrow(/stay at rest/);
    expect(() => initialRequest(rm, [Number.NaN], 1)).toThrow(/offset of x is not a finite number/);
    expect(() => initialRequest(rm, [1, 2], 1)).toThrow(/1 expected, 2 given/);
  });

  it("sends the parsed sequence as u[k][j] with its own times", () => {
    const rm = responseModelOf(LAG_PLANT, VARIANT, RESULT, "closed-loop");
    const p = sequenceRequest(rm, sequence("t,r\n0,1\n0.5,2\n2,0", 1, null));
    expect(p.times).toEqual([0, 0.5, 2]);
    expect(p.u).toEqual([[1], [2], [0]]);
  });

  it("reads input limits of an equation-based plant as deviations from the operating point", () => {
    const plant = { id: "p", model: { type: "nonlinear", inputs: [{ name: "u", min: -2, max: 3 }] } } as unknown as PlantSpec;
    const result = { ...RESULT, plant: { operatingPoint: { inputs: { u: 1 } } } } as unknown as VariantResult;
    expect(inputLimitsOf(plant, result)).toEqual([{ lower: -3, upper: 2 }]);
    expect(inputLimitsOf(plant, null)).toEqual([]); // no operating point yet: no limits on the wrong scale
    expect(inputLimitsOf(LAG_PLANT, RESULT)).toEqual([]);
  });
});

describe("responses controller with the in-process dispatcher", () => {
  const rm = responseModelOf(LAG_PLANT, VARIANT, RESULT, "closed-loop");

  it("releases the closed loop from x = 1 as y = e^(−2t), u = −e^(−2t)", async () => {
    const c = createResponsesController(inProcessBridge());
    await c.initial(rm, "closed-loop", [1], 2);
    const d = c.getState().data!;
    expect(d.kind).toBe("initial");
    let worst = 0;
    d.time.forEach((t, k) => (worst = Math.max(worst, Math.abs(d.output[0]![k]! - Math.exp(-2 * t)), Math.abs(d.control[0]![k]! + Math.exp(-2 * t)))));
    expectAtMost(worst, 1e-12, "deviation from e^(−2t)"); // hand-worked: ẋ = −2x
    expect(d.controlNames).toEqual(["u"]);
  });

  it("simulates a pasted unit step on the reference as y = (1 − e^(−2t))/2", async () => {
    const c = createResponsesController(inProcessBridge());
    const times = Array.from({ length: 41 }, (_, k) => k * 0.05);
    await c.sequence(rm, "closed-loop", sequence(["time,r_u", ...times.map((t) => `${t},1`)].join("\n"), 1, null));
    const d = c.getState().data!;
    let worst = 0;
    d.time.forEach((t, k) => (worst = Math.max(worst, Math.abs(d.output[0]![k]! - (1 - Math.exp(-2 * t)) / 2))));
    expectAtMost(worst, 1e-12, "deviation from (1 − e^(−2t))/2"); // hand-worked: ẋ = −2x + 1
    expect(d.title).toMatch(/Input sequence \(closed loop, 41 samples\)/);
  });

  it("computes the disturbance step on demand with its metrics", async () => {
    const c = createResponsesController(inProcessBridge());
    await c.disturbanceStep(rm, "closed-loop", 0, 4);
    const d = c.getState().data!;
    // Hand-worked: ẋ = −2x + w ⇒ y → 1/2.
    expect(d.output[0]!.at(-1)).toBeCloseTo(0.5 * (1 - Math.exp(-8)), 12);
    expect(d.metrics!.peak).toBeCloseTo(0.5 * (1 - Math.exp(-8)), 12);
  });

  it("shows only the latest of two overlapping requests and counts the dropped one", async () => {
    const c = createResponsesController(inProcessBridge(5));
    const first = c.sequence(rm, "closed-loop", sequence("0,1\n1,1", 1, null));
    const second = c.initial(rm, "closed-loop", [1], 1);
    await Promise.all([first, second]);
    expect(c.getState().data!.kind).toBe("initial");
    expect(c.getState().discarded).toBe(1);
  });

  it("reports a request the engine refuses in words, without clearing the last response", async () => {
    const c = createResponsesController(inProcessBridge());
    await c.initial(rm, "closed-loop", [1], 1);
    await c.initial(rm, "closed-loop", [0], 1);
    expect(c.getState().status).toBe("failed");
    expect(c.getState().error).toMatch(/stay at rest/);
    expect(c.getState().data!.kind).toBe("initial");
  });
});

describe("on the demo project (headless store)", () => {
  it("simulates a pasted CSV on the sampled baseline design, matching two steps of the discrete closed loop (with its accumulator) by hand", async () => {
    const bridge = inProcessBridge();
    const store = await openDemoStore(bridge, "lqr-integral-1s");
    const state = store.getState();
    const variant = activeVariantOf(state)!;
    const result = state.evaluation.result!;
    const plant = state.document!.plants.find((p) => p.id === variant.plant);
    const rm = responseModelOf(plant, variant, result, "closed-loop");
    const T = result.discrete!.sampleTime;
    expect(rm.sampleTime).toBe(T);
    const text = ["time;r", ...Array.from({ length: 6 }, (_, k) => `${k * T};${k < 3 ? 2 : 0}`)].join("\n");
    const c = createResponsesController(bridge);
    await c.sequence(rm, "closed-loop", sequence(text, 1, T));
    const d = c.getState().data!;
    expect(d.time).toHaveLength(6);
    // Two steps by hand from rest with r = 2 (the loop now includes the design's accumulator
    // xi[k+1] = xi[k] + T(r − y), u = −Kx x − Ki xi, D = 0 in the queue model):
    // y[1] = 0 (u[0] = 0), xi[1] = 2T, u[1] = −Ki·2T, x[2] = B·u[1], y[2] = C·x[2].
    const { B, C } = result.discrete!;
    const Ki = result.gain!.Ki![0]![0]!;
    const u1 = -Ki * 2 * T;
    const x2 = B.map((row) => row[0]! * u1);
    const y2 = C[0]!.reduce((s, c, i) => s + c * x2[i]!, 0);
    expect(d.output[0]![0]).toBe(0);
    expect(Math.abs(d.output[0]![1]!)).toBeLessThanOrEqual(1e-12);
    expect(Math.abs(d.output[0]![2]! - y2)).toBeLessThanOrEqual(1e-12 * Math.max(1, Math.abs(y2)));
    expect(rm.notes.join(" ")).toMatch(/includes the design's integrators/);
    store.dispose();
  }, 30_000);

  it("turns the design run's disturbance step into a shown response", () => {
    const result = {
      ...RESULT,
      disturbanceStep: { loop: "closed-loop", disturbance: "w", size: 2, time: [0, 1], output: [[0, 0.4]], outputNames: ["y"], control: [[0, -0.4]], peakDeviation: 0.4, peakTime: 1, steadyStateValue: 1, settlingTime: null, status: "not-settled-within-horizon" },
    } as VariantResult;
    const d = disturbanceStepFromResult(result, ["u"])!;
    expect(d.title).toMatch(/Disturbance step on w of size 2 \(closed loop, from the design run\)/);
    expect(d.notes).toEqual(["The response has not settled within the horizon."]);
    expect(d.controlNames).toEqual(["u"]);
  });
});
