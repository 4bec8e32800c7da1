/**
 * Validation of zero-pole-gain plants in a project file, SISO or one entry per (output, input)
 * pair: list shapes against the gain grid, conjugate pairs within each list (the rule of the
 * model layer's createZeroPoleGain), properness per entry, and signal names.
 */
import { describe, type Checker, type Path } from "./checker";
import type { ComplexSpec } from "./format";
import type { PlantDims } from "./validateNonlinear";
import { checkComplexList, checkNames, checkSampleTime, defaultNames } from "./validationParts";

// Conjugate pairing tolerance of the model layer (createZeroPoleGain): √ε relative, so values
// computed elsewhere pair up and typos do not.
const CONJUGATE_TOLERANCE = Math.sqrt(Number.EPSILON);

/** Each non-real value needs its own partner near its conjugate (the rule of createZeroPoleGain). */
function checkConjugatePairs(c: Checker, list: ComplexSpec[], path: Path, what: "zeros" | "poles"): void {
  const values = list.map((v) => (typeof v === "number" ? { re: v, im: 0 } : v));
  if (!values.every((v) => Number.isFinite(v.re) && Number.isFinite(v.im))) return; // already reported
  const free = values.map((_, k) => k).filter((k) => values[k]!.im < 0);
  values.forEach((v, k) => {
    if (!(v.im > 0)) return;
    let best = -1;
    let bestDistance = Infinity;
    free.forEach((f, at) => {
      const d = Math.hypot(values[f]!.re - v.re, values[f]!.im + v.im);
      if (d < bestDistance) [best, bestDistance] = [at, d];
    });
    if (best >= 0 && bestDistance <= CONJUGATE_TOLERANCE * Math.max(1, Math.hypot(v.re, v.im))) free.splice(best, 1);
    else c.problem([...path, k], `${complexText(v)} has no conjugate partner ${complexText({ re: v.re, im: -v.im })} in this list; complex ${what} must come in conjugate pairs`);
  });
  for (const k of free) {
    const v = values[k]!;
    c.problem([...path, k], `${complexText(v)} has no conjugate partner ${complexText({ re: v.re, im: -v.im })} in this list; complex ${what} must come in conjugate pairs`);
  }
}

function complexText(v: { re: number; im: number }): string {
  return `${v.re}${v.im < 0 ? "-" : "+"}${Math.abs(v.im)}j`;
}

/** One zero-pole-gain entry: its zero and pole lists (conjugate pairs, proper). Returns the pole count. */
function checkZeroPoleGainEntry(c: Checker, zerosValue: unknown, polesValue: unknown, zerosPath: Path, polesPath: Path, entry: string): number {
  const zeros = checkComplexList(c, zerosValue, zerosPath);
  const poles = checkComplexList(c, polesValue, polesPath);
  if (zeros) checkConjugatePairs(c, zeros, zerosPath, "zeros");
  if (poles) checkConjugatePairs(c, poles, polesPath, "poles");
  if (zeros && poles && zeros.length > poles.length) {
    c.problem(zerosPath, `improper${entry}: ${zeros.length} zeros but only ${poles.length} poles`);
  }
  return poles?.length ?? -1;
}

const isGrid = (value: unknown): boolean => Array.isArray(value) && value.some((row) => Array.isArray(row));

/** A zero-pole-gain model; returns its dimensions (n = the pole count for SISO, −1 for a grid). */
export function checkZeroPoleGain(c: Checker, value: unknown, path: Path): PlantDims | null {
  const m = c.object(value, path, ["type", "zeros", "poles", "gain", "sampleTime", "names", "units"]);
  if (!m) return null;
  const discrete = checkSampleTime(c, m.sampleTime, [...path, "sampleTime"]);
  const mimo = Array.isArray(m.gain) || isGrid(m.zeros) || isGrid(m.poles);
  let p = 1;
  let inputs = 1;
  let n = -1;
  if (!mimo) {
    c.number(m.gain, [...path, "gain"]);
    n = checkZeroPoleGainEntry(c, m.zeros, m.poles, [...path, "zeros"], [...path, "poles"], "");
  } else {
    // The gain grid fixes outputs × inputs; zeros and poles must have one list per pair.
    if (!Array.isArray(m.gain)) {
      c.problem([...path, "gain"], `must be one gain per (output, input) pair, a list of rows like zeros and poles (they are given per pair); is ${describe(m.gain)}`);
    } else {
      const gain = c.matrix(m.gain, [...path, "gain"]);
      p = m.gain.length;
      inputs = Array.isArray(m.gain[0]) ? (m.gain[0] as unknown[]).length : 0;
      if (gain && inputs === 0) c.problem([...path, "gain", 0], "must not be empty: one gain per input");
    }
    const grids = (["zeros", "poles"] as const).map((key) => {
      const rows = c.array(m[key], [...path, key], { nonEmpty: true }) ?? [];
      if (Array.isArray(m.gain) && rows.length !== p) {
        c.problem([...path, key], `has ${rows.length} rows but gain has ${p}: one row per output, one list of ${key} per input`);
      }
      return rows.map((row, i) => {
        const r = c.array(row, [...path, key, i]);
        if (r && r.length > inputs) c.problem([...path, key, i], `has ${r.length} entries but gain row ${i} has ${inputs}: one list of ${key} per input`);
        return r; // undefined when not a list (already reported)
      });
    });
    const [zeroRows, poleRows] = grids as [(unknown[] | undefined)[], (unknown[] | undefined)[]];
    for (let i = 0; i < p; i++) {
      for (let j = 0; j < inputs; j++) {
        const zPath = [...path, "zeros", i, j];
        const pPath = [...path, "poles", i, j];
        const z = zeroRows[i]?.[j];
        const q = poleRows[i]?.[j];
        if (zeroRows[i] && z === undefined) c.problem(zPath, `is missing: every (output, input) pair needs its list of zeros ([] for none)`);
        if (poleRows[i] && q === undefined) c.problem(pPath, `is missing: every (output, input) pair needs its list of poles ([] for none)`);
        if (z !== undefined && q !== undefined) checkZeroPoleGainEntry(c, z, q, zPath, pPath, ` entry (output ${i + 1}, input ${j + 1})`);
      }
    }
  }
  const counts = { states: -1, inputs, outputs: p, disturbances: 0 };
  const outputs = checkNames(c, m, path, "names", counts);
  checkNames(c, m, path, "units", counts);
  return { n, m: inputs, p, q: 0, outputs: outputs.length ? outputs : defaultNames("y", p), discrete: discrete === true };
}
