/**
 * Edits that change which signals a linear plant has without going through its matrices: the
 * size of a transfer-function or zero-pole-gain grid, and a switch of the model form. Both
 * return the new document with the variants of the plant refitted (variantSignals.ts: weights
 * sized by inputs and outputs follow, fields naming a signal that is gone are pruned) and the
 * list of what was pruned, for the command's undo label.
 */
import type { ProjectFile, VariantSpec } from "../../../shared-engine/api/contract";
import { findPlant, linearPlantSignals, linearSignalCounts, type LinearModelSpec, type ModelSpec, type SignalNamesSpec } from "./documentEdits";
import { resizeTransferFunction } from "./transferFunctionGrid";
import { pruneVariantSignals, refitVariants, resizeSignalWeights, type ReportedEdit } from "./variantSignals";
import { resizeZeroPoleGain } from "./zeroPoleGainGrid";

function withModel(doc: ProjectFile, plantId: string, model: ModelSpec): ProjectFile {
  return { ...doc, plants: doc.plants.map((p) => (p.id === plantId ? { ...p, model } : p)) };
}

// Variants of a linear plant after its signals changed: input/output-sized weights resized, dead references pruned.
function refitToModel(doc: ProjectFile, plantId: string, model: LinearModelSpec): ReportedEdit {
  const signals = linearPlantSignals(model);
  return refitVariants(withModel(doc, plantId, model), plantId, (v: VariantSpec) => {
    resizeSignalWeights(v, signals);
    return pruneVariantSignals(v, signals);
  });
}

/**
 * Outputs × inputs of a transfer-function or zero-pole-gain plant (each 1…TF_GRID_LIMIT):
 * entries that remain are kept, new pairs start uncoupled, names and units follow
 * (resizeTransferFunction, resizeZeroPoleGain). Every variant of the plant gets R, N's columns
 * and the Kalman covariances sized to the new inputs and outputs (identity for new entries), and
 * loses integral action on outputs that are gone, unity-feedback margins once the plant is not
 * 1 × 1, and reference feedforward once outputs and inputs differ in number.
 */
export function resizeEntryGridPlant(doc: ProjectFile, plantId: string, outputs: number, inputs: number): ReportedEdit {
  const model = findPlant(doc, plantId).model;
  if (model.type === "transfer-function") return refitToModel(doc, plantId, resizeTransferFunction(model, outputs, inputs));
  if (model.type === "zero-pole-gain") return refitToModel(doc, plantId, resizeZeroPoleGain(model, outputs, inputs));
  throw new Error(`Plant “${plantId}” is not entered per (output, input) pair; switch it to transfer functions or zeros, poles and gain first.`);
}

type IoLists = Pick<SignalNamesSpec, "inputs" | "outputs">;

// Input and output names and units of a model, as far as it gives them (an equation plant always names its signals).
function ioListsOf(model: ModelSpec): { names: IoLists; units: IoLists; inputs: number; outputs: number } {
  if (model.type === "nonlinear") {
    const units = (rows: { unit?: string }[]) => (rows.some((r) => r.unit) ? rows.map((r) => r.unit ?? "") : undefined);
    return {
      names: { inputs: model.inputs.map((r) => r.name), outputs: model.outputs.map((r) => r.name) },
      units: dropUndefined({ inputs: units(model.inputs), outputs: units(model.outputs) }),
      inputs: model.inputs.length,
      outputs: model.outputs.length,
    };
  }
  const counts = linearSignalCounts(model);
  return {
    names: dropUndefined({ inputs: model.names?.inputs, outputs: model.names?.outputs }),
    units: dropUndefined({ inputs: model.units?.inputs, outputs: model.units?.outputs }),
    inputs: counts.inputs,
    outputs: counts.outputs,
  };
}

function dropUndefined(lists: IoLists): IoLists {
  const out: IoLists = {};
  if (lists.inputs) out.inputs = [...lists.inputs];
  if (lists.outputs) out.outputs = [...lists.outputs];
  return out;
}

const isEmpty = (lists: IoLists): boolean => !lists.inputs && !lists.outputs;

/**
 * Replaces the plant's model by `model` in another form (the editor's starting model of that
 * form). When the new model has as many inputs and as many outputs as the old one, it keeps the
 * old input and output names and units (unless it brings its own); otherwise it starts with
 * default names. The plant's variants are refitted to the new signals as by a grid resize.
 */
export function switchModelForm(doc: ProjectFile, plantId: string, model: ModelSpec): ReportedEdit {
  const old = findPlant(doc, plantId).model;
  const next = structuredClone(model);
  if (next.type === "nonlinear") return { document: withModel(doc, plantId, next), pruned: [] };
  const before = ioListsOf(old);
  const counts = linearSignalCounts(next);
  if (counts.inputs === before.inputs && counts.outputs === before.outputs) {
    if (!next.names && !isEmpty(before.names)) next.names = before.names;
    if (!next.units && !isEmpty(before.units)) next.units = before.units;
  }
  return refitToModel(doc, plantId, next);
}
