// Variant fields that name a plant's signals follow renames and lose removed signals: the
// disturbance step of a state-space plant, integral action, and the nonlinear keys (check
// scenario, robustness parameters) of an equation plant. Expected documents are written out by
// hand from the rules in renderer/state/workspace/variantSignals.ts.
import { describe, expect, it } from "vitest";
import type { ProjectFile, VariantSpec } from "../../../../shared-engine/api/contract";
import { openDocumentOnlyStore } from "./documentOnlyStore";
import {
  labelWithPruned,
  pruneVariantSignals,
  removeParameter,
  renameInVariants,
  renameNonlinearRow,
  renameSignal,
  resizeDimensions,
  resizePlantReporting,
} from "../../../../renderer/state/workspace";
import { LINEAR_QUEUE_DOCUMENT } from "./linearQueueDocument";

/** The linear queue with a second disturbance and disturbance steps naming each (by name and by index). */
function queueWithTwoDisturbances(): ProjectFile {
  const doc = structuredClone(LINEAR_QUEUE_DOCUMENT);
  const model = doc.plants[0]!.model as Extract<ProjectFile["plants"][number]["model"], { type: "state-space" }>;
  model.F = [[1, 0], [0, 1]];
  model.E = [[0, 0]];
  model.names!.disturbances = ["arrival_rate", "outage"];
  model.units!.disturbances = ["msg/s", "consumers"];
  doc.variants[0]!.disturbanceStep = { times: [0, 10, 20], disturbance: "outage", size: 2 };
  doc.variants[1]!.disturbanceStep = { times: [0, 10, 20], disturbance: 0 };
  doc.variants[2]!.disturbanceStep = { times: [0, 10, 20], disturbance: 1 };
  return doc;
}

describe("variant references on a state-space plant", () => {
  it("renaming a disturbance renames the disturbance step that names it", () => {
    const doc = renameSignal(queueWithTwoDisturbances(), "queue", "disturbances", 1, "consumer_outage");
    expect(doc.variants.map((v) => v.disturbanceStep)).toEqual([
      { times: [0, 10, 20], disturbance: "consumer_outage", size: 2 },
      { times: [0, 10, 20], disturbance: 0 },
      { times: [0, 10, 20], disturbance: 1 },
    ]);
  });

  it("removing a disturbance removes the steps of it (by name or index) and reports them; the other step stays", () => {
    const { document, pruned } = resizePlantReporting(queueWithTwoDisturbances(), "queue", { states: 2, inputs: 1, outputs: 1, disturbances: 1 });
    expect(document.variants.map((v) => v.disturbanceStep)).toEqual([undefined, { times: [0, 10, 20], disturbance: 0 }, undefined]);
    expect(pruned).toEqual(["the disturbance step of outage from variant lqr-integral-1s", "the disturbance step of disturbance 2 from variant lqr-kalman"]);
    // With no disturbance left, no step can stay; the Kalman process noise falls back to the inputs (1 × 1).
    const none = resizePlantReporting(queueWithTwoDisturbances(), "queue", { states: 2, inputs: 1, outputs: 1, disturbances: 0 });
    expect(none.document.variants.every((v) => v.disturbanceStep === undefined)).toBe(true);
    expect(none.pruned).toContain("the disturbance step (the plant has no disturbance inputs) from variant poles-continuous");
    expect(none.document.variants[2]!.observer).toEqual({ method: "kalman", processNoise: [[40000]], measurementNoise: [[2500]] });
  });

  it("the resize command names what it pruned in the undo label", async () => {
    const store = await openDocumentOnlyStore(queueWithTwoDisturbances());
    try {
      expect(resizeDimensions(store, "queue", { states: 2, inputs: 1, outputs: 1, disturbances: 1 })).toBe(true);
      expect(store.getState().undoLabel).toBe(
        "changed plant queue to 2 states, 1 input, 1 output, 1 disturbance; removed the disturbance step of outage from variant lqr-integral-1s, the disturbance step of disturbance 2 from variant lqr-kalman",
      );
    } finally {
      store.dispose();
    }
  });
});

