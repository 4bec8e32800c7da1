/**
 * Typed engine errors. Every failure the engine can report is an EngineError with a `kind`
 * (stable, machine-readable), a message that names the input and the violated property, and
 * plain-data `details` (iterations used, last residual, shapes, ...). Errors cross the bridge
 * as `{ kind, message, details }` (see `toErrorPayload`) and are rebuilt by `fromErrorPayload`.
 */

export type EngineErrorKind =
  | "invalid-argument" // a value is out of its allowed set (negative period, wrong type, ...)
  | "shape-mismatch" // dimensions do not agree, or square was required
  | "non-finite" // NaN or Infinity in an input, or produced where it has no meaning
  | "empty" // an empty matrix or list where one with entries is required
  | "no-convergence" // an iterative routine reached its iteration cap
  | "singular" // a solve met a (numerically) singular matrix or equation
  | "not-controllable" // a design needs controllability/stabilizability that is missing
  | "not-observable" // a design needs observability/detectability that is missing
  | "no-stabilizing-solution" // a Riccati equation has no stabilizing solution
  | "unknown-method" // a bridge request named no known method
  | "parse-error" // an expression or file could not be parsed
  | "validation" // a project file or record failed validation
  | "cancelled" // the caller cancelled a long request
  | "timeout" // a request or page did not finish within its time limit (details.limitMs)
  | "forbidden" // a request from a sender outside the app was refused (details.reason)
  | "conflict" // a save was based on an older revision than the stored one
  | "storage" // the local database refused a write (quota, disk full, blocked)
  | "internal"; // a bug: an invariant failed (never a user error)

export interface ErrorPayload {
  kind: EngineErrorKind;
  message: string;
  details: Record<string, unknown>;
}

export class EngineError extends Error {
  readonly kind: EngineErrorKind;
  readonly details: Record<string, unknown>;

  constructor(kind: EngineErrorKind, message: string, details: Record<string, unknown> = {}) {
    super(message);
    this.name = "EngineError";
    this.kind = kind;
    this.details = details;
  }
}

export function isEngineError(value: unknown): value is EngineError {
  return value instanceof EngineError;
}

/** The plain-data form of any thrown value, for the bridge. Unknown throws become `internal`. */
export function toErrorPayload(error: unknown): ErrorPayload {
  if (error instanceof EngineError) {
    return { kind: error.kind, message: error.message, details: plainDetails(error.details) };
  }
  const message = error instanceof Error ? error.message : String(error);
  return { kind: "internal", message: `Internal error: ${message}`, details: {} };
}

export function fromErrorPayload(payload: ErrorPayload): EngineError {
  return new EngineError(payload.kind, payload.message, payload.details);
}

// Details must survive structured clone and JSON: drop functions and typed arrays become arrays.
function plainDetails(details: Record<string, unknown>): Record<string, unknown> {
  const out: Record<string, unknown> = {};
  for (const [key, value] of Object.entries(details)) {
    if (typeof value === "function") continue;
    out[key] = ArrayBuffer.isView(value) ? Array.from(value as unknown as ArrayLike<number>) : value;
  }
  return out;
}
