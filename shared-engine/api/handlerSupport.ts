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