describe("pruning and renaming rules", () => {
  it("prune only what the new signals cannot support", () => {
    const v: VariantSpec = { id: "v", plant: "p", stateFeedback: { method: "poles", poles: [-1] }, integralAction: { outputs: ["a", 0, "gone", 5], poles: [-2, -3, -4, -5] }, margins: { at: "plant-input" }, referenceFeedforward: true };
    const pruned = pruneVariantSignals(v, { inputs: 2, outputs: ["a", "b"], disturbances: [] });
    expect(v).toEqual({ id: "v", plant: "p", stateFeedback: { method: "poles", poles: [-1] }, integralAction: { outputs: ["a", 0], poles: [-2, -3] }, margins: { at: "plant-input" }, referenceFeedforward: true });
    expect(pruned).toEqual(["integral action on gone, output 6"]);
    expect(labelWithPruned("did it", [])).toBe("did it");
  });

  it("a rename leaves variants that do not mention the name as the same objects", () => {
    const doc = structuredClone(LINEAR_QUEUE_DOCUMENT);
    const renamed = renameInVariants(doc, "queue", "outputs", "backlog", "queue_length");
    expect(renamed.variants[0]!.integralAction!.outputs).toEqual(["queue_length"]);
    expect(renamed.variants[1]).toBe(doc.variants[1]);
    expect(doc.variants[0]!.integralAction!.outputs).toEqual(["backlog"]);
  });
});

/** A one-tank equation plant (invented, test) with a variant that names its output, disturbance, state and parameters. */
const TANK: ProjectFile = {
  format: "loopwright-project",
  version: 1,
  name: "Tank (invented, test)",
  plants: [{
    id: "tank",
    model: {
      type: "nonlinear",
      states: [{ name: "h" }],
      inputs: [{ name: "q_in" }],
      disturbances: [{ name: "leak", nominal: 0 }],
      parameters: [{ name: "a", value: 1 }, { name: "area", value: 2 }],
      stateEquations: { h: "(q_in - leak - a*sqrt(h))/area" },
      outputs: [{ name: "level", equation: "h" }],
      operatingPoint: { unknowns: ["q_in"], states: { h: 1 } },
      sampleTime: null,
    },
  }],
  variants: [{
    id: "servo",
    plant: "tank",
    stateFeedback: { method: "lqr", Q: [[1]], R: [[1]] },
    integralAction: { outputs: ["level"], weights: [1] },
    nonlinearCheck: { times: [0, 1, 2], scenario: { setpointSteps: [{ output: "level", size: 0.1 }], disturbanceChanges: [{ disturbance: "leak", kind: "step", size: 0.01 }], initialOffset: { h: 0.05 } } },
    robustness: { parameters: [{ name: "a", percent: 10 }, { name: "area", percent: 5 }], sampling: { kind: "grid", pointsPerParameter: 3 } },
  }],
};

describe("variant references on an equation plant", () => {
  it("renaming an output, a disturbance, a state and a parameter renames them in integral action, the check scenario and the robustness sweep", async () => {
    const store = await openDocumentOnlyStore(TANK);
    try {
      expect(renameNonlinearRow(store, "tank", "outputs", 0, "height")).toBe(true);
      expect(renameNonlinearRow(store, "tank", "disturbances", 0, "drain")).toBe(true);
      expect(renameNonlinearRow(store, "tank", "states", 0, "h1")).toBe(true);
      expect(renameNonlinearRow(store, "tank", "parameters", 0, "coeff")).toBe(true);
      const v = store.getState().document!.variants[0]!;
      expect(v.integralAction).toEqual({ outputs: ["height"], weights: [1] });
      expect(v.nonlinearCheck).toEqual({ times: [0, 1, 2], scenario: { setpointSteps: [{ output: "height", size: 0.1 }], disturbanceChanges: [{ disturbance: "drain", kind: "step", size: 0.01 }], initialOffset: { h1: 0.05 } } });
      expect(v.robustness!.parameters).toEqual([{ name: "coeff", percent: 10 }, { name: "area", percent: 5 }]);
      for (let k = 0; k < 4; k++) store.undo();
      expect(store.getState().document).toEqual(TANK);
    } finally {
      store.dispose();
    }
  });

  it("removing a parameter drops it from the robustness sweep, and the whole sweep with its last parameter, saying so", async () => {
    const store = await openDocumentOnlyStore(TANK);
    try {
      expect(removeParameter(store, "tank", 0)).toBe(true);
      expect(store.getState().document!.variants[0]!.robustness!.parameters).toEqual([{ name: "area", percent: 5 }]);
      expect(store.getState().undoLabel).toBe("removed parameter 1 of plant tank; removed the parameter a of the robustness sweep from variant servo");
      expect(removeParameter(store, "tank", 0)).toBe(true);
      expect(store.getState().document!.variants[0]!.robustness).toBeUndefined();
      expect(store.getState().undoLabel).toBe("removed parameter 1 of plant tank; removed the robustness sweep (area was its only parameter) from variant servo");
    } finally {
      store.dispose();
    }
  });
});
