/**
 * Transfer-function entry of several inputs and outputs: the model keeps one numerator and
 * denominator per (output, input) pair (`numerator[i][j]`, highest power first), or the plain
 * SISO vectors when the plant has one input and one output. These helpers read and rewrite that
 * shape for the plant editor's grid; they never mutate their argument. The grid helpers at the
 * top (size check, resizing, input/output names following a resize) serve every entry-per-pair
 * form: zeroPoleGainGrid.ts builds on them.
 */
import type { ModelSpec, SignalNamesSpec } from "./documentEdits";

export type TransferFunctionModelSpec = Extract<ModelSpec, { type: "transfer-function" }>;

/** The largest grid the editor offers (outputs × inputs), for every entry-per-pair form. */
export const TF_GRID_LIMIT = 8;

/** Throws a RangeError in words unless outputs and inputs are whole numbers from 1 to TF_GRID_LIMIT. */
export function checkGridSize(outputs: number, inputs: number): void {
  for (const [what, v] of [["outputs", outputs], ["inputs", inputs]] as const) {
    if (!Number.isInteger(v) || v < 1 || v > TF_GRID_LIMIT) throw new RangeError(`The number of ${what} must be a whole number from 1 to ${TF_GRID_LIMIT} (it is ${v}).`);
  }
}

/** `old` cut or grown to outputs × inputs: kept entries stay, new ones come from `fill`. */
export function resizeGrid<T>(old: readonly (readonly T[])[], outputs: number, inputs: number, fill: (i: number, j: number) => T): T[][] {
  return Array.from({ length: outputs }, (_, i) => Array.from({ length: inputs }, (_, j) => old[i]?.[j] ?? fill(i, j)));
}

/**
 * The `names` and `units` of a model resized to outputs × inputs: kept entries stay, new inputs
 * and outputs get the default names (u3, y3) and empty units; lists (and other kinds, such as
 * state names) the model did not have stay absent.
 */
export function gridSignals(model: { names?: SignalNamesSpec; units?: SignalNamesSpec }, outputs: number, inputs: number): { names?: SignalNamesSpec; units?: SignalNamesSpec } {
  const names = resizedNames(model.names, outputs, inputs, (k, i) => `${k === "inputs" ? "u" : "y"}${i + 1}`);
  const units = resizedNames(model.units, outputs, inputs, () => "");
  return { ...(names ? { names } : {}), ...(units ? { units } : {}) };
}

export interface TransferFunctionEntry {
  numerator: number[];
  denominator: number[];
}

function isMimo(model: TransferFunctionModelSpec): boolean {
  return Array.isArray(model.numerator) && Array.isArray(model.numerator[0]);
}

/** Outputs × inputs of a transfer-function model (1 × 1 for the SISO form). */
export function transferFunctionSize(model: TransferFunctionModelSpec): { outputs: number; inputs: number } {
  if (!isMimo(model)) return { outputs: 1, inputs: 1 };
  const rows = model.numerator as number[][][];
  return { outputs: rows.length, inputs: rows[0]?.length ?? 0 };
}

/** The transfer function from input j to output i. */
export function transferFunctionEntry(model: TransferFunctionModelSpec, i: number, j: number): TransferFunctionEntry {
  if (!isMimo(model)) return { numerator: [...(model.numerator as number[])], denominator: [...(model.denominator as number[])] };
  return {
    numerator: [...((model.numerator as number[][][])[i]?.[j] ?? [0])],
    denominator: [...((model.denominator as number[][][])[i]?.[j] ?? [1])],
  };
}

/** All entries as an outputs × inputs grid. */
function entriesOf(model: TransferFunctionModelSpec): TransferFunctionEntry[][] {
  const { outputs, inputs } = transferFunctionSize(model);
  return Array.from({ length: outputs }, (_, i) => Array.from({ length: inputs }, (_, j) => transferFunctionEntry(model, i, j)));
}

function fromEntries(model: TransferFunctionModelSpec, grid: TransferFunctionEntry[][]): TransferFunctionModelSpec {
  const outputs = grid.length;
  const inputs = grid[0]?.length ?? 0;
  const base: TransferFunctionModelSpec = outputs === 1 && inputs === 1
    ? { type: "transfer-function", numerator: grid[0]![0]!.numerator, denominator: grid[0]![0]!.denominator, sampleTime: model.sampleTime }
    : {
        type: "transfer-function",
        numerator: grid.map((row) => row.map((e) => e.numerator)),
        denominator: grid.map((row) => row.map((e) => e.denominator)),
        sampleTime: model.sampleTime,
      };
  return { ...base, ...gridSignals(model, outputs, inputs) };
}

// Input and output name (or unit) lists follow the new sizes: kept entries stay, new ones get
// the default; lists the model did not have stay absent, and so do other kinds (a transfer
// function's states belong to its realization, so their count changes with any entry).
function resizedNames(
  spec: SignalNamesSpec | undefined,
  outputs: number,
  inputs: number,
  fill: (kind: "inputs" | "outputs", index: number) => string,
): SignalNamesSpec | undefined {
  if (!spec) return undefined;
  const out: SignalNamesSpec = {};
  for (const [kind, count] of [["inputs", inputs], ["outputs", outputs]] as const) {
    const list = spec[kind];
    if (list) out[kind] = Array.from({ length: count }, (_, i) => list[i] ?? fill(kind, i));
  }
  return out;
}

/**
 * The model resized to outputs × inputs (each 1…TF_GRID_LIMIT): existing entries are kept, new
 * pairs start as 0/1 (no coupling). A 1 × 1 result uses the SISO form.
 */
export function resizeTransferFunction(model: TransferFunctionModelSpec, outputs: number, inputs: number): TransferFunctionModelSpec {
  checkGridSize(outputs, inputs);
  return fromEntries(model, resizeGrid(entriesOf(model), outputs, inputs, () => ({ numerator: [0], denominator: [1] })));
}

/** The model with one coefficient list of the (output i, input j) pair replaced. */
export function withTransferFunctionEntry(model: TransferFunctionModelSpec, i: number, j: number, which: "numerator" | "denominator", values: number[]): TransferFunctionModelSpec {
  const grid = entriesOf(model);
  const row = grid[i];
  if (!row || !row[j]) throw new RangeError(`There is no transfer function from input ${j + 1} to output ${i + 1}.`);
  row[j] = { ...row[j]!, [which]: [...values] };
  return fromEntries(model, grid);
}
