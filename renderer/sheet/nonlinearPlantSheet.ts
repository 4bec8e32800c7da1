/**
 * The design sheet's content for a plant typed as nonlinear equations: the equations as typed,
 * the parameters, the solved operating point, the linearization there, and the declared limits
 * (actuator min/max/rate and state bounds). Pure data, read by NonlinearPlantSection and by the
 * "Assumptions and limits" section.
 */
import type { PlantSpec, VariantResult } from "../../shared-engine/api/contract";
import { fullDigits, plantMatrices, type LabelledMatrix, type SignalLabels } from "./sheetModel";

/** The plant model when it is typed as nonlinear equations, else null. */
export type NonlinearModel = Extract<PlantSpec["model"], { type: "nonlinear" }>;

export function nonlinearModelOf(plant: PlantSpec): NonlinearModel | null {
  return plant.model.type === "nonlinear" ? plant.model : null;
}

export interface EquationRow {
  kind: "state" | "output";
  /** Left-hand side as printed: "d(backlog)/dt" or "backlog_out". */
  lhs: string;
  unit: string;
  /** The right-hand side exactly as typed in the project. */
  equation: string;
}

/** State equations (one per declared state, in declaration order) then output equations. */
export function equationRows(model: NonlinearModel): EquationRow[] {
  const rows: EquationRow[] = model.states.map((s) => ({
    kind: "state" as const,
    lhs: `d(${s.name})/dt`,
    unit: s.unit ? `${s.unit}/s` : "",
    equation: model.stateEquations[s.name] ?? "(missing)",
  }));
  for (const o of model.outputs) rows.push({ kind: "output", lhs: o.name, unit: o.unit ?? "", equation: o.equation });
  return rows;
}

export interface ParameterRow {
  name: string;
  value: string;
  unit: string;
}

export function parameterRows(model: NonlinearModel): ParameterRow[] {
  return model.parameters.map((p) => ({ name: p.name, value: fullDigits(p.value), unit: p.unit ?? "" }));
}

export interface OperatingPointRow {
  group: "state" | "input" | "disturbance" | "output";
  name: string;
  value: string;
  unit: string;
  /** How the value was fixed: solved for, given, or held at an output set-point. */
  role: string;
}

export interface OperatingPointTable {
  rows: OperatingPointRow[];
  residual: string;
  iterations: number;
}

/** The solved operating point (absolute values) with units and how each value was obtained. */
export function operatingPointTable(model: NonlinearModel, result: VariantResult): OperatingPointTable | null {
  const op = result.plant?.operatingPoint;
  if (!op) return null;
  const unknowns = new Set(model.operatingPoint.unknowns);
  const setpoints = model.operatingPoint.outputSetpoints ?? {};
  const unitOf = (list: readonly { name: string; unit?: string }[], name: string): string => list.find((s) => s.name === name)?.unit ?? "";
  const rows: OperatingPointRow[] = [];
  const add = (group: OperatingPointRow["group"], values: Record<string, number>, declared: readonly { name: string; unit?: string }[], role: (name: string) => string) => {
    for (const [name, value] of Object.entries(values)) rows.push({ group, name, value: fullDigits(value), unit: unitOf(declared, name), role: role(name) });
  };
  add("state", op.states, model.states, (n) => (unknowns.has(n) ? "solved" : "given"));
  add("input", op.inputs, model.inputs, (n) => (unknowns.has(n) ? "solved" : "given"));
  add("disturbance", op.disturbances, model.disturbances, () => "given");
  add("output", op.outputs, model.outputs, (n) => (setpoints[n] !== undefined ? `set-point ${fullDigits(setpoints[n]!)}` : "computed"));
  return { rows, residual: op.residual === 0 ? "0" : op.residual.toExponential(2).replace("-", "−"), iterations: op.iterations };
}

/** The linearization at the operating point as labelled matrices (deviation variables δx, δu, δw, δy). */
export function linearizationMatrices(result: VariantResult, labels: SignalLabels): LabelledMatrix[] {
  const lin = result.plant?.linearization;
  if (!lin) return [];
  return plantMatrices(lin, labels);
}

export interface LimitRow {
  kind: "actuator" | "state bound";
  name: string;
  min: string;
  max: string;
  /** Rate limit per second (actuators only); "—" for states. */
  rate: string;
  unit: string;
}

const bound = (value: number | undefined): string => (value === undefined ? "none" : fullDigits(value));

/** Declared actuator limits (every input) and state bounds (states that declare one). */
export function limitRows(model: NonlinearModel): LimitRow[] {
  const rows: LimitRow[] = model.inputs.map((u) => ({
    kind: "actuator" as const,
    name: u.name,
    min: bound(u.min),
    max: bound(u.max),
    rate: u.rateLimit === undefined ? "none" : `${fullDigits(u.rateLimit)}${u.unit ? ` ${u.unit}` : ""}/s`,
    unit: u.unit ?? "",
  }));
  for (const s of model.states) {
    if (s.min === undefined && s.max === undefined) continue;
    rows.push({ kind: "state bound", name: s.name, min: bound(s.min), max: bound(s.max), rate: "—", unit: s.unit ?? "" });
  }
  return rows;
}

/** Sentences on the declared limits, saying plainly when none are declared. */
export function limitSentences(plant: PlantSpec, nonlinearCheck: boolean): string[] {
  const model = nonlinearModelOf(plant);
  if (!model) return ["No actuator limits or state bounds are declared: the plant is given as a linear model, and the linear design assumes the actuator never saturates."];
  const list: string[] = [];
  const limited = model.inputs.filter((u) => u.min !== undefined || u.max !== undefined || u.rateLimit !== undefined);
  if (limited.length === 0) list.push("No actuator limits are declared for any input: the design and the nonlinear check assume the actuator never saturates.");
  else {
    const unlimited = model.inputs.filter((u) => !limited.includes(u)).map((u) => u.name);
    list.push(
      `Actuator limits are declared for ${limited.map((u) => u.name).join(", ")} (table below)${unlimited.length ? `; none for ${unlimited.join(", ")}` : ""}. The linear design ignores them; ${nonlinearCheck ? "the nonlinear check applies them." : "this variant runs no nonlinear check, so their effect is not simulated."}`,
    );
  }
  const bounded = model.states.filter((s) => s.min !== undefined || s.max !== undefined);
  list.push(bounded.length === 0 ? "No state bounds are declared." : `State bounds are declared for ${bounded.map((s) => s.name).join(", ")} (table below): the domain in which the equations are valid.`);
  return list;
}
