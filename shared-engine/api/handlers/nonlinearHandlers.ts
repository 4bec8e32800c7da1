/**
 * Bridge handlers of the nonlinear layer: the live equation check, operating point,
 * linearization, closed-loop simulation and robustness sweep (the last two with progress and
 * cancellation through the request context).
 */
import { EngineError } from "../../errors";
import { poles } from "../../analysis";
import { linearize, robustnessSweep, simulateClosedLoop, solveOperatingPoint, type CompiledNonlinearPlant, type OperatingPoint } from "../../nonlinear";
import { checkEquations, checkPlantSpec, MAX_CHECKED_EQUATIONS } from "../equationCheck";
import { diagnostics, modelToJson, progressForwarder, throwIfCancelled, withFieldPaths, type RequestContext, type RequestHandler } from "../handlerSupport";
import type {
  EquationToCheck,
  LinearizeResult,
  NonlinearCheckResult,
  NonlinearRobustnessResult,
  NonlinearSimulateResult,
  OperatingPointResult,
} from "../nonlinearContractTypes";
import {
  MAX_PLANT_SIGNALS,
  NONLINEAR_FIELD_NAMES,
  optionalIntegralParam,
  optionalScenarioParam,
  requireOperatingPointRequestParam,
  requirePlantParam,
} from "../nonlinearParams";
import { ANALYSIS_LIMITS, optionalNumberParam, optionalSampleTimeParam, requireMatrixParam, requireNumberListParam, requireObjectParams } from "../params";

/** Most numbers one simulation result may hold (samples × signals × 2 for the linear prediction). */
const MAX_SIMULATION_NUMBERS = 5_000_000;

/** Plant + solved operating point, the common first step of four requests. */
function plantAndPoint(p: Record<string, unknown>, context: RequestContext, method: string): { plant: CompiledNonlinearPlant; point: OperatingPoint } {
  const plant = requirePlantParam(p);
  const request = requireOperatingPointRequestParam(p);
  throwIfCancelled(context, method, "before the operating point");
  const point = withFieldPaths(() => solveOperatingPoint(plant, request), { prefix: "request" });
  return { plant, point };
}

/** The `equations` field of a loose check: a list of {field, text} or an object field → text. */
function equationList(value: unknown): EquationToCheck[] {
  let list: EquationToCheck[];
  if (Array.isArray(value)) {
    list = value.map((item: unknown, i: number) => {
      if (item === null || typeof item !== "object" || typeof (item as { field?: unknown }).field !== "string") {
        throw new EngineError("invalid-argument", `equations[${i}] must be {field, text}`, { field: "equations", index: i });
      }
      return { field: (item as EquationToCheck).field, text: (item as EquationToCheck).text };
    });
  } else if (value !== null && typeof value === "object") {
    list = Object.entries(value as Record<string, unknown>).map(([field, text]) => ({ field, text: text as string }));
  } else {
    throw new EngineError("invalid-argument", "equations must be a list of {field, text} or an object of equation texts by field", { field: "equations" });
  }
  if (list.length > MAX_CHECKED_EQUATIONS) throw new EngineError("invalid-argument", `equations has ${list.length} entries; at most ${MAX_CHECKED_EQUATIONS} are checked`, { field: "equations" });
  return list;
}

