/**
 * Zero-pole-gain entry of several inputs and outputs: the model keeps one list of zeros, one
 * list of poles and one gain per (output, input) pair (`zeros[i][j]`, `poles[i][j]`,
 * `gain[i][j]`), or the plain SISO lists and number when the plant has one input and one output.
 * These helpers read and rewrite that shape for the plant editor's grid, on the grid helpers of
 * transferFunctionGrid.ts; they never mutate their argument.
 */
import type { ComplexSpec, ModelSpec } from "./documentEdits";
import { parseComplexListText, parseNumberText } from "./parseMatrixText";
import { checkGridSize, gridSignals, resizeGrid } from "./transferFunctionGrid";

export type ZeroPoleGainModelSpec = Extract<ModelSpec, { type: "zero-pole-gain" }>;

export interface ZeroPoleGainEntry {
  zeros: ComplexSpec[];
  poles: ComplexSpec[];
  gain: number;
}

const isGrid = (model: ZeroPoleGainModelSpec): boolean => Array.isArray(model.gain);

/** Outputs × inputs of a zero-pole-gain model (1 × 1 for the SISO form). */
export function zeroPoleGainSize(model: ZeroPoleGainModelSpec): { outputs: number; inputs: number } {
  if (!isGrid(model)) return { outputs: 1, inputs: 1 };
  const rows = model.gain as number[][];
  return { outputs: rows.length, inputs: rows[0]?.length ?? 0 };
}

const copyList = (list: readonly ComplexSpec[] | undefined): ComplexSpec[] => (list ?? []).map((v) => (typeof v === "number" ? v : { re: v.re, im: v.im }));

/** The zeros, poles and gain from input j to output i. */
export function zeroPoleGainEntry(model: ZeroPoleGainModelSpec, i: number, j: number): ZeroPoleGainEntry {
  if (!isGrid(model)) return { zeros: copyList(model.zeros as ComplexSpec[]), poles: copyList(model.poles as ComplexSpec[]), gain: model.gain as number };
  return {
    zeros: copyList((model.zeros as ComplexSpec[][][])[i]?.[j]),
    poles: copyList((model.poles as ComplexSpec[][][])[i]?.[j]),
    gain: (model.gain as number[][])[i]?.[j] ?? 0,
  };
}

function entriesOf(model: ZeroPoleGainModelSpec): ZeroPoleGainEntry[][] {
  const { outputs, inputs } = zeroPoleGainSize(model);
  return Array.from({ length: outputs }, (_, i) => Array.from({ length: inputs }, (_, j) => zeroPoleGainEntry(model, i, j)));
}

function fromEntries(model: ZeroPoleGainModelSpec, grid: ZeroPoleGainEntry[][]): ZeroPoleGainModelSpec {
  const outputs = grid.length;
  const inputs = grid[0]?.length ?? 0;
  const base: ZeroPoleGainModelSpec = outputs === 1 && inputs === 1
    ? { type: "zero-pole-gain", zeros: grid[0]![0]!.zeros, poles: grid[0]![0]!.poles, gain: grid[0]![0]!.gain, sampleTime: model.sampleTime }
    : {
        type: "zero-pole-gain",
        zeros: grid.map((row) => row.map((e) => e.zeros)),
        poles: grid.map((row) => row.map((e) => e.poles)),
        gain: grid.map((row) => row.map((e) => e.gain)),
        sampleTime: model.sampleTime,
      };
  return { ...base, ...gridSignals(model, outputs, inputs) };
}

/**
 * The model resized to outputs × inputs (each 1…TF_GRID_LIMIT): existing entries are kept, new
 * pairs start with no zeros, no poles and gain 0 (no coupling). A 1 × 1 result uses the SISO form.
 */
export function resizeZeroPoleGain(model: ZeroPoleGainModelSpec, outputs: number, inputs: number): ZeroPoleGainModelSpec {
  checkGridSize(outputs, inputs);
  return fromEntries(model, resizeGrid(entriesOf(model), outputs, inputs, () => ({ zeros: [], poles: [], gain: 0 })));
}

/** The model with the zeros, the poles or the gain of the (output i, input j) pair replaced. */
export function withZeroPoleGainEntry<K extends keyof ZeroPoleGainEntry>(model: ZeroPoleGainModelSpec, i: number, j: number, part: K, value: ZeroPoleGainEntry[K]): ZeroPoleGainModelSpec {
  const grid = entriesOf(model);
  const row = grid[i];
  if (!row || !row[j]) throw new RangeError(`There is no zero-pole-gain entry from input ${j + 1} to output ${i + 1}.`);
  row[j] = { ...row[j]!, [part]: typeof value === "number" ? value : copyList(value as ComplexSpec[]) };
  return fromEntries(model, grid);
}

/** A complex value as the editor shows it: “−2+3i”, reals plainly. */
export function complexText(v: ComplexSpec): string {
  if (typeof v === "number") return String(v);
  return v.im === 0 ? String(v.re) : `${v.re}${v.im < 0 ? "-" : "+"}${Math.abs(v.im)}i`;
}

/**
 * The project file's rule for zeros and poles (validateProject, createZeroPoleGain): every
 * complex value needs its conjugate in the same list, to within √ε relative. Returns the message
 * for the first value without one, or null when the list is fine.
 */
export function unpairedComplexMessage(values: readonly ComplexSpec[], what: "zeros" | "poles"): string | null {
  const list = values.map((v) => (typeof v === "number" ? { re: v, im: 0 } : v));
  const free = list.map((_, k) => k).filter((k) => list[k]!.im < 0);
  const tolerance = Math.sqrt(Number.EPSILON);
  for (const v of list) {
    if (!(v.im > 0)) continue;
    const at = free.findIndex((k) => Math.abs(list[k]!.re - v.re) + Math.abs(list[k]!.im + v.im) <= tolerance * Math.max(1, Math.abs(v.re) + Math.abs(v.im)));
    if (at < 0) return unpaired(v, what);
    free.splice(at, 1);
  }
  return free.length > 0 ? unpaired(list[free[0]!]!, what) : null;
}

function unpaired(v: { re: number; im: number }, what: "zeros" | "poles"): string {
  const pair = `${v.re}±${Math.abs(v.im)}i`;
  return `${complexText(v)} has no conjugate partner ${complexText({ re: v.re, im: -v.im })}: complex ${what} come in conjugate pairs. Type both, or the pair as “${pair}”.`;
}

/**
 * The typed text of one part of an entry: zeros or poles as a complex list (“−1, −2±3i”, empty
 * for none; every complex value with its conjugate), the gain as a number. The error says what
 * to type instead.
 */
export function parseZeroPoleGainPart<K extends keyof ZeroPoleGainEntry>(part: K, text: string): { ok: true; value: ZeroPoleGainEntry[K] } | { ok: false; error: string } {
  if (part === "gain") {
    const n = parseNumberText(text);
    return n.ok ? { ok: true, value: n.value as ZeroPoleGainEntry[K] } : { ok: false, error: `The gain ${n.error}.` };
  }
  const r = parseComplexListText(text);
  if (!r.ok) return r;
  const unpairedValue = unpairedComplexMessage(r.values, part as "zeros" | "poles");
  return unpairedValue ? { ok: false, error: unpairedValue } : { ok: true, value: r.values as ZeroPoleGainEntry[K] };
}
