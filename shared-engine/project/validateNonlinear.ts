/**
 * Validation of the nonlinear parts of a project file: plants of type "nonlinear" (declared
 * signals, equations parsed and name-checked with their column, the operating-point request)
 * and the variant keys `nonlinearCheck` and `robustness`. Every problem carries its JSON path,
 * e.g. `plants[1].model.stateEquations.backlog: at column 7: expected ')' ...`.
 */
import { EngineError } from "../errors";
import { compileExpression, isFunctionName, parseExpression } from "../nonlinear";
import type { Checker, Path } from "./checker";

/** What a variant needs to know about its plant (shared with validateProject). */
export interface PlantDims {
  n: number;
  m: number;
  p: number;
  q: number;
  outputs: string[];
  discrete: boolean;
  /** Present for nonlinear plants: the declared names. */
  nonlinear?: { states: string[]; inputs: string[]; disturbances: string[]; parameters: string[] };
}

const NAME_PATTERN = /^[A-Za-z_][A-Za-z0-9_]*$/;
/** Bounds on simulation and sweep sizes accepted from a file (keeps a hostile file from hanging the workbench). */
const MAX_CHECK_TIMES = 5000;
const MAX_SWEEP_SAMPLES = 10_000;

interface Declared { name: string; path: Path }

function checkSignalList(
  c: Checker, value: unknown, path: Path, keys: readonly string[], options: { nonEmpty?: boolean },
  each: (item: Record<string, unknown>, itemPath: Path) => void, declared: Declared[],
): string[] {
  const list = c.array(value, path, { nonEmpty: options.nonEmpty }) ?? [];
  const names: string[] = [];
  list.forEach((entry, i) => {
    const item = c.object(entry, [...path, i], keys);
    if (!item) return;
    const name = c.string(item.name, [...path, i, "name"], { nonEmpty: true, maxLength: 100 });
    if (name !== undefined) {
      if (!NAME_PATTERN.test(name)) c.problem([...path, i, "name"], `"${name}" is not a name the equations can use (a letter or "_" first, then letters, digits or "_")`);
      else if (isFunctionName(name)) c.problem([...path, i, "name"], `"${name}" is a built-in function name; choose another`);
      const earlier = declared.find((d) => d.name === name);
      if (earlier) c.problem([...path, i, "name"], `"${name}" is already declared (names must be unique across states, inputs, disturbances, parameters and outputs)`);
      declared.push({ name, path: [...path, i, "name"] });
      names.push(name);
    }
    c.string(item.unit, [...path, i, "unit"], { optional: true, maxLength: 100 });
    each(item, [...path, i]);
  });
  return names;
}

function checkBounds(c: Checker, item: Record<string, unknown>, path: Path, extra: string[] = []): void {
  const min = c.number(item.min, [...path, "min"], { optional: true });
  const max = c.number(item.max, [...path, "max"], { optional: true });
  if (min !== undefined && max !== undefined && min > max) c.problem([...path, "min"], `min ${min} is above max ${max}`);
  for (const key of extra) {
    const v = c.number(item[key], [...path, key], { optional: true });
    if (v !== undefined && ((min !== undefined && v < min) || (max !== undefined && v > max))) {
      c.problem([...path, key], `${v} is outside the bounds [${min ?? "−∞"}, ${max ?? "∞"}]`);
    }
  }
}

/** Parses and name-checks one equation; problems read "at column N: ...". */
function checkEquation(c: Checker, value: unknown, path: Path, slots: string[]): void {
  const text = c.string(value, path, { nonEmpty: true });
  if (text === undefined || text.trim() === "") return;
  try {
    compileExpression(parseExpression(text), slots, "equation");
  } catch (error) {
    if (!(error instanceof EngineError)) throw error;
    c.problem(path, error.message.replace(/^in equation, /, ""));
  }
}

