/**
 * Validation of a project file (format "loopwright-project"): structure, types, matrix shapes
 * and cross-references, every problem reported with its JSON path. Runs after parseProjectJson
 * (hostile-content checks) and migrateProject (older versions), before anything is computed.
 */
import { EngineError } from "../errors";
import { Checker, describe, shape, type Finding, type Path } from "./checker";
import { checkNonlinearModel, checkNonlinearVariantKeys, type PlantDims } from "./validateNonlinear";
import {
  PROJECT_FORMAT,
  PROJECT_VERSION,
  type ComplexSpec,
  type ModelSpec,
  type PlantSpec,
  type ProjectFile,
  type VariantSpec,
} from "./format";

export interface ValidatedProject {
  project: ProjectFile;
  warnings: Finding[];
}

const ID_PATTERN = /^[A-Za-z0-9][A-Za-z0-9_.-]{0,63}$/;
const SIGNAL_KINDS = ["states", "inputs", "outputs", "disturbances"] as const;

/** Validates and returns the project (the same data, unknown keys still present but ignored). */
export function validateProject(value: unknown): ValidatedProject {
  const c = new Checker();
  const top = c.object(value, [], ["format", "version", "name", "description", "plants", "variants", "requirements", "notes", "signOffs"]);
  if (!top) throw validationError(c);
  if (top.format !== PROJECT_FORMAT) c.problem(["format"], `must be "${PROJECT_FORMAT}", is ${JSON.stringify(top.format)}`);
  if (top.version !== PROJECT_VERSION) c.problem(["version"], `must be ${PROJECT_VERSION} after migration, is ${JSON.stringify(top.version)}`);
  c.string(top.name, ["name"], { nonEmpty: true, maxLength: 200 });
  c.string(top.description, ["description"], { optional: true });
  c.string(top.notes, ["notes"], { optional: true });

  const plantDims = new Map<string, PlantDims>();
  const plants = c.array(top.plants, ["plants"], { nonEmpty: true }) ?? [];
  plants.forEach((plant, i) => {
    const dims = checkPlant(c, plant, ["plants", i]);
    const id = (plant as PlantSpec | null)?.id;
    if (typeof id === "string") {
      if (plantDims.has(id)) c.problem(["plants", i, "id"], `duplicate plant id "${id}"`);
      else if (dims) plantDims.set(id, dims);
      else plantDims.set(id, { n: -1, m: -1, p: -1, q: -1, outputs: [], discrete: false });
    }
  });

  const variantIds = new Set<string>();
  const variants = c.array(top.variants, ["variants"]) ?? [];
  variants.forEach((variant, i) => {
    checkVariant(c, variant, ["variants", i], plantDims);
    const id = (variant as VariantSpec | null)?.id;
    if (typeof id === "string") {
      if (variantIds.has(id)) c.problem(["variants", i, "id"], `duplicate variant id "${id}"`);
      variantIds.add(id);
    }
  });

  const requirements = c.array(top.requirements, ["requirements"], { optional: true }) ?? [];
  requirements.forEach((req, i) => {
    const r = c.object(req, ["requirements", i], ["id", "metric", "min", "max", "description"]);
    if (!r) return;
    checkId(c, r.id, ["requirements", i, "id"]);
    c.string(r.metric, ["requirements", i, "metric"], { nonEmpty: true });
    const min = c.number(r.min, ["requirements", i, "min"], { optional: true });
    const max = c.number(r.max, ["requirements", i, "max"], { optional: true });
    if (r.min === undefined && r.max === undefined) c.problem(["requirements", i], "needs a min, a max, or both");
    if (min !== undefined && max !== undefined && min > max) c.problem(["requirements", i], `min ${min} is above max ${max}`);
    c.string(r.description, ["requirements", i, "description"], { optional: true });
  });

  const signOffs = c.array(top.signOffs, ["signOffs"], { optional: true }) ?? [];
  signOffs.forEach((s, i) => {
    const so = c.object(s, ["signOffs", i], ["variant", "role", "name", "date", "fingerprint", "comment"]);
    if (!so) return;
    const v = c.string(so.variant, ["signOffs", i, "variant"], { nonEmpty: true });
    if (v !== undefined && !variantIds.has(v)) c.problem(["signOffs", i, "variant"], `names no variant ("${v}")`);
    c.oneOf(so.role, ["signOffs", i, "role"], ["prepared", "reviewed", "approved"] as const);
    c.string(so.name, ["signOffs", i, "name"], { nonEmpty: true, maxLength: 200 });
    c.string(so.date, ["signOffs", i, "date"], { nonEmpty: true });
    c.string(so.fingerprint, ["signOffs", i, "fingerprint"], { nonEmpty: true });
    c.string(so.comment, ["signOffs", i, "comment"], { optional: true });
  });

  if (c.problems.length > 0) throw validationError(c);
  return { project: top as unknown as ProjectFile, warnings: c.warnings };
}

