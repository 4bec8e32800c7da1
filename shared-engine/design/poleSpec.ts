/**
 * Requested closed-loop pole sets: parsing from JSON (project files) and the checks every
 * pole-placement routine applies before it starts (count, finiteness, conjugate pairing,
 * multiplicity). Poles are plain `{ re, im }` records (see linalg/complex.ts).
 */
import { EngineError } from "../errors";
import type { Complex } from "../linalg/complex";

/**
 * Relative distance under which two requested poles count as the same pole, and under which a
 * complex pole counts as the conjugate of another. Exact duplicates typed by a user land far
 * below this; poles a user means to be distinct (−1 and −1.0001) land far above it.
 */
export const SAME_POLE_TOLERANCE = 1e-12;

/** Formats a pole for messages: "-2", "-2+4j", "-2-4j". */
export function formatPole(p: Complex): string {
  const re = String(Number(p.re.toPrecision(12)));
  if (p.im === 0) return re;
  const im = String(Number(Math.abs(p.im).toPrecision(12)));
  return `${re}${p.im > 0 ? "+" : "-"}${im}j`;
}

function samePole(a: Complex, b: Complex): boolean {
  return Math.hypot(a.re - b.re, a.im - b.im) <= SAME_POLE_TOLERANCE * Math.max(1, Math.hypot(b.re, b.im));
}

/**
 * Computes: a Complex[] from a JSON value `[p₁, p₂, …]` where each pᵢ is a number (real pole)
 * or an object `{ re: number, im?: number }`.
 *
 * Requires: nothing; any value is accepted and checked.
 *
 * Method: field-by-field validation; the path in each message follows the project-file
 * convention (`poles[2].im`). Conjugate pairing is not checked here (see `normalizePoleSet`)
 * so that a partially edited list can still be shown.
 *
 * Cost: O(length). Accuracy: values are copied unchanged.
 *
 * Errors: "validation" naming the path when the value is not an array, an entry is neither a
 * number nor an object with numeric `re` (and optional numeric `im`), or a number is not finite.
 *
 * Example:
 *   parsePoleSpec([-10, { re: -2, im: 4 }, { re: -2, im: -4 }]);
 *   // → [{re:-10,im:0},{re:-2,im:4},{re:-2,im:-4}]
 */
export function parsePoleSpec(value: unknown, path = "poles"): Complex[] {
  if (!Array.isArray(value)) {
    throw new EngineError("validation", `${path} must be an array of poles (numbers or {re, im} objects)`, { path });
  }
  return value.map((entry: unknown, i) => {
    const at = `${path}[${i}]`;
    if (typeof entry === "number") {
      if (!Number.isFinite(entry)) {
        throw new EngineError("validation", `${at} is ${entry}; a pole must be a finite number`, { path: at });
      }
      return { re: entry, im: 0 };
    }
    if (entry === null || typeof entry !== "object" || Array.isArray(entry)) {
      throw new EngineError("validation", `${at} must be a number or an object {re, im}`, { path: at });
    }
    const record = entry as Record<string, unknown>;
    const re = record["re"];
    const im = record["im"] === undefined ? 0 : record["im"];
    for (const [field, v] of [["re", re], ["im", im]] as const) {
      if (typeof v !== "number" || !Number.isFinite(v)) {
        throw new EngineError("validation", `${at}.${field} must be a finite number (it is ${String(v)})`, { path: `${at}.${field}` });
      }
    }
    for (const key of Object.keys(record)) {
      if (key !== "re" && key !== "im") {
        throw new EngineError("validation", `${at} has an unknown field "${key}" (allowed: re, im)`, { path: `${at}.${key}` });
      }
    }
    return { re: re as number, im: im as number };
  });
}

/** A checked pole set: `ordered` has each conjugate pair adjacent (+im first), with exact conjugates. */
export interface NormalizedPoleSet {
  ordered: Complex[];
  /** Largest number of times one pole value occurs. */
  maxMultiplicity: number;
  /** A pole with that multiplicity. */
  mostRepeated: Complex;
}

/**
 * Computes: the ordering used by the placement kernels — real poles stay as given, each
 * complex pole with im > 0 is followed by its conjugate, made exact (conj of the +im member).
 *
 * Requires: nothing; checks everything.
 *
 * Method: pairing by nearest unused conjugate within SAME_POLE_TOLERANCE (relative).
 *
 * Cost: O(k²) for k poles. Accuracy: the −im member is replaced by the exact conjugate of the
 * +im member, a change of at most SAME_POLE_TOLERANCE relative.
 *
 * Errors: "invalid-argument" if `poles` is not an array of {re, im} or its length is not
 * `expectedCount`, or a complex pole has no conjugate partner (named in the message);
 * "non-finite" for NaN/Infinity parts.
 *
 * Example:
 *   normalizePoleSet([{ re: -2, im: -4 }, { re: -10, im: 0 }, { re: -2, im: 4 }], 3, "poles").ordered;
 *   // → [-2+4j, -2-4j, -10]
 */
