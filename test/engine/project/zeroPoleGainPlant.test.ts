// Zero-pole-gain plants of several inputs and outputs in a project file: validation with paths
// naming the entry, realization through the pipeline, and signal names of transfer-function and
// zero-pole-gain plants carried into the design result.
import { describe, expect, it } from "vitest";
import { EngineError } from "../../../shared-engine/errors";
import { buildPlantModel, evaluateVariant, loadProjectValue, validateProject, type ProjectFile } from "../../../shared-engine/project";
import { dcGain } from "../../../shared-engine/analysis/dcGain";
import { expectMatrixClose } from "../../helpers/assertions";

type Json = Record<string, unknown>;

/** G = [[2/(s+1), 1.5(s+3)/(s²+2s+5)], [0.5(s²+s+1.25)/((s+2)(s+4)(s+1)), −0.8]]. */
const zpkModel = (): Json => ({
  type: "zero-pole-gain",
  zeros: [[[], [-3]], [[{ re: -0.5, im: 1 }, { re: -0.5, im: -1 }], []]],
  poles: [[[-1], [{ re: -1, im: 2 }, { re: -1, im: -2 }]], [[-2, -4, -1], []]],
  gain: [[2, 1.5], [0.5, -0.8]],
  sampleTime: null,
  names: { inputs: ["heater", "fan"], outputs: ["temperature", "humidity"] },
  units: { inputs: ["W", "%"], outputs: ["°C", "%RH"] },
});

const project = (model: Json): Json => ({
  format: "loopwright-project",
  version: 1,
  name: "zpk grid (test)",
  plants: [{ id: "room", model }],
  variants: [{ id: "lqr", plant: "room", stateFeedback: { method: "lqr", Q: Array.from({ length: 6 }, (_, i) => Array.from({ length: 6 }, (_, j) => (i === j ? 1 : 0))), R: [[1, 0], [0, 1]] }, step: { times: [0, 0.5, 1, 2, 5] } }],
});

const evaluate = (p: ProjectFile) => evaluateVariant(p.plants[0]!, p.variants[0]!);

function problemsOf(model: Json): { path: string; message: string }[] {
  try {
    validateProject(project(model));
  } catch (error) {
    expect(error).toBeInstanceOf(EngineError);
    expect((error as EngineError).kind).toBe("validation");
    return (error as EngineError).details.problems as { path: string; message: string }[];
  }
  return [];
}

function withChange(change: (m: Json) => void): Json {
  const m = zpkModel();
  change(m);
  return m;
}

