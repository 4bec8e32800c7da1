/**
 * Parameter checks of the nonlinear requests: the plant spec (checked equation by equation so
 * the error names the field and column), the operating-point request, the integral action and
 * the scenario. Values the nonlinear layer checks itself (names declared, sizes) are left to it
 * and re-raised with their field path by `withFieldPaths`.
 */
import { EngineError } from "../errors";
import { compileNonlinearPlant, type CompiledNonlinearPlant, type NonlinearPlantSpec, type OperatingPointRequest } from "../nonlinear";
import { checkPlantSpec } from "./equationCheck";
import { withFieldPaths } from "./handlerSupport";
import type { IntegralActionJson, ScenarioJson } from "./nonlinearContractTypes";
import { ANALYSIS_LIMITS, optionalEnumParam, optionalNumberParam, requireMatrixParam } from "./params";

/** Most states, inputs, disturbances, parameters or outputs of a plant sent through the bridge. */
export const MAX_PLANT_SIGNALS = 200;

function fail(kind: "invalid-argument" | "non-finite" | "empty", field: string, message: string): never {
  throw new EngineError(kind, message, { field });
}

function objectField(value: unknown, field: string, what: string): Record<string, unknown> {
  if (value === null || typeof value !== "object" || Array.isArray(value)) fail("invalid-argument", field, `${field} must be ${what}`);
  return value as Record<string, unknown>;
}

function listField(value: unknown, field: string, maxLength: number): unknown[] {
  if (!Array.isArray(value)) fail("invalid-argument", field, `${field} must be a list`);
  if (value.length > maxLength) fail("invalid-argument", field, `${field} has ${value.length} entries; at most ${maxLength} are accepted`);
  return value;
}

function stringField(value: unknown, field: string): string {
  if (typeof value !== "string") fail("invalid-argument", field, `${field} must be a name (text), it is ${JSON.stringify(value) ?? "missing"}`);
  return value;
}

function finiteField(value: unknown, field: string): number {
  if (typeof value !== "number") fail("invalid-argument", field, `${field} must be a number (it is ${JSON.stringify(value) ?? "missing"})`);
  if (!Number.isFinite(value)) fail("non-finite", field, `${field} is ${value}; it must be finite`);
  return value;
}

/** A record of finite numbers by name (names are checked against the plant by the engine). */
function numberRecord(value: unknown, field: string): Record<string, number> | undefined {
  if (value === undefined || value === null) return undefined;
  const record = objectField(value, field, "an object of numbers by name");
  const keys = Object.keys(record);
  if (keys.length > MAX_PLANT_SIGNALS * 4) fail("invalid-argument", field, `${field} has ${keys.length} entries; at most ${MAX_PLANT_SIGNALS * 4} are accepted`);
  return Object.fromEntries(keys.map((k) => [k, finiteField(record[k], `${field}.${k}`)]));
}

/**
 * The `plant` field compiled. Every equation is parsed first, so a syntax error or an unknown
 * name fails as "parse-error" with `field` = "plant.stateEquations.h" (or
 * "plant.outputs[0].equation") and `column`; a structural problem fails as "validation" with
 * the spec path (`plant.states[1].name`).
 */
export function requirePlantParam(params: Record<string, unknown>, field = "plant"): CompiledNonlinearPlant {
  const spec = objectField(params[field], field, "a nonlinear plant {states, inputs, disturbances, parameters, stateEquations, outputs}");
  for (const list of ["states", "inputs", "disturbances", "parameters", "outputs"] as const) {
    if (Array.isArray(spec[list]) && (spec[list] as unknown[]).length > MAX_PLANT_SIGNALS) {
      fail("invalid-argument", `${field}.${list}`, `${field}.${list} has ${(spec[list] as unknown[]).length} entries; at most ${MAX_PLANT_SIGNALS} are accepted`);
    }
  }
  const { problems } = checkPlantSpec(spec);
  const first = problems[0];
  if (first) {
    const kind = first.column !== null ? "parse-error" : "validation";
    throw new EngineError(kind, `${field}.${first.field}: ${first.message}`, {
      field: `${field}.${first.field}`,
      ...(first.column !== null ? { column: first.column } : {}),
      problems: problems.length,
    });
  }
  return withFieldPaths(() => compileNonlinearPlant(spec as unknown as NonlinearPlantSpec), { prefix: field });
}

