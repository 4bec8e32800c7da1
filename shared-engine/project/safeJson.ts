/**
 * Reading untrusted project data (files, imports, database records) before anything is
 * computed: size limit, nesting limit, no prototype-polluting keys, only JSON values, no
 * non-finite numbers. Failures are EngineError kind "validation" with the JSON path.
 */
import { EngineError } from "../errors";

/** Limits for a project file. Changing them changes which saved files open: raise with care. */
export const PROJECT_LIMITS = {
  /** Largest project file accepted, in UTF-16 code units of its text (≈ bytes for ASCII). */
  maxTextLength: 16 * 1024 * 1024,
  /** Deepest nesting of arrays/objects (a project needs about 8). */
  maxDepth: 32,
  /** Most entries in one array or object. */
  maxEntries: 100_000,
  /** Longest string value. */
  maxStringLength: 100_000,
} as const;

const FORBIDDEN_KEYS = new Set(["__proto__", "constructor", "prototype"]);

/** Formats a JSON path the way messages show it: plants[0].model.A[2][1]. */
export function formatPath(path: readonly (string | number)[]): string {
  let out = "";
  for (const part of path) {
    if (typeof part === "number") out += `[${part}]`;
    else out += out === "" ? part : /^[A-Za-z_$][\w$]*$/.test(part) ? `.${part}` : `[${JSON.stringify(part)}]`;
  }
  return out === "" ? "(top level)" : out;
}

/** Parses text as JSON under PROJECT_LIMITS; the result is plain data (null-prototype-free objects). */
export function parseProjectJson(text: string): unknown {
  if (typeof text !== "string") throw new EngineError("validation", "A project file must be text", {});
  if (text.length > PROJECT_LIMITS.maxTextLength) {
    throw new EngineError("validation", `The file is ${text.length} characters long; projects are limited to ${PROJECT_LIMITS.maxTextLength}`, {
      path: "",
    });
  }
  let value: unknown;
  try {
    value = JSON.parse(text);
  } catch (error) {
    throw new EngineError("validation", `The file is not valid JSON: ${(error as Error).message}`, { path: "" });
  }
  checkPlainJson(value);
  return value;
}

/**
 * Checks a value already in memory (e.g. from IndexedDB or a structured clone) the same way:
 * only null, booleans, finite numbers, strings, arrays and plain objects, within the limits.
 */
export function checkPlainJson(value: unknown): void {
  const stack: { value: unknown; path: (string | number)[]; depth: number }[] = [{ value, path: [], depth: 0 }];
  while (stack.length > 0) {
    const { value: v, path, depth } = stack.pop()!;
    if (depth > PROJECT_LIMITS.maxDepth) {
      throw new EngineError("validation", `${formatPath(path)}: nested more than ${PROJECT_LIMITS.maxDepth} levels deep`, { path: formatPath(path) });
    }
    if (v === null || typeof v === "boolean") continue;
    if (typeof v === "number") {
      if (!Number.isFinite(v)) throw new EngineError("validation", `${formatPath(path)}: ${v} is not a finite number`, { path: formatPath(path) });
      continue;
    }
    if (typeof v === "string") {
      if (v.length > PROJECT_LIMITS.maxStringLength) {
        throw new EngineError("validation", `${formatPath(path)}: text longer than ${PROJECT_LIMITS.maxStringLength} characters`, { path: formatPath(path) });
      }
      continue;
    }
    if (Array.isArray(v)) {
      if (v.length > PROJECT_LIMITS.maxEntries) {
        throw new EngineError("validation", `${formatPath(path)}: more than ${PROJECT_LIMITS.maxEntries} entries`, { path: formatPath(path) });
      }
      for (let i = 0; i < v.length; i++) stack.push({ value: v[i], path: [...path, i], depth: depth + 1 });
      continue;
    }
    if (typeof v === "object") {
      const proto = Object.getPrototypeOf(v);
      if (proto !== Object.prototype && proto !== null) {
        throw new EngineError("validation", `${formatPath(path)}: only plain JSON objects are allowed`, { path: formatPath(path) });
      }
      const keys = Object.keys(v as object);
      if (keys.length > PROJECT_LIMITS.maxEntries) {
        throw new EngineError("validation", `${formatPath(path)}: more than ${PROJECT_LIMITS.maxEntries} keys`, { path: formatPath(path) });
      }
      // JSON.parse creates "__proto__" as an own key: refuse it rather than risk a later merge.
      for (const key of Object.getOwnPropertyNames(v as object)) {
        if (FORBIDDEN_KEYS.has(key)) {
          throw new EngineError("validation", `${formatPath([...path, key])}: the key "${key}" is not allowed`, { path: formatPath([...path, key]) });
        }
        stack.push({ value: (v as Record<string, unknown>)[key], path: [...path, key], depth: depth + 1 });
      }
      continue;
    }
    throw new EngineError("validation", `${formatPath(path)}: a ${typeof v} is not JSON data`, { path: formatPath(path) });
  }
}
