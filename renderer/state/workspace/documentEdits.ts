/**
 * Pure edits of the project document (format "loopwright-project"): each takes a document and
 * returns a new one, never changing its input, so the workspace can keep before/after pairs for
 * undo. Edits keep the document consistent: resizing a plant resizes its signal names, units and
 * the weights, poles and noise matrices of every variant built on it and prunes what names a
 * signal that is gone; renaming a signal renames it wherever a variant refers to it
 * (variantSignals.ts).
 */
import type { PlantSpec, ProjectFile, VariantSpec } from "../../../shared-engine/api/contract";
import { transferFunctionSize } from "./transferFunctionGrid";
import { pruneVariantSignals, refitVariants, renameInVariants, resizeSignalWeights, type PlantSignals, type ReportedEdit } from "./variantSignals";
import { zeroPoleGainSize } from "./zeroPoleGainGrid";

// The document's part types, derived from the bridge contract (the renderer imports no other engine module).
export type ModelSpec = PlantSpec["model"];
export type StateSpaceModelSpec = Extract<ModelSpec, { type: "state-space" }>;
export type SignalNamesSpec = NonNullable<StateSpaceModelSpec["names"]>;
export type ComplexSpec = Extract<NonNullable<VariantSpec["stateFeedback"]>, { method: "poles" }>["poles"][number];

export type MatrixName = "A" | "B" | "F" | "C" | "D" | "E";
export type SignalKind = "states" | "inputs" | "outputs" | "disturbances";

export interface PlantDimensions {
  states: number;
  inputs: number;
  outputs: number;
  disturbances: number;
}

const NAME_PREFIX: Record<SignalKind, string> = { states: "x", inputs: "u", outputs: "y", disturbances: "w" };

/** Rows and columns of each matrix, in signal kinds. */
export const MATRIX_SHAPE: Record<MatrixName, [SignalKind, SignalKind]> = {
  A: ["states", "states"],
  B: ["states", "inputs"],
  F: ["states", "disturbances"],
  C: ["outputs", "states"],
  D: ["outputs", "inputs"],
  E: ["outputs", "disturbances"],
};

export function stateSpaceDimensions(model: StateSpaceModelSpec): PlantDimensions {
  const states = model.A.length;
  return {
    states,
    inputs: model.B[0]?.length ?? model.D?.[0]?.length ?? 0,
    outputs: model.C.length,
    disturbances: model.F?.[0]?.length ?? model.E?.[0]?.length ?? 0,
  };
}

export function sizeOf(dims: PlantDimensions, kind: SignalKind): number {
  return dims[kind];
}

/** The names of one signal kind, filled with x1, u1, y1, w1 … where the document has none. */
export function signalNames(names: SignalNamesSpec | undefined, kind: SignalKind, count: number): string[] {
  const given = names?.[kind] ?? [];
  return Array.from({ length: count }, (_, i) => given[i] ?? `${NAME_PREFIX[kind]}${i + 1}`);
}

export function signalUnits(units: SignalNamesSpec | undefined, kind: SignalKind, count: number): string[] {
  const given = units?.[kind] ?? [];
  return Array.from({ length: count }, (_, i) => given[i] ?? "");
}

/** A matrix of the model, zeros when the document leaves it out (D, F, E are optional). */
export function matrixOf(model: StateSpaceModelSpec, name: MatrixName): number[][] {
  const dims = stateSpaceDimensions(model);
  const [r, c] = MATRIX_SHAPE[name];
  const given = model[name];
  return Array.from({ length: dims[r] }, (_, i) => Array.from({ length: dims[c] }, (_, j) => given?.[i]?.[j] ?? 0));
}

function resizeMatrix(m: readonly (readonly number[])[] | undefined, rows: number, cols: number, fill: (i: number, j: number) => number = () => 0): number[][] {
  return Array.from({ length: rows }, (_, i) => Array.from({ length: cols }, (_, j) => m?.[i]?.[j] ?? fill(i, j)));
}

const identityFill = (i: number, j: number): number => (i === j ? 1 : 0);

export function findPlant(doc: ProjectFile, plantId: string): PlantSpec {
  const plant = doc.plants.find((p) => p.id === plantId);
  if (!plant) throw new Error(`The project has no plant “${plantId}”.`);
  return plant;
}

export function findVariant(doc: ProjectFile, variantId: string): VariantSpec {
  const variant = doc.variants.find((v) => v.id === variantId);
  if (!variant) throw new Error(`The project has no variant “${variantId}”.`);
  return variant;
}

function replacePlant(doc: ProjectFile, plantId: string, change: (p: PlantSpec) => PlantSpec): ProjectFile {
  return { ...doc, plants: doc.plants.map((p) => (p.id === plantId ? change(structuredClone(p)) : p)) };
}

