/**
 * Reads a matrix (or a single number, or a coefficient list) from text the user typed or pasted:
 * a spreadsheet selection (tabs and new lines), comma- or space-separated rows, rows split by
 * semicolons, bracketed forms ("[1 2; 3 4]", "[[1, 2], [3, 4]]"). Pure and DOM-free.
 *
 * Policy: nothing is guessed. A cell that is not a plain decimal number, an empty cell between
 * two tabs or commas, or rows of unequal length is an error that names the row and column
 * (1-based, as a person counts them), so the editor can keep the user's text and say what to fix.
 */

export type MatrixParse = { ok: true; rows: number[][] } | { ok: false; error: string; row?: number; column?: number };
export type NumberParse = { ok: true; value: number } | { ok: false; error: string };

// A decimal number: optional sign, digits with an optional point (or a leading point), optional
// exponent. Deliberately no hex, no "Infinity", no "NaN": none of those is a design value.
const NUMBER_PATTERN = /^[+-]?(?:\d+(?:\.\d*)?|\.\d+)(?:[eE][+-]?\d+)?$/;

/** Turns typographic minus signs and thin spaces (pasted from documents) into ASCII. */
function normaliseText(text: string): string {
  return text.replace(/[\u2212\u2013\u2012]/g, "-").replace(/[\u00a0\u2009\u202f]/g, " ");
}

/** One number; "−1.5e-3" (true minus sign) is accepted. */
export function parseNumberText(text: string): NumberParse {
  const token = normaliseText(text).trim();
  if (token === "") return { ok: false, error: "is empty; type a number" };
  if (!NUMBER_PATTERN.test(token)) return { ok: false, error: `“${text.trim()}” is not a number` };
  const value = Number(token);
  if (!Number.isFinite(value)) return { ok: false, error: `“${text.trim()}” is too large to be a finite number` };
  return { ok: true, value };
}

/** Splits one row into cells: by tabs when the row has any (spreadsheets), else by commas and/or spaces. */
function splitRow(row: string): string[] {
  if (row.includes("\t")) return row.split("\t").map((c) => c.trim());
  const trimmed = row.trim().replace(/,\s*$/, "");
  if (trimmed.includes(",")) return trimmed.split(",").map((c) => c.trim());
  return trimmed.split(/\s+/);
}

/**
 * Parses `text` into a rectangular matrix of finite numbers. An empty text gives an error, not
 * an empty matrix (an empty paste is almost always a mistake).
 */
export function parseMatrixText(text: string): MatrixParse {
  let body = normaliseText(text);
  // Nested-list form: "],[" (with any spacing) separates rows.
  body = body.replace(/\]\s*[,;]?\s*\[/g, ";");
  body = body.replace(/[[\]]/g, " ");
  const rowTexts = body
    .split(/;|\r?\n|\r/)
    .map((r) => r.replace(/^[ ]+|[ ]+$/g, ""))
    .filter((r) => r.replace(/[\s,]/g, "") !== "");
  if (rowTexts.length === 0) return { ok: false, error: "The text holds no numbers; paste or type rows such as “1 2; 3 4”." };
  const rows: number[][] = [];
  for (let i = 0; i < rowTexts.length; i++) {
    const cells = splitRow(rowTexts[i]!);
    const values: number[] = [];
    for (let j = 0; j < cells.length; j++) {
      const cell = cells[j]!;
      if (cell === "") return { ok: false, error: `Row ${i + 1}, column ${j + 1} is empty.`, row: i + 1, column: j + 1 };
      const parsed = parseNumberText(cell);
      if (!parsed.ok) return { ok: false, error: `Row ${i + 1}, column ${j + 1}: ${parsed.error}.`, row: i + 1, column: j + 1 };
      values.push(parsed.value);
    }
    if (rows.length > 0 && values.length !== rows[0]!.length) {
      return {
        ok: false,
        error: `Row ${i + 1} has ${values.length} ${values.length === 1 ? "entry" : "entries"} but row 1 has ${rows[0]!.length}; every row needs the same number of entries.`,
        row: i + 1,
      };
    }
    rows.push(values);
  }
  return { ok: true, rows };
}

/** Parses a list of numbers on one or more lines (polynomial coefficients, weights) into one vector. */
export function parseVectorText(text: string): { ok: true; values: number[] } | { ok: false; error: string } {
  const parsed = parseMatrixText(text);
  if (!parsed.ok) return parsed;
  if (parsed.rows.length === 1) return { ok: true, values: parsed.rows[0]! };
  if (parsed.rows.every((r) => r.length === 1)) return { ok: true, values: parsed.rows.map((r) => r[0]!) };
  return { ok: false, error: "Expected one row (or one column) of numbers, e.g. “1 3 2”." };
}

export interface ComplexValue {
  re: number;
  im: number;
}

const UNSIGNED = String.raw`(?:\d+(?:\.\d*)?|\.\d+)(?:[eE][+-]?\d+)?`;
const COMPLEX_PATTERN = new RegExp(`^([+-]?${UNSIGNED})(?:([+-])(${UNSIGNED})?[ij])?$`);
const IMAGINARY_PATTERN = new RegExp(`^([+-]?)(${UNSIGNED})?[ij]$`);

/**
 * Parses a comma- or semicolon-separated list of complex numbers, "−1, −2+3i, −2−3i" (i or j;
 * "±" adds both members of a pair: "−2±3i").
 */
export function parseComplexListText(text: string): { ok: true; values: ComplexValue[] } | { ok: false; error: string } {
  const body = normaliseText(text).replace(/\s+/g, "").replace(/[[\]]/g, "");
  if (body === "") return { ok: true, values: [] };
  const values: ComplexValue[] = [];
  const tokens = body.split(/[,;]/);
  for (let k = 0; k < tokens.length; k++) {
    const token = tokens[k]!;
    if (token === "") return { ok: false, error: `Entry ${k + 1} is empty.` };
    const pm = token.indexOf("±");
    if (pm >= 0) {
      const re = pm === 0 ? 0 : Number(token.slice(0, pm));
      const imText = token.slice(pm + 1).replace(/[ij]$/, "");
      const im = imText === "" ? 1 : Number(imText);
      if (!NUMBER_PATTERN.test(imText === "" ? "1" : imText) || (pm > 0 && !NUMBER_PATTERN.test(token.slice(0, pm)))) {
        return { ok: false, error: `Entry ${k + 1}, “${token}”, is not a complex number such as “−2±3i”.` };
      }
      values.push({ re, im: Math.abs(im) }, { re, im: -Math.abs(im) });
      continue;
    }
    const imaginaryOnly = IMAGINARY_PATTERN.exec(token);
    if (imaginaryOnly) {
      const magnitude = imaginaryOnly[2] !== undefined ? Number(imaginaryOnly[2]) : 1;
      values.push({ re: 0, im: imaginaryOnly[1] === "-" ? -magnitude : magnitude });
      continue;
    }
    const match = COMPLEX_PATTERN.exec(token);
    if (!match || match[1] === undefined) {
      return { ok: false, error: `Entry ${k + 1}, “${token}”, is not a number such as “−1” or “−2+3i”.` };
    }
    const re = Number(match[1]);
    let im = 0;
    if (match[2] !== undefined) {
      const magnitude = match[3] !== undefined ? Number(match[3]) : 1;
      im = match[2] === "-" ? -magnitude : magnitude;
    }
    values.push({ re, im });
  }
  return { ok: true, values };
}
