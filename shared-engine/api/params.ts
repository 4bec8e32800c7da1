/**
 * Parameter checks at the bridge: requests arrive as untrusted JSON-like data. Each check names
 * the request and the field path in its error.
 */
import { EngineError } from "../errors";

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
