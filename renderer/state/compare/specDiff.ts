/**
 * The parameters in which design variants differ: a structural diff of their specifications by
 * JSON path ("stateFeedback.Q[0][0]"), one row per path where at least two variants disagree.
 * `id` and `name` are left out (they always differ and head the columns anyway).
 */

export interface SpecDifference {
  /** JSON path from the variant's root, e.g. "stateFeedback.Q[1][1]". */
  path: string;
  /** The value of each variant at `path`; undefined when the variant has no such field. */
  values: unknown[];
}

/** Numeric lists longer than this (time grids, frequency grids) are compared as one value. */
export const WHOLE_LIST_LENGTH = 12;

const IGNORED_TOP_LEVEL = new Set(["id", "name"]);

function isPlainObject(value: unknown): value is Record<string, unknown> {
  return value !== null && typeof value === "object" && !Array.isArray(value);
}

function sameJson(a: unknown, b: unknown): boolean {
  if (a === b) return true;
  if (typeof a === "number" && typeof b === "number") return Object.is(a, b) || a === b;
  if (Array.isArray(a) && Array.isArray(b)) return a.length === b.length && a.every((x, i) => sameJson(x, b[i]));
  if (isPlainObject(a) && isPlainObject(b)) {
    const keys = new Set([...Object.keys(a), ...Object.keys(b)]);
    for (const k of keys) if (!sameJson(a[k], b[k])) return false;
    return true;
  }
  return false;
}

function childPath(path: string, key: string | number): string {
  if (typeof key === "number") return `${path}[${key}]`;
  return /^[A-Za-z_$][\w$]*$/.test(key) ? (path ? `${path}.${key}` : key) : `${path}[${JSON.stringify(key)}]`;
}

function isLongNumberList(value: unknown): boolean {
  return Array.isArray(value) && value.length > WHOLE_LIST_LENGTH && value.every((x) => typeof x === "number");
}

function walk(values: unknown[], path: string, out: SpecDifference[], depth: number): void {
  if (values.every((v) => sameJson(v, values[0]))) return;
  // Descend while every present value is an object (or every one an array), to name the deepest
  // differing field; otherwise this path itself is the difference.
  const present = values.filter((v) => v !== undefined);
  const allObjects = present.length > 0 && present.every(isPlainObject);
  const allArrays = present.length > 0 && present.every((v) => Array.isArray(v)) && !present.some(isLongNumberList);
  if (depth < 32 && allObjects && present.length === values.length) {
    const keys = [...new Set(values.flatMap((v) => Object.keys(v as object)))].sort();
    for (const key of keys) {
      if (depth === 0 && IGNORED_TOP_LEVEL.has(key)) continue;
      walk(values.map((v) => (v as Record<string, unknown>)[key]), childPath(path, key), out, depth + 1);
    }
    return;
  }
  if (depth < 32 && allArrays && present.length === values.length) {
    const length = Math.max(...values.map((v) => (v as unknown[]).length));
    const lengths = new Set(values.map((v) => (v as unknown[]).length));
    if (lengths.size > 1) {
      out.push({ path, values: structuredClone(values) });
      return;
    }
    for (let i = 0; i < length; i++) walk(values.map((v) => (v as unknown[])[i]), childPath(path, i), out, depth + 1);
    return;
  }
  out.push({ path, values: structuredClone(values) });
}

/** Every path at which the given specifications (2 or more) do not all agree, in sorted key order. */
export function diffSpecs(specs: readonly unknown[]): SpecDifference[] {
  const out: SpecDifference[] = [];
  if (specs.length < 2) return out;
  walk([...specs], "", out, 0);
  return out;
}

/** A short, exact text for one diff cell: "absent", numbers in shortest round-trip form, JSON otherwise. */
export function formatDiffValue(value: unknown): string {
  if (value === undefined) return "absent";
  if (typeof value === "number") return String(value).replace("-", "−");
  if (isLongNumberList(value)) {
    const list = value as number[];
    return `${list.length} values, ${list[0]} … ${list[list.length - 1]}`;
  }
  const text = JSON.stringify(value);
  return text.length > 120 ? `${text.slice(0, 117)}…` : text;
}