export function updateVariant(doc: ProjectFile, variantId: string, change: (v: VariantSpec) => VariantSpec): ProjectFile {
  findVariant(doc, variantId);
  return { ...doc, variants: doc.variants.map((v) => (v.id === variantId ? change(structuredClone(v)) : v)) };
}

/** A plant form whose signal names and units the document holds in `names`/`units`. */
export type LinearModelSpec = Exclude<ModelSpec, { type: "nonlinear" }>;

/**
 * Signal counts of a linear plant as far as the document tells: all four kinds for state space;
 * inputs and outputs of a transfer-function or zero-pole-gain grid (their states belong to the
 * realization and they have no disturbance inputs, so those count 0 here).
 */
export function linearSignalCounts(model: LinearModelSpec): PlantDimensions {
  if (model.type === "state-space") return stateSpaceDimensions(model);
  const { outputs, inputs } = model.type === "transfer-function" ? transferFunctionSize(model) : zeroPoleGainSize(model);
  return { states: 0, inputs, outputs, disturbances: 0 };
}

function requireLinear(plant: PlantSpec): LinearModelSpec {
  if (plant.model.type === "nonlinear") throw new Error(`Plant “${plant.id}” is given by equations; its signal names are those of the equations.`);
  return plant.model;
}

function requireStateSpace(plant: PlantSpec): StateSpaceModelSpec {
  if (plant.model.type !== "state-space") throw new Error(`Plant “${plant.id}” is not in state-space form; switch its form first.`);
  return plant.model;
}

/** Sets one entry of A, B, F, C, D or E. */
export function setMatrixEntry(doc: ProjectFile, plantId: string, name: MatrixName, row: number, column: number, value: number): ProjectFile {
  return replacePlant(doc, plantId, (plant) => {
    const model = requireStateSpace(plant);
    const m = matrixOf(model, name);
    if (row < 0 || row >= m.length || column < 0 || column >= (m[0]?.length ?? 0)) {
      throw new Error(`${name}[${row}][${column}] is outside ${name} (${m.length}×${m[0]?.length ?? 0}).`);
    }
    m[row]![column] = value;
    return { ...plant, model: { ...model, [name]: m } };
  });
}

/**
 * Replaces a whole matrix (a paste). The shape must match the plant's dimensions; the message
 * says what the plant needs, so the user can change the dimensions first.
 */
export function setMatrix(doc: ProjectFile, plantId: string, name: MatrixName, rows: number[][]): ProjectFile {
  const plant = findPlant(doc, plantId);
  const model = requireStateSpace(plant);
  const dims = stateSpaceDimensions(model);
  const [rk, ck] = MATRIX_SHAPE[name];
  const r = dims[rk];
  const c = dims[ck];
  const cols = rows[0]?.length ?? 0;
  if (rows.length !== r || cols !== c) {
    throw new Error(`${name} must be ${r}×${c} (${r} ${rk} by ${c} ${ck}); the pasted matrix is ${rows.length}×${cols}. Change the dimensions first, or paste ${r} rows of ${c} entries.`);
  }
  return replacePlant(doc, plantId, (p) => ({ ...p, model: { ...requireStateSpace(p), [name]: rows.map((row) => [...row]) } }));
}

function resizeList<T>(list: readonly T[] | undefined, count: number, fill: (i: number) => T): T[] {
  return Array.from({ length: count }, (_, i) => list?.[i] ?? fill(i));
}

function resizeNames(spec: SignalNamesSpec | undefined, dims: PlantDimensions, fill: (kind: SignalKind, i: number) => string): SignalNamesSpec | undefined {
  if (!spec) return undefined;
  const out: SignalNamesSpec = {};
  for (const kind of ["states", "inputs", "outputs", "disturbances"] as const) {
    if (dims[kind] > 0) out[kind] = resizeList(spec[kind], dims[kind], (i) => fill(kind, i));
  }
  return out;
}

/** Unique default name for a new signal: x3, or x3_2 when x3 is taken. */
function freshName(kind: SignalKind, index: number, taken: readonly string[]): string {
  let name = `${NAME_PREFIX[kind]}${index + 1}`;
  for (let k = 2; taken.includes(name); k++) name = `${NAME_PREFIX[kind]}${index + 1}_${k}`;
  return name;
}

/**
 * Changes the plant's dimensions: matrices keep their top-left block and gain zero rows and
 * columns; new signals get fresh names and empty units; variants of this plant get identity
 * weights, poles −1, −2, … and identity noise for the new entries, and lose what names a signal
 * that no longer exists (integral action on a removed output, the step of a removed disturbance;
 * pruneVariantSignals). `resizePlantReporting` also lists what it pruned.
 */
export function resizePlant(doc: ProjectFile, plantId: string, dims: PlantDimensions): ProjectFile {
  return resizePlantReporting(doc, plantId, dims).document;
}