function validationError(c: Checker): EngineError {
  const shown = c.problems.slice(0, 8).map((p) => `${p.path}: ${p.message}`);
  const more = c.problems.length > shown.length ? `\n(and ${c.problems.length - shown.length} more)` : "";
  return new EngineError("validation", `The project is not valid:\n${shown.join("\n")}${more}`, {
    problems: c.problems,
    warnings: c.warnings,
  });
}

function checkId(c: Checker, value: unknown, path: Path): string | undefined {
  const id = c.string(value, path, { nonEmpty: true });
  if (id !== undefined && !ID_PATTERN.test(id)) {
    c.problem(path, `"${id}" is not a valid id (letters, digits, "_", "-", "."; at most 64 characters; starting with a letter or digit)`);
  }
  return id;
}

function checkSampleTime(c: Checker, value: unknown, path: Path): boolean | undefined {
  if (value === null) return false;
  if (value === undefined) {
    c.problem(path, 'is required: null for a continuous-time plant, or the sample period in seconds');
    return undefined;
  }
  return c.number(value, path, { positive: true }) === undefined ? undefined : true;
}

function checkNames(c: Checker, model: Record<string, unknown>, path: Path, key: "names" | "units", counts: Record<(typeof SIGNAL_KINDS)[number], number>): string[] {
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

function checkComplexList(c: Checker, value: unknown, path: Path, options: { nonEmpty?: boolean } = {}): ComplexSpec[] | undefined {
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

function checkPlant(c: Checker, value: unknown, path: Path): PlantDims | null {
  const plant = c.object(value, path, ["id", "name", "description", "model"]);
  if (!plant) return null;
  checkId(c, plant.id, [...path, "id"]);
  c.string(plant.name, [...path, "name"], { optional: true, maxLength: 200 });
  c.string(plant.description, [...path, "description"], { optional: true });
  const mpath = [...path, "model"];
  const type = (plant.model as ModelSpec | undefined)?.type;
  if (type === "state-space") return checkStateSpace(c, plant.model, mpath);
  if (type === "transfer-function") return checkTransferFunction(c, plant.model, mpath);
  if (type === "zero-pole-gain") return checkZeroPoleGain(c, plant.model, mpath);
  if (type === "nonlinear") return checkNonlinearModel(c, plant.model, mpath);
  if (plant.model === undefined || plant.model === null || typeof plant.model !== "object") c.problem(mpath, "is required: an object with a \"type\"");
  else c.problem([...mpath, "type"], `must be "state-space", "transfer-function", "zero-pole-gain" or "nonlinear", is ${JSON.stringify(type)}`);
  return null;
}

function checkStateSpace(c: Checker, value: unknown, path: Path) {
  const m = c.object(value, path, ["type", "A", "B", "C", "D", "F", "E", "sampleTime", "names", "units"]);
  if (!m) return null;
  const discrete = checkSampleTime(c, m.sampleTime, [...path, "sampleTime"]);
  const A = c.matrix(m.A, [...path, "A"]);
  const B = c.matrix(m.B, [...path, "B"]);
  const C = c.matrix(m.C, [...path, "C"]);
  const D = c.matrix(m.D, [...path, "D"], { optional: true });
  const F = c.matrix(m.F, [...path, "F"], { optional: true });
  const E = c.matrix(m.E, [...path, "E"], { optional: true });
  if (!A || !B || !C) return null;
  const n = A.length;
  if (A[0]!.length !== n) c.problem([...path, "A"], `must be square, is ${shape(A)}`);
  const mIn = B[0]!.length;
  const p = C.length;
  if (B.length !== n) c.problem([...path, "B"], `must have ${n} rows like A, has ${B.length}`);
  if (C[0]!.length !== n) c.problem([...path, "C"], `must have ${n} columns like A has states, has ${C[0]!.length}`);
  if (D && (D.length !== p || D[0]!.length !== mIn)) c.problem([...path, "D"], `must be ${p}×${mIn} (outputs × inputs), is ${shape(D)}`);
  const q = F ? F[0]!.length : E ? E[0]!.length : 0;
  if (F && F.length !== n) c.problem([...path, "F"], `must have ${n} rows like A, has ${F.length}`);
  if (E && (E.length !== p || E[0]!.length !== q)) c.problem([...path, "E"], `must be ${p}×${q} (outputs × disturbances), is ${shape(E)}`);
  if (E && !F) c.problem([...path, "F"], "is required when E is given (the disturbances must enter the states or be omitted from E)");
  const counts = { states: n, inputs: mIn, outputs: p, disturbances: q };
  const outputs = checkNames(c, m, path, "names", counts);
  checkNames(c, m, path, "units", counts);
  return { n, m: mIn, p, q, outputs: outputs.length ? outputs : defaultNames("y", p), discrete: discrete === true };
}

function checkPolynomial(c: Checker, value: unknown, path: Path, denominator: boolean): number[] | undefined {
  const coeffs = c.numberList(value, path, { nonEmpty: true });
  if (coeffs && denominator && coeffs[0] === 0) {
    c.problem([...path, 0], "the leading denominator coefficient must not be zero (write coefficients highest power first, without leading zeros)");
  }
  if (coeffs && denominator && coeffs.every((v) => v === 0)) c.problem(path, "the denominator must not be zero");
  return coeffs;
}

function checkTransferFunction(c: Checker, value: unknown, path: Path) {
  const m = c.object(value, path, ["type", "numerator", "denominator", "sampleTime", "names", "units"]);
  if (!m) return null;
  const discrete = checkSampleTime(c, m.sampleTime, [...path, "sampleTime"]);
  const mimo = Array.isArray(m.numerator) && Array.isArray((m.numerator as unknown[])[0]);
  let p = 1;
  let inputs = 1;
  const pairs: [unknown, unknown, Path, Path][] = [];
  if (!mimo) {
    pairs.push([m.numerator, m.denominator, [...path, "numerator"], [...path, "denominator"]]);
  } else {
    const num = c.array(m.numerator, [...path, "numerator"], { nonEmpty: true }) ?? [];
    const den = c.array(m.denominator, [...path, "denominator"], { nonEmpty: true }) ?? [];
    p = num.length;
    inputs = Array.isArray(num[0]) ? (num[0] as unknown[]).length : 0;
    if (den.length !== p) c.problem([...path, "denominator"], `must have ${p} rows like numerator, has ${den.length}`);
    num.forEach((row, i) => {
      const r = c.array(row, [...path, "numerator", i]) ?? [];
      if (r.length !== inputs) c.problem([...path, "numerator", i], `has ${r.length} entries but row 0 has ${inputs}`);
      const drow = Array.isArray(den[i]) ? (den[i] as unknown[]) : [];
      r.forEach((entry, j) => pairs.push([entry, drow[j], [...path, "numerator", i, j], [...path, "denominator", i, j]]));
    });
  }
  for (const [num, den, npath, dpath] of pairs) {
    const n = checkPolynomial(c, num, npath, false);
    const d = checkPolynomial(c, den, dpath, true);
    if (n && d) {
      const degNum = n.length - 1 - leadingZeros(n);
      const degDen = d.length - 1;
      if (degNum > degDen) c.problem(npath, `improper transfer function: numerator degree ${degNum} is above denominator degree ${degDen}`);
    }
  }
  const counts = { states: -1, inputs, outputs: p, disturbances: 0 };
  const outputs = checkNames(c, m, path, "names", counts);
  checkNames(c, m, path, "units", counts);
  return { n: -1, m: inputs, p, q: 0, outputs: outputs.length ? outputs : defaultNames("y", p), discrete: discrete === true };
}

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

function checkZeroPoleGain(c: Checker, value: unknown, path: Path) {
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

function leadingZeros(coeffs: number[]): number {
  let k = 0;
  while (k < coeffs.length - 1 && coeffs[k] === 0) k++;
  return k;
}

function defaultNames(prefix: string, count: number): string[] {
  return Array.from({ length: Math.max(0, count) }, (_, i) => `${prefix}${i + 1}`);
}

function checkSquareSymmetric(c: Checker, value: unknown, path: Path, size: number, what: string, optional = false): void {
  const M = c.matrix(value, path, { optional });
  if (!M) return;
  if (size >= 0 && (M.length !== size || M[0]!.length !== size)) {
    c.problem(path, `must be ${size}×${size} (${what}), is ${shape(M)}`);
    return;
  }
  for (let i = 0; i < M.length; i++) {
    for (let j = 0; j < i; j++) {
      const a = M[i]![j]!;
      const b = M[j]![i]!;
      if (Math.abs(a - b) > 1e-12 * Math.max(1, Math.abs(a), Math.abs(b))) {
        c.problem([...path, i, j], `must equal entry [${j}][${i}] (the matrix must be symmetric): ${a} vs ${b}`);
        return;
      }
    }
  }
}

function checkVariant(
  c: Checker,
  value: unknown,
  path: Path,
  plants: Map<string, PlantDims>,
): void {
  const v = c.object(value, path, [
    "id", "name", "description", "plant", "parent", "baseline", "discretize", "stateFeedback", "integralAction",
    "referenceFeedforward", "observer", "bode", "margins", "step", "disturbanceStep", "nonlinearCheck", "robustness", "notes",
  ]);
  if (!v) return;
  checkId(c, v.id, [...path, "id"]);
  c.string(v.name, [...path, "name"], { optional: true, maxLength: 200 });
  c.string(v.description, [...path, "description"], { optional: true });
  c.string(v.notes, [...path, "notes"], { optional: true });
  c.string(v.parent, [...path, "parent"], { optional: true });
  if (v.baseline !== undefined && typeof v.baseline !== "boolean") c.problem([...path, "baseline"], "must be true or false");
  if (v.referenceFeedforward !== undefined && typeof v.referenceFeedforward !== "boolean") c.problem([...path, "referenceFeedforward"], "must be true or false");
  const plantId = c.string(v.plant, [...path, "plant"], { nonEmpty: true });
  const dims = plantId !== undefined ? plants.get(plantId) : undefined;
  if (plantId !== undefined && !dims) c.problem([...path, "plant"], `names no plant ("${plantId}"); plants are: ${[...plants.keys()].join(", ") || "none"}`);
  const n = dims?.n ?? -1;
  const mIn = dims?.m ?? -1;
  const p = dims?.p ?? -1;

  if (v.discretize !== undefined) {
    const d = c.object(v.discretize, [...path, "discretize"], ["sampleTime", "method", "prewarpRadPerSec"]);
    if (d) {
      c.number(d.sampleTime, [...path, "discretize", "sampleTime"], { positive: true });
      c.oneOf(d.method, [...path, "discretize", "method"], ["zoh", "tustin", "bilinear"] as const);
      c.number(d.prewarpRadPerSec, [...path, "discretize", "prewarpRadPerSec"], { optional: true, positive: true });
      if (d.prewarpRadPerSec !== undefined && d.method === "zoh") c.problem([...path, "discretize", "prewarpRadPerSec"], "applies only to the tustin method");
      if (dims?.discrete) c.problem([...path, "discretize"], "the plant is already sampled (it has a sampleTime); remove discretize");
    }
  }

  const integratorCount = Array.isArray((v.integralAction as { outputs?: unknown } | undefined)?.outputs)
    ? ((v.integralAction as { outputs: unknown[] }).outputs.length)
    : 0;

  if (v.stateFeedback !== undefined) {
    const sf = c.object(v.stateFeedback, [...path, "stateFeedback"], ["method", "Q", "R", "N", "poles"]);
    if (sf) {
      const method = c.oneOf(sf.method, [...path, "stateFeedback", "method"], ["lqr", "poles"] as const);
      const nAug = n >= 0 ? n + integratorCount : -1;
      if (method === "lqr") {
        checkSquareSymmetric(c, sf.Q, [...path, "stateFeedback", "Q"], n, `states × states${integratorCount ? "; integrator weights go in integralAction.weights" : ""}`);
        checkSquareSymmetric(c, sf.R, [...path, "stateFeedback", "R"], mIn, "inputs × inputs");
        const N = c.matrix(sf.N, [...path, "stateFeedback", "N"], { optional: true });
        if (N && n >= 0 && (N.length !== n || N[0]!.length !== mIn)) c.problem([...path, "stateFeedback", "N"], `must be ${n}×${mIn} (states × inputs), is ${shape(N)}`);
        if (sf.poles !== undefined) c.problem([...path, "stateFeedback", "poles"], 'belongs to method "poles", not "lqr"');
      } else if (method === "poles") {
        const poles = checkComplexList(c, sf.poles, [...path, "stateFeedback", "poles"], { nonEmpty: true });
        if (poles && n >= 0 && poles.length !== n) {
          c.problem([...path, "stateFeedback", "poles"], `needs ${n} poles (one per state${integratorCount ? "; integrator poles go in integralAction.poles" : ""}), has ${poles.length}`);
        }
        for (const key of ["Q", "R", "N"]) if (sf[key] !== undefined) c.problem([...path, "stateFeedback", key], 'belongs to method "lqr", not "poles"');
        void nAug;
      }
    }
  }

  if (v.integralAction !== undefined) {
    const ia = c.object(v.integralAction, [...path, "integralAction"], ["outputs", "weights", "poles", "antiWindup"]);
    if (ia) {
      const outs = c.array(ia.outputs, [...path, "integralAction", "outputs"], { nonEmpty: true }) ?? [];
      outs.forEach((o, i) => {
        const opath = [...path, "integralAction", "outputs", i];
        if (typeof o === "number") {
          if (!Number.isInteger(o) || o < 0 || (p >= 0 && o >= p)) c.problem(opath, `output index ${o} is out of range (the plant has ${p} outputs, numbered from 0)`);
        } else if (typeof o === "string") {
          if (dims && !dims.outputs.includes(o)) c.problem(opath, `names no output ("${o}"); outputs are: ${dims.outputs.join(", ")}`);
        } else c.problem(opath, "must be an output name or a 0-based index");
      });
      const w = c.numberList(ia.weights, [...path, "integralAction", "weights"], { optional: true, positive: true });
      if (w && w.length !== outs.length) c.problem([...path, "integralAction", "weights"], `needs one weight per integrated output (${outs.length}), has ${w.length}`);
      const ip = ia.poles === undefined ? undefined : checkComplexList(c, ia.poles, [...path, "integralAction", "poles"]);
      if (ip && ip.length !== outs.length) c.problem([...path, "integralAction", "poles"], `needs one pole per integrated output (${outs.length}), has ${ip.length}`);
      c.oneOf(ia.antiWindup, [...path, "integralAction", "antiWindup"], ["back-calculation", "conditional", "none"] as const, { optional: true });
      if (outs.length > 0 && mIn >= 0 && outs.length > mIn) {
        c.problem([...path, "integralAction", "outputs"], `integrates ${outs.length} outputs but the plant has only ${mIn} inputs: at most one integrated output per input can be held at zero error`);
      }
      const sfMethod = (v.stateFeedback as { method?: unknown } | undefined)?.method;
      if (sfMethod === "poles" && ia.poles === undefined) c.problem([...path, "integralAction", "poles"], "is required when the state feedback is placed by poles");
      if (sfMethod === "lqr" && ia.poles !== undefined) c.problem([...path, "integralAction", "poles"], "applies to pole placement; with LQR give integralAction.weights");
      if (v.stateFeedback === undefined) c.problem([...path, "integralAction"], "needs a stateFeedback design to act through");
    }
  }

  if (v.observer !== undefined) {
    const o = c.object(v.observer, [...path, "observer"], ["method", "poles", "processNoise", "measurementNoise", "form"]);
    if (o) {
      const method = c.oneOf(o.method, [...path, "observer", "method"], ["poles", "kalman"] as const);
      if (method === "poles") {
        const poles = checkComplexList(c, o.poles, [...path, "observer", "poles"], { nonEmpty: true });
        if (poles && n >= 0 && poles.length !== n) c.problem([...path, "observer", "poles"], `needs ${n} poles (one per state), has ${poles.length}`);
      } else if (method === "kalman") {
        const q = dims ? (dims.q > 0 ? dims.q : dims.m) : -1;
        checkSquareSymmetric(c, o.processNoise, [...path, "observer", "processNoise"], q, dims && dims.q > 0 ? "disturbances × disturbances: noise enters through F" : "inputs × inputs: noise enters through B (the plant has no F)");
        checkSquareSymmetric(c, o.measurementNoise, [...path, "observer", "measurementNoise"], p, "outputs × outputs");
        c.oneOf(o.form, [...path, "observer", "form"], ["predictor", "current"] as const, { optional: true });
      }
    }
  }

  if (v.bode !== undefined) {
    const b = c.object(v.bode, [...path, "bode"], ["frequencies"]);
    if (b) c.numberList(b.frequencies, [...path, "bode", "frequencies"], { nonEmpty: true, positive: true });
  }
  if (v.margins !== undefined) {
    const mg = c.object(v.margins, [...path, "margins"], ["feedback", "at"]);
    if (mg) {
      if (mg.feedback !== undefined) c.oneOf(mg.feedback, [...path, "margins", "feedback"], ["unity-negative"] as const);
      if (mg.at !== undefined) c.oneOf(mg.at, [...path, "margins", "at"], ["plant-input"] as const);
      if ((mg.feedback === undefined) === (mg.at === undefined)) c.problem([...path, "margins"], 'needs exactly one of "feedback": "unity-negative" or "at": "plant-input"');
      if (mg.at !== undefined && v.stateFeedback === undefined) c.problem([...path, "margins", "at"], "needs a stateFeedback design (the loop is broken at the plant input)");
      if (mg.feedback !== undefined && dims && (dims.m !== 1 || dims.p !== 1)) c.problem([...path, "margins", "feedback"], `needs a single-input single-output plant (this one has ${dims.m} inputs and ${dims.p} outputs)`);
    }
  }
  checkNonlinearVariantKeys(c, v, path, dims);
  if (v.step !== undefined) {
    const s = c.object(v.step, [...path, "step"], ["times"]);
    if (s) checkTimes(c, s.times, [...path, "step", "times"]);
  }
  if (v.disturbanceStep !== undefined) {
    const dpath = [...path, "disturbanceStep"];
    const d = c.object(v.disturbanceStep, dpath, ["times", "disturbance", "size"]);
    if (d) {
      checkTimes(c, d.times, [...dpath, "times"]);
      c.number(d.size, [...dpath, "size"], { optional: true });
      if (d.size === 0) c.problem([...dpath, "size"], "must not be zero");
      if (dims && dims.q === 0) c.problem(dpath, "the plant has no disturbance inputs (give F and name its columns)");
      if (d.disturbance !== undefined) {
        if (typeof d.disturbance === "number") {
          if (!Number.isInteger(d.disturbance) || d.disturbance < 0 || (dims && dims.q >= 0 && d.disturbance >= dims.q)) {
            c.problem([...dpath, "disturbance"], `disturbance index ${d.disturbance} is out of range (the plant has ${dims?.q ?? "?"} disturbances, numbered from 0)`);
          }
        } else if (typeof d.disturbance !== "string") {
          c.problem([...dpath, "disturbance"], "must be a disturbance name or a 0-based index");
        }
      }
    }
  }
}

function checkTimes(c: Checker, value: unknown, path: Path): void {
  const times = c.numberList(value, path, { nonEmpty: true });
  if (!times) return;
  if (times.some((t) => t < 0)) c.problem(path, "must not be negative");
  for (let i = 1; i < times.length; i++) {
    if (!(times[i]! > times[i - 1]!)) {
      c.problem([...path, i], "times must increase strictly");
      break;
    }
  }
}