export const nonlinearHandlers = {
  "nonlinear.check": ((params) => {
    const p = requireObjectParams(params, "nonlinear.check");
    let outcome: Pick<NonlinearCheckResult, "problems" | "equations">;
    if (p.plant !== undefined) {
      if (p.equations !== undefined) throw new EngineError("invalid-argument", "give either plant or equations, not both", { field: "equations" });
      if (p.plant === null || typeof p.plant !== "object" || Array.isArray(p.plant)) {
        throw new EngineError("invalid-argument", "plant must be a nonlinear plant spec (an object), even an unfinished one", { field: "plant" });
      }
      outcome = checkPlantSpec(p.plant as Record<string, unknown>);
    } else {
      const equations = equationList(p.equations);
      let names: string[] | null = null;
      if (p.names !== undefined && p.names !== null) {
        if (!Array.isArray(p.names) || p.names.some((n: unknown) => typeof n !== "string")) throw new EngineError("invalid-argument", "names must be a list of declared names (text)", { field: "names" });
        if (p.names.length > MAX_PLANT_SIGNALS * 4) throw new EngineError("invalid-argument", `names has ${p.names.length} entries; at most ${MAX_PLANT_SIGNALS * 4} are accepted`, { field: "names" });
        names = p.names as string[];
      }
      outcome = checkEquations(equations, names);
    }
    const warnings = p.plant === undefined && p.names === undefined ? ["names not given: unknown names are not reported, only syntax is checked"] : [];
    return { ok: outcome.problems.length === 0, ...outcome, diagnostics: diagnostics({ warnings }) };
  }) as RequestHandler<NonlinearCheckResult>,

  "nonlinear.operatingPoint": ((params, context) => {
    const p = requireObjectParams(params, "nonlinear.operatingPoint");
    const { point } = plantAndPoint(p, context, "nonlinear.operatingPoint");
    return { operatingPoint: point, residual: point.residual, iterations: point.iterations, diagnostics: diagnostics({ residual: point.residual }) };
  }) as RequestHandler<OperatingPointResult>,

  "nonlinear.linearize": ((params, context) => {
    const p = requireObjectParams(params, "nonlinear.linearize");
    const { plant, point } = plantAndPoint(p, context, "nonlinear.linearize");
    const lin = withFieldPaths(() => linearize(plant, point), { prefix: "request" });
    const warnings = lin.equilibriumResidual > 1e-6 ? [`the point is not an equilibrium (max |f| = ${lin.equilibriumResidual.toExponential(3)}): the model holds to first order around a moving point`] : [];
    return {
      model: modelToJson(lin.model),
      operatingPoint: lin.operatingPoint,
      equilibriumResidual: lin.equilibriumResidual,
      poles: poles(lin.model),
      diagnostics: diagnostics({ residual: lin.equilibriumResidual, warnings }),
    };
  }) as RequestHandler<LinearizeResult>,

  "nonlinear.simulate": ((params, context) => {
    const p = requireObjectParams(params, "nonlinear.simulate");
    const K = requireMatrixParam(p, "K");
    const integral = optionalIntegralParam(p);
    const sampleTime = optionalSampleTimeParam(p);
    const scenario = optionalScenarioParam(p);
    const times = requireNumberListParam(p, "times");
    const rtol = optionalNumberParam(p, "rtol", { positive: true, max: 0.1 });
    const atol = optionalNumberParam(p, "atol", { positive: true });
    const { plant, point } = plantAndPoint(p, context, "nonlinear.simulate");
    const signals = plant.n + plant.m + plant.p;
    if (times.length * signals * 2 > MAX_SIMULATION_NUMBERS) {
      throw new EngineError("invalid-argument", `times: ${times.length} samples × ${signals} signals is too large a response (at most ${MAX_SIMULATION_NUMBERS / 2} values)`, { field: "times" });
    }
    const onProgress = progressForwarder(context, "closed-loop simulation");
    const sim = withFieldPaths(
      () =>
        simulateClosedLoop({
          plant,
          operatingPoint: point,
          K,
          ...(integral ? { integral } : {}),
          sampleTime,
          scenario,
          times,
          ...(rtol !== undefined ? { rtol } : {}),
          ...(atol !== undefined ? { atol } : {}),
          isCancelled: () => context.isCancelled(),
          onProgress,
        }),
      { rename: NONLINEAR_FIELD_NAMES },
    );
    onProgress(1);
    // The engine ends the record at the last sample where every signal is finite (and says why
    // in stoppedEarly); the dispatcher's finite-result check stays the last guard.
    const { warnings, ...rest } = sim;
    const notes = rest.stoppedEarly ? [...warnings, `the simulation stopped early at t = ${rest.stoppedEarly.time}: ${rest.stoppedEarly.reason}`] : warnings;
    return { ...rest, diagnostics: diagnostics({ warnings: notes }) };
  }) as RequestHandler<NonlinearSimulateResult>,

  "nonlinear.robustness": ((params, context) => {
    const p = requireObjectParams(params, "nonlinear.robustness");
    const K = requireMatrixParam(p, "K");
    const integral = optionalIntegralParam(p, "integral", { antiWindup: false });
    const parameters = requireParameterSpread(p.parameters);
    const sampleTime = optionalSampleTimeParam(p);
    const sampling = p.sampling;
    if (sampling === null || typeof sampling !== "object" || Array.isArray(sampling)) {
      throw new EngineError("invalid-argument", 'sampling must be {kind: "grid", pointsPerParameter} or {kind: "random", samples, seed}', { field: "sampling" });
    }
    // The nominal point is solved here first so that its errors carry the "request." path.
    const { plant } = plantAndPoint(p, context, "nonlinear.robustness");
    const request = requireOperatingPointRequestParam(p);
    const onProgress = progressForwarder(context, "robustness sweep");
    const sweep = withFieldPaths(
      () =>
        robustnessSweep({
          plant,
          operatingPoint: request,
          K,
          ...(integral ? { integral: { outputs: integral.outputs, Ki: integral.Ki } } : {}),
          parameters,
          sampling: sampling as Parameters<typeof robustnessSweep>[0]["sampling"],
          sampleTime,
          isCancelled: () => context.isCancelled(),
          onProgress,
        }),
      { rename: NONLINEAR_FIELD_NAMES },
    );
    onProgress(1);
    const failed = sweep.failedSamples;
    const warnings = [
      ...(failed > 0 ? [`${failed} sample(s) have no operating point or linearization; they count as not stable`] : []),
      ...(sweep.allStable ? [] : ["the loop is not stable at every sample"]),
    ];
    return {
      ...sweep,
      samples: sweep.samples.map((s) => ({ ...s, error: s.error ? { kind: s.error.kind, message: s.error.message } : null })),
      diagnostics: diagnostics({ warnings: [...warnings, sweep.marginsNote] }),
    };
  }) as RequestHandler<NonlinearRobustnessResult>,
};

function requireParameterSpread(value: unknown): { name: string; percent: number }[] {
  if (!Array.isArray(value)) throw new EngineError("invalid-argument", "parameters must be a list of {name, percent}", { field: "parameters" });
  if (value.length === 0) throw new EngineError("empty", "parameters is empty; name at least one parameter to vary", { field: "parameters" });
  if (value.length > ANALYSIS_LIMITS.maxStates) throw new EngineError("invalid-argument", `parameters has ${value.length} entries; at most ${ANALYSIS_LIMITS.maxStates}`, { field: "parameters" });
  return value.map((item: unknown, k: number) => {
    const o = item as { name?: unknown; percent?: unknown } | null;
    if (o === null || typeof o !== "object" || typeof o.name !== "string") {
      throw new EngineError("invalid-argument", `parameters[${k}] must be {name, percent} with the parameter's name`, { field: `parameters[${k}].name` });
    }
    if (typeof o.percent !== "number" || !Number.isFinite(o.percent)) {
      throw new EngineError("invalid-argument", `parameters[${k}].percent must be a finite number (it is ${JSON.stringify(o.percent) ?? "missing"})`, { field: `parameters[${k}].percent` });
    }
    return { name: o.name, percent: o.percent };
  });
}
