/**
 * The design sheet's content as plain data: everything the printed record shows, computed from
 * the project document, the chosen variant and its evaluated result. Pure (no DOM, no React), so
 * tests check the content directly and the component only lays it out.
 */
import type { PlantSpec, ProjectFile, VariantResult, VariantSpec } from "../../shared-engine/api/contract";

/** A recorded sign-off, as stored in the project document. */
export type SignOffSpec = NonNullable<ProjectFile["signOffs"]>[number];
import { formatComplex, formatReal } from "../../shared-engine/format";
import { fingerprint } from "../../shared-engine/project/fingerprint";
import { limitSentences } from "./nonlinearPlantSheet";

export type PageSize = "a4" | "letter";
export type SignOffRole = SignOffSpec["role"];
export const SIGN_OFF_ROLES: readonly SignOffRole[] = ["prepared", "reviewed", "approved"];

export interface SheetInput {
  project: ProjectFile;
  variantId: string;
  result: VariantResult;
  /** Revision of the project document the sheet records (e.g. "7", or a VCS tag). */
  revision: string;
  /** Date printed in the header (ISO "2025-03-14" recommended). */
  date: string;
  pageSize: PageSize;
  /** Engine version that produced `result`; it is part of the fingerprint. */
  engineVersion: string;
}

/** A labelled matrix: rows and columns carry signal names and units. */
export interface LabelledMatrix {
  symbol: string;
  caption: string;
  rowLabels: string[];
  columnLabels: string[];
  values: number[][];
  /** Unit of each entry, when known (e.g. "consumers/msg"); "" when not. */
  entryUnit?: (row: number, column: number) => string;
}

export interface PoleRow {
  /** The pole as computed (s for continuous, z for sampled). */
  pole: string;
  /** Magnitude |z| (sampled only). */
  magnitude?: string;
  /** Equivalent continuous pole s = ln(z)/T (sampled only). */
  equivalent?: string;
  dampingRatio: string;
  naturalFrequency: string;
  timeConstant: string;
}

export interface SignOffStatus {
  /** Sign-offs of this variant whose fingerprint equals the current one. */
  matching: SignOffSpec[];
  /** Sign-offs of this variant recorded for an earlier (different) design. */
  stale: SignOffSpec[];
  /** True when the variant was signed off but not for this exact design: show the banner. */
  changedSinceSignOff: boolean;
}

/** Full precision: the shortest text that reads back to the same double. */
export function fullDigits(value: number): string {
  if (!Number.isFinite(value)) return Number.isNaN(value) ? "not a number" : value > 0 ? "unbounded" : "−unbounded";
  return String(value).replace("-", "−");
}

/** Rounded for reading: 4 significant digits. */
export function rounded(value: number, digits = 4): string {
  return formatReal(value, digits).replace("-", "−");
}

const optional = (value: number | null | undefined, unit: string, digits = 4, none = "none"): string =>
  value === null || value === undefined ? none : `${rounded(value, digits)}${unit ? ` ${unit}` : ""}`;

/**
 * Damping ratio, natural frequency and time constant of a continuous pole s:
 * ωn = |s|, ζ = −Re(s)/|s|, τ = −1/Re(s) (stable poles; an unstable or marginal pole has none).
 */
export function continuousPoleMetrics(s: { re: number; im: number }): { dampingRatio: string; naturalFrequency: string; timeConstant: string } {
  const wn = Math.hypot(s.re, s.im);
  return {
    dampingRatio: wn === 0 ? "—" : rounded(-s.re / wn),
    naturalFrequency: rounded(wn),
    timeConstant: s.re < 0 ? rounded(-1 / s.re) : s.re === 0 ? "none (marginal)" : "none (unstable)",
  };
}

/** Pole table rows; sampled poles are mapped through s = ln(z)/T before ζ, ωn and τ. */
export function poleRows(poles: readonly { re: number; im: number }[], sampleTime: number | null): PoleRow[] {
  return poles.map((p) => {
    if (sampleTime === null) return { pole: formatComplex(p, 6), ...continuousPoleMetrics(p) };
    const r = Math.hypot(p.re, p.im);
    const base = { pole: formatComplex(p, 6), magnitude: rounded(r, 6) };
    if (r === 0) return { ...base, equivalent: "−∞ (deadbeat, z = 0)", dampingRatio: "1", naturalFrequency: "unbounded", timeConstant: "0 (one sample)" };
    const s = { re: Math.log(r) / sampleTime, im: Math.atan2(p.im, p.re) / sampleTime };
    return { ...base, equivalent: formatComplex(s, 6), ...continuousPoleMetrics(s) };
  });
}