function checkValueMap(c: Checker, value: unknown, path: Path, allowed: string[], what: string): Record<string, number> {
  if (value === undefined) return {};
  const obj = c.object(value, path, allowed);
  if (!obj) return {};
  const out: Record<string, number> = {};
  for (const [key, v] of Object.entries(obj)) {
    if (!allowed.includes(key)) {
      c.problem([...path, key], `"${key}" is not a declared ${what}${allowed.length ? ` (${what}s: ${allowed.join(", ")})` : ""}`);
      continue;
    }
    const num = c.number(v, [...path, key]);
    if (num !== undefined) out[key] = num;
  }
  return out;
}

/** Checks a `"type": "nonlinear"` model; returns the dimensions a variant needs, or null. */
export function checkNonlinearModel(c: Checker, value: unknown, path: Path): PlantDims | null {
  const m = c.object(value, path, ["type", "states", "inputs", "disturbances", "parameters", "stateEquations", "outputs", "operatingPoint", "sampleTime"]);
  if (!m) return null;
  if (m.sampleTime !== null) c.problem([...path, "sampleTime"], `must be null: the equations are continuous-time (a variant may discretize the design), is ${JSON.stringify(m.sampleTime) ?? "missing"}`);
  const declared: Declared[] = [];
  const bounds = new Map<string, Record<string, unknown>>();
  const states = checkSignalList(c, m.states, [...path, "states"], ["name", "unit", "min", "max", "initial"], { nonEmpty: true }, (item, p) => {
    checkBounds(c, item, p, ["initial"]);
    if (typeof item.name === "string") bounds.set(item.name, item);
  }, declared);
  const inputs = checkSignalList(c, m.inputs, [...path, "inputs"], ["name", "unit", "min", "max", "rateLimit"], { nonEmpty: true }, (item, p) => {
    checkBounds(c, item, p);
    c.number(item.rateLimit, [...p, "rateLimit"], { optional: true, positive: true });
    if (typeof item.name === "string") bounds.set(item.name, item);
  }, declared);
  const disturbances = checkSignalList(c, m.disturbances, [...path, "disturbances"], ["name", "unit", "nominal"], {}, (item, p) => {
    c.number(item.nominal, [...p, "nominal"], { optional: true });
  }, declared);
  const parameters = checkSignalList(c, m.parameters, [...path, "parameters"], ["name", "unit", "value"], {}, (item, p) => {
    c.number(item.value, [...p, "value"]);
  }, declared);
  const slots = [...states, ...inputs, ...disturbances, ...parameters];
  const outputs = checkSignalList(c, m.outputs, [...path, "outputs"], ["name", "unit", "equation"], { nonEmpty: true }, (item, p) => {
    checkEquation(c, item.equation, [...p, "equation"], slots);
  }, declared);

  const eqPath = [...path, "stateEquations"];
  const eqs = c.object(m.stateEquations, eqPath, states);
  if (eqs) {
    for (const key of Object.keys(eqs)) {
      if (!states.includes(key)) c.problem([...eqPath, key], `"${key}" is not a declared state (states: ${states.join(", ")}); each equation gives d(state)/dt`);
    }
    for (const s of states) {
      if (eqs[s] === undefined) c.problem([...eqPath, s], `is missing: every state needs an equation for its derivative (d${s}/dt)`);
      else checkEquation(c, eqs[s], [...eqPath, s], slots);
    }
  }

  const opPath = [...path, "operatingPoint"];
  const op = c.object(m.operatingPoint, opPath, ["unknowns", "states", "inputs", "disturbances", "parameters", "outputSetpoints", "tolerance", "maxIterations"]);
  if (op) {
    const unknowns = c.array(op.unknowns, [...opPath, "unknowns"]) ?? [];
    const unknownNames: string[] = [];
    unknowns.forEach((u, i) => {
      const name = c.string(u, [...opPath, "unknowns", i], { nonEmpty: true });
      if (name === undefined) return;
      if (!states.includes(name) && !inputs.includes(name)) c.problem([...opPath, "unknowns", i], `"${name}" cannot be solved for: only declared states and inputs can be unknowns`);
      else if (unknownNames.includes(name)) c.problem([...opPath, "unknowns", i], `"${name}" is listed twice`);
      unknownNames.push(name);
    });
    const fixed = { ...checkValueMap(c, op.states, [...opPath, "states"], states, "state"), ...checkValueMap(c, op.inputs, [...opPath, "inputs"], inputs, "input") };
    for (const [name, v] of Object.entries(fixed)) {
      const b = bounds.get(name);
      const lo = typeof b?.min === "number" ? b.min : -Infinity;
      const hi = typeof b?.max === "number" ? b.max : Infinity;
      const kind = states.includes(name) ? "states" : "inputs";
      if (v < lo || v > hi) {
        c.problem([...opPath, kind, name], `${v} is outside the declared bounds [${Number.isFinite(lo) ? lo : "−∞"}, ${Number.isFinite(hi) ? hi : "∞"}] of ${name}${unknownNames.includes(name) ? " (as the initial guess)" : ""}`);
      }
    }
    checkValueMap(c, op.disturbances, [...opPath, "disturbances"], disturbances, "disturbance");
    checkValueMap(c, op.parameters, [...opPath, "parameters"], parameters, "parameter");
    const setpoints = checkValueMap(c, op.outputSetpoints, [...opPath, "outputSetpoints"], outputs, "output");
    const equations = states.length + Object.keys(setpoints).length;
    if (unknowns.length !== equations) {
      c.problem([...opPath, "unknowns"], `lists ${unknowns.length} unknowns but there are ${equations} equations (${states.length} state equations${Object.keys(setpoints).length ? ` and ${Object.keys(setpoints).length} output set-points` : ""}); they must match`);
    }
    c.number(op.tolerance, [...opPath, "tolerance"], { optional: true, positive: true });
    const iters = c.number(op.maxIterations, [...opPath, "maxIterations"], { optional: true, positive: true, integer: true });
    if (iters !== undefined && iters > 10_000) c.problem([...opPath, "maxIterations"], `must be at most 10000, is ${iters}`);
  }
  return {
    n: states.length, m: inputs.length, p: outputs.length, q: disturbances.length, outputs, discrete: false,
    nonlinear: { states, inputs, disturbances, parameters },
  };
}

