/**
 * Bridge handlers of the simulation requests: an arbitrary input sequence through
 * `simulateLinear` ("analysis.simulate") and the free response from an initial state through
 * `initialResponse` ("analysis.initial"). Every argument is checked here with its field name
 * before the engine sees it, and the response size is bounded.
 */
import { EngineError } from "../../errors";
import { initialResponse, simulateLinear, type TimeResponse } from "../../analysis";
import type { StateSpace } from "../../model";
import type { SimulationResult } from "../simulationContractTypes";
import { diagnostics, type RequestHandler } from "../handlerSupport";
import { ANALYSIS_LIMITS, optionalEnumParam, requireModelParam, requireNumberListParam, requireObjectParams } from "../params";

/** Most numbers one simulated response may hold (samples × signals), as for "analysis.step". */
export const MAX_SIMULATION_NUMBERS = 5_000_000;
/** Most samples of one simulation request (the engine itself accepts up to 10⁶). */
export const MAX_SIMULATION_SAMPLES = ANALYSIS_LIMITS.maxListLength;

function fail(kind: "invalid-argument" | "non-finite" | "empty" | "shape-mismatch", field: string, message: string, extra: Record<string, unknown> = {}): never {
  throw new EngineError(kind, message, { field, ...extra });
}

/** times: strictly increasing finite numbers; sampled models: integer multiples of T. */
function requireTimes(p: Record<string, unknown>, model: StateSpace, method: string): number[] {
  const times = requireNumberListParam(p, "times", { maxLength: MAX_SIMULATION_SAMPLES });
  for (let k = 1; k < times.length; k++) {
    if (!(times[k]! > times[k - 1]!)) {
      fail("invalid-argument", "times", `${method}: times must increase strictly (times[${k}] = ${times[k]} follows times[${k - 1}] = ${times[k - 1]})`, { index: k });
    }
  }
  const T = model.sampleTime;
  if (T !== null) {
    times.forEach((t, k) => {
      const j = t / T;
      // Same relative alignment tolerance as the engine (1e-9), so the bridge refuses nothing the engine takes.
      if (Math.abs(j - Math.round(j)) > 1e-9 * Math.max(1, Math.abs(j))) {
        fail("invalid-argument", "times", `${method}: times[${k}] = ${t} s is not a multiple of the sample period ${T} s`, { index: k });
      }
    });
  }
  const signals = model.A.rows + model.B.columns + model.C.rows + model.F.columns;
  if (times.length * Math.max(1, signals) > MAX_SIMULATION_NUMBERS) {
    fail("invalid-argument", "times", `${method}: ${times.length} samples × ${signals} signals is too large a response (at most ${MAX_SIMULATION_NUMBERS} values)`);
  }
  return times;
}

/** rows[k][j]: one row per time with `width` finite entries. */
function requireSequence(p: Record<string, unknown>, field: string, samples: number, width: number, what: string): number[][] {
  const v = p[field];
  if (!Array.isArray(v)) fail("invalid-argument", field, `${field} must be an array with one row per time, each row holding one number per ${what}`);
  if (v.length !== samples) fail("shape-mismatch", field, `${field} has ${v.length} rows but times has ${samples}; give one row per time`);
  return v.map((row: unknown, k: number) => {
    if (!Array.isArray(row)) fail("invalid-argument", field, `${field}[${k}] must be an array of ${width} number(s), one per ${what}`, { row: k });
    if (row.length !== width) fail("shape-mismatch", field, `${field}[${k}] has ${row.length} entries; the model has ${width} ${what}(s)`, { row: k });
    return row.map((x: unknown, j: number) => {
      if (typeof x !== "number") fail("invalid-argument", field, `${field}[${k}][${j}] must be a number (it is ${JSON.stringify(x)})`, { row: k, col: j });
      if (!Number.isFinite(x)) fail("non-finite", field, `${field}[${k}][${j}] is ${x}; entries must be finite`, { row: k, col: j });
      return x;
    });
  });
}

function requireState(p: Record<string, unknown>, field: string, n: number): number[] {
  const x0 = requireNumberListParam(p, field, { allowEmpty: n === 0, maxLength: ANALYSIS_LIMITS.maxStates });
  if (x0.length !== n) fail("shape-mismatch", field, `${field} has ${x0.length} entries; the model has ${n} state(s)`);
  return x0;
}

function toResult(model: StateSpace, r: TimeResponse): SimulationResult {
  return {
    time: r.time,
    outputs: r.outputs,
    states: r.states,
    inputs: r.inputs,
    ...(r.disturbances ? { disturbances: r.disturbances } : {}),
    outputNames: [...model.names.outputs],
    stateNames: [...model.names.states],
    inputNames: [...model.names.inputs],
    diagnostics: diagnostics({ warnings: r.warnings }),
  };
}

export const simulationHandlers = {
  "analysis.simulate": ((params) => {
    const method = "analysis.simulate";
    const p = requireObjectParams(params, method);
    const model = requireModelParam(p);
    const times = requireTimes(p, model, method);
    const u = requireSequence(p, "u", times.length, model.B.columns, "input");
    const w = p.w === undefined || p.w === null ? undefined : requireSequence(p, "w", times.length, model.F.columns, "disturbance");
    const x0 = p.x0 === undefined || p.x0 === null ? undefined : requireState(p, "x0", model.A.rows);
    const hold = optionalEnumParam(p, "hold", ["zoh", "foh"] as const);
    if (hold === "foh" && model.sampleTime !== null) fail("invalid-argument", "hold", `${method}: hold "foh" applies to continuous models only; a sampled model's input is a sequence`);
    const r = simulateLinear(model, times, u, { ...(x0 ? { x0 } : {}), ...(w ? { w } : {}), ...(hold ? { hold } : {}) });
    return toResult(model, r);
  }) as RequestHandler<SimulationResult>,

  "analysis.initial": ((params) => {
    const method = "analysis.initial";
    const p = requireObjectParams(params, method);
    const model = requireModelParam(p);
    const x0 = requireState(p, "x0", model.A.rows);
    const times = requireTimes(p, model, method);
    return toResult(model, initialResponse(model, x0, times));
  }) as RequestHandler<SimulationResult>,
};
