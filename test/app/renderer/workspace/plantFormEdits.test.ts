// Resizing a transfer-function or zero-pole-gain grid and switching the model form: the plant's
// variants follow (weights sized by inputs and outputs, references to removed outputs pruned and
// named in the undo label), and a form switch keeps the input and output names when the counts
// match. Every expected document below is written out by hand from the rules in
// renderer/state/workspace/variantSignals.ts and plantFormEdits.ts.
import { describe, expect, it } from "vitest";
import type { ProjectFile } from "../../../../shared-engine/api/contract";
import { openDocumentOnlyStore } from "./documentOnlyStore";
import { resizeEntryGrid, resizeEntryGridPlant, switchModelForm, switchModelFormCommand } from "../../../../renderer/state/workspace";

/** 2 × 2 transfer functions (invented, test): outputs flow and level, inputs u1 and pump. */
const TF_DOCUMENT: ProjectFile = {
  format: "loopwright-project",
  version: 1,
  name: "Two tanks (invented, test)",
  plants: [{
    id: "tanks",
    model: {
      type: "transfer-function",
      numerator: [[[2], [1]], [[0], [1, 4]]],
      denominator: [[[1, 3], [1, 1]], [[1], [1, 3, 2]]],
      sampleTime: null,
      names: { inputs: ["u1", "pump"], outputs: ["flow", "level"] },
      units: { outputs: ["l/s", "m"] },
    },
  }],
  variants: [
    {
      id: "lqr",
      plant: "tanks",
      stateFeedback: { method: "lqr", Q: [[1, 0, 0, 0], [0, 1, 0, 0], [0, 0, 1, 0], [0, 0, 0, 1]], R: [[1, 0], [0, 4]] },
      integralAction: { outputs: ["flow", "level"], weights: [2, 3] },
      referenceFeedforward: true,
      observer: { method: "kalman", processNoise: [[1, 0], [0, 2]], measurementNoise: [[5, 0], [0, 6]] },
      margins: { at: "plant-input" },
    },
    { id: "by-index", plant: "tanks", stateFeedback: { method: "poles", poles: [-1, -2, -3, -4] }, integralAction: { outputs: [1], poles: [-5] } },
  ],
};