/** The operating-point request (`request` field), copied into a clean object. */
export function requireOperatingPointRequestParam(params: Record<string, unknown>, field = "request"): OperatingPointRequest {
  const r = objectField(params[field], field, "an operating-point request {unknowns, states?, inputs?, disturbances?, parameters?, outputSetpoints?}");
  const unknowns = listField(r.unknowns, `${field}.unknowns`, MAX_PLANT_SIGNALS * 2).map((u, i) => stringField(u, `${field}.unknowns[${i}]`));
  const request: OperatingPointRequest = { unknowns };
  for (const key of ["states", "inputs", "disturbances", "parameters", "outputSetpoints"] as const) {
    const record = numberRecord(r[key], `${field}.${key}`);
    if (record) request[key] = record;
  }
  const tolerance = optionalNumberParam({ [`${field}.tolerance`]: r.tolerance }, `${field}.tolerance`, { positive: true, max: 1 });
  const maxIterations = optionalNumberParam({ [`${field}.maxIterations`]: r.maxIterations }, `${field}.maxIterations`, { integer: true, min: 1, max: 10_000 });
  if (tolerance !== undefined) request.tolerance = tolerance;
  if (maxIterations !== undefined) request.maxIterations = maxIterations;
  return request;
}

/** The optional `integral` field of the simulation (names + gain in the simulator's convention). */
export function optionalIntegralParam(params: Record<string, unknown>, field = "integral", options: { antiWindup: boolean } = { antiWindup: true }): IntegralActionJson | undefined {
  if (params[field] === undefined || params[field] === null) return undefined;
  const o = objectField(params[field], field, "{outputs, Ki, antiWindup?, trackingTimeSec?}");
  const outputs = listField(o.outputs, `${field}.outputs`, MAX_PLANT_SIGNALS).map((u, i) => stringField(u, `${field}.outputs[${i}]`));
  if (outputs.length === 0) fail("empty", `${field}.outputs`, `${field}.outputs is empty; omit ${field} for no integral action`);
  const Ki = requireMatrixParam({ [`${field}.Ki`]: o.Ki }, `${field}.Ki`);
  const result: IntegralActionJson = { outputs, Ki };
  if (options.antiWindup) {
    const antiWindup = optionalEnumParam({ [`${field}.antiWindup`]: o.antiWindup }, `${field}.antiWindup`, ["back-calculation", "conditional", "none"] as const);
    const trackingTimeSec = optionalNumberParam({ [`${field}.trackingTimeSec`]: o.trackingTimeSec }, `${field}.trackingTimeSec`, { positive: true });
    if (antiWindup !== undefined) result.antiWindup = antiWindup;
    if (trackingTimeSec !== undefined) result.trackingTimeSec = trackingTimeSec;
  }
  return result;
}

/** The optional `scenario` field: set-point steps, disturbance steps/ramps, initial offsets. */
export function optionalScenarioParam(params: Record<string, unknown>, field = "scenario"): ScenarioJson {
  if (params[field] === undefined || params[field] === null) return {};
  const s = objectField(params[field], field, "{setpointSteps?, disturbanceChanges?, initialOffset?}");
  const scenario: ScenarioJson = {};
  const optionalTime = (o: Record<string, unknown>, path: string): { time?: number } => {
    if (o.time === undefined || o.time === null) return {};
    const time = finiteField(o.time, `${path}.time`);
    if (time < 0) fail("invalid-argument", `${path}.time`, `${path}.time must not be negative (it is ${time})`);
    return { time };
  };
  if (s.setpointSteps !== undefined) {
    scenario.setpointSteps = listField(s.setpointSteps, `${field}.setpointSteps`, ANALYSIS_LIMITS.maxSweepValues).map((item, k) => {
      const path = `${field}.setpointSteps[${k}]`;
      const o = objectField(item, path, "{output, size, time?}");
      return { output: stringField(o.output, `${path}.output`), size: finiteField(o.size, `${path}.size`), ...optionalTime(o, path) };
    });
  }
  if (s.disturbanceChanges !== undefined) {
    scenario.disturbanceChanges = listField(s.disturbanceChanges, `${field}.disturbanceChanges`, ANALYSIS_LIMITS.maxSweepValues).map((item, k) => {
      const path = `${field}.disturbanceChanges[${k}]`;
      const o = objectField(item, path, "{disturbance, kind, size, time?}");
      const kind = o.kind;
      if (kind !== "step" && kind !== "ramp") fail("invalid-argument", `${path}.kind`, `${path}.kind must be "step" or "ramp" (it is ${JSON.stringify(kind) ?? "missing"})`);
      return { disturbance: stringField(o.disturbance, `${path}.disturbance`), kind, size: finiteField(o.size, `${path}.size`), ...optionalTime(o, path) };
    });
  }
  const offset = numberRecord(s.initialOffset, `${field}.initialOffset`);
  if (offset) scenario.initialOffset = offset;
  return scenario;
}

/** Error-argument names of the nonlinear layer mapped to bridge fields. */
export const NONLINEAR_FIELD_NAMES: Readonly<Record<string, string>> = Object.freeze({ Ki: "integral.Ki" });
