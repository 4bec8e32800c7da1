/**
 * Checks shared by the project-file validators (validateProject, validatePlant,
 * validateZeroPoleGain, validateVariant): ids, sample times, signal names and units, complex
 * lists. Each reports problems on the Checker with their JSON path and returns what it read.
 */
import type { Checker, Path } from "./checker";
import type { ComplexSpec } from "./format";

/**
 * Ids as the project format allows them: letters, digits, "_", "-", "."; at most 64 characters;
 * starting with a letter or digit. main/printIpc.ts keeps a copy for print routes.
 */
export const ID_PATTERN = /^[A-Za-z0-9][A-Za-z0-9_.-]{0,63}$/;
export const SIGNAL_KINDS = ["states", "inputs", "outputs", "disturbances"] as const;

/** A plant, variant or requirement id: a non-empty string matching ID_PATTERN. */
export function checkId(c: Checker, value: unknown, path: Path): string | undefined {
  const id = c.string(value, path, { nonEmpty: true });
  if (id !== undefined && !ID_PATTERN.test(id)) {
    c.problem(path, `"${id}" is not a valid id (letters, digits, "_", "-", "."; at most 64 characters; starting with a letter or digit)`);
  }
  return id;
}

/** `sampleTime`: null (continuous, returns false) or a positive period (returns true); undefined when invalid. */
export function checkSampleTime(c: Checker, value: unknown, path: Path): boolean | undefined {
  if (value === null) return false;
  if (value === undefined) {
    c.problem(path, 'is required: null for a continuous-time plant, or the sample period in seconds');
    return undefined;
  }
  return c.number(value, path, { positive: true }) === undefined ? undefined : true;
}

/**
 * `names` or `units` of a linear model: per kind a list as long as the model has signals of that
 * kind (a count of −1 skips the length check), names non-empty and unique. Returns the output
 * names (empty when the model names none).
 */
export function checkNames(c: Checker, model: Record<string, unknown>, path: Path, key: "names" | "units", counts: Record<(typeof SIGNAL_KINDS)[number], number>): string[] {
  let outputs: string[] = [];
  const spec = c.object(model[key] ?? {}, [...path, key], SIGNAL_KINDS);
  if (!spec) return outputs;
  for (const kind of SIGNAL_KINDS) {
    const list = c.array(spec[kind], [...path, key, kind], { optional: true });
    if (!list) continue;
    if (counts[kind] >= 0 && list.length !== counts[kind]) {
      c.problem([...path, key, kind], `has ${list.length} entries; the model has ${counts[kind]} ${kind}`);
    }
    const seen = new Set<string>();
    list.forEach((name, i) => {
      const s = c.string(name, [...path, key, kind, i], { nonEmpty: key === "names", maxLength: 100 });
      if (key === "names" && s !== undefined) {
        if (seen.has(s)) c.problem([...path, key, kind, i], `duplicate name "${s}" among the ${kind}`);
        seen.add(s);
      }
    });
    if (key === "names" && kind === "outputs") outputs = list as string[];
  }
  return outputs;
}

/** A list of complex values, each a number or {re, im}. */
export function checkComplexList(c: Checker, value: unknown, path: Path, options: { nonEmpty?: boolean } = {}): ComplexSpec[] | undefined {
  const list = c.array(value, path, options);
  if (!list) return undefined;
  list.forEach((v, i) => {
    if (typeof v === "number") {
      c.number(v, [...path, i]);
      return;
    }
    const o = c.object(v, [...path, i], ["re", "im"]);
    if (!o) return;
    c.number(o.re, [...path, i, "re"]);
    c.number(o.im, [...path, i, "im"]);
  });
  return list as ComplexSpec[];
}

/** Default signal names: prefix1 … prefixN (y1, y2, … for outputs). */
export function defaultNames(prefix: string, count: number): string[] {
  return Array.from({ length: Math.max(0, count) }, (_, i) => `${prefix}${i + 1}`);
}
