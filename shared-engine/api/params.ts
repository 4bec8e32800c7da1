/**
 * Parameter checks at the bridge: requests arrive as untrusted JSON-like data. Each check names
 * the request and the field path in its error.
 */
import { EngineError } from "../errors";
import type { Complex } from "../linalg";
import { createStateSpace, type StateSpace, type StateSpaceSpec } from "../model";

/** Limits that keep a hostile or mistaken request from exhausting memory or time. */
export const REQUEST_LIMITS = {
  /** Largest matrix dimension accepted through the bridge. */
  maxDimension: 2000,
} as const;

export function requireObjectParams(params: unknown, method: string): Record<string, unknown> {
  if (params === null || typeof params !== "object" || Array.isArray(params)) {
    throw new EngineError("invalid-argument", `${method}: parameters must be an object`, { method });
  }
  return params as Record<string, unknown>;
}

export function requireMatrixParam(
  params: Record<string, unknown>,
  field: string,
  options: { square?: boolean } = {},
): number[][] {
  const value = params[field];
  if (!Array.isArray(value)) {
    throw new EngineError("invalid-argument", `${field} must be a matrix given as an array of rows`, { field });
  }
  if (value.length === 0) throw new EngineError("empty", `${field} is empty; it needs at least one row`, { field });
  if (value.length > REQUEST_LIMITS.maxDimension) {
    throw new EngineError("invalid-argument", `${field} has ${value.length} rows; at most ${REQUEST_LIMITS.maxDimension} are accepted`, { field });
  }
  const first = value[0];
  if (!Array.isArray(first)) throw new EngineError("invalid-argument", `${field}[0] must be an array of numbers`, { field });
  const cols = first.length;
  value.forEach((row: unknown, i: number) => {
    if (!Array.isArray(row)) throw new EngineError("invalid-argument", `${field}[${i}] must be an array of numbers`, { field, row: i });
    if (row.length !== cols) {
      throw new EngineError("shape-mismatch", `${field} row ${i + 1} has ${row.length} entries but row 1 has ${cols}`, { field, row: i });
    }
    row.forEach((v: unknown, j: number) => {
      if (typeof v !== "number") throw new EngineError("invalid-argument", `${field}[${i}][${j}] must be a number`, { field, row: i, col: j });
      if (!Number.isFinite(v)) throw new EngineError("non-finite", `${field}[${i}][${j}] is ${v}; entries must be finite`, { field, row: i, col: j });
    });
  });
  if (options.square && cols !== value.length) {
    throw new EngineError("shape-mismatch", `${field} must be square (it is ${value.length}×${cols})`, { field });
  }
  return value as number[][];
}

// ---- Checks used by the model, analysis and design requests --------------------------------
// (appended; the checks above are unchanged)


/**
 * Further limits for the numerical requests. The O(n³) routines take seconds at n ≈ 500 on one
 * core; larger models belong in a batch job, not an interactive request.
 */
export const ANALYSIS_LIMITS = {
  /** Most states (rows of A) of a model or matrix pencil sent to an analysis or design request. */
  maxStates: 500,
  /** Longest list of frequencies, times, poles or coefficients. */
  maxListLength: 100_000,
  /** Most ρ values of one LQR sweep. */
  maxSweepValues: 1_000,
  /** Most points per root-locus branch. */
  maxLocusPoints: 5_000,
} as const;

function fail(kind: "invalid-argument" | "non-finite" | "empty", field: string, message: string, extra: Record<string, unknown> = {}): never {
  throw new EngineError(kind, message, { field, ...extra });
}

/** A matrix field that may be absent (undefined) — checked like `requireMatrixParam` otherwise. */
export function optionalMatrixParam(params: Record<string, unknown>, field: string, options: { square?: boolean } = {}): number[][] | undefined {
  if (params[field] === undefined || params[field] === null) return undefined;
  return requireMatrixParam(params, field, options);
}

/** A matrix with at most ANALYSIS_LIMITS.maxStates rows (the state dimension of a design request). */
export function requireStateMatrixParam(params: Record<string, unknown>, field: string, options: { square?: boolean } = {}): number[][] {
  const m = requireMatrixParam(params, field, options);
  if (m.length > ANALYSIS_LIMITS.maxStates) {
    fail("invalid-argument", field, `${field} has ${m.length} rows; design and analysis requests accept at most ${ANALYSIS_LIMITS.maxStates}`);
  }
  return m;
}

