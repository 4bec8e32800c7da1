/**
 * Input sequences typed, pasted or loaded as CSV text: a time column followed by one column per
 * input, for the "analysis.simulate" request. Pure: text in, a checked sequence (or an error
 * naming the row and column) out.
 *
 * Accepted text:
 *   - separators: tab, semicolon or comma, decided once for the whole text (tab when any data
 *     line has a tab, else semicolon when any has one, else comma). With semicolons a decimal
 *     comma ("0,5") is read as a decimal point, as spreadsheets in many locales write it;
 *   - an optional header: the first non-empty line is a header when any of its cells is not a
 *     number; its cells after the first name the columns;
 *   - blank lines and lines starting with "#" are skipped;
 *   - times finite and strictly increasing; for a sampled model every time must be an integer
 *     multiple of the sample period T (within 1e-9 relative, the engine's own tolerance), and
 *     is then snapped to exactly k·T.
 * Row and column numbers in messages are 1-based and count lines as the user sees them (the
 * header and skipped lines included), so "row 4" is the fourth line of the pasted text.
 */
import { parseNumberText } from "./parseMatrixText";

/** Most rows accepted (the bridge's list limit; a longer sequence belongs in a batch job). */
export const MAX_SEQUENCE_ROWS = 100_000;
/** Relative tolerance for "a multiple of T": the engine's (analysis/timeGrid.ts SAMPLE_ALIGNMENT_TOL). */
export const SAMPLE_ALIGNMENT_TOLERANCE = 1e-9;

export type Separator = "\t" | ";" | ",";

export interface InputSequence {
  /** Sample times (s), strictly increasing. */
  times: number[];
  /** values[k][j]: input j at times[k] (the u[k][j] of "analysis.simulate"). */
  values: number[][];
  /** Column names from the header (after the time column), or null without a header. */
  header: string[] | null;
  separator: Separator;
}

export interface SequenceError {
  message: string;
  /** 1-based line of the text (null when the problem is not one line, e.g. empty text). */
  row: number | null;
  /** 1-based column (null when the whole row is wrong). */
  column: number | null;
}

export type SequenceParse = { ok: true; sequence: InputSequence } | { ok: false; error: SequenceError };

export interface SequenceOptions {
  /** Number of input columns expected after the time column. */
  inputs: number;
  /** null = continuous model; otherwise the sample period T in seconds. */
  sampleTime: number | null;
}

function detectSeparator(lines: readonly string[]): Separator {
  if (lines.some((l) => l.includes("\t"))) return "\t";
  if (lines.some((l) => l.includes(";"))) return ";";
  return ",";
}

function fail(message: string, row: number | null, column: number | null): SequenceParse {
  return { ok: false, error: { message, row, column } };
}

const plural = (count: number, word: string) => `${count} ${word}${count === 1 ? "" : "s"}`;

/** Parses CSV text into a checked input sequence (see the module comment for the rules). */
export function parseInputSequence(text: string, options: SequenceOptions): SequenceParse {
  const { inputs, sampleTime } = options;
  const lines = text.split(/\r\n|\r|\n/);
  const data: { line: number; text: string }[] = [];
  lines.forEach((l, i) => {
    const t = l.trim();
    if (t !== "" && !t.startsWith("#")) data.push({ line: i + 1, text: l });
  });
  if (data.length === 0) return fail("The sequence is empty: paste a time column and one column per input.", null, null);
  const separator = detectSeparator(data.map((d) => d.text));
  const split = (l: string) => {
    const cells = l.split(separator).map((c) => c.trim());
    // A trailing separator (some exporters end every line with one) is not an extra column.
    if (cells.length > 1 && cells[cells.length - 1] === "") cells.pop();
    return cells;
  };
  const number = (cell: string) => parseNumberText(separator === ";" ? cell.replace(",", ".") : cell);
  const expected = inputs + 1;
  const describeColumns = `a time column and ${plural(inputs, "input column")}`;

  let header: string[] | null = null;
  let start = 0;
  const first = split(data[0]!.text);
  if (first.some((c) => !number(c).ok)) {
    if (first.length !== expected) return fail(`Row ${data[0]!.line} (the header) has ${plural(first.length, "column")}; expected ${expected}: ${describeColumns}.`, data[0]!.line, null);
    header = first.slice(1);
    start = 1;
  }
  const rows = data.length - start;
  if (rows < 2) return fail(`The sequence has ${plural(rows, "row")} of numbers; at least 2 are needed (a start and an end time).`, data[data.length - 1]!.line, null);
  if (rows > MAX_SEQUENCE_ROWS) return fail(`The sequence has ${rows} rows; at most ${MAX_SEQUENCE_ROWS} are accepted.`, null, null);

  const times: number[] = [];
  const values: number[][] = [];
  for (let r = start; r < data.length; r++) {
    const { line, text: rowText } = data[r]!;
    const cells = split(rowText);
    if (cells.length !== expected) return fail(`Row ${line} has ${plural(cells.length, "column")}; expected ${expected}: ${describeColumns}.`, line, null);
    const parsed: number[] = [];
    for (let c = 0; c < cells.length; c++) {
      const p = number(cells[c]!);
      if (!p.ok) return fail(`Row ${line}, column ${c + 1}${header && c > 0 ? ` (${header[c - 1]})` : c === 0 ? " (time)" : ""}: ${cells[c] === "" ? "the cell is empty" : `“${cells[c]}” is not a number`}.`, line, c + 1);
      parsed.push(p.value);
    }
    let t = parsed[0]!;
    if (sampleTime !== null) {
      const k = Math.round(t / sampleTime);
      if (Math.abs(t / sampleTime - k) > SAMPLE_ALIGNMENT_TOLERANCE * Math.max(1, Math.abs(t / sampleTime))) {
        return fail(`Row ${line}, column 1: time ${t} s is not a multiple of the sample period ${sampleTime} s; a sampled model moves only at its sample instants.`, line, 1);
      }
      t = k * sampleTime;
    }
    if (times.length > 0 && !(t > times[times.length - 1]!)) {
      return fail(`Row ${line}, column 1: time ${t} s does not come after the previous time ${times[times.length - 1]} s; times must increase.`, line, 1);
    }
    times.push(t);
    values.push(parsed.slice(1));
  }
  return { ok: true, sequence: { times, values, header, separator } };
}

/** A small example sequence for the input box: a unit step on the first input at t = 1 s, then back to 0 at the midpoint. */
export function exampleSequenceText(inputNames: readonly string[], sampleTime: number | null, horizonSec: number): string {
  const T = sampleTime ?? horizonSec / 200;
  const steps = Math.max(4, Math.round(horizonSec / T));
  const rows = [["time", ...inputNames].join(",")];
  for (let k = 0; k <= steps; k++) {
    const t = Number((k * T).toPrecision(12));
    const on = t >= horizonSec * 0.1 && t < horizonSec * 0.55 ? 1 : 0;
    rows.push([String(t), ...inputNames.map((_, j) => String(j === 0 ? on : 0))].join(","));
  }
  return rows.join("\n");
}