function checkTimes(c: Checker, value: unknown, path: Path): void {
  const times = c.numberList(value, path, { nonEmpty: true });
  if (!times) return;
  if (times.length > MAX_CHECK_TIMES) c.problem(path, `has ${times.length} times; at most ${MAX_CHECK_TIMES} are allowed`);
  if (times.some((t) => t < 0)) c.problem(path, "must not be negative");
  for (let i = 1; i < times.length; i++) {
    if (!(times[i]! > times[i - 1]!)) {
      c.problem([...path, i], "times must increase strictly");
      break;
    }
  }
}

/** Checks `nonlinearCheck` and `robustness` of a variant against its plant. */
export function checkNonlinearVariantKeys(c: Checker, v: Record<string, unknown>, path: Path, dims: PlantDims | undefined): void {
  for (const key of ["nonlinearCheck", "robustness"] as const) {
    if (v[key] === undefined) continue;
    if (dims && !dims.nonlinear) c.problem([...path, key], `applies only to a plant of type "nonlinear" (the variant's plant is linear)`);
    if (v.stateFeedback === undefined) c.problem([...path, key], "needs a stateFeedback design (the check feeds back the measured states)");
  }
  const nl = dims?.nonlinear;
  if (v.nonlinearCheck !== undefined) {
    const p = [...path, "nonlinearCheck"];
    const nc = c.object(v.nonlinearCheck, p, ["times", "scenario", "relativeTolerance"]);
    if (nc) {
      checkTimes(c, nc.times, [...p, "times"]);
      c.number(nc.relativeTolerance, [...p, "relativeTolerance"], { optional: true, positive: true });
      const sp = [...p, "scenario"];
      const sc = c.object(nc.scenario, sp, ["setpointSteps", "disturbanceChanges", "initialOffset"]);
      if (sc) {
        const integrated = ((v.integralAction as { outputs?: unknown[] } | undefined)?.outputs ?? []).map((o) =>
          typeof o === "number" ? dims?.outputs[o] : o);
        (c.array(sc.setpointSteps, [...sp, "setpointSteps"], { optional: true }) ?? []).forEach((s, i) => {
          const ip = [...sp, "setpointSteps", i];
          const step = c.object(s, ip, ["output", "size", "time"]);
          if (!step) return;
          const out = c.string(step.output, [...ip, "output"], { nonEmpty: true });
          if (out !== undefined && !integrated.includes(out)) {
            c.problem([...ip, "output"], `"${out}" has no integral action in this variant, so a set-point step cannot act on it (integrated outputs: ${integrated.join(", ") || "none"})`);
          }
          c.number(step.size, [...ip, "size"]);
          c.number(step.time, [...ip, "time"], { optional: true, nonNegative: true });
        });
        (c.array(sc.disturbanceChanges, [...sp, "disturbanceChanges"], { optional: true }) ?? []).forEach((s, i) => {
          const ip = [...sp, "disturbanceChanges", i];
          const change = c.object(s, ip, ["disturbance", "kind", "size", "time"]);
          if (!change) return;
          const name = c.string(change.disturbance, [...ip, "disturbance"], { nonEmpty: true });
          if (name !== undefined && nl && !nl.disturbances.includes(name)) c.problem([...ip, "disturbance"], `"${name}" is not a declared disturbance (disturbances: ${nl.disturbances.join(", ") || "none"})`);
          c.oneOf(change.kind, [...ip, "kind"], ["step", "ramp"] as const);
          c.number(change.size, [...ip, "size"]);
          c.number(change.time, [...ip, "time"], { optional: true, nonNegative: true });
        });
        if (sc.initialOffset !== undefined) checkValueMap(c, sc.initialOffset, [...sp, "initialOffset"], nl?.states ?? Object.keys(sc.initialOffset as object), "state");
      }
    }
  }
  if (v.robustness !== undefined) {
    const p = [...path, "robustness"];
    const rb = c.object(v.robustness, p, ["parameters", "sampling"]);
    if (rb) {
      const params = c.array(rb.parameters, [...p, "parameters"], { nonEmpty: true }) ?? [];
      params.forEach((entry, i) => {
        const ip = [...p, "parameters", i];
        const item = c.object(entry, ip, ["name", "percent"]);
        if (!item) return;
        const name = c.string(item.name, [...ip, "name"], { nonEmpty: true });
        if (name !== undefined && nl && !nl.parameters.includes(name)) c.problem([...ip, "name"], `"${name}" is not a declared parameter (parameters: ${nl.parameters.join(", ") || "none"})`);
        const pct = c.number(item.percent, [...ip, "percent"]);
        if (pct !== undefined && !(pct >= 0 && pct < 100)) c.problem([...ip, "percent"], `must be at least 0 and below 100, is ${pct}`);
      });
      const sp = [...p, "sampling"];
      const s = c.object(rb.sampling, sp, ["kind", "pointsPerParameter", "samples", "seed"]);
      if (s) {
        const kind = c.oneOf(s.kind, [...sp, "kind"], ["grid", "random"] as const);
        if (kind === "grid") {
          const g = c.number(s.pointsPerParameter, [...sp, "pointsPerParameter"], { integer: true });
          if (g !== undefined && g < 2) c.problem([...sp, "pointsPerParameter"], `must be at least 2 (the two ends), is ${g}`);
          if (g !== undefined && g >= 2 && Math.pow(g, params.length) > MAX_SWEEP_SAMPLES) c.problem([...sp, "pointsPerParameter"], `gives ${Math.pow(g, params.length)} grid samples; at most ${MAX_SWEEP_SAMPLES} are allowed`);
        } else if (kind === "random") {
          const n = c.number(s.samples, [...sp, "samples"], { integer: true, positive: true });
          if (n !== undefined && n > MAX_SWEEP_SAMPLES) c.problem([...sp, "samples"], `must be at most ${MAX_SWEEP_SAMPLES}, is ${n}`);
          c.number(s.seed, [...sp, "seed"], { integer: true });
        }
      }
    }
  }
}
