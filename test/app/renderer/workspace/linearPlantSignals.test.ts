// Signal names and units of transfer-function plants in the workspace: renamed and given units
// as state-space signals are, stored in the model's names/units, and carried into the result.
import { describe, expect, it } from "vitest";
import type { ProjectFile } from "../../../../shared-engine/api/contract";
import { renameSignal, renameSignalCommand, setUnitCommand } from "../../../../renderer/state/workspace";
import { idle, openWorkspace, settle } from "./entryGridTestSupport";

/** G = [[2/(s+3), 1/(s+1)], [0, (s+4)/(s²+3s+2)]]: 1 + 3 = 4 states in the realization. */
const TF_DOCUMENT: ProjectFile = {
  format: "loopwright-project",
  version: 1,
  name: "Two-tank transfer functions (invented, test)",
  plants: [{
    id: "tanks",
    model: { type: "transfer-function", numerator: [[[2], [1]], [[0], [1, 4]]], denominator: [[[1, 3], [1, 1]], [[1], [1, 3, 2]]], sampleTime: null },
  }],
  variants: [{ id: "placed", plant: "tanks", stateFeedback: { method: "poles", poles: [-1, -2, -3, -4] }, integralAction: { outputs: ["y1"], poles: [-5] }, step: { times: [0, 1, 2, 5] } }],
};

describe("signal names of a transfer-function plant in the workspace", () => {
  it("renames an output and an input, gives units, and the design result, integral action and saved document follow", async () => {
    const { store, documents, close } = await openWorkspace(TF_DOCUMENT);
    try {
      expect(store.getState().evaluation.result!.plant!.names.outputs).toEqual(["y1", "y2"]);
      expect(renameSignalCommand(store, "tanks", "outputs", 0, " flow ")).toBe(true);
      expect(renameSignalCommand(store, "tanks", "inputs", 1, "pump")).toBe(true);
      setUnitCommand(store, "tanks", "outputs", 0, "l/s");
      setUnitCommand(store, "tanks", "inputs", 1, "rpm");
      const doc = store.getState().document!;
      const model = doc.plants[0]!.model as { names: unknown; units: unknown; numerator: unknown };
      expect(model.names).toEqual({ inputs: ["u1", "pump"], outputs: ["flow", "y2"] });
      expect(model.units).toEqual({ outputs: ["l/s", ""], inputs: ["", "rpm"] });
      expect(model.numerator).toEqual(TF_DOCUMENT.plants[0]!.model.type === "transfer-function" && TF_DOCUMENT.plants[0]!.model.numerator);
      expect(doc.variants[0]!.integralAction!.outputs).toEqual(["flow"]);

      await settle(store, (s) => idle(s) && s.evaluation.result?.plant?.names.outputs[0] === "flow");
      const result = store.getState().evaluation.result!;
      expect(result.error).toBeFalsy();
      expect(result.plant!.names.inputs).toEqual(["u1", "pump"]);
      expect(result.step!.outputNames).toEqual(["flow", "y2"]);
      const saved = await documents.load("p1");
      expect((saved.document.plants[0]!.model as { names: unknown }).names).toEqual({ inputs: ["u1", "pump"], outputs: ["flow", "y2"] });

      // Undo takes the edits back one by one: the input's unit, the output's unit, then the names.
      store.undo();
      expect((store.getState().document!.plants[0]!.model as { units: unknown }).units).toEqual({ outputs: ["l/s", ""] });
      store.undo();
      store.undo();
      expect((store.getState().document!.plants[0]!.model as { names: unknown }).names).toEqual({ inputs: ["u1", "u2"], outputs: ["flow", "y2"] });
      store.undo();
      expect(store.getState().document).toEqual(TF_DOCUMENT);
    } finally {
      close();
    }
  });

  it("refuses a duplicate or empty name with the reason, keeps the typed text, and changes nothing", async () => {
    const { store, close } = await openWorkspace(TF_DOCUMENT);
    try {
      renameSignalCommand(store, "tanks", "outputs", 0, "flow");
      const before = store.getState().document;
      expect(renameSignalCommand(store, "tanks", "outputs", 1, "flow")).toBe(false);
      expect(store.getState().drafts["tanks:name:outputs:1"]).toEqual({ text: "flow", error: "Another output is already named “flow”." });
      expect(renameSignalCommand(store, "tanks", "inputs", 0, "   ")).toBe(false);
      expect(store.getState().drafts["tanks:name:inputs:0"]).toEqual({ text: "   ", error: "A signal name cannot be empty." });
      expect(renameSignalCommand(store, "tanks", "inputs", 0, "2nd")).toBe(false);
      expect(store.getState().drafts["tanks:name:inputs:0"]!.error).toMatch(/not a usable name/);
      expect(store.getState().document).toBe(before);
      // A good name clears the draft.
      expect(renameSignalCommand(store, "tanks", "inputs", 0, "valve")).toBe(true);
      expect(store.getState().drafts["tanks:name:inputs:0"]).toBeUndefined();
    } finally {
      close();
    }
  });

  it("names only inputs and outputs of a transfer-function plant (its states belong to the realization)", () => {
    expect(() => renameSignal(TF_DOCUMENT, "tanks", "states", 0, "level")).toThrow(/names only its inputs and outputs/);
  });
});
