/**
 * What the request handlers share: the request context (progress, cancellation), conversion of
 * engine objects to plain JSON, the uniform diagnostics record, and the final check that no
 * result carries NaN or ±Infinity across the bridge.
 */
import { EngineError } from "../errors";
import { stateSpaceToSpec, type StateSpace } from "../model";
import type { Progress } from "./contract";
import type { Diagnostics, FullModelJson } from "./contractTypes";

/** What a handler may use while it runs: cooperative cancellation and progress reports. */
export interface RequestContext {
  isCancelled(): boolean;
  reportProgress(progress: Progress): void;
}

/** One request handler: untrusted params in, a plain JSON result out (or an EngineError). */
export type RequestHandler<R> = (params: unknown, context: RequestContext) => R | Promise<R>;

/** Throws "cancelled" when the caller has cancelled; called between units of work. */
export function throwIfCancelled(context: RequestContext, method: string, done: string): void {
  if (context.isCancelled()) {
    throw new EngineError("cancelled", `${method} was cancelled (${done})`, { method });
  }
}

export function modelToJson(model: StateSpace): FullModelJson {
  return stateSpaceToSpec(model) as FullModelJson;
}

export function diagnostics(parts: Partial<Diagnostics> = {}): Diagnostics {
  return {
    residual: parts.residual ?? null,
    condition: parts.condition ?? null,
    conditionMeaning: parts.conditionMeaning ?? null,
    warnings: [...(parts.warnings ?? [])],
  };
}

/**
 * Walks a result and throws "internal" at the first NaN or ±Infinity, naming its path. The
 * engine reports unbounded values as null; a non-finite number reaching this point is a bug,
 * and it must not cross the bridge (JSON would turn it into null silently).
 */
export function requireFiniteResult<T>(value: T, method: string): T {
  const stack: { v: unknown; path: string }[] = [{ v: value, path: "result" }];
  while (stack.length > 0) {
    const { v, path } = stack.pop()!;
    if (typeof v === "number") {
      if (!Number.isFinite(v)) throw new EngineError("internal", `${method}: ${path} is ${v}; results must be finite (or null where unbounded)`, { method, path });
    } else if (Array.isArray(v)) {
      for (let i = v.length - 1; i >= 0; i--) stack.push({ v: v[i], path: `${path}[${i}]` });
    } else if (v !== null && typeof v === "object") {
      for (const [k, x] of Object.entries(v)) stack.push({ v: x, path: `${path}.${k}` });
    }
  }
  return value;
}

// ---- Shared by the nonlinear, servo-design and locus requests (appended) ---------------------

/**
 * A progress callback for an engine routine that reports bare fractions: keeps the reports
 * non-decreasing and inside [0, 1], and forwards at most one per percent (plus the final 1), so
 * a fine-grained routine does not flood the IPC channel.
 */
export function progressForwarder(context: RequestContext, label: string): (fraction: number) => void {
  let last = -1;
  return (fraction: number) => {
    if (!Number.isFinite(fraction)) return;
    const f = Math.min(1, Math.max(0, fraction));
    if (f < last + 0.01 && !(f === 1 && last < 1)) return;
    last = f;
    context.reportProgress({ fraction: f, label });
  };
}

/**
 * Runs an engine call and re-raises its argument errors with the bridge field path: an error
 * whose details name an `argument` (or a `path`, for plant validation) gets
 * `details.field = prefix + "." + argument` (or `rename[argument]` when given) and the prefix in
 * its message. Errors without an argument (cancelled, no-convergence, singular) pass unchanged.
 */
export function withFieldPaths<T>(compute: () => T, options: { prefix?: string; rename?: Record<string, string> } = {}): T {
  try {
    return compute();
  } catch (error) {
    if (!(error instanceof EngineError) || typeof error.details.field === "string") throw error;
    const argument = typeof error.details.argument === "string" ? error.details.argument : typeof error.details.path === "string" ? error.details.path : null;
    if (argument === null) throw error;
    const renamed = options.rename?.[argument];
    const field = renamed ?? (options.prefix ? `${options.prefix}.${argument}` : argument);
    const message = options.prefix && !error.message.startsWith(options.prefix) ? `${options.prefix}: ${error.message}` : error.message;
    throw new EngineError(error.kind, message, { ...error.details, field });
  }
}

/**
 * Replaces −0 by 0 throughout a freshly built result (in place) and returns it. JSON writes −0
 * as 0, so without this a result sent through a JSON channel would differ from the same result
 * sent by structured clone (the IPC path), and contract comparisons would fail on the sign bit.
 */
export function withPositiveZeros<T>(value: T): T {
  const stack: unknown[] = [value];
  while (stack.length > 0) {
    const v = stack.pop();
    // A frozen container (shared engine constant) cannot hold a fresh −0; leave it alone.
    if (v !== null && typeof v === "object" && Object.isFrozen(v)) continue;
    if (Array.isArray(v)) {
      for (let i = 0; i < v.length; i++) {
        if (Object.is(v[i], -0)) v[i] = 0;
        else if (v[i] !== null && typeof v[i] === "object") stack.push(v[i]);
      }
    } else if (v !== null && typeof v === "object") {
      const o = v as Record<string, unknown>;
      for (const k of Object.keys(o)) {
        if (Object.is(o[k], -0)) o[k] = 0;
        else if (o[k] !== null && typeof o[k] === "object") stack.push(o[k]);
      }
    }
  }
  return value;
}
