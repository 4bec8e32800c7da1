/**
 * The workspace's named commands: each turns a user action into one labelled document edit on
 * the store (the label becomes the undo entry and the autosave message). Views call these; tests
 * call the same functions.
 */
import type { ProjectFile, VariantSpec } from "../../../shared-engine/api/contract";
import { formatCount } from "../../../shared-engine/format";
import { asPole, brysonWeights, setPoleKeepingPairs, type Pole } from "./designHelpers";
import {
  addVariant,
  duplicateVariant,
  findPlant,
  findVariant,
  removeVariant,
  renameSignal,
  resizePlantReporting,
  setMatrix,
  setMatrixEntry,
  setModel,
  setSignalUnit,
  updateVariant,
  type ComplexSpec,
  type MatrixName,
  type ModelSpec,
  type PlantDimensions,
  type SignalKind,
} from "./documentEdits";
import { parseMatrixText } from "./parseMatrixText";
import { resizeEntryGridPlant, switchModelForm } from "./plantFormEdits";
import { editReporting } from "./variantSignals";
import { parseZeroPoleGainPart, withZeroPoleGainEntry, type ZeroPoleGainEntry } from "./zeroPoleGainGrid";
import type { WorkspaceStore } from "./workspaceStore";

export const cellKey = (plantId: string, name: MatrixName, row: number, column: number): string => `${plantId}:${name}:${row}:${column}`;

export function setMatrixCell(store: WorkspaceStore, plantId: string, name: MatrixName, row: number, column: number, text: string): boolean {
  return store.editNumber(cellKey(plantId, name, row, column), text, `edited ${name}[${row + 1}][${column + 1}] of plant ${plantId}`, (doc, value) =>
    setMatrixEntry(doc, plantId, name, row, column, value),
  );
}

/** Pastes text into a matrix; a parse or shape error keeps the text in the paste field's draft. */
export function pasteMatrix(store: WorkspaceStore, plantId: string, name: MatrixName, text: string): boolean {
  return store.editText(`${plantId}:${name}:paste`, text, `pasted ${name} of plant ${plantId}`, (t) => {
    const parsed = parseMatrixText(t);
    if (!parsed.ok) return { ok: false, error: parsed.error };
    return { ok: true, apply: (doc) => setMatrix(doc, plantId, name, parsed.rows) };
  });
}

/** Resizes a state-space plant (resizePlant); the undo label names what its variants lost. */
export function resizeDimensions(store: WorkspaceStore, plantId: string, dims: PlantDimensions): boolean {
  return editReporting(store, `changed plant ${plantId} to ${formatCount(dims.states, "state")}, ${formatCount(dims.inputs, "input")}, ${formatCount(dims.outputs, "output")}, ${formatCount(dims.disturbances, "disturbance")}`, (doc) =>
    resizePlantReporting(doc, plantId, dims),
  );
}

export function renameSignalCommand(store: WorkspaceStore, plantId: string, kind: SignalKind, index: number, name: string): boolean {
  return store.editText(`${plantId}:name:${kind}:${index}`, name, `renamed ${kind.slice(0, -1)} ${index + 1} of plant ${plantId} to ${name.trim()}`, (t) => ({
    ok: true,
    apply: (doc) => renameSignal(doc, plantId, kind, index, t),
  }));
}

export function setUnitCommand(store: WorkspaceStore, plantId: string, kind: SignalKind, index: number, unit: string): boolean {
  return store.edit(`set the unit of ${kind.slice(0, -1)} ${index + 1} of plant ${plantId} to “${unit.trim()}”`, (doc) => setSignalUnit(doc, plantId, kind, index, unit), {
    coalesce: `${plantId}:unit:${kind}:${index}`,
  });
}

export function setModelCommand(store: WorkspaceStore, plantId: string, model: ModelSpec, what: string): boolean {
  return store.edit(`${what} of plant ${plantId}`, (doc) => setModel(doc, plantId, model));
}

/**
 * Switches the plant to another model form, starting from `model`: input and output names and
 * units stay when the counts match, and the variants are refitted (switchModelForm); the undo
 * label names what they lost.
 */