export function resizePlantReporting(doc: ProjectFile, plantId: string, dims: PlantDimensions): ReportedEdit {
  for (const kind of ["states", "inputs", "outputs"] as const) {
    if (!Number.isInteger(dims[kind]) || dims[kind] < 1 || dims[kind] > 60) throw new Error(`The number of ${kind} must be a whole number from 1 to 60; got ${dims[kind]}.`);
  }
  if (!Number.isInteger(dims.disturbances) || dims.disturbances < 0 || dims.disturbances > 60) throw new Error(`The number of disturbances must be a whole number from 0 to 60; got ${dims.disturbances}.`);
  const plant = findPlant(doc, plantId);
  const model = requireStateSpace(plant);
  const old = stateSpaceDimensions(model);
  const oldNames = {
    states: signalNames(model.names, "states", old.states),
    inputs: signalNames(model.names, "inputs", old.inputs),
    outputs: signalNames(model.names, "outputs", old.outputs),
    disturbances: signalNames(model.names, "disturbances", old.disturbances),
  };
  const { states: n, inputs: m, outputs: p, disturbances: d } = dims;
  const next: StateSpaceModelSpec = {
    ...model,
    A: resizeMatrix(model.A, n, n),
    B: resizeMatrix(model.B, n, m),
    C: resizeMatrix(model.C, p, n),
    D: resizeMatrix(model.D, p, m),
    names: resizeNames(model.names, dims, (kind, i) => freshName(kind, i, oldNames[kind])),
    units: resizeNames(model.units, dims, () => ""),
  };
  if (d > 0) {
    next.F = resizeMatrix(model.F, n, d);
    next.E = resizeMatrix(model.E, p, d);
  } else {
    delete next.F;
    delete next.E;
  }
  if (!next.names) delete next.names;
  if (!next.units) delete next.units;
  const signals = linearPlantSignals(next);
  const changed = replacePlant(doc, plantId, (pl) => ({ ...pl, model: next }));
  return refitVariants(changed, plantId, (v) => {
    resizeStateWeights(v, n);
    resizeSignalWeights(v, signals);
    return pruneVariantSignals(v, signals);
  });
}

/** The inputs, output names and disturbance names a linear plant offers its variants. */
export function linearPlantSignals(model: LinearModelSpec): PlantSignals {
  const dims = linearSignalCounts(model);
  return {
    inputs: dims.inputs,
    outputs: signalNames(model.names, "outputs", dims.outputs),
    disturbances: model.type === "state-space" ? signalNames(model.names, "disturbances", dims.disturbances) : [],
  };
}

function defaultPoles(count: number, offset = 0): { re: number; im: number }[] {
  return Array.from({ length: count }, (_, i) => ({ re: -(i + 1 + offset), im: 0 }));
}

// The variant's state-sized entries (Q, N's rows, placed and observer poles) follow n states.
function resizeStateWeights(v: VariantSpec, n: number): void {
  if (v.stateFeedback?.method === "lqr") {
    v.stateFeedback = { ...v.stateFeedback, Q: resizeMatrix(v.stateFeedback.Q, n, n, identityFill) };
    if (v.stateFeedback.N) v.stateFeedback.N = resizeMatrix(v.stateFeedback.N, n, v.stateFeedback.N[0]?.length ?? 0);
  } else if (v.stateFeedback?.method === "poles") {
    v.stateFeedback = { method: "poles", poles: resizeList(v.stateFeedback.poles, n, (i) => ({ re: -(i + 1), im: 0 })) };
  }
  if (v.observer?.method === "poles") {
    v.observer = { method: "poles", poles: resizeList(v.observer.poles, n, (i) => ({ re: -2 * (i + 1), im: 0 })) };
  }
}

/**
 * Renames one signal of a linear plant (state space: any kind; transfer function and
 * zero-pole-gain: inputs and outputs). Names must be unique within their kind, non-empty and
 * identifiers; every variant of this plant follows the new name (integral action on an output,
 * the step of a disturbance: renameInVariants).
 */
