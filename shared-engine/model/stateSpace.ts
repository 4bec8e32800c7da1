/**
 * The state-space model with disturbance channels, the central type of the model layer:
 *
 *   x' = A x + B u + F w        (continuous, sampleTime = null)
 *   x[k+1] = A x[k] + B u[k] + F w[k]   (sampled, sampleTime = T seconds)
 *   y  = C x + D u + E w
 *
 * with A: n×n, B: n×m, C: p×n, D: p×m, F: n×q, E: p×q. Any of n, m, p, q may be 0; ml-matrix
 * represents k×0 and 0×k matrices correctly (checked: products, transposes and sub-matrix
 * copies all work), so a model without disturbances carries F: n×0 and E: p×0.
 *
 * Models are immutable by convention: every routine returns a new model, and
 * `createStateSpace` / `stateSpaceFromMatrices` copy their inputs, so no caller array or
 * Matrix is ever aliased. The model object and its name arrays are frozen.
 */
import { Matrix } from "ml-matrix";
import { EngineError } from "../errors";
import { asMatrix, shapeOf, type MatrixInput } from "../linalg";

export interface SignalNames {
  states: string[];
  inputs: string[];
  outputs: string[];
  disturbances: string[];
}

export interface StateSpace {
  A: Matrix;
  B: Matrix;
  C: Matrix;
  D: Matrix;
  /** n×q; q may be 0. */
  F: Matrix;
  /** p×q; q may be 0. */
  E: Matrix;
  /** null = continuous time; otherwise the sample period in seconds. */
  sampleTime: number | null;
  names: SignalNames;
  units: SignalNames;
}

/** Plain JSON form of a model (project files, the bridge). */
export interface StateSpaceSpec {
  A: number[][];
  B: number[][];
  C: number[][];
  D?: number[][];
  F?: number[][];
  E?: number[][];
  sampleTime?: number | null;
  names?: Partial<SignalNames>;
  units?: Partial<SignalNames>;
}

/** The same content with Matrix (or rows) entries: the form other engine routines build. */
export interface StateSpaceMatrices {
  A: MatrixInput;
  B: MatrixInput;
  C: MatrixInput;
  D?: MatrixInput;
  F?: MatrixInput;
  E?: MatrixInput;
  sampleTime?: number | null;
  names?: Partial<SignalNames>;
  units?: Partial<SignalNames>;
}

export type SignalKind = keyof SignalNames;

const SIGNAL_KINDS: readonly SignalKind[] = ["states", "inputs", "outputs", "disturbances"];
const SINGULAR: Record<SignalKind, string> = {
  states: "state",
  inputs: "input",
  outputs: "output",
  disturbances: "disturbance",
};
const DEFAULT_PREFIX: Record<SignalKind, string> = { states: "x", inputs: "u", outputs: "y", disturbances: "w" };

/** Default signal names x1.., u1.., y1.., w1.. */
export function defaultNames(kind: SignalKind, count: number): string[] {
  return Array.from({ length: count }, (_, i) => `${DEFAULT_PREFIX[kind]}${i + 1}`);
}

/**
 * Builds a validated model from its plain JSON form.
 *
 * Computes: the StateSpace (A n×n, B n×m, C p×n, D p×m, F n×q, E p×q) described by `spec`.
 * Requires: finite entries; consistent shapes. An empty array `[]` stands for a matrix with
 *   zero rows (e.g. B of a static gain with n = 0); dimensions that no matrix fixes are read
 *   from D, E or the name lists. D defaults to zeros p×m, E to zeros p×q, F to zeros n×q
 *   (n×0 when there are no disturbances; an E without F means disturbances that reach the
 *   outputs only).
 * Method: shape and value checks only; matrices and names are copied.
 * Cost: O(n² + nm + pn + pm + (n+p)q) time and memory.
 * Accuracy: exact (no arithmetic).
 * Errors: "shape-mismatch" (A not square, B/C/D/F/E not matching A/B/C/F), "non-finite"
 *   (NaN/Infinity entry, naming it), "invalid-argument" (bad sample time, names that are
 *   empty, duplicated or of the wrong count, non-number entries). Nothing partially built
 *   is returned.
 * Example:
 *   const m = createStateSpace({ A: [[0, 1], [0, 0]], B: [[0], [1]], C: [[1, 0]] });
 *   dimensions(m) // { n: 2, m: 1, p: 1, q: 0 }; m.D.get(0, 0) === 0
 */
export function createStateSpace(spec: StateSpaceSpec): StateSpace {
  if (spec === null || typeof spec !== "object") {
    throw new EngineError("invalid-argument", "model must be an object with A, B and C matrices", {});
  }
  for (const key of ["A", "B", "C"] as const) {
    if (spec[key] === undefined) {
      throw new EngineError("invalid-argument", `model is missing matrix ${key}`, { argument: key });
    }
  }
  return stateSpaceFromMatrices(spec);
}