export function switchModelFormCommand(store: WorkspaceStore, plantId: string, model: ModelSpec, what: string): boolean {
  return editReporting(store, `${what} of plant ${plantId}`, (doc) => switchModelForm(doc, plantId, model));
}

/**
 * Outputs × inputs of a transfer-function or zero-pole-gain plant: entries that remain are kept,
 * new pairs start uncoupled, names and units follow, and the variants are refitted
 * (resizeEntryGridPlant); the undo label names what they lost.
 */
export function resizeEntryGrid(store: WorkspaceStore, plantId: string, outputs: number, inputs: number): boolean {
  return editReporting(store, `changed plant ${plantId} to ${formatCount(outputs, "output")} and ${formatCount(inputs, "input")}`, (doc) => resizeEntryGridPlant(doc, plantId, outputs, inputs));
}

/** The field name of one part of a zero-pole-gain entry; its draft key is `${plantId}:${field}`. */
export const zeroPoleGainField = (output: number, input: number, part: keyof ZeroPoleGainEntry): string => `zpk.${output}.${input}.${part}`;
export const zeroPoleGainFieldKey = (plantId: string, output: number, input: number, part: keyof ZeroPoleGainEntry): string => `${plantId}:${zeroPoleGainField(output, input, part)}`;

/**
 * Typed zeros, poles or gain of the entry from input `input` to output `output` (0-based). Text
 * that does not parse, or a complex value without its conjugate, stays in the field's draft with
 * the reason; the model keeps its last valid entry.
 */
export function setZeroPoleGainPart(store: WorkspaceStore, plantId: string, output: number, input: number, part: keyof ZeroPoleGainEntry, text: string): boolean {
  return store.editText(zeroPoleGainFieldKey(plantId, output, input, part), text, `set the ${part} from input ${input + 1} to output ${output + 1} of plant ${plantId}`, (t) => {
    const parsed = parseZeroPoleGainPart(part, t);
    if (!parsed.ok) return parsed;
    return {
      ok: true,
      apply: (doc) => {
        const model = findPlant(doc, plantId).model;
        if (model.type !== "zero-pole-gain") throw new Error(`Plant “${plantId}” is not entered as zeros, poles and gain.`);
        return setModel(doc, plantId, withZeroPoleGainEntry(model, output, input, part, parsed.value));
      },
    };
  });
}

// ---- variants --------------------------------------------------------------------------------

export function addVariantCommand(store: WorkspaceStore, plantId: string, method: "poles" | "lqr", dims: PlantDimensions): string | null {
  let id: string | null = null;
  const ok = store.edit(`added a ${method === "lqr" ? "LQR" : "pole-placement"} variant`, (doc) => {
    const added = addVariant(doc, plantId, method, dims);
    id = added.id;
    return added.document;
  });
  if (ok && id) store.selectVariant(id);
  return ok ? id : null;
}

export function duplicateVariantCommand(store: WorkspaceStore, variantId: string): string | null {
  let id: string | null = null;
  const ok = store.edit(`duplicated variant ${variantId}`, (doc) => {
    const added = duplicateVariant(doc, variantId);
    id = added.id;
    return added.document;
  });
  if (ok && id) store.selectVariant(id);
  return ok ? id : null;
}

export function removeVariantCommand(store: WorkspaceStore, variantId: string): boolean {
  return store.edit(`removed variant ${variantId}`, (doc) => removeVariant(doc, variantId));
}

export function renameVariantCommand(store: WorkspaceStore, variantId: string, name: string): boolean {
  return store.edit(`renamed variant ${variantId}`, (doc) => updateVariant(doc, variantId, (v) => ({ ...v, name })), { coalesce: `${variantId}:name` });
}

function change(store: WorkspaceStore, variantId: string, label: string, fn: (v: VariantSpec) => VariantSpec, options?: { coalesce?: string; live?: boolean }): boolean {
  return store.edit(`${label} of variant ${variantId}`, (doc) => updateVariant(doc, variantId, fn), options);
}

