/**
 * Bridge handlers of the model layer: transfer-function and zero-pole-gain entry, and
 * discretization. Each checks its parameters (errors name the field), calls the engine, and
 * returns plain JSON with diagnostics.
 */
import { EngineError } from "../../errors";
import { eigenvalues } from "../../linalg";
import {
  createTransferFunction,
  createZeroPoleGain,
  discretize,
  realizeTransferFunction,
  realizeZeroPoleGain,
  type StateSpace,
  type TransferFunction,
} from "../../model";
import type { DiscretizeResult, ModelResult } from "../modelContractTypes";
import { diagnostics, modelToJson, type RequestHandler } from "../handlerSupport";
import {
  ANALYSIS_LIMITS,
  optionalBooleanParam,
  optionalEnumParam,
  optionalNumberParam,
  optionalSampleTimeParam,
  requireComplexListParam,
  requireModelParam,
  requireNumberListParam,
  requireNumberParam,
  requireObjectParams,
} from "../params";

function modelResult(model: StateSpace, warnings: string[] = []): ModelResult {
  return { model: modelToJson(model), poles: model.A.rows === 0 ? [] : eigenvalues(model.A), diagnostics: diagnostics({ warnings }) };
}

/** Re-raises an engine error with the request field it concerns. */
function atField<T>(field: string, build: () => T): T {
  try {
    return build();
  } catch (error) {
    if (error instanceof EngineError && error.details.field === undefined) {
      throw new EngineError(error.kind, `${field}: ${error.message}`, { ...error.details, field });
    }
    throw error;
  }
}

function transferEntries(p: Record<string, unknown>): TransferFunction | TransferFunction[][] {
  const sampleTime = optionalSampleTimeParam(p);
  const num = p.numerator;
  const den = p.denominator;
  if (!Array.isArray(num)) throw new EngineError("invalid-argument", "numerator must be an array of coefficients (or numerator[i][j] arrays for a transfer matrix)", { field: "numerator" });
  if (!Array.isArray(den)) throw new EngineError("invalid-argument", "denominator must be an array of coefficients (or denominator[i][j] arrays for a transfer matrix)", { field: "denominator" });
  const mimo = num.length > 0 && Array.isArray(num[0]);
  if (!mimo) {
    const n = requireNumberListParam(p, "numerator", { maxLength: ANALYSIS_LIMITS.maxStates + 1 });
    const d = requireNumberListParam(p, "denominator", { maxLength: ANALYSIS_LIMITS.maxStates + 1 });
    return atField("numerator/denominator", () => createTransferFunction(n, d, sampleTime));
  }
  if (num.length !== den.length) {
    throw new EngineError("shape-mismatch", `denominator must have as many rows as numerator (${num.length} outputs; it has ${den.length})`, { field: "denominator" });
  }
  if (num.length * (num[0] as unknown[]).length > 400) {
    throw new EngineError("invalid-argument", "a transfer matrix may have at most 400 entries", { field: "numerator" });
  }
  return num.map((row: unknown, i: number) => {
    const denRow = den[i];
    if (!Array.isArray(row) || !Array.isArray(denRow) || row.length !== denRow.length) {
      throw new EngineError("shape-mismatch", `numerator[${i}] and denominator[${i}] must be rows of equal length (one entry per input)`, { field: "denominator", row: i });
    }
    return row.map((_entry: unknown, j: number) => {
      const entry = { n: row[j], d: denRow[j] };
      const nList = requireNumberListParam({ [`numerator[${i}][${j}]`]: entry.n }, `numerator[${i}][${j}]`, { maxLength: ANALYSIS_LIMITS.maxStates + 1 });
      const dList = requireNumberListParam({ [`denominator[${i}][${j}]`]: entry.d }, `denominator[${i}][${j}]`, { maxLength: ANALYSIS_LIMITS.maxStates + 1 });
      return atField(`numerator[${i}][${j}]`, () => createTransferFunction(nList, dList, sampleTime, `entry (${i + 1}, ${j + 1})`));
    });
  });
}

export const modelHandlers = {
  "model.fromTransferFunction": ((params) => {
    const p = requireObjectParams(params, "model.fromTransferFunction");
    const balance = optionalBooleanParam(p, "balance") ?? true;
    const tf = transferEntries(p);
    const model = realizeTransferFunction(tf, { balance });
    const warnings = Array.isArray(tf) && tf.length * (tf[0]?.length ?? 0) > 1
      ? ["a transfer matrix is realized column by column and is in general not minimal"]
      : [];
    return modelResult(model, warnings);
  }) as RequestHandler<ModelResult>,

  "model.fromZeroPoleGain": ((params) => {
    const p = requireObjectParams(params, "model.fromZeroPoleGain");
    const zeros = requireComplexListParam(p, "zeros", { allowEmpty: true });
    const poles = requireComplexListParam(p, "poles", { allowEmpty: true });
    if (poles.length > ANALYSIS_LIMITS.maxStates) throw new EngineError("invalid-argument", `poles has ${poles.length} entries; at most ${ANALYSIS_LIMITS.maxStates}`, { field: "poles" });
    const gain = requireNumberParam(p, "gain");
    const sampleTime = optionalSampleTimeParam(p);
    const zpk = atField("zeros/poles", () => createZeroPoleGain(zeros, poles, gain, sampleTime));
    return modelResult(realizeZeroPoleGain(zpk));
  }) as RequestHandler<ModelResult>,

  "model.discretize": ((params) => {
    const p = requireObjectParams(params, "model.discretize");
    const model = requireModelParam(p);
    const period = requireNumberParam(p, "period", { positive: true });
    const method = optionalEnumParam(p, "method", ["zoh", "tustin"] as const) ?? "zoh";
    const prewarp = optionalNumberParam(p, "prewarpRadPerSec", { positive: true });
    if (prewarp !== undefined && method !== "tustin") {
      throw new EngineError("invalid-argument", "prewarpRadPerSec applies only to the Tustin method (method: \"tustin\")", { field: "prewarpRadPerSec" });
    }
    if (model.sampleTime !== null) {
      throw new EngineError("invalid-argument", `model is already sampled (sampleTime ${model.sampleTime} s); only continuous models can be discretized`, { field: "model.sampleTime" });
    }
    const sampled = discretize(model, period, prewarp === undefined ? { method } : { method, prewarpRadPerSec: prewarp });
    const result = modelResult(sampled);
    const continuousPoles = model.A.rows === 0 ? [] : eigenvalues(model.A);
    // Sampling faster than the fastest mode is what keeps the discrete model faithful (common practice: ≥ 10 samples per time constant or period).
    const fastest = Math.max(0, ...continuousPoles.map((s) => Math.hypot(s.re, s.im)));
    if (fastest * period > 0.5) {
      result.diagnostics.warnings.push(`the fastest continuous pole has |s| = ${fastest.toPrecision(4)} rad/s, so |s|·T = ${(fastest * period).toPrecision(3)}: fewer than about two samples per time constant; consider a shorter period`);
    }
    const out: DiscretizeResult = { ...result, method, period, prewarpRadPerSec: prewarp ?? null, continuousPoles };
    return out;
  }) as RequestHandler<DiscretizeResult>,
};
