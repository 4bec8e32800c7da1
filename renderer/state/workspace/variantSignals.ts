/**
 * Variant fields that refer to a plant's signals, kept consistent when the plant changes. A
 * variant names signals in: integral action (outputs, by name or 0-based index), the
 * disturbance step (a disturbance, by name or index), the nonlinear check's scenario (set-point
 * outputs, disturbances, states of the initial offset) and the robustness sweep (parameters).
 * It also holds fields sized or constrained by the input and output counts: LQR R (inputs ×
 * inputs) and N's columns, the Kalman noise covariances, unity-feedback margins (one input,
 * one output) and reference feedforward (as many outputs as inputs). Inputs are never named.
 *
 * Two rules: a rename is followed everywhere the old name appears; a signal that is gone (or a
 * field the new plant cannot support) is pruned, and the edit reports what it pruned so the
 * command can say so in its undo label and save message.
 */
import type { ProjectFile, VariantSpec } from "../../../shared-engine/api/contract";
import type { WorkspaceStore } from "./workspaceState";

/** The signals a linear plant offers its variants after an edit. */
export interface PlantSignals {
  inputs: number;
  /** Output names in order (defaults y1, y2, … where the model names none). */
  outputs: string[];
  /** Disturbance names in order; empty for a plant without disturbance inputs. */
  disturbances: string[];
}

/** A document edit that may have pruned variant fields: `pruned` lists them in words. */
export interface ReportedEdit {
  document: ProjectFile;
  pruned: string[];
}

const identityFill = (i: number, j: number): number => (i === j ? 1 : 0);

function resizeMatrix(m: readonly (readonly number[])[] | undefined, rows: number, cols: number, fill: (i: number, j: number) => number = () => 0): number[][] {
  return Array.from({ length: rows }, (_, i) => Array.from({ length: cols }, (_, j) => m?.[i]?.[j] ?? fill(i, j)));
}

/**
 * The matrices a variant sizes by inputs, outputs and disturbances, resized to `signals`: LQR R
 * (new inputs weighted 1), the columns of N (its rows follow the states and stay), Kalman
 * process noise (disturbances × disturbances, or inputs × inputs when the plant has none: the
 * noise then enters through B) and measurement noise (outputs × outputs), new entries identity.
 * Mutates and returns `v` (callers pass a copy).
 */
export function resizeSignalWeights(v: VariantSpec, signals: PlantSignals): VariantSpec {
  const m = signals.inputs;
  const p = signals.outputs.length;
  const d = signals.disturbances.length;
  if (v.stateFeedback?.method === "lqr") {
    v.stateFeedback = { ...v.stateFeedback, R: resizeMatrix(v.stateFeedback.R, m, m, identityFill) };
    if (v.stateFeedback.N) v.stateFeedback.N = resizeMatrix(v.stateFeedback.N, v.stateFeedback.N.length, m);
  }
  if (v.observer?.method === "kalman") {
    const w = d > 0 ? d : m;
    v.observer = { ...v.observer, processNoise: resizeMatrix(v.observer.processNoise, w, w, identityFill), measurementNoise: resizeMatrix(v.observer.measurementNoise, p, p, identityFill) };
  }
  return v;
}

const refersTo = (ref: string | number, names: readonly string[]): boolean => (typeof ref === "number" ? Number.isInteger(ref) && ref >= 0 && ref < names.length : names.includes(ref));
const refText = (ref: string | number, kind: string): string => (typeof ref === "number" ? `${kind} ${ref + 1}` : ref);

/**
 * Prunes the fields of `v` that no longer fit `signals`: integrated outputs that are gone (and
 * any beyond one per input), their weights or poles with them, integral action altogether when
 * none is left; a disturbance step whose disturbance is gone; unity-feedback margins unless the
 * plant has one input and one output; reference feedforward unless it has as many outputs as
 * inputs. Mutates `v` (callers pass a copy) and returns what it pruned, in words.
 */