export function normalizePoleSet(poles: Complex[], expectedCount: number, name: string): NormalizedPoleSet {
  if (!Array.isArray(poles)) {
    throw new EngineError("invalid-argument", `${name} must be an array of {re, im} poles`, { argument: name });
  }
  if (poles.length !== expectedCount) {
    throw new EngineError(
      "invalid-argument",
      `${name} must have exactly ${expectedCount} entries (one per state to place), but it has ${poles.length}`,
      { argument: name, expected: expectedCount, actual: poles.length },
    );
  }
  poles.forEach((p, i) => {
    if (p === null || typeof p !== "object" || typeof p.re !== "number" || typeof p.im !== "number") {
      throw new EngineError("invalid-argument", `${name}[${i}] must be an object {re, im} of numbers`, { argument: name, index: i });
    }
    if (!Number.isFinite(p.re) || !Number.isFinite(p.im)) {
      throw new EngineError("non-finite", `${name}[${i}] is ${p.re}${p.im >= 0 ? "+" : ""}${p.im}j; poles must be finite`, {
        argument: name,
        index: i,
      });
    }
  });
  const used = new Array<boolean>(poles.length).fill(false);
  const ordered: Complex[] = [];
  poles.forEach((p, i) => {
    if (used[i]) return;
    used[i] = true;
    if (p.im === 0) {
      ordered.push({ re: p.re, im: 0 });
      return;
    }
    const target = { re: p.re, im: -p.im };
    let best = -1;
    let bestDist = Infinity;
    poles.forEach((q, j) => {
      if (used[j]) return;
      const d = Math.hypot(q.re - target.re, q.im - target.im);
      if (d < bestDist) { bestDist = d; best = j; }
    });
    if (best < 0 || !(bestDist <= SAME_POLE_TOLERANCE * Math.max(1, Math.hypot(p.re, p.im)))) {
      throw new EngineError(
        "invalid-argument",
        `${name}[${i}] = ${formatPole(p)} has no conjugate partner ${formatPole(target)}; complex poles of a real system must come in conjugate pairs`,
        { argument: name, index: i, pole: { re: p.re, im: p.im } },
      );
    }
    used[best] = true;
    const upper = p.im > 0 ? p : poles[best]!;
    ordered.push({ re: upper.re, im: upper.im }, { re: upper.re, im: -upper.im });
  });
  let maxMultiplicity = 0;
  let mostRepeated: Complex = ordered[0] ?? { re: 0, im: 0 };
  for (const p of ordered) {
    const count = ordered.filter((q) => samePole(q, p)).length;
    if (count > maxMultiplicity) { maxMultiplicity = count; mostRepeated = p; }
  }
  return { ordered, maxMultiplicity, mostRepeated };
}

/** Groups equal poles: index of the first occurrence of each pole's value, for the kernels. */
export function firstOccurrence(ordered: Complex[]): number[] {
  return ordered.map((p, i) => {
    for (let j = 0; j < i; j++) if (samePole(ordered[j]!, p)) return j;
    return i;
  });
}

/**
 * Greedy matching of achieved to requested poles (closest pair first), returning
 * max |achieved − requested| / max(1, |requested|) over the matched pairs.
 */
export function maxRelativePoleError(requested: Complex[], achieved: Complex[]): number {
  const pairs: { d: number; i: number; j: number }[] = [];
  requested.forEach((r, i) =>
    achieved.forEach((a, j) => pairs.push({ d: Math.hypot(a.re - r.re, a.im - r.im) / Math.max(1, Math.hypot(r.re, r.im)), i, j })),
  );
  pairs.sort((x, y) => x.d - y.d);
  const usedR = new Array<boolean>(requested.length).fill(false);
  const usedA = new Array<boolean>(achieved.length).fill(false);
  let worst = 0;
  let matched = 0;
  for (const { d, i, j } of pairs) {
    if (usedR[i] || usedA[j]) continue;
    usedR[i] = usedA[j] = true;
    worst = Math.max(worst, d);
    if (++matched === requested.length) break;
  }
  return worst;
}