export function renameSignal(doc: ProjectFile, plantId: string, kind: SignalKind, index: number, name: string): ProjectFile {
  const trimmed = name.trim();
  const plant = findPlant(doc, plantId);
  const model = requireLinear(plant);
  const dims = linearSignalCounts(model);
  requireNamedKind(model, kind);
  if (trimmed === "") throw new Error("A signal name cannot be empty.");
  if (!/^[A-Za-z_][A-Za-z0-9_]*$/.test(trimmed)) throw new Error(`“${trimmed}” is not a usable name: start with a letter or _, then letters, digits or _.`);
  const names = signalNames(model.names, kind, dims[kind]);
  if (index < 0 || index >= names.length) throw new Error(`There is no ${kind.slice(0, -1)} ${index + 1}.`);
  const old = names[index]!;
  if (names.some((n, i) => i !== index && n === trimmed)) throw new Error(`Another ${kind.slice(0, -1)} is already named “${trimmed}”.`);
  names[index] = trimmed;
  const allNames: SignalNamesSpec =
    model.type === "state-space"
      ? {
          states: signalNames(model.names, "states", dims.states),
          inputs: signalNames(model.names, "inputs", dims.inputs),
          outputs: signalNames(model.names, "outputs", dims.outputs),
          ...(dims.disturbances > 0 ? { disturbances: signalNames(model.names, "disturbances", dims.disturbances) } : {}),
          [kind]: names,
        }
      : {
          // Other kinds the file may name (states that fit the realization) are kept as they are.
          ...model.names,
          inputs: signalNames(model.names, "inputs", dims.inputs),
          outputs: signalNames(model.names, "outputs", dims.outputs),
          [kind]: names,
        };
  const changed = replacePlant(doc, plantId, (p) => ({ ...p, model: { ...requireLinear(p), names: allNames } }));
  return renameInVariants(changed, plantId, kind, old, trimmed);
}

// Transfer-function and zero-pole-gain plants name only their inputs and outputs.
function requireNamedKind(model: LinearModelSpec, kind: SignalKind): void {
  if (model.type !== "state-space" && kind !== "inputs" && kind !== "outputs") {
    throw new Error(`A ${model.type === "transfer-function" ? "transfer-function" : "zero-pole-gain"} plant names only its inputs and outputs; its states belong to the realization.`);
  }
}

/** Sets the unit of one signal of a linear plant (empty text: no unit). */
export function setSignalUnit(doc: ProjectFile, plantId: string, kind: SignalKind, index: number, unit: string): ProjectFile {
  const model = requireLinear(findPlant(doc, plantId));
  requireNamedKind(model, kind);
  const dims = linearSignalCounts(model);
  if (index < 0 || index >= dims[kind]) throw new Error(`There is no ${kind.slice(0, -1)} ${index + 1}.`);
  const units = { ...(model.units ?? {}) };
  const list = signalUnits(model.units, kind, dims[kind]);
  list[index] = unit.trim();
  units[kind] = list;
  return replacePlant(doc, plantId, (p) => ({ ...p, model: { ...requireLinear(p), units } }));
}

/** Replaces the plant's model (switching between state-space, transfer-function and zero-pole-gain entry). */
export function setModel(doc: ProjectFile, plantId: string, model: ModelSpec): ProjectFile {
  return replacePlant(doc, plantId, (p) => ({ ...p, model: structuredClone(model) }));
}

function uniqueVariantId(doc: ProjectFile, base: string): string {
  const stem = base.replace(/[^A-Za-z0-9_-]+/g, "-").replace(/^-+|-+$/g, "") || "variant";
  let id = stem;
  for (let k = 2; doc.variants.some((v) => v.id === id); k++) id = `${stem}-${k}`;
  return id;
}

/** A new variant of `plantId`: pole placement at −1, −2, … or LQR with identity weights. */
export function addVariant(doc: ProjectFile, plantId: string, method: "poles" | "lqr", dims: PlantDimensions): { document: ProjectFile; id: string } {
  findPlant(doc, plantId);
  const id = uniqueVariantId(doc, method === "lqr" ? "lqr" : "poles");
  const variant: VariantSpec = {
    id,
    name: method === "lqr" ? "LQR design" : "Pole placement",
    plant: plantId,
    stateFeedback:
      method === "lqr"
        ? { method: "lqr", Q: resizeMatrix(undefined, dims.states, dims.states, identityFill), R: resizeMatrix(undefined, dims.inputs, dims.inputs, identityFill) }
        : { method: "poles", poles: defaultPoles(dims.states) },
    margins: { at: "plant-input" },
  };
  return { document: { ...doc, variants: [...doc.variants, variant] }, id };
}

export function duplicateVariant(doc: ProjectFile, variantId: string): { document: ProjectFile; id: string } {
  const source = findVariant(doc, variantId);
  const id = uniqueVariantId(doc, `${source.id}-copy`);
  const copy: VariantSpec = { ...structuredClone(source), id, name: `${source.name ?? source.id} (copy)`, parent: source.id };
  delete copy.baseline;
  const at = doc.variants.indexOf(source);
  const variants = [...doc.variants];
  variants.splice(at + 1, 0, copy);
  return { document: { ...doc, variants }, id };
}

export function removeVariant(doc: ProjectFile, variantId: string): ProjectFile {
  findVariant(doc, variantId);
  return {
    ...doc,
    variants: doc.variants.filter((v) => v.id !== variantId).map((v) => (v.parent === variantId ? (({ parent: _p, ...rest }) => rest)(v) : v)),
    ...(doc.signOffs ? { signOffs: doc.signOffs.filter((s) => s.variant !== variantId) } : {}),
  };
}