export function signOffStatus(signOffs: readonly SignOffSpec[] | undefined, variantId: string, currentFingerprint: string): SignOffStatus {
  const mine = (signOffs ?? []).filter((s) => s.variant === variantId);
  const matching = mine.filter((s) => s.fingerprint === currentFingerprint);
  const stale = mine.filter((s) => s.fingerprint !== currentFingerprint);
  return { matching, stale, changedSinceSignOff: stale.length > 0 };
}

function names(list: readonly string[] | undefined, count: number, prefix: string): string[] {
  return Array.from({ length: count }, (_, i) => list?.[i] ?? `${prefix}${i + 1}`);
}

function withUnit(name: string, unit: string | undefined): string {
  return unit ? `${name} (${unit})` : name;
}

export interface SignalLabels {
  states: string[];
  inputs: string[];
  outputs: string[];
  disturbances: string[];
  stateUnits: string[];
  inputUnits: string[];
  outputUnits: string[];
  disturbanceUnits: string[];
}

export function signalLabels(plant: PlantSpec, result: VariantResult): SignalLabels {
  const dims = result.plant?.dimensions;
  const model = plant.model;
  const reported = result.plant?.names;
  const count = (key: "states" | "inputs" | "outputs" | "disturbances"): number => dims?.[key] ?? reported?.[key].length ?? 0;
  // Nonlinear plants carry their names in the equations; the result's names are used for them.
  const modelNames = "names" in model ? (model.names as { states?: string[]; inputs?: string[]; outputs?: string[]; disturbances?: string[] } | undefined) : undefined;
  const units =
    model.type === "nonlinear"
      ? {
          states: model.states.map((x) => x.unit ?? ""),
          inputs: model.inputs.map((u) => u.unit ?? ""),
          outputs: model.outputs.map((y) => y.unit ?? ""),
          disturbances: model.disturbances.map((w) => w.unit ?? ""),
        }
      : (("units" in model ? (model.units as typeof modelNames) : undefined) ?? {});
  return {
    states: reported?.states ?? names(modelNames?.states, count("states"), "x"),
    inputs: reported?.inputs ?? names(modelNames?.inputs, count("inputs"), "u"),
    outputs: reported?.outputs ?? names(modelNames?.outputs, count("outputs"), "y"),
    disturbances: reported?.disturbances ?? names(modelNames?.disturbances, count("disturbances"), "w"),
    stateUnits: Array.from({ length: count("states") }, (_, i) => units.states?.[i] ?? ""),
    inputUnits: Array.from({ length: count("inputs") }, (_, i) => units.inputs?.[i] ?? ""),
    outputUnits: Array.from({ length: count("outputs") }, (_, i) => units.outputs?.[i] ?? ""),
    disturbanceUnits: Array.from({ length: count("disturbances") }, (_, i) => units.disturbances?.[i] ?? ""),
  };
}

const ratioUnit = (top: string, bottom: string): string => (top || bottom ? `${top || "1"}/${bottom || "1"}` : "");

/** The plant matrices with named, unit-labelled rows and columns (state-space plants, or the discretized model). */
export function plantMatrices(model: { A: number[][]; B: number[][]; C: number[][]; D?: number[][]; F?: number[][]; E?: number[][] }, l: SignalLabels, suffix = ""): LabelledMatrix[] {
  const x = l.states.map((n, i) => withUnit(n, l.stateUnits[i]));
  const u = l.inputs.map((n, i) => withUnit(n, l.inputUnits[i]));
  const y = l.outputs.map((n, i) => withUnit(n, l.outputUnits[i]));
  const w = l.disturbances.map((n, i) => withUnit(n, l.disturbanceUnits[i]));
  const list: LabelledMatrix[] = [
    { symbol: `A${suffix}`, caption: "state to state derivative", rowLabels: x, columnLabels: x, values: model.A },
    { symbol: `B${suffix}`, caption: "input to state", rowLabels: x, columnLabels: u, values: model.B },
    { symbol: `C${suffix}`, caption: "state to output", rowLabels: y, columnLabels: x, values: model.C },
  ];
  if (model.D) list.push({ symbol: `D${suffix}`, caption: "input to output (direct)", rowLabels: y, columnLabels: u, values: model.D });
  if (model.F && model.F[0] && model.F[0].length > 0) list.push({ symbol: `F${suffix}`, caption: "disturbance to state", rowLabels: x, columnLabels: w, values: model.F });
  if (model.E && model.E[0] && model.E[0].length > 0) list.push({ symbol: `E${suffix}`, caption: "disturbance to output", rowLabels: y, columnLabels: w, values: model.E });
  return list;
}