/** Switches the state-feedback method, starting from poles −1…−n or identity weights. */
export function setFeedbackMethod(store: WorkspaceStore, variantId: string, method: "poles" | "lqr", dims: PlantDimensions): boolean {
  return change(store, variantId, `switched to ${method === "lqr" ? "LQR" : "pole placement"}`, (v) => {
    if (v.stateFeedback?.method === method) return v;
    const eye = (k: number) => Array.from({ length: k }, (_, i) => Array.from({ length: k }, (_, j) => (i === j ? 1 : 0)));
    const next: VariantSpec = {
      ...v,
      stateFeedback: method === "lqr" ? { method: "lqr", Q: eye(dims.states), R: eye(dims.inputs) } : { method: "poles", poles: Array.from({ length: dims.states }, (_, i) => ({ re: -(i + 1), im: 0 })) },
    };
    if (next.integralAction) {
      const count = next.integralAction.outputs.length;
      next.integralAction = { ...next.integralAction };
      if (method === "lqr") {
        delete next.integralAction.poles;
        next.integralAction.weights = next.integralAction.weights ?? Array.from({ length: count }, () => 1);
      } else {
        delete next.integralAction.weights;
        next.integralAction.poles = next.integralAction.poles ?? Array.from({ length: count }, (_, i) => ({ re: -(dims.states + i + 1), im: 0 }));
      }
    }
    return next;
  });
}

export function polesOf(v: VariantSpec): Pole[] {
  return v.stateFeedback?.method === "poles" ? v.stateFeedback.poles.map(asPole) : [];
}

/** Moves placed pole `index` (its conjugate follows). `live`: part of a drag, merged into one undo step. */
export function setPlacedPole(store: WorkspaceStore, variantId: string, index: number, value: Pole, options: { live?: boolean; gesture?: string } = {}): boolean {
  return change(
    store,
    variantId,
    `moved pole ${index + 1}`,
    (v) => {
      if (v.stateFeedback?.method !== "poles") throw new Error("This variant does not place poles; switch its method to pole placement first.");
      return { ...v, stateFeedback: { method: "poles", poles: setPoleKeepingPairs(v.stateFeedback.poles.map(asPole), index, value) } };
    },
    { live: options.live, coalesce: options.gesture ? `${variantId}:pole:${options.gesture}` : undefined },
  );
}

/** Typed pole part (re or im): the text is kept when it does not parse. */
export function setPolePart(store: WorkspaceStore, variantId: string, index: number, part: "re" | "im", text: string): boolean {
  return store.editNumber(`${variantId}:pole:${index}:${part}`, text, `set pole ${index + 1} of variant ${variantId}`, (doc, value) =>
    updateVariant(doc, variantId, (v) => {
      if (v.stateFeedback?.method !== "poles") throw new Error("This variant does not place poles.");
      const poles = v.stateFeedback.poles.map(asPole);
      const current = poles[index]!;
      return { ...v, stateFeedback: { method: "poles", poles: setPoleKeepingPairs(poles, index, { ...current, [part]: value }) } };
    }),
  );
}

function setDiagonal(m: number[][], index: number, value: number): number[][] {
  return m.map((row, i) => row.map((x, j) => (i === index && j === index ? value : x)));
}

/** One diagonal LQR weight (Q for states, R for inputs); `gesture` merges a slider scrub into one undo step. */
export function setLqrWeight(store: WorkspaceStore, variantId: string, which: "Q" | "R", index: number, value: number, gesture?: string): boolean {
  return change(
    store,
    variantId,
    `set ${which}[${index + 1}][${index + 1}] to ${Number(value.toPrecision(4))}`,
    (v) => {
      if (v.stateFeedback?.method !== "lqr") throw new Error("This variant is not an LQR design.");
      if (!(value > 0 && Number.isFinite(value))) throw new Error(`${which}[${index + 1}][${index + 1}] must be a positive number; got ${value}.`);
      return { ...v, stateFeedback: { ...v.stateFeedback, [which]: setDiagonal(v.stateFeedback[which], index, value) } };
    },
    { coalesce: gesture ? `${variantId}:${which}:${index}:${gesture}` : undefined },
  );
}

