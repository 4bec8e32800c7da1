/**
 * CSV of a plot's data: one column per quantity, a header "quantity (unit)" per column, numbers
 * in shortest round-trip form (every digit needed to read the value back exactly), nulls and
 * non-finite values as empty cells. RFC 4180 quoting; CRLF line ends (RFC 4180 §2).
 */
import { quantityLabel } from "./plotTypes";

export interface CsvColumn {
  quantity: string;
  unit: string;
  values: readonly (number | null)[];
}

function quote(text: string): string {
  return /[",\r\n]/.test(text) ? `"${text.replace(/"/g, '""')}"` : text;
}

function cell(v: number | null | undefined): string {
  // An unbounded or missing value is an empty cell: "NaN" or "Infinity" would be read as text
  // or as data by spreadsheet programs.
  if (typeof v !== "number" || !Number.isFinite(v)) return "";
  return Object.is(v, -0) ? "0" : String(v);
}

/** Columns may differ in length; short columns pad with empty cells. */
export function toCsv(columns: readonly CsvColumn[]): string {
  if (columns.length === 0) return "";
  const rows = Math.max(...columns.map((c) => c.values.length));
  const lines = [columns.map((c) => quote(quantityLabel(c))).join(",")];
  for (let k = 0; k < rows; k++) lines.push(columns.map((c) => cell(c.values[k])).join(","));
  return lines.join("\r\n") + "\r\n";
}
