/**
 * The last guard of the pipeline: a result must hold no NaN or Infinity anywhere (explicit
 * "unbounded" data is null). A non-finite number here is a bug upstream; it becomes a typed
 * internal error naming the field, never a silent NaN in the output.
 */
import { EngineError } from "../errors";
import { formatPath } from "./safeJson";

export function assertFiniteResult(value: unknown): void {
  const stack: { v: unknown; path: (string | number)[] }[] = [{ v: value, path: [] }];
  while (stack.length > 0) {
    const { v, path } = stack.pop()!;
    if (typeof v === "number") {
      if (!Number.isFinite(v)) throw new EngineError("internal", `The result field ${formatPath(path)} is ${v}; results must be finite (this is a bug)`, { path: formatPath(path) });
    } else if (Array.isArray(v)) {
      v.forEach((x, i) => stack.push({ v: x, path: [...path, i] }));
    } else if (v !== null && typeof v === "object") {
      for (const [k, x] of Object.entries(v)) stack.push({ v: x, path: [...path, k] });
    }
  }
}