export function setLqrWeightText(store: WorkspaceStore, variantId: string, which: "Q" | "R", index: number, text: string): boolean {
  return store.editNumber(`${variantId}:${which}:${index}`, text, `set ${which}[${index + 1}][${index + 1}] of variant ${variantId}`, (doc, value) => {
    if (!(value > 0)) throw new Error(`${which}[${index + 1}][${index + 1}] must be positive (a weight of zero or less does not define a design); got ${value}.`);
    return updateVariant(doc, variantId, (v) => {
      if (v.stateFeedback?.method !== "lqr") throw new Error("This variant is not an LQR design.");
      return { ...v, stateFeedback: { ...v.stateFeedback, [which]: setDiagonal(v.stateFeedback[which], index, value) } };
    });
  });
}

/** Bryson's rule: Q = diag(1/xmax²), R = diag(1/umax²). */
export function applyBrysonRule(store: WorkspaceStore, variantId: string, stateMax: readonly number[], inputMax: readonly number[]): boolean {
  return change(store, variantId, "set weights by Bryson's rule", (v) => {
    const q = brysonWeights(stateMax, "state");
    const r = brysonWeights(inputMax, "input");
    const diag = (d: number[]) => d.map((x, i) => d.map((_, j) => (i === j ? x : 0)));
    return { ...v, stateFeedback: { method: "lqr", Q: diag(q), R: diag(r) } };
  });
}

/** Integral action on the named outputs (empty list: none). Weights/poles follow the method. */
export function setIntegralOutputs(store: WorkspaceStore, variantId: string, outputs: string[], dims: PlantDimensions): boolean {
  return change(store, variantId, outputs.length ? `integrated the error of ${outputs.join(", ")}` : "removed integral action", (v) => {
    const next = { ...v };
    if (outputs.length === 0) {
      delete next.integralAction;
      return next;
    }
    if (outputs.length > dims.inputs) throw new Error(`At most ${dims.inputs} ${dims.inputs === 1 ? "output" : "outputs"} can be integrated: one per input.`);
    const old = v.integralAction;
    const pick = <T,>(list: T[] | undefined, fill: (i: number) => T) =>
      outputs.map((o, i) => {
        const k = old?.outputs.indexOf(o) ?? -1;
        return k >= 0 && list?.[k] !== undefined ? list[k]! : fill(i);
      });
    next.integralAction = { outputs, ...(old?.antiWindup ? { antiWindup: old.antiWindup } : {}) };
    if (v.stateFeedback?.method === "poles") next.integralAction.poles = pick(old?.poles, (i) => ({ re: -(dims.states + i + 1), im: 0 }) as ComplexSpec);
    else next.integralAction.weights = pick(old?.weights, () => 1);
    return next;
  });
}

export function setObserver(store: WorkspaceStore, variantId: string, observer: VariantSpec["observer"] | null): boolean {
  return change(store, variantId, observer ? `set a ${observer.method === "kalman" ? "Kalman" : "pole-placement"} observer` : "removed the observer", (v) => {
    const next = { ...v };
    if (observer) next.observer = observer;
    else delete next.observer;
    return next;
  });
}

export function setDiscretization(store: WorkspaceStore, variantId: string, discretize: VariantSpec["discretize"] | null): boolean {
  return change(store, variantId, discretize ? `sampled at ${discretize.sampleTime} s (${discretize.method})` : "made continuous", (v) => {
    const next = { ...v };
    if (discretize) {
      if (!(discretize.sampleTime > 0 && Number.isFinite(discretize.sampleTime))) throw new Error(`The sample period must be a positive number of seconds; got ${discretize.sampleTime}.`);
      next.discretize = discretize;
    } else delete next.discretize;
    return next;
  });
}

export function variantOf(doc: ProjectFile, id: string): VariantSpec {
  return findVariant(doc, id);
}