export function optionalNumberParam(
  params: Record<string, unknown>,
  field: string,
  rule: { positive?: boolean; nonNegative?: boolean; integer?: boolean; min?: number; max?: number } = {},
): number | undefined {
  const v = params[field];
  if (v === undefined || v === null) return undefined;
  if (typeof v !== "number") fail("invalid-argument", field, `${field} must be a number (it is ${JSON.stringify(v)})`);
  if (!Number.isFinite(v)) fail("non-finite", field, `${field} is ${v}; it must be finite`);
  if (rule.integer && !Number.isInteger(v)) fail("invalid-argument", field, `${field} must be an integer (it is ${v})`);
  if (rule.positive && !(v > 0)) fail("invalid-argument", field, `${field} must be positive (it is ${v})`);
  if (rule.nonNegative && v < 0) fail("invalid-argument", field, `${field} must not be negative (it is ${v})`);
  if (rule.min !== undefined && v < rule.min) fail("invalid-argument", field, `${field} must be at least ${rule.min} (it is ${v})`);
  if (rule.max !== undefined && v > rule.max) fail("invalid-argument", field, `${field} must be at most ${rule.max} (it is ${v})`);
  return v;
}

export function requireNumberParam(params: Record<string, unknown>, field: string, rule: Parameters<typeof optionalNumberParam>[2] = {}): number {
  const v = optionalNumberParam(params, field, rule);
  if (v === undefined) fail("invalid-argument", field, `${field} is required (a number)`);
  return v;
}

export function optionalBooleanParam(params: Record<string, unknown>, field: string): boolean | undefined {
  const v = params[field];
  if (v === undefined || v === null) return undefined;
  if (typeof v !== "boolean") fail("invalid-argument", field, `${field} must be true or false (it is ${JSON.stringify(v)})`);
  return v;
}

export function optionalEnumParam<T extends string>(params: Record<string, unknown>, field: string, allowed: readonly T[]): T | undefined {
  const v = params[field];
  if (v === undefined || v === null) return undefined;
  if (typeof v !== "string" || !(allowed as readonly string[]).includes(v)) {
    fail("invalid-argument", field, `${field} must be one of ${allowed.map((a) => JSON.stringify(a)).join(", ")} (it is ${JSON.stringify(v)})`);
  }
  return v as T;
}

/** null/omitted = continuous; otherwise a positive finite period in seconds. */
export function optionalSampleTimeParam(params: Record<string, unknown>, field = "sampleTime"): number | null {
  const v = optionalNumberParam(params, field, { positive: true });
  return v === undefined ? null : v;
}

/** A list of finite numbers (length 1 … maxListLength unless allowEmpty). */
export function requireNumberListParam(params: Record<string, unknown>, field: string, options: { allowEmpty?: boolean; maxLength?: number } = {}): number[] {
  const v = params[field];
  if (!Array.isArray(v)) fail("invalid-argument", field, `${field} must be an array of numbers`);
  const max = options.maxLength ?? ANALYSIS_LIMITS.maxListLength;
  if (v.length === 0 && !options.allowEmpty) fail("empty", field, `${field} is empty; it needs at least one number`);
  if (v.length > max) fail("invalid-argument", field, `${field} has ${v.length} entries; at most ${max} are accepted`);
  v.forEach((x: unknown, i: number) => {
    if (typeof x !== "number") fail("invalid-argument", field, `${field}[${i}] must be a number (it is ${JSON.stringify(x)})`, { index: i });
    if (!Number.isFinite(x)) fail("non-finite", field, `${field}[${i}] is ${x}; entries must be finite`, { index: i });
  });
  return [...(v as number[])];
}

/** 0-based indices below `count`, without repeats. */
export function optionalIndexListParam(params: Record<string, unknown>, field: string, count: number, what: string): number[] | undefined {
  if (params[field] === undefined || params[field] === null) return undefined;
  const list = requireNumberListParam(params, field, { allowEmpty: false, maxLength: ANALYSIS_LIMITS.maxStates * 4 });
  list.forEach((x, i) => {
    if (!Number.isInteger(x) || x < 0 || x >= count) {
      fail("invalid-argument", field, `${field}[${i}] must be a 0-based ${what} index from 0 to ${count - 1} (it is ${x})`, { index: i });
    }
  });
  if (new Set(list).size !== list.length) fail("invalid-argument", field, `${field} repeats an index`);
  return list;
}