/** The gains with rows and columns named; each entry's unit is (row unit)/(column unit). */
export function gainMatrices(result: VariantResult, variant: VariantSpec, l: SignalLabels): LabelledMatrix[] {
  const g = result.gain;
  if (!g) return [];
  const list: LabelledMatrix[] = [];
  const integrated = (variant.integralAction?.outputs ?? []).map((o) => (typeof o === "number" ? l.outputs[o] ?? `y${o + 1}` : o));
  const integratedUnits = (variant.integralAction?.outputs ?? []).map((o) => {
    const i = typeof o === "number" ? o : l.outputs.indexOf(o);
    return l.outputUnits[i] ?? "";
  });
  if (g.K.length > 0) {
    list.push({
      symbol: "K",
      caption: "state feedback, u = −K x (+ reference terms)",
      rowLabels: l.inputs,
      columnLabels: l.states,
      values: g.K,
      entryUnit: (r, c) => ratioUnit(l.inputUnits[r] ?? "", l.stateUnits[c] ?? ""),
    });
  }
  if (g.Ki) {
    list.push({
      symbol: "Ki",
      caption: "integral gain on the integrated tracking error",
      rowLabels: l.inputs,
      columnLabels: integrated.map((n) => `∫ ${n}`),
      values: g.Ki,
      entryUnit: (r, c) => ratioUnit(l.inputUnits[r] ?? "", integratedUnits[c] ? `(${integratedUnits[c]}·s)` : "s"),
    });
  }
  if (g.referenceGain) {
    list.push({ symbol: "N", caption: "reference feedforward, u = −K x + N r", rowLabels: l.inputs, columnLabels: l.outputs.map((n) => `r ${n}`), values: g.referenceGain, entryUnit: (r, c) => ratioUnit(l.inputUnits[r] ?? "", l.outputUnits[c] ?? "") });
  }
  if (g.L) list.push({ symbol: "L", caption: "observer gain on the output error", rowLabels: l.states, columnLabels: l.outputs, values: g.L, entryUnit: (r, c) => ratioUnit(l.stateUnits[r] ?? "", l.outputUnits[c] ?? "") });
  if (g.M) list.push({ symbol: "M", caption: "current-estimate observer gain", rowLabels: l.states, columnLabels: l.outputs, values: g.M, entryUnit: (r, c) => ratioUnit(l.stateUnits[r] ?? "", l.outputUnits[c] ?? "") });
  return list;
}

/** A term → value list describing the design method and its parameters, in words. */
export function methodParameters(variant: VariantSpec): { term: string; value: string }[] {
  const rows: { term: string; value: string }[] = [];
  const complexList = (list: readonly (number | { re: number; im: number })[]): string =>
    list.map((p) => formatComplex(typeof p === "number" ? { re: p, im: 0 } : p, 6)).join(", ");
  const sf = variant.stateFeedback;
  if (!sf) rows.push({ term: "State feedback", value: "none (open-loop analysis only)" });
  else if (sf.method === "poles") rows.push({ term: "State feedback", value: "pole placement" }, { term: "Requested poles", value: complexList(sf.poles) });
  else {
    rows.push({ term: "State feedback", value: "linear-quadratic regulator (Riccati equation)" });
    rows.push({ term: "Q (state weight)", value: matrixInline(sf.Q) }, { term: "R (input weight)", value: matrixInline(sf.R) });
    if (sf.N) rows.push({ term: "N (cross weight)", value: matrixInline(sf.N) });
  }
  const ia = variant.integralAction;
  if (ia) {
    rows.push({ term: "Integral action", value: `on ${ia.outputs.join(", ")}${ia.antiWindup ? `; anti-windup: ${ia.antiWindup}` : ""}` });
    if (ia.weights) rows.push({ term: "Integrator weights", value: ia.weights.map((w) => fullDigits(w)).join(", ") });
    if (ia.poles) rows.push({ term: "Integrator poles", value: complexList(ia.poles) });
  } else rows.push({ term: "Integral action", value: "none" });
  if (variant.referenceFeedforward) rows.push({ term: "Reference feedforward", value: "static gain for zero steady-state error on the nominal model" });
  const ob = variant.observer;
  if (!ob) rows.push({ term: "Observer", value: "none (full state measured)" });
  else if (ob.method === "poles") rows.push({ term: "Observer", value: "pole placement" }, { term: "Observer poles", value: complexList(ob.poles) });
  else {
    rows.push({ term: "Observer", value: `steady-state Kalman filter${ob.form ? ` (${ob.form} form)` : ""}` });
    rows.push({ term: "Process noise covariance", value: matrixInline(ob.processNoise) }, { term: "Measurement noise covariance", value: matrixInline(ob.measurementNoise) });
  }
  return rows;
}

