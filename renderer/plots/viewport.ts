/**
 * Zoom and pan as pure functions of a domain, for linear and logarithmic axes. The hook
 * `useZoomPan` feeds pointer and wheel events through these; tests call them directly.
 */
import type { Domain } from "./plotTypes";

export type AxisKind = "linear" | "log";

const toUnit = (v: number, kind: AxisKind) => (kind === "log" ? Math.log10(v) : v);
const fromUnit = (u: number, kind: AxisKind) => (kind === "log" ? 10 ** u : u);

/**
 * Zooms `domain` about the data value `anchor` by `factor` (factor < 1 zooms in: the new span is
 * factor × the old one, measured in decades on a log axis). The anchor keeps its screen position.
 * The span never shrinks below `minSpan` × the anchor's magnitude (1e-9), so repeated zooming
 * cannot collapse the scale into a single floating-point number.
 */
export function zoomDomain(domain: Domain, anchor: number, factor: number, kind: AxisKind = "linear"): Domain {
  const a = toUnit(domain[0], kind);
  const b = toUnit(domain[1], kind);
  const c = toUnit(anchor, kind);
  const minSpan = Math.max(Math.abs(c), Math.abs(a), Math.abs(b), 1) * 1e-9;
  let f = factor;
  if (Math.abs(b - a) * f < minSpan) f = minSpan / Math.abs(b - a);
  return [fromUnit(c + (a - c) * f, kind), fromUnit(c + (b - c) * f, kind)];
}

/** Shifts `domain` by `fraction` of its span (in decades on a log axis); positive moves to higher values. */
export function panDomain(domain: Domain, fraction: number, kind: AxisKind = "linear"): Domain {
  const a = toUnit(domain[0], kind);
  const b = toUnit(domain[1], kind);
  const shift = (b - a) * fraction;
  return [fromUnit(a + shift, kind), fromUnit(b + shift, kind)];
}

/** The data value at `fraction` (0…1) along the domain (geometric on a log axis). */
export function valueAtFraction(domain: Domain, fraction: number, kind: AxisKind = "linear"): number {
  const a = toUnit(domain[0], kind);
  const b = toUnit(domain[1], kind);
  return fromUnit(a + (b - a) * fraction, kind);
}

/**
 * Expands a 2-D view so one data unit has the same length on both axes (pole maps, loci: a
 * circle must look round). The narrower direction grows about its centre; nothing is cut.
 */
export function equalAspect(x: Domain, y: Domain, widthPx: number, heightPx: number): { x: Domain; y: Domain } {
  const xSpan = x[1] - x[0];
  const ySpan = y[1] - y[0];
  const perPx = Math.max(xSpan / widthPx, ySpan / heightPx);
  const xc = (x[0] + x[1]) / 2;
  const yc = (y[0] + y[1]) / 2;
  return {
    x: [xc - (perPx * widthPx) / 2, xc + (perPx * widthPx) / 2],
    y: [yc - (perPx * heightPx) / 2, yc + (perPx * heightPx) / 2],
  };
}
