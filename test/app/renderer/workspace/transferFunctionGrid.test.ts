import { describe, expect, it } from "vitest";
import {
  resizeTransferFunction,
  transferFunctionEntry,
  transferFunctionSize,
  withTransferFunctionEntry,
  type TransferFunctionModelSpec,
} from "../../../../renderer/state/workspace/transferFunctionGrid";
import { buildPlantModel, loadProjectValue } from "../../../../shared-engine/project";
import { dcGain } from "../../../../shared-engine/analysis/dcGain";
import { expectMatrixClose } from "../../../helpers/assertions";

const siso: TransferFunctionModelSpec = { type: "transfer-function", numerator: [2], denominator: [1, 3], sampleTime: null, names: { inputs: ["valve"], outputs: ["flow"] } };

describe("transfer-function grid of the plant editor", () => {
  it("grows a SISO plant to 2×2, keeping its entry and adding 0/1 pairs and default names", () => {
    const grown = resizeTransferFunction(siso, 2, 2);
    expect(transferFunctionSize(grown)).toEqual({ outputs: 2, inputs: 2 });
    expect(transferFunctionEntry(grown, 0, 0)).toEqual({ numerator: [2], denominator: [1, 3] });
    expect(transferFunctionEntry(grown, 1, 0)).toEqual({ numerator: [0], denominator: [1] });
    expect(grown.names).toEqual({ inputs: ["valve", "u2"], outputs: ["flow", "y2"] });
    expect(siso.numerator).toEqual([2]); // the argument is not changed
  });

  it("shrinks back to the SISO form and rejects sizes outside 1…8", () => {
    const back = resizeTransferFunction(resizeTransferFunction(siso, 3, 2), 1, 1);
    expect(back).toEqual(siso);
    expect(() => resizeTransferFunction(siso, 0, 1)).toThrow(/outputs must be a whole number from 1 to 8/);
    expect(() => resizeTransferFunction(siso, 1, 9)).toThrow(/inputs must be a whole number from 1 to 8/);
    expect(() => withTransferFunctionEntry(siso, 1, 0, "numerator", [1])).toThrow(/no transfer function from input 1 to output 2/);
  });

  it("builds a 2×2 plant whose DC gain is num(0)/den(0) entry by entry", () => {
    // G = [[2/(s+3), 1/(s+1)], [0, (s+4)/(s²+3s+2)]]: hand-derived G(0) = [[2/3, 1], [0, 2]].
    let model = resizeTransferFunction(siso, 2, 2);
    model = withTransferFunctionEntry(model, 0, 1, "denominator", [1, 1]);
    model = withTransferFunctionEntry(model, 0, 1, "numerator", [1]);
    model = withTransferFunctionEntry(model, 1, 1, "numerator", [1, 4]);
    model = withTransferFunctionEntry(model, 1, 1, "denominator", [1, 3, 2]);
    const project = { format: "loopwright-project", version: 1, name: "tf grid (test)", plants: [{ id: "p", model }], variants: [] };
    const loaded = loadProjectValue(project); // the grid's output passes the project-file validation
    const plant = buildPlantModel(loaded.project.plants[0]!.model as never, "plants[0].model");
    expect(plant.B.columns).toBe(2);
    expect(plant.C.rows).toBe(2);
    const g = dcGain(plant);
    expect(g.gain).not.toBeNull();
    expectMatrixClose(g.gain!, [[2 / 3, 1], [0, 2]], 1e-12, "G(0)");
  });
});