describe("zero-pole-gain plants with several inputs and outputs", () => {
  it("validate, build with the hand-derived DC gain, and keep their names in the design result", () => {
    const loaded = loadProjectValue(project(zpkModel()));
    const model = buildPlantModel(loaded.project.plants[0]!.model, "plants[0].model");
    // Hand-derived: G11(0) = 2, G12(0) = 1.5·3/5 = 0.9, G21(0) = 0.5·1.25/8 = 0.078125, G22 = −0.8.
    expectMatrixClose(dcGain(model).gain!, [[2, 0.9], [0.078125, -0.8]], 1e-14, "G(0)");
    expect(model.names.inputs).toEqual(["heater", "fan"]);
    expect(model.units.outputs).toEqual(["°C", "%RH"]);
    const result = evaluate(loaded.project as ProjectFile);
    expect(result.error).toBeFalsy();
    expect(result.plant!.dimensions).toMatchObject({ states: 6, inputs: 2, outputs: 2 });
    expect(result.plant!.names.outputs).toEqual(["temperature", "humidity"]);
    expect(result.plant!.names.inputs).toEqual(["heater", "fan"]);
  });

  it.each([
    ["a missing entry", (m: Json) => { (m.poles as unknown[][][])[1]!.pop(); }, "room", "plants[0].model.poles[1][1]", /is missing: every \(output, input\) pair needs its list of poles/],
    ["a ragged gain grid", (m: Json) => { (m.gain as number[][])[1] = [0.5]; }, "", "plants[0].model.gain[1]", /has 1 entries but row 0 has 2/],
    ["a row of zeros too many", (m: Json) => { (m.zeros as unknown[][][]).push([[], []]); }, "", "plants[0].model.zeros", /has 3 rows but gain has 2/],
    ["an extra entry in a row", (m: Json) => { (m.zeros as unknown[][][])[0]!.push([]); }, "", "plants[0].model.zeros[0]", /has 3 entries but gain row 0 has 2/],
    ["a complex zero without its conjugate", (m: Json) => { (m.zeros as unknown[][][])[1]![0] = [{ re: -0.5, im: 1 }, -2]; }, "", "plants[0].model.zeros[1][0][0]", /-0\.5\+1j has no conjugate partner -0\.5-1j in this list; complex zeros must come in conjugate pairs/],
    ["a lone lower-half pole", (m: Json) => { (m.poles as unknown[][][])[0]![1] = [{ re: -1, im: -2 }, -3]; }, "", "plants[0].model.poles[0][1][0]", /-1-2j has no conjugate partner -1\+2j/],
    ["a non-finite gain", (m: Json) => { (m.gain as number[][])[1]![0] = Number.POSITIVE_INFINITY; }, "", "plants[0].model.gain[1][0]", /must be a finite number, is number Infinity/],
    ["an improper entry", (m: Json) => { (m.zeros as unknown[][][])[0]![0] = [-1, -2]; }, "", "plants[0].model.zeros[0][0]", /improper entry \(output 1, input 1\): 2 zeros but only 1 poles/],
    ["a single gain beside grids of zeros and poles", (m: Json) => { m.gain = 2; }, "", "plants[0].model.gain", /must be one gain per \(output, input\) pair, a list of rows/],
    ["three output names for two outputs", (m: Json) => { (m.names as Json).outputs = ["a", "b", "c"]; }, "", "plants[0].model.names.outputs", /has 3 entries; the model has 2 outputs/],
  ])("reports %s with its path", (_what, change, _unused, path, message) => {
    const problems = problemsOf(withChange(change));
    const found = problems.find((p) => p.path === path);
    expect(found, `problems: ${JSON.stringify(problems)}`).toBeDefined();
    expect(found!.message).toMatch(message);
  });

  it("applies the conjugate-pair rule to the single-entry form too", () => {
    const problems = problemsOf({ type: "zero-pole-gain", zeros: [], poles: [{ re: -1, im: 1 }, -2], gain: 1, sampleTime: null });
    expect(problems.filter((p) => p.path.startsWith("plants"))).toEqual([{ path: "plants[0].model.poles[0]", message: "-1+1j has no conjugate partner -1-1j in this list; complex poles must come in conjugate pairs" }]);
  });

  it("carries the names of a transfer-function plant into the design result", () => {
    const tf = {
      type: "transfer-function",
      numerator: [[[2], [1]], [[0], [1, 4]]],
      denominator: [[[1, 3], [1, 1]], [[1], [1, 3, 2]]],
      sampleTime: null,
      names: { inputs: ["valve", "pump"], outputs: ["flow", "level"] },
      units: { inputs: ["%", "rpm"], outputs: ["l/s", "m"] },
    };
    const p = project(tf);
    (p.variants as Json[])[0]!.stateFeedback = { method: "poles", poles: [-1, -2, -3, -4] };
    const loaded = loadProjectValue(p);
    const result = evaluate(loaded.project as ProjectFile);
    expect(result.error).toBeFalsy();
    expect(result.plant!.names.inputs).toEqual(["valve", "pump"]);
    expect(result.plant!.names.outputs).toEqual(["flow", "level"]);
    expect(result.step!.outputNames ?? result.plant!.names.outputs).toEqual(["flow", "level"]);
  });
});