export function matrixInline(m: readonly (readonly number[])[]): string {
  return `[${m.map((row) => row.map(fullDigits).join(", ")).join("; ")}]`;
}

/** Assumptions and limits, each a sentence. */
export function assumptions(plant: PlantSpec, variant: VariantSpec, result: VariantResult): string[] {
  const list: string[] = [];
  const T = plant.model.sampleTime;
  if (variant.discretize) {
    const method = variant.discretize.method === "zoh" ? "zero-order hold" : `Tustin (bilinear)${variant.discretize.prewarpRadPerSec ? `, prewarped at ${fullDigits(variant.discretize.prewarpRadPerSec)} rad/s` : ""}`;
    list.push(`The continuous plant is discretized by ${method} with sample period T = ${fullDigits(variant.discretize.sampleTime)} s; the controller is designed and checked in discrete time.`);
  } else if (T !== null) list.push(`The plant is given sampled with period T = ${fullDigits(T)} s.`);
  else list.push("Continuous time: the controller is assumed to act continuously (no sampling).");
  list.push("No input or output transport delays are modelled; the delay margin below says how much delay the loop tolerates.");
  list.push(...limitSentences(plant, variant.nonlinearCheck !== undefined));
  if (variant.integralAction?.antiWindup && variant.integralAction.antiWindup !== "none") {
    list.push(`Actuator limits are not part of the linear design; anti-windup (${variant.integralAction.antiWindup}) is specified for the integrators.`);
  }
  if (plant.model.type === "nonlinear") {
    list.push(
      `The design uses the linearization of the equations at the operating point (valid near it only)${variant.nonlinearCheck ? "; the nonlinear check below goes back to the equations" : ""}${variant.robustness ? "; the robustness sweep re-solves and re-linearizes over parameter changes" : ""}.`,
    );
  } else list.push("The model is linear (for a linearised plant: valid near its operating point only) and the design is checked on this nominal model only.");
  if (result.plant && result.plant.stable === false) list.push("The open-loop plant is not stable: the loop must be closed for safe operation.");
  return list;
}

/** The requirement checklist: every project requirement with its result for this variant. */
export function requirementRows(project: ProjectFile, result: VariantResult): { id: string; description: string; limit: string; value: string; status: "pass" | "fail" | "not evaluated" }[] {
  return (project.requirements ?? []).map((r) => {
    const check = result.checks.find((c) => c.name === `requirement:${r.id}`);
    const limit = [r.min !== undefined ? `≥ ${fullDigits(r.min)}` : "", r.max !== undefined ? `≤ ${fullDigits(r.max)}` : ""].filter(Boolean).join(" and ");
    return {
      id: r.id,
      description: r.description ?? r.metric,
      limit: `${r.metric} ${limit}`,
      value: check?.value !== undefined ? rounded(check.value, 6) : check ? check.detail : "—",
      status: check ? (check.passed ? "pass" : "fail") : "not evaluated",
    };
  });
}

export interface SheetModel {
  input: SheetInput;
  plant: PlantSpec;
  variant: VariantSpec;
  fingerprint: string;
  labels: SignalLabels;
  signOff: SignOffStatus;
  sampleTime: number | null;
}

/** Gathers the sheet's data; throws an Error naming the variant when it is not in the project. */
export function buildSheetModel(input: SheetInput): SheetModel {
  const variant = input.project.variants.find((v) => v.id === input.variantId);
  if (!variant) throw new Error(`No variant "${input.variantId}" in project "${input.project.name}"; variants are: ${input.project.variants.map((v) => v.id).join(", ") || "none"}`);
  const plant = input.project.plants.find((p) => p.id === variant.plant);
  if (!plant) throw new Error(`Variant "${variant.id}" names plant "${variant.plant}", which is not in the project`);
  const print = fingerprint(plant, variant, input.engineVersion);
  return {
    input,
    plant,
    variant,
    fingerprint: print,
    labels: signalLabels(plant, input.result),
    signOff: signOffStatus(input.project.signOffs, variant.id, print),
    sampleTime: input.result.plant?.sampleTime ?? input.result.discrete?.sampleTime ?? plant.model.sampleTime,
  };
}

export { optional };
