// The Responses panel's plot series carry the model's sample period, so a sampled loop is drawn
// as stairs (held input) and markers (outputs), and its CSV holds the sample values themselves.
import { describe, expect, it } from "vitest";
import type { PlantSpec, VariantResult, VariantSpec } from "../../../../shared-engine/api/contract";
import { responseCsv } from "../../../../renderer/plots/ResponsePlot";
import { responseModel } from "../../../../renderer/plots/responseModel";
import { createResponsesController, disturbanceStepFromResult, responseModelOf, responseSeriesOf, sampleTimeOf } from "../../../../renderer/state/workspace/responses";
import { inProcessBridge } from "./nonlinearTestSupport";

// x[k+1] = 0.5 x[k] + u[k], y = x, T = 0.5 s, K = [0.25]: closed loop x[k+1] = 0.25 x[k],
// u[k] = −0.25 x[k] (hand-worked).
const SAMPLED_PLANT: PlantSpec = { id: "d", model: { type: "state-space", A: [[0.5]], B: [[1]], C: [[1]], F: [[1]], sampleTime: 0.5, names: { states: ["x"], inputs: ["u"], outputs: ["y"], disturbances: ["w"] } } };
const VARIANT: VariantSpec = { id: "v", plant: "d", stateFeedback: { method: "poles", poles: [0.25] } };
const RESULT = { id: "v", name: "v", gain: { K: [[0.25]] }, checks: [], warnings: [] } as VariantResult;

describe("plot series of the Responses panel", () => {
  it("marks a sampled loop's response as sampled every T and draws its input as stairs, with exact sample values in the CSV", async () => {
    const rm = responseModelOf(SAMPLED_PLANT, VARIANT, RESULT, "closed-loop");
    const c = createResponsesController(inProcessBridge());
    await c.initial(rm, "closed-loop", [1], 2);
    const data = c.getState().data!;
    expect(data.sampleTime).toBe(0.5);
    expect(data.time).toEqual([0, 0.5, 1, 1.5, 2]);
    const series = responseSeriesOf(data, "v", 2, []);
    expect(series.sampled).toEqual({ period: 0.5 });
    expect(series.styleIndex).toBe(2);
    const m = responseModel({ series: [series], width: 600, top: 30, height: 400, left: 60, right: 20, gap: 20 });
    expect(m.control!.paths[0]!.drawing).toBe("stairs");
    expect(m.outputs.paths[0]!.markers!.count).toBe(5);
    const csv = responseCsv([series]);
    expect(csv.map((col) => col.quantity)).toEqual(["v sample time", "v y", "v u"]);
    // y[k] = 0.25^k, u[k] = −0.25·0.25^k (hand-worked), one value per sample.
    csv[1]!.values.forEach((v, k) => expect(Math.abs(v! - 0.25 ** k)).toBeLessThanOrEqual(1e-15));
    csv[2]!.values.forEach((v, k) => expect(Math.abs(v! + 0.25 * 0.25 ** k)).toBeLessThanOrEqual(1e-15));
    c.dispose();
  });

  it("leaves a continuous model's response unsampled", () => {
    const continuous: PlantSpec = { ...SAMPLED_PLANT, model: { ...SAMPLED_PLANT.model, A: [[-1]], sampleTime: null } as PlantSpec["model"] };
    const rm = responseModelOf(continuous, VARIANT, RESULT, "closed-loop");
    expect(rm.sampleTime).toBeNull();
    const series = responseSeriesOf({ kind: "initial", target: "closed-loop", title: "t", time: [0, 1], output: [[1, 0.5]], outputNames: ["y"], control: [], controlNames: [], sampleTime: null, metrics: null, notes: [] }, "v", 0, []);
    expect(series.sampled).toBeNull();
    expect(series.control).toBeUndefined();
  });

  it("takes the period of a design run's disturbance step from the run's sampled loop", () => {
    const result = {
      ...RESULT,
      discrete: { sampleTime: 1 },
      disturbanceStep: { loop: "closed-loop", disturbance: "w", size: 1, time: [0, 1, 2], output: [[0, 1, 0.5]], outputNames: ["y"], control: [[0, -0.25, -0.1]], peakDeviation: 1, peakTime: 1, steadyStateValue: 0, settlingTime: null, status: "settled" },
    } as unknown as VariantResult;
    expect(sampleTimeOf(result)).toBe(1);
    expect(sampleTimeOf(RESULT)).toBeNull();
    expect(disturbanceStepFromResult(result, ["u"])!.sampleTime).toBe(1);
  });
});
