/**
 * Bridge handlers of the analysis layer: poles/stability/DC gain, structure, zeros, modal form
 * with the coupling report, Gramians, frequency response, loop margins, step response with
 * metrics, and the root locus (with progress and cancellation between its stages).
 */
import { EngineError } from "../../errors";
import {
  couplingReport,
  dcGain,
  frequencyGrid,
  frequencyResponse,
  gramians,
  hankelSingularValues,
  loopMargins,
  modalForm,
  poles,
  responseMetrics,
  rootLocus,
  stability,
  stepResponse,
  structure,
  transmissionZeros,
} from "../../analysis";
import { stateSpaceFromMatrices, type StateSpace } from "../../model";
import type {
  FrequencyResponseResult,
  GramiansResult,
  MarginsResult,
  ModalFormResult,
  PolesResult,
  RootLocusResult,
  StepMetricsJson,
  StepResult,
  StructureResult,
  ZerosResult,
} from "../analysisContractTypes";
import { diagnostics, modelToJson, progressForwarder, throwIfCancelled, type RequestHandler } from "../handlerSupport";
import {
  ANALYSIS_LIMITS,
  optionalBooleanParam,
  optionalEnumParam,
  optionalIndexListParam,
  optionalNumberParam,
  requireModelParam,
  requireNumberListParam,
  requireObjectParams,
} from "../params";

/** Most numbers one response may hold (samples × signals): about 40 MB of JSON. */
const MAX_RESPONSE_NUMBERS = 5_000_000;

function modelOf(params: unknown, method: string): { p: Record<string, unknown>; model: StateSpace } {
  const p = requireObjectParams(params, method);
  return { p, model: requireModelParam(p) };
}

function requireStates(model: StateSpace, method: string): void {
  if (model.A.rows === 0) throw new EngineError("empty", `${method}: model has no states (A is 0×0)`, { field: "model.A" });
}

/** One input→output channel of a model as a SISO model (for the root locus of a MIMO plant). */
function channelOf(model: StateSpace, p: Record<string, unknown>): StateSpace {
  const input = optionalNumberParam(p, "input", { integer: true, nonNegative: true });
  const output = optionalNumberParam(p, "output", { integer: true, nonNegative: true });
  if (input === undefined && output === undefined) return model;
  const i = input ?? 0;
  const o = output ?? 0;
  if (i >= model.B.columns) throw new EngineError("invalid-argument", `input must be a 0-based input index below ${model.B.columns} (it is ${i})`, { field: "input" });
  if (o >= model.C.rows) throw new EngineError("invalid-argument", `output must be a 0-based output index below ${model.C.rows} (it is ${o})`, { field: "output" });
  return stateSpaceFromMatrices({
    A: model.A,
    B: model.B.subMatrixColumn([i]),
    C: model.C.subMatrixRow([o]),
    D: [[model.D.get(o, i)]],
    sampleTime: model.sampleTime,
    names: { states: model.names.states, inputs: [model.names.inputs[i]!], outputs: [model.names.outputs[o]!] },
  });
}