describe("resizing an entry grid refits the plant's variants", () => {
  it("dropping an output prunes integral action on it (by name and by index) and reference feedforward, and sizes the noise to the outputs", () => {
    const { document, pruned } = resizeEntryGridPlant(TF_DOCUMENT, "tanks", 1, 2);
    expect(document.plants[0]!.model).toEqual({
      type: "transfer-function",
      numerator: [[[2], [1]]],
      denominator: [[[1, 3], [1, 1]]],
      sampleTime: null,
      names: { inputs: ["u1", "pump"], outputs: ["flow"] },
      units: { outputs: ["l/s"] },
    });
    expect(document.variants).toEqual([
      {
        id: "lqr",
        plant: "tanks",
        // Q follows the realization's states, which only the engine knows: left as it was.
        stateFeedback: { method: "lqr", Q: [[1, 0, 0, 0], [0, 1, 0, 0], [0, 0, 1, 0], [0, 0, 0, 1]], R: [[1, 0], [0, 4]] },
        integralAction: { outputs: ["flow"], weights: [2] },
        observer: { method: "kalman", processNoise: [[1, 0], [0, 2]], measurementNoise: [[5]] },
        margins: { at: "plant-input" },
      },
      { id: "by-index", plant: "tanks", stateFeedback: { method: "poles", poles: [-1, -2, -3, -4] } },
    ]);
    expect(pruned).toEqual([
      "integral action on level from variant lqr",
      "reference feedforward (it needs as many outputs as inputs) from variant lqr",
      "integral action on output 2 from variant by-index",
    ]);
    expect(TF_DOCUMENT.variants[0]!.integralAction!.outputs).toEqual(["flow", "level"]); // the input is not changed
  });

  it("dropping an input keeps one integrated output per input and shrinks R and the process noise", () => {
    const { document, pruned } = resizeEntryGridPlant(TF_DOCUMENT, "tanks", 2, 1);
    expect(document.variants[0]).toEqual({
      id: "lqr",
      plant: "tanks",
      stateFeedback: { method: "lqr", Q: [[1, 0, 0, 0], [0, 1, 0, 0], [0, 0, 1, 0], [0, 0, 0, 1]], R: [[1]] },
      integralAction: { outputs: ["flow"], weights: [2] },
      observer: { method: "kalman", processNoise: [[1]], measurementNoise: [[5, 0], [0, 6]] },
      margins: { at: "plant-input" },
    });
    expect(document.variants[1]!.integralAction).toEqual({ outputs: [1], poles: [-5] });
    expect(pruned).toEqual(["integral action on level from variant lqr", "reference feedforward (it needs as many outputs as inputs) from variant lqr"]);
  });

  it("growing a 1 × 1 zero-pole-gain plant removes unity-feedback margins and gives new inputs identity weights", () => {
    const doc: ProjectFile = {
      ...TF_DOCUMENT,
      plants: [{ id: "room", model: { type: "zero-pole-gain", zeros: [], poles: [-1], gain: 2, sampleTime: null } }],
      variants: [{ id: "siso", plant: "room", stateFeedback: { method: "lqr", Q: [[1]], R: [[3]], N: [[0.5]] }, margins: { feedback: "unity-negative" }, integralAction: { outputs: ["y1"], weights: [1] } }],
    };
    const { document, pruned } = resizeEntryGridPlant(doc, "room", 1, 2);
    expect(document.plants[0]!.model).toEqual({ type: "zero-pole-gain", zeros: [[[], []]], poles: [[[-1], []]], gain: [[2, 0]], sampleTime: null });
    expect(document.variants).toEqual([{ id: "siso", plant: "room", stateFeedback: { method: "lqr", Q: [[1]], R: [[3, 0], [0, 1]], N: [[0.5, 0]] }, integralAction: { outputs: ["y1"], weights: [1] } }]);
    expect(pruned).toEqual(["the unity-feedback margins (they need one input and one output) from variant siso"]);
  });

  it("names what was pruned in the undo label and the save message, and Undo brings it back", async () => {
    const store = await openDocumentOnlyStore(TF_DOCUMENT);
    try {
      expect(resizeEntryGrid(store, "tanks", 1, 2)).toBe(true);
      const label =
        "changed plant tanks to 1 output and 2 inputs; removed integral action on level from variant lqr, reference feedforward (it needs as many outputs as inputs) from variant lqr, integral action on output 2 from variant by-index";
      expect(store.getState().undoLabel).toBe(label);
      expect(store.getState().document!.variants[1]!.integralAction).toBeUndefined();
      await store.flushSave();
      expect(store.getState().save.lastMessage).toBe(label);
      store.undo();
      expect(store.getState().document).toEqual(TF_DOCUMENT);
      // Nothing pruned: the label is the plain one.
      expect(resizeEntryGrid(store, "tanks", 2, 2)).toBe(true);
      expect(store.getState().undoLabel).toBe("changed plant tanks to 2 outputs and 2 inputs");
      // A refused size changes nothing and says why.
      expect(resizeEntryGrid(store, "tanks", 9, 2)).toBe(false);
      expect(store.getState().editError).toMatch(/outputs must be a whole number from 1 to 8/);
    } finally {
      store.dispose();
    }
  });
});

