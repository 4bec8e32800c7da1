// Zero-pole-gain plants of several inputs and outputs in the workspace: the grid helpers, and
// the store switching a plant to 2 × 2 and editing entries (saved, evaluated by the engine).
import { describe, expect, it } from "vitest";
import type { ProjectFile } from "../../../../shared-engine/api/contract";
import {
  parseZeroPoleGainPart,
  renameSignalCommand,
  resizeEntryGrid,
  resizeZeroPoleGain,
  setZeroPoleGainPart,
  unpairedComplexMessage,
  updateVariant,
  withZeroPoleGainEntry,
  zeroPoleGainEntry,
  zeroPoleGainFieldKey,
  zeroPoleGainSize,
  type ZeroPoleGainModelSpec,
} from "../../../../renderer/state/workspace";
import { buildPlantModel, loadProjectValue } from "../../../../shared-engine/project";
import { dcGain } from "../../../../shared-engine/analysis/dcGain";
import { expectComplexSetsClose, expectMatrixClose } from "../../../helpers/assertions";
import { idle, openWorkspace, settle } from "./entryGridTestSupport";

const siso: ZeroPoleGainModelSpec = { type: "zero-pole-gain", zeros: [], poles: [-1], gain: 1, sampleTime: null, names: { inputs: ["heater"], outputs: ["temperature"] }, units: { inputs: ["W"] } };

const DOCUMENT: ProjectFile = {
  format: "loopwright-project",
  version: 1,
  name: "Room climate (invented, test)",
  plants: [{ id: "room", model: siso }],
  variants: [{ id: "lqr", plant: "room", stateFeedback: { method: "lqr", Q: [[1]], R: [[1]] }, step: { times: [0, 0.5, 1, 2, 5] } }],
};

describe("zero-pole-gain grid helpers", () => {
  it("grow a SISO plant to 2 × 2 keeping its entry, adding uncoupled pairs and default names, and shrink back", () => {
    const grown = resizeZeroPoleGain(siso, 2, 2);
    expect(zeroPoleGainSize(grown)).toEqual({ outputs: 2, inputs: 2 });
    expect(grown.gain).toEqual([[1, 0], [0, 0]]);
    expect(grown.poles).toEqual([[[-1], []], [[], []]]);
    expect(zeroPoleGainEntry(grown, 1, 0)).toEqual({ zeros: [], poles: [], gain: 0 });
    expect(grown.names).toEqual({ inputs: ["heater", "u2"], outputs: ["temperature", "y2"] });
    expect(grown.units).toEqual({ inputs: ["W", ""] });
    expect(resizeZeroPoleGain(grown, 1, 1)).toEqual(siso);
    expect(siso.poles).toEqual([-1]); // the argument is not changed
    expect(() => resizeZeroPoleGain(siso, 9, 1)).toThrow(/outputs must be a whole number from 1 to 8/);
    expect(() => withZeroPoleGainEntry(grown, 2, 0, "gain", 1)).toThrow(/no zero-pole-gain entry from input 1 to output 3/);
  });

  it("refuse a complex value without its conjugate and accept a pair typed with ±", () => {
    expect(unpairedComplexMessage([-1, { re: -2, im: 3 }], "poles")).toBe("-2+3i has no conjugate partner -2-3i: complex poles come in conjugate pairs. Type both, or the pair as “-2±3i”.");
    expect(unpairedComplexMessage([{ re: 1, im: -1 }], "zeros")).toMatch(/^1-1i has no conjugate partner 1\+1i/);
    expect(unpairedComplexMessage([{ re: -2, im: 3 }, { re: -2, im: -3 }, -1], "poles")).toBeNull();
    expect(parseZeroPoleGainPart("poles", "−2±3i, −1")).toEqual({ ok: true, value: [{ re: -2, im: 3 }, { re: -2, im: -3 }, { re: -1, im: 0 }] });
    expect(parseZeroPoleGainPart("gain", "2.5")).toEqual({ ok: true, value: 2.5 });
    expect(parseZeroPoleGainPart("gain", "two")).toEqual({ ok: false, error: "The gain “two” is not a number." });
  });
});