/**
 * Same as `createStateSpace` but accepts ml-matrix `Matrix` values (copied) as well as rows.
 * Used by every engine routine that returns a model, so all models pass the same checks.
 *
 * Computes/Requires/Errors: as `createStateSpace`.
 * Method: validation and copy. Cost: linear in the number of entries. Accuracy: exact.
 * Example: stateSpaceFromMatrices({ A: Matrix.eye(2), B: Matrix.zeros(2, 1), C: Matrix.eye(2) })
 */
export function stateSpaceFromMatrices(parts: StateSpaceMatrices): StateSpace {
  const A = copyOf(parts.A, "A");
  if (A.rows !== A.columns) {
    throw new EngineError("shape-mismatch", `A must be square (it is ${shapeOf(A)})`, { argument: "A", rows: A.rows, columns: A.columns });
  }
  const n = A.rows;
  const Bin = copyOf(parts.B, "B");
  const Cin = copyOf(parts.C, "C");
  const Din = parts.D === undefined ? null : copyOf(parts.D, "D");
  const Fin = parts.F === undefined ? null : copyOf(parts.F, "F");
  const Ein = parts.E === undefined ? null : copyOf(parts.E, "E");
  const names = parts.names ?? {};
  const units = parts.units ?? {};
  if (typeof names !== "object" || typeof units !== "object") {
    throw new EngineError("invalid-argument", "names and units must be objects with states, inputs, outputs and disturbances lists", {});
  }

  // Dimensions: a matrix with rows fixes its dimension; "[]" (0 rows) defers to the next source.
  const m = Bin.rows > 0 ? Bin.columns : Din && Din.rows > 0 ? Din.columns : (names.inputs?.length ?? 0);
  const p = Cin.rows > 0 ? Cin.rows : Din && Din.rows > 0 ? Din.rows : (names.outputs?.length ?? 0);
  const q = Fin && Fin.rows > 0 ? Fin.columns : Ein && Ein.rows > 0 ? Ein.columns : (names.disturbances?.length ?? 0);

  if (Bin.rows !== n && !(Bin.rows === 0 && n === 0)) {
    throw new EngineError("shape-mismatch", `B must have as many rows as A (A is ${shapeOf(A)}, B is ${shapeOf(Bin)})`, { argument: "B" });
  }
  const B = Bin.rows === 0 ? new Matrix(0, m) : Bin;
  if (Cin.rows > 0 && Cin.columns !== n) {
    throw new EngineError("shape-mismatch", `C must have as many columns as A (A is ${shapeOf(A)}, C is ${shapeOf(Cin)})`, { argument: "C" });
  }
  if (Cin.rows === 0 && p > 0 && n > 0) {
    throw new EngineError("shape-mismatch", `C must have ${p} rows (one per output, as D has) and ${n} columns (A is ${shapeOf(A)}, C is empty)`, { argument: "C" });
  }
  const C = Cin.rows === 0 ? new Matrix(p, n) : Cin;
  const D = resolveOptional(Din, p, m, "D", `D must be ${p}×${m}: as many rows as C and as many columns as B (C is ${shapeOf(C)}, B is ${shapeOf(B)}, D is `);
  if (Fin && Fin.rows !== n && !(Fin.rows === 0 && (n === 0 || q === 0))) {
    throw new EngineError("shape-mismatch", `F must have as many rows as A (A is ${shapeOf(A)}, F is ${shapeOf(Fin)})`, { argument: "F" });
  }
  const F = Fin && Fin.rows > 0 ? Fin : new Matrix(n, q);
  const E = resolveOptional(Ein, p, q, "E", `E must be ${p}×${q}: as many rows as C and as many columns as F (C is ${shapeOf(C)}, F is ${shapeOf(F)}, E is `);

  for (const [M, name] of [[A, "A"], [B, "B"], [C, "C"], [D, "D"], [F, "F"], [E, "E"]] as const) requireAllFinite(M, name);

  const sampleTime = checkSampleTime(parts.sampleTime);
  const counts: Record<SignalKind, number> = { states: n, inputs: m, outputs: p, disturbances: q };
  const finalNames = {} as SignalNames;
  const finalUnits = {} as SignalNames;
  for (const kind of SIGNAL_KINDS) {
    finalNames[kind] = Object.freeze(checkNames(names[kind], kind, counts[kind])) as string[];
    finalUnits[kind] = Object.freeze(checkUnits(units[kind], kind, counts[kind])) as string[];
  }
  return Object.freeze({
    A,
    B,
    C,
    D,
    F,
    E,
    sampleTime,
    names: Object.freeze(finalNames),
    units: Object.freeze(finalUnits),
  });
}

/**
 * Plain JSON copy of a model: every matrix as rows, names and units as new arrays.
 * Computes: the StateSpaceSpec that `createStateSpace` maps back to an equal model.
 * Requires: a model built by this module. Method: copy. Cost: linear in entries. Accuracy: exact.
 * Errors: none. Example: createStateSpace(stateSpaceToSpec(m)) reproduces m.
 */
