/**
 * Number formatting shared by the command line, the workbench and the design sheet, so a value
 * reads the same everywhere. Pure and DOM-free.
 */
import type { Complex } from "./linalg/complex";

/** A real number with `digits` significant digits; exact zero prints as "0". Uses the true minus sign only when asked. */
export function formatReal(value: number, digits = 6): string {
  if (Number.isNaN(value)) return "not a number";
  if (!Number.isFinite(value)) return value > 0 ? "unbounded" : "−unbounded";
  if (value === 0) return "0";
  const abs = Math.abs(value);
  if (abs >= 1e-4 && abs < 10 ** digits) {
    return Number(value.toPrecision(digits)).toString();
  }
  return value.toExponential(digits - 1).replace(/\.?0+e/, "e");
}

/** a + bj with `digits` significant digits in each part; a real value prints without the j part. */
export function formatComplex(value: Complex, digits = 6): string {
  const scale = Math.max(Math.abs(value.re), Math.abs(value.im));
  // An imaginary part below rounding level relative to the number's size is noise: drop it.
  if (value.im === 0 || Math.abs(value.im) <= scale * 1e-14) return formatReal(value.re, digits);
  const sign = value.im < 0 ? "−" : "+";
  const re = Math.abs(value.re) <= scale * 1e-14 ? "0" : formatReal(value.re, digits);
  return `${re} ${sign} ${formatReal(Math.abs(value.im), digits)}j`;
}

/** "1 input", "2 inputs", "0 disturbances": a count with its noun, plural unless exactly one. */
export function formatCount(count: number, noun: string): string {
  return `${count} ${noun}${count === 1 ? "" : "s"}`;
}

/** Renders rows as an aligned plain-text table (first row is the header). */
export function formatTable(rows: readonly (readonly string[])[]): string {
  if (rows.length === 0) return "";
  const widths = rows[0]!.map((_, c) => Math.max(...rows.map((r) => (r[c] ?? "").length)));
  const line = (r: readonly string[]): string => r.map((cell, c) => cell.padEnd(widths[c]!)).join("  ").trimEnd();
  const rule = widths.map((w) => "─".repeat(w)).join("  ");
  return [line(rows[0]!), rule, ...rows.slice(1).map(line)].join("\n") + "\n";
}