export function pruneVariantSignals(v: VariantSpec, signals: PlantSignals): string[] {
  const pruned: string[] = [];
  const { inputs: m, outputs, disturbances } = signals;
  if (v.integralAction) {
    const ia = v.integralAction;
    const resolved = ia.outputs.map((o, k) => ({ o, k })).filter(({ o }) => refersTo(o, outputs));
    const keep = resolved.slice(0, m);
    const dropped = ia.outputs.filter((_, k) => !keep.some((x) => x.k === k));
    if (dropped.length > 0) {
      pruned.push(`integral action on ${dropped.map((o) => refText(o, "output")).join(", ")}`);
      if (keep.length === 0) delete v.integralAction;
      else {
        v.integralAction = { ...ia, outputs: keep.map(({ o }) => o) };
        if (ia.weights) v.integralAction.weights = keep.map(({ k }) => ia.weights![k] ?? 1);
        if (ia.poles) v.integralAction.poles = keep.map(({ k }) => ia.poles![k] ?? -1);
      }
    }
  }
  if (v.disturbanceStep) {
    const which = v.disturbanceStep.disturbance;
    if (disturbances.length === 0) pruned.push("the disturbance step (the plant has no disturbance inputs)");
    else if (which !== undefined && !refersTo(which, disturbances)) pruned.push(`the disturbance step of ${refText(which, "disturbance")}`);
    if (disturbances.length === 0 || (which !== undefined && !refersTo(which, disturbances))) delete v.disturbanceStep;
  }
  if (v.margins && "feedback" in v.margins && (m !== 1 || outputs.length !== 1)) {
    pruned.push("the unity-feedback margins (they need one input and one output)");
    delete v.margins;
  }
  if (v.referenceFeedforward && m !== outputs.length) {
    pruned.push("reference feedforward (it needs as many outputs as inputs)");
    delete v.referenceFeedforward;
  }
  return pruned;
}

/**
 * Every variant of `plantId` refitted to `signals` by `refit` (which mutates a copy and returns
 * what it pruned), with each pruned field named with its variant: “integral action on y2 from variant lqr”.
 */
export function refitVariants(doc: ProjectFile, plantId: string, refit: (v: VariantSpec) => string[]): ReportedEdit {
  const pruned: string[] = [];
  const variants = doc.variants.map((v) => {
    if (v.plant !== plantId) return v;
    const copy = structuredClone(v);
    const lost = refit(copy);
    for (const what of lost) pruned.push(`${what} from variant ${v.id}`);
    return copy;
  });
  return { document: { ...doc, variants }, pruned };
}

/** The kinds a variant can name: a linear plant's signals and a nonlinear plant's parameters. */
export type NamedKind = "states" | "inputs" | "outputs" | "disturbances" | "parameters";

function renameIn(v: VariantSpec, kind: NamedKind, from: string, to: string): VariantSpec {
  const rename = <T extends string | number>(x: T): T | string => (x === from ? to : x);
  const next = structuredClone(v);
  const scenario = next.nonlinearCheck?.scenario;
  if (kind === "outputs") {
    if (next.integralAction) next.integralAction.outputs = next.integralAction.outputs.map(rename);
    if (scenario?.setpointSteps) scenario.setpointSteps = scenario.setpointSteps.map((s) => ({ ...s, output: rename(s.output) }));
  } else if (kind === "disturbances") {
    if (next.disturbanceStep?.disturbance !== undefined) next.disturbanceStep.disturbance = rename(next.disturbanceStep.disturbance);
    if (scenario?.disturbanceChanges) scenario.disturbanceChanges = scenario.disturbanceChanges.map((c) => ({ ...c, disturbance: rename(c.disturbance) }));
  } else if (kind === "states") {
    if (scenario?.initialOffset) scenario.initialOffset = Object.fromEntries(Object.entries(scenario.initialOffset).map(([k, x]) => [rename(k), x]));
  } else if (kind === "parameters") {
    if (next.robustness) next.robustness.parameters = next.robustness.parameters.map((p) => ({ ...p, name: rename(p.name) }));
  }
  return next;
}

/**
 * The document with signal `from` of kind `kind` renamed to `to` in every variant of `plantId`
 * (references by index are left alone: they do not change with a name). Variants that do not
 * mention the name come back as the same objects.
 */
export function renameInVariants(doc: ProjectFile, plantId: string, kind: NamedKind, from: string, to: string): ProjectFile {
  if (from === to) return doc;
  const variants = doc.variants.map((v) => {
    if (v.plant !== plantId) return v;
    const renamed = renameIn(v, kind, from, to);
    return JSON.stringify(renamed) === JSON.stringify(v) ? v : renamed;
  });
  return { ...doc, variants };
}

/** “label; removed integral action on y2 from variant lqr”, or the label alone when nothing was pruned. */
export function labelWithPruned(label: string, pruned: readonly string[]): string {
  return pruned.length === 0 ? label : `${label}; removed ${pruned.join(", ")}`;
}

/**
 * Runs a reporting edit on the store as one undo step whose label (and save message) names
 * what the edit pruned. The edit is computed once on the current document to write the label;
 * an edit that throws is handed to the store, which refuses it with the message.
 */
export function editReporting(store: WorkspaceStore, label: string, change: (doc: ProjectFile) => ReportedEdit): boolean {
  const current = store.getState().document;
  let outcome: ReportedEdit | null = null;
  try {
    if (current) outcome = change(current);
  } catch {
    outcome = null; // store.edit below runs it again and reports the error
  }
  const done = outcome;
  return store.edit(labelWithPruned(label, done?.pruned ?? []), (doc) => (done && doc === current ? done.document : change(doc).document));
}