export function stateSpaceToSpec(model: StateSpace): StateSpaceSpec {
  const plainNames = (s: SignalNames): SignalNames => ({
    states: [...s.states],
    inputs: [...s.inputs],
    outputs: [...s.outputs],
    disturbances: [...s.disturbances],
  });
  return {
    A: model.A.to2DArray(),
    B: model.B.to2DArray(),
    C: model.C.to2DArray(),
    D: model.D.to2DArray(),
    F: model.F.to2DArray(),
    E: model.E.to2DArray(),
    sampleTime: model.sampleTime,
    names: plainNames(model.names),
    units: plainNames(model.units),
  };
}

/** Numbers of states n, inputs m, outputs p and disturbances q. */
export function dimensions(model: StateSpace): { n: number; m: number; p: number; q: number } {
  return { n: model.A.rows, m: model.B.columns, p: model.C.rows, q: model.F.columns };
}

/** True for a sampled (discrete-time) model. */
export const isDiscrete = (model: StateSpace): boolean => model.sampleTime !== null;

/**
 * Checks a sample period: null/undefined → null (continuous); otherwise a finite number > 0.
 * Errors: "non-finite" for NaN/±Infinity, "invalid-argument" for ≤ 0 or a non-number.
 */
export function checkSampleTime(value: unknown, name = "sampleTime"): number | null {
  if (value === null || value === undefined) return null;
  if (typeof value !== "number") {
    throw new EngineError("invalid-argument", `${name} must be null (continuous) or a number of seconds, not ${typeof value}`, { argument: name });
  }
  if (!Number.isFinite(value)) {
    throw new EngineError("non-finite", `${name} is ${value}; the sample period must be a finite positive number of seconds`, { argument: name, value });
  }
  if (value <= 0) {
    throw new EngineError("invalid-argument", `${name} is ${value}; the sample period must be positive`, { argument: name, value });
  }
  return value;
}

/** "continuous" or "sampled at T s", for messages. */
export function describeSampleTime(sampleTime: number | null): string {
  return sampleTime === null ? "continuous" : `sampled at ${sampleTime} s`;
}

function copyOf(value: MatrixInput, name: string): Matrix {
  if (value instanceof Matrix) return value.clone();
  const m = asMatrix(value, name);
  return m; // asMatrix builds a new Matrix from rows: already a copy
}

function resolveOptional(M: Matrix | null, rows: number, cols: number, name: string, messageStart: string): Matrix {
  // "[]" (0 rows) is accepted whenever the required matrix has no entries.
  if (M === null || (M.rows === 0 && rows * cols === 0)) return Matrix.zeros(rows, cols);
  if (M.rows !== rows || M.columns !== cols) {
    throw new EngineError("shape-mismatch", `${messageStart}${shapeOf(M)})`, { argument: name, expected: [rows, cols], actual: [M.rows, M.columns] });
  }
  return M;
}

function requireAllFinite(M: Matrix, name: string): void {
  for (let i = 0; i < M.rows; i++) {
    for (let j = 0; j < M.columns; j++) {
      const v = M.get(i, j);
      if (!Number.isFinite(v)) {
        throw new EngineError("non-finite", `${name}[${i}][${j}] is ${v}; every entry must be a finite number`, { argument: name, row: i, col: j });
      }
    }
  }
}

function checkNames(given: unknown, kind: SignalKind, count: number): string[] {
  if (given === undefined) return defaultNames(kind, count);
  const list = checkStringList(given, kind, count, "names");
  const seen = new Set<string>();
  list.forEach((name, i) => {
    if (name.trim() === "") {
      throw new EngineError("invalid-argument", `${SINGULAR[kind]} name ${i + 1} is empty; names must be non-empty`, { kind, index: i });
    }
    if (seen.has(name)) {
      throw new EngineError("invalid-argument", `duplicate ${SINGULAR[kind]} name '${name}'`, { kind, name, index: i });
    }
    seen.add(name);
  });
  return list;
}

function checkUnits(given: unknown, kind: SignalKind, count: number): string[] {
  if (given === undefined) return Array.from({ length: count }, () => "");
  return checkStringList(given, kind, count, "units");
}

function checkStringList(given: unknown, kind: SignalKind, count: number, what: "names" | "units"): string[] {
  if (!Array.isArray(given)) {
    throw new EngineError("invalid-argument", `${what}.${kind} must be a list of strings`, { kind });
  }
  if (given.length !== count) {
    throw new EngineError("invalid-argument", `${what}.${kind} has ${given.length} entries but the model has ${count} ${kind}`, {
      kind,
      entries: given.length,
      expected: count,
    });
  }
  return given.map((value, i) => {
    if (typeof value !== "string") {
      throw new EngineError("invalid-argument", `${what}.${kind}[${i}] must be a string`, { kind, index: i });
    }
    return value;
  });
}