export const analysisHandlers = {
  "analysis.poles": ((params) => {
    const { model } = modelOf(params, "analysis.poles");
    const s = stability(model);
    const g = dcGain(model);
    const warnings = s.defectiveBoundaryPoles.length > 0 ? ["a pole on the stability boundary is repeated without enough eigenvectors: responses grow like a power of t"] : [];
    return {
      poles: poles(model),
      stability: { ...s },
      dcGain: { gain: g.gain, reason: g.reason ?? null },
      diagnostics: diagnostics({ warnings }),
    };
  }) as RequestHandler<PolesResult>,

  "analysis.structure": ((params) => {
    const { p, model } = modelOf(params, "analysis.structure");
    const tol = optionalNumberParam(p, "tolerance", { nonNegative: true });
    const r = structure(model, tol);
    const warnings: string[] = [];
    if (!r.stabilizable) warnings.push("not stabilizable: no state feedback can move the unstable uncontrollable modes");
    if (!r.detectable) warnings.push("not detectable: no observer can estimate the unstable unobservable modes");
    return { ...r, diagnostics: diagnostics({ warnings }) };
  }) as RequestHandler<StructureResult>,

  "analysis.zeros": ((params) => {
    const { p, model } = modelOf(params, "analysis.zeros");
    const inputs = optionalIndexListParam(p, "inputs", model.B.columns, "input");
    const outputs = optionalIndexListParam(p, "outputs", model.C.rows, "output");
    const r = transmissionZeros(model, { ...(inputs ? { inputs } : {}), ...(outputs ? { outputs } : {}) });
    const warnings = r.decouplingZeros.length > 0 ? [`${r.decouplingZeros.length} mode(s) do not reach the outputs from the inputs (decoupling zeros); they are not transmission zeros`] : [];
    return { ...r, diagnostics: diagnostics({ warnings }) };
  }) as RequestHandler<ZerosResult>,

  "analysis.modalForm": ((params) => {
    const { model } = modelOf(params, "analysis.modalForm");
    requireStates(model, "analysis.modalForm");
    const m = modalForm(model);
    const c = couplingReport(model);
    const warnings = [m.warning, c.warning].filter((w): w is string => w !== null);
    return {
      model: modelToJson(m.model),
      T: m.T.to2DArray(),
      blocks: m.blocks.map((b) => ({ ...b })),
      condition: m.condition,
      residual: m.residual,
      coupling: { states: c.states, modes: c.modes, offDiagonalRatio: c.offDiagonalRatio, eigenvectorCondition: c.eigenvectorCondition },
      diagnostics: diagnostics({ residual: m.residual, condition: m.condition, conditionMeaning: "κ₂(T) of the modal basis", warnings: [...new Set(warnings)] }),
    };
  }) as RequestHandler<ModalFormResult>,

  "analysis.gramians": ((params, context) => {
    const { model } = modelOf(params, "analysis.gramians");
    requireStates(model, "analysis.gramians");
    const g = gramians(model);
    throwIfCancelled(context, "analysis.gramians", "after the Gramians");
    const hsv = hankelSingularValues(model);
    const residual = Math.max(g.residuals.controllability, g.residuals.observability);
    const ratio = hsv.length > 0 && hsv[0]! > 0 ? hsv[hsv.length - 1]! / hsv[0]! : 0;
    return {
      controllability: g.controllability.to2DArray(),
      observability: g.observability.to2DArray(),
      residuals: { ...g.residuals },
      hankelSingularValues: hsv,
      diagnostics: diagnostics({
        residual,
        condition: ratio > 0 ? 1 / ratio : null,
        conditionMeaning: ratio > 0 ? "σ_max/σ_min of the Hankel singular values" : null,
        warnings: ratio === 0 ? ["the smallest Hankel singular value is 0: the model is not minimal"] : [],
      }),
    };
  }) as RequestHandler<GramiansResult>,

  "analysis.frequencyResponse": ((params) => {
    const { p, model } = modelOf(params, "analysis.frequencyResponse");
    const from = optionalEnumParam(p, "from", ["input", "disturbance"] as const) ?? "input";
    let omegas: number[];
    if (p.frequenciesRadPerSec !== undefined) {
      if (p.grid !== undefined) throw new EngineError("invalid-argument", "give either frequenciesRadPerSec or grid, not both", { field: "grid" });
      omegas = requireNumberListParam(p, "frequenciesRadPerSec");
      omegas.forEach((w, k) => {
        if (w < 0) throw new EngineError("invalid-argument", `frequenciesRadPerSec[${k}] is negative (${w}); frequencies are ≥ 0 rad/s`, { field: "frequenciesRadPerSec", index: k });
      });
    } else {
      const g = p.grid === undefined ? {} : requireObjectParams(p.grid, "grid");
      const points = optionalNumberParam(g, "points", { integer: true, min: 2, max: ANALYSIS_LIMITS.maxListLength / 2 });
      const minRadPerSec = optionalNumberParam(g, "minRadPerSec", { positive: true });
      const maxRadPerSec = optionalNumberParam(g, "maxRadPerSec", { positive: true });
      omegas = frequencyGrid(model, { ...(points ? { points } : {}), ...(minRadPerSec ? { minRadPerSec } : {}), ...(maxRadPerSec ? { maxRadPerSec } : {}) });
    }
    const channels = model.C.rows * (from === "input" ? model.B.columns : model.F.columns);
    if (omegas.length * Math.max(1, channels) * 4 > MAX_RESPONSE_NUMBERS) {
      throw new EngineError("invalid-argument", `frequenciesRadPerSec: ${omegas.length} frequencies × ${channels} channels is too large a response (at most ${MAX_RESPONSE_NUMBERS / 4} values)`, { field: "frequenciesRadPerSec" });
    }
    const r = frequencyResponse(model, omegas, { from });
    const warnings = r.unbounded.length > 0 ? [`${r.unbounded.length} value(s) are unbounded (a pole on the frequency axis); they are null`] : [];
    return { ...r, diagnostics: diagnostics({ warnings }) };
  }) as RequestHandler<FrequencyResponseResult>,

  "analysis.margins": ((params) => {
    const { p, model } = modelOf(params, "analysis.margins");
    const grid = p.frequenciesRadPerSec === undefined ? undefined : requireNumberListParam(p, "frequenciesRadPerSec");
    const r = loopMargins(model, grid ? { grid } : {});
    const { warnings, ...rest } = r;
    return { ...rest, diagnostics: diagnostics({ warnings }) };
  }) as RequestHandler<MarginsResult>,

  "analysis.step": ((params) => {
    const { p, model } = modelOf(params, "analysis.step");
    const from = optionalEnumParam(p, "from", ["input", "disturbance"] as const) ?? "input";
    const input = optionalNumberParam(p, "input", { integer: true, nonNegative: true }) ?? 0;
    const band = optionalNumberParam(p, "settlingBand", { positive: true, max: 0.5 });
    let grid: number[] | { horizonSec?: number; points?: number };
    if (p.times !== undefined) {
      if (p.horizonSec !== undefined || p.points !== undefined) throw new EngineError("invalid-argument", "give either times or horizonSec/points, not both", { field: "times" });
      grid = requireNumberListParam(p, "times");
    } else {
      const horizonSec = optionalNumberParam(p, "horizonSec", { positive: true });
      const points = optionalNumberParam(p, "points", { integer: true, min: 2, max: ANALYSIS_LIMITS.maxListLength });
      grid = { ...(horizonSec ? { horizonSec } : {}), ...(points ? { points } : {}) };
    }
    const samples = Array.isArray(grid) ? grid.length : (grid.points ?? 501);
    const signals = model.A.rows + model.B.columns + model.C.rows + model.F.columns;
    if (samples * Math.max(1, signals) > MAX_RESPONSE_NUMBERS) {
      throw new EngineError("invalid-argument", `points: ${samples} samples × ${signals} signals is too large a response (at most ${MAX_RESPONSE_NUMBERS} values)`, { field: Array.isArray(grid) ? "times" : "points" });
    }
    const response = stepResponse(model, grid, { input, from });
    const stable = stability(model).stable;
    // The final value of each output: the DC gain of the stepped channel (input: C, B, D; disturbance:
    // C, F, E), so a disturbance rejected by integral action has final value 0 and its metrics
    // describe the deviation, not the last sample's rounding.
    const channel = from === "input" ? model : stateSpaceFromMatrices({ A: model.A, B: model.F, C: model.C, D: model.E, sampleTime: model.sampleTime });
    const gain = stable ? dcGain(channel).gain : null;
    const metrics: StepMetricsJson[] = response.outputs.map((y, i) => {
      const finalValue = gain ? gain[i]![input]! : undefined;
      const m = responseMetrics(response.time, y, {
        stable: stable ? undefined : false,
        ...(finalValue !== undefined ? { finalValue } : {}),
        ...(band !== undefined ? { settlingBand: band } : {}),
        // A sampled model's response exists at its sample instants only: read the metrics there.
        ...(model.sampleTime !== null ? { sampleTime: model.sampleTime } : {}),
      });
      return { output: model.names.outputs[i] ?? `y${i + 1}`, ...m };
    });
    const { warnings, ...rest } = response;
    return { ...rest, metrics, stable, diagnostics: diagnostics({ warnings }) };
  }) as RequestHandler<StepResult>,

  "analysis.rootLocus": ((params, context) => {
    const { p, model } = modelOf(params, "analysis.rootLocus");
    const loop = channelOf(model, p);
    const negativeGain = optionalBooleanParam(p, "negativeGain");
    const maxGain = optionalNumberParam(p, "maxGain", { positive: true });
    const pointsPerBranch = optionalNumberParam(p, "pointsPerBranch", { integer: true, min: 2, max: ANALYSIS_LIMITS.maxLocusPoints });
    // Progress comes from the tracing itself (fraction of the log-gain range, then break points
    // and crossings); cancellation is checked before every eigenvalue evaluation.
    context.reportProgress({ fraction: 0, label: "tracing root-locus branches" });
    throwIfCancelled(context, "analysis.rootLocus", "before tracing");
    const onProgress = progressForwarder(context, "tracing root-locus branches");
    const r = rootLocus(loop, {
      ...(negativeGain !== undefined ? { negativeGain } : {}),
      ...(maxGain !== undefined ? { maxGain } : {}),
      ...(pointsPerBranch !== undefined ? { pointsPerBranch } : {}),
      isCancelled: () => context.isCancelled(),
      onProgress,
    });
    throwIfCancelled(context, "analysis.rootLocus", "after tracing");
    context.reportProgress({ fraction: 1, label: "root locus traced" });
    const { notes, ...rest } = r;
    return { ...rest, diagnostics: diagnostics({ warnings: notes }) };
  }) as RequestHandler<RootLocusResult>,
};