/** Complex values given as { re, im } or as real numbers. */
export function requireComplexListParam(params: Record<string, unknown>, field: string, options: { allowEmpty?: boolean } = {}): Complex[] {
  const v = params[field];
  if (!Array.isArray(v)) fail("invalid-argument", field, `${field} must be an array of complex numbers {re, im} (or real numbers)`);
  if (v.length === 0 && !options.allowEmpty) fail("empty", field, `${field} is empty; it needs at least one value`);
  if (v.length > ANALYSIS_LIMITS.maxListLength) fail("invalid-argument", field, `${field} has ${v.length} entries; at most ${ANALYSIS_LIMITS.maxListLength} are accepted`);
  return v.map((z: unknown, i: number): Complex => {
    const part = (x: unknown, name: string): number => {
      if (typeof x !== "number") fail("invalid-argument", field, `${field}[${i}]${name} must be a number (it is ${JSON.stringify(x)})`, { index: i });
      if (!Number.isFinite(x)) fail("non-finite", field, `${field}[${i}]${name} is ${x}; it must be finite`, { index: i });
      return x;
    };
    if (typeof z === "number") return { re: part(z, ""), im: 0 };
    if (z === null || typeof z !== "object" || Array.isArray(z)) {
      fail("invalid-argument", field, `${field}[${i}] must be a complex number {re, im} or a real number`, { index: i });
    }
    const o = z as Record<string, unknown>;
    return { re: part(o.re, ".re"), im: part(o.im ?? 0, ".im") };
  });
}

const MODEL_MATRICES = ["A", "B", "C", "D", "F", "E"] as const;

/**
 * A model field (StateSpaceSpec JSON) turned into a validated StateSpace. Shapes are checked
 * before anything is copied, so an oversize or hostile request fails fast; model-layer errors
 * are re-raised with the field path ("model: B must have as many rows as A ...").
 */
export function requireModelParam(params: Record<string, unknown>, field = "model"): StateSpace {
  const value = params[field];
  if (value === null || typeof value !== "object" || Array.isArray(value)) {
    fail("invalid-argument", field, `${field} must be a state-space model {A, B, C, D?, F?, E?, sampleTime?, names?, units?}`);
  }
  const spec = value as Record<string, unknown>;
  for (const key of MODEL_MATRICES) {
    const m = spec[key];
    if (m === undefined && (key === "D" || key === "F" || key === "E")) continue;
    const path = `${field}.${key}`;
    if (!Array.isArray(m)) fail("invalid-argument", path, `${path} must be a matrix given as an array of rows`);
    if (m.length > ANALYSIS_LIMITS.maxStates * 4) fail("invalid-argument", path, `${path} has ${m.length} rows; at most ${ANALYSIS_LIMITS.maxStates * 4} are accepted`);
    m.forEach((row: unknown, i: number) => {
      if (!Array.isArray(row)) fail("invalid-argument", path, `${path}[${i}] must be an array of numbers`, { row: i });
      if (row.length > ANALYSIS_LIMITS.maxStates * 4) fail("invalid-argument", path, `${path}[${i}] has ${row.length} entries; at most ${ANALYSIS_LIMITS.maxStates * 4} are accepted`, { row: i });
      row.forEach((x: unknown, j: number) => {
        if (typeof x !== "number") fail("invalid-argument", path, `${path}[${i}][${j}] must be a number (it is ${JSON.stringify(x)})`, { row: i, col: j });
        if (!Number.isFinite(x)) fail("non-finite", path, `${path}[${i}][${j}] is ${x}; entries must be finite`, { row: i, col: j });
      });
    });
  }
  const a = spec.A as unknown[];
  if (a.length > ANALYSIS_LIMITS.maxStates) {
    fail("invalid-argument", `${field}.A`, `${field}.A has ${a.length} rows; analysis and design requests accept at most ${ANALYSIS_LIMITS.maxStates} states`);
  }
  try {
    return createStateSpace(spec as unknown as StateSpaceSpec);
  } catch (error) {
    if (error instanceof EngineError) {
      const argument = typeof error.details.argument === "string" ? `${field}.${error.details.argument}` : field;
      throw new EngineError(error.kind, `${field}: ${error.message}`, { ...error.details, field: argument });
    }
    throw error;
  }
}