describe("a zero-pole-gain plant in the workspace", () => {
  it("switches to 2 inputs × 2 outputs, takes typed entries, refuses an unpaired pole with the text kept, and the design uses the grid", async () => {
    const { store, documents, close } = await openWorkspace(DOCUMENT);
    try {
      expect(resizeEntryGrid(store, "room", 2, 2)).toBe(true);
      // G21 = 1.5(s + 3)/(s² + 2s + 5), G22 = −0.8; G11 = 1/(s + 1) kept; G12 = 0.
      expect(setZeroPoleGainPart(store, "room", 1, 0, "poles", "-1±2i")).toBe(true);
      expect(setZeroPoleGainPart(store, "room", 1, 0, "zeros", "-3")).toBe(true);
      expect(setZeroPoleGainPart(store, "room", 1, 0, "gain", "1.5")).toBe(true);
      expect(setZeroPoleGainPart(store, "room", 1, 1, "gain", "-0.8")).toBe(true);
      expect(renameSignalCommand(store, "room", "outputs", 1, "humidity")).toBe(true);
      // The realization has 3 states (see below): the weights follow, as the engineer would set them.
      const eye = (k: number) => Array.from({ length: k }, (_, i) => Array.from({ length: k }, (_, j) => (i === j ? 1 : 0)));
      expect(store.edit("sized the LQR weights", (doc) => updateVariant(doc, "lqr", (v) => ({ ...v, stateFeedback: { method: "lqr", Q: eye(3), R: eye(2) } })))).toBe(true);

      const before = store.getState().document;
      expect(setZeroPoleGainPart(store, "room", 0, 1, "poles", "-2+1i")).toBe(false);
      expect(store.getState().drafts[zeroPoleGainFieldKey("room", 0, 1, "poles")]).toEqual({ text: "-2+1i", error: "-2+1i has no conjugate partner -2-1i: complex poles come in conjugate pairs. Type both, or the pair as “-2±1i”." });
      expect(setZeroPoleGainPart(store, "room", 0, 1, "gain", "1.5x")).toBe(false);
      expect(store.getState().drafts[zeroPoleGainFieldKey("room", 0, 1, "gain")]!.text).toBe("1.5x");
      expect(store.getState().document).toBe(before);

      const model = store.getState().document!.plants[0]!.model as ZeroPoleGainModelSpec;
      expect(model.gain).toEqual([[1, 0], [1.5, -0.8]]);
      expect(model.zeros).toEqual([[[], []], [[{ re: -3, im: 0 }], []]]);
      expect(model.poles).toEqual([[[-1], []], [[{ re: -1, im: 2 }, { re: -1, im: -2 }], []]]);
      expect(model.names).toEqual({ inputs: ["heater", "u2"], outputs: ["temperature", "humidity"] });

      await settle(store, (s) => idle(s) && s.evaluation.result?.plant?.dimensions.inputs === 2);
      const result = store.getState().evaluation.result!;
      expect(result.error).toBeFalsy();
      expect(result.plant!.dimensions).toMatchObject({ states: 3, inputs: 2, outputs: 2 });
      expect(result.plant!.names.outputs).toEqual(["temperature", "humidity"]);
      // Open-loop poles: −1 from G11 and −1 ± 2j from G21 (column 1 has two denominators; column 2 none).
      expectComplexSetsClose(result.plant!.poles, [{ re: -1, im: 0 }, { re: -1, im: 2 }, { re: -1, im: -2 }], 1e-12, "plant poles");

      // The saved document is the edited one, valid, and its DC gain is the hand-derived
      // G(0) = [[1/1, 0], [1.5·3/5, −0.8]] = [[1, 0], [0.9, −0.8]].
      const saved = await documents.load("p1");
      expect(saved.document).toEqual(store.getState().document);
      const built = buildPlantModel(loadProjectValue(saved.document).project.plants[0]!.model, "plants[0].model");
      expectMatrixClose(dcGain(built).gain!, [[1, 0], [0.9, -0.8]], 1e-14, "G(0)");

      // Undo takes back the weights, the rename and the last gain.
      store.undo();
      store.undo();
      store.undo();
      expect((store.getState().document!.plants[0]!.model as ZeroPoleGainModelSpec).gain).toEqual([[1, 0], [1.5, 0]]);
    } finally {
      close();
    }
  });
});
