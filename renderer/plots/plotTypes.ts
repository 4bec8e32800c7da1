/**
 * Plain data shapes the plots draw. They mirror the engine's result fields structurally
 * (VariantResult.bode, .step, .margins, root and parameter loci), so a result object can be passed
 * straight in, yet the renderer imports nothing from the engine but the bridge contract.
 */

/** A complex number as the engine sends it. */
export interface PlotComplex {
  re: number;
  im: number;
}

/** [low, high] in data units. */
export type Domain = [number, number];

/** How the plot looks: "screen" (interactive, themed) or "print" (white, darker lines, no hover UI). */
export type PlotVariant = "screen" | "print";

/** Inner margins of a panel in SVG user units. */
export interface Margins {
  top: number;
  right: number;
  bottom: number;
  left: number;
}

/** A label for an axis: the quantity and its unit, e.g. { quantity: "Frequency", unit: "rad/s" }. */
export interface Quantity {
  quantity: string;
  unit: string;
}

/** "Frequency (rad/s)"; a dimensionless unit ("" or "1") prints without parentheses. */
export function quantityLabel(q: Quantity): string {
  return q.unit && q.unit !== "1" ? `${q.quantity} (${q.unit})` : q.quantity;
}

/**
 * A number with every digit needed to read it back exactly (shortest round-trip form), for hover
 * read-outs and CSV; null (an unbounded value) reads "unbounded", never "NaN".
 */
export function fullPrecision(value: number | null | undefined): string {
  if (value === null || value === undefined) return "unbounded";
  if (Number.isNaN(value)) return "not a number";
  if (!Number.isFinite(value)) return value > 0 ? "unbounded" : "−unbounded";
  return String(value).replace("-", "−");
}

/** True when v is a finite number (null, NaN and ±∞ are gaps). */
export function isDrawable(v: number | null | undefined): v is number {
  return typeof v === "number" && Number.isFinite(v);
}