describe("switching the model form", () => {
  const SISO: ProjectFile = {
    ...TF_DOCUMENT,
    plants: [{ id: "room", model: { type: "transfer-function", numerator: [2], denominator: [1, 1], sampleTime: null, names: { inputs: ["heater"], outputs: ["temperature"] }, units: { inputs: ["W"], outputs: ["degC"] } } }],
    variants: [{ id: "lqr", plant: "room", stateFeedback: { method: "lqr", Q: [[1]], R: [[1]] }, integralAction: { outputs: ["temperature"], weights: [1] } }],
  };

  it("keeps the input and output names and units when the new form has as many inputs and outputs", () => {
    const { document, pruned } = switchModelForm(SISO, "room", { type: "zero-pole-gain", zeros: [], poles: [-1], gain: 1, sampleTime: null });
    expect(document.plants[0]!.model).toEqual({
      type: "zero-pole-gain", zeros: [], poles: [-1], gain: 1, sampleTime: null,
      names: { inputs: ["heater"], outputs: ["temperature"] },
      units: { inputs: ["W"], outputs: ["degC"] },
    });
    expect(document.variants).toEqual(SISO.variants);
    expect(pruned).toEqual([]);
    const toStateSpace = switchModelForm(SISO, "room", { type: "state-space", A: [[-1]], B: [[1]], C: [[1]], D: [[0]], sampleTime: null });
    expect(toStateSpace.document.plants[0]!.model).toEqual({
      type: "state-space", A: [[-1]], B: [[1]], C: [[1]], D: [[0]], sampleTime: null,
      names: { inputs: ["heater"], outputs: ["temperature"] },
      units: { inputs: ["W"], outputs: ["degC"] },
    });
  });

  it("starts with default names when the counts differ, pruning integral action on the outputs that lost their names", () => {
    const { document, pruned } = switchModelForm(TF_DOCUMENT, "tanks", { type: "state-space", A: [[-1]], B: [[1]], C: [[1]], D: [[0]], sampleTime: null });
    expect(document.plants[0]!.model).toEqual({ type: "state-space", A: [[-1]], B: [[1]], C: [[1]], D: [[0]], sampleTime: null });
    expect(document.variants).toEqual([
      {
        id: "lqr",
        plant: "tanks",
        stateFeedback: { method: "lqr", Q: [[1, 0, 0, 0], [0, 1, 0, 0], [0, 0, 1, 0], [0, 0, 0, 1]], R: [[1]] },
        observer: { method: "kalman", processNoise: [[1]], measurementNoise: [[5]] },
        referenceFeedforward: true,
        margins: { at: "plant-input" },
      },
      { id: "by-index", plant: "tanks", stateFeedback: { method: "poles", poles: [-1, -2, -3, -4] } },
    ]);
    expect(pruned).toEqual(["integral action on flow, level from variant lqr", "integral action on output 2 from variant by-index"]);
  });

  it("carries the names of an equation plant's single input and output", () => {
    const doc: ProjectFile = {
      ...TF_DOCUMENT,
      plants: [{
        id: "tank",
        model: {
          type: "nonlinear",
          states: [{ name: "h" }],
          inputs: [{ name: "q_in", unit: "m3/s" }],
          disturbances: [],
          parameters: [{ name: "a", value: 1 }],
          stateEquations: { h: "q_in - a*sqrt(h)" },
          outputs: [{ name: "level", equation: "h" }],
          operatingPoint: { unknowns: ["q_in"], states: { h: 1 } },
          sampleTime: null,
        },
      }],
      variants: [],
    };
    const { document } = switchModelForm(doc, "tank", { type: "transfer-function", numerator: [1], denominator: [1, 1], sampleTime: null });
    expect(document.plants[0]!.model).toEqual({ type: "transfer-function", numerator: [1], denominator: [1, 1], sampleTime: null, names: { inputs: ["q_in"], outputs: ["level"] }, units: { inputs: ["m3/s"] } });
  });

  it("through the store: the names stay, and Undo brings back the previous model", async () => {
    const store = await openDocumentOnlyStore(SISO);
    try {
      expect(switchModelFormCommand(store, "room", { type: "zero-pole-gain", zeros: [], poles: [-1], gain: 1, sampleTime: null }, "started a new zeros, poles and gain model")).toBe(true);
      expect(store.getState().undoLabel).toBe("started a new zeros, poles and gain model of plant room");
      expect((store.getState().document!.plants[0]!.model as { names?: unknown }).names).toEqual({ inputs: ["heater"], outputs: ["temperature"] });
      store.undo();
      expect(store.getState().document).toEqual(SISO);
    } finally {
      store.dispose();
    }
  });
});
