/**
 * Tick choice for linear and logarithmic axes. Pure: the Axis component only draws what this
 * returns, and tests check the choice without a DOM.
 */
import { scaleLinear } from "d3";
import { formatReal } from "../../shared-engine/format";
import type { Domain } from "./plotTypes";

export interface Tick {
  value: number;
  /** Position in SVG user units along the axis. */
  position: number;
  /** Text under/beside the tick; "" for an unlabelled minor tick. */
  label: string;
  major: boolean;
}

export interface AxisModel {
  kind: "linear" | "log";
  domain: Domain;
  range: Domain;
  ticks: Tick[];
}

/** 10^k as the double nearest to it (10 ** -4 in floating point is 0.00009999999999999999; 1 / 10 ** 4 is exact-nearest). */
export function decade(k: number): number {
  return k >= 0 ? 10 ** k : 1 / 10 ** -k;
}

/** Label for a tick value: up to 4 significant digits, "−" for minus, exact zero "0". */
export function tickLabel(value: number): string {
  // Ticks computed as k·step carry rounding noise (0.30000000000000004): 4 digits remove it.
  return formatReal(Math.abs(value) < 1e-12 ? 0 : value, 4).replace(/^-/, "−");
}

/** Linear ticks: d3's 1-2-5 steps, about `count` of them, all labelled. */
export function linearTicks(domain: Domain, range: Domain, count = 6): AxisModel {
  const scale = scaleLinear().domain(domain).range(range);
  const step = Math.abs(domain[1] - domain[0]) / Math.max(1, count);
  const ticks = scale.ticks(count).map((value) => ({
    // Snap values within a tiny fraction of a step to zero so the origin reads "0".
    value: Math.abs(value) < step * 1e-9 ? 0 : value,
    position: scale(value),
    label: tickLabel(Math.abs(value) < step * 1e-9 ? 0 : value),
    major: true,
  }));
  return { kind: "linear", domain, range, ticks };
}

/** Ticks at a fixed step (e.g. 45° for phase), labelled; falls back to linear ticks if too dense. */
export function steppedTicks(domain: Domain, range: Domain, step: number, maxTicks = 9): AxisModel {
  const [lo, hi] = domain[0] <= domain[1] ? domain : [domain[1], domain[0]];
  let s = step;
  while ((hi - lo) / s > maxTicks) s *= 2;
  const scale = scaleLinear().domain(domain).range(range);
  const ticks: Tick[] = [];
  for (let v = Math.ceil(lo / s) * s; v <= hi + s * 1e-9; v += s) {
    const value = Math.abs(v) < s * 1e-9 ? 0 : v;
    ticks.push({ value, position: scale(value), label: tickLabel(value), major: true });
  }
  return { kind: "linear", domain, range, ticks };
}

/** Preferred phase tick steps (degrees), best first; wider steps follow for very wide ranges. */
export const PHASE_STEPS = [45, 90, 30, 15, 180, 360, 720, 1440];

/**
 * Phase-axis ticks at multiples of 15°, 30°, 45° or 90° (wider ranges: 180°, 360°, …): the first
 * step of PHASE_STEPS giving between `minTicks` and `maxTicks` labelled ticks inside the domain;
 * if none does (a span of a few degrees), plain 1-2-5 linear ticks.
 */
export function phaseTicks(domain: Domain, range: Domain, minTicks = 3, maxTicks = 7): AxisModel {
  const [lo, hi] = domain[0] <= domain[1] ? domain : [domain[1], domain[0]];
  const count = (s: number) => Math.floor(hi / s + 1e-9) - Math.ceil(lo / s - 1e-9) + 1;
  const step = PHASE_STEPS.find((s) => { const n = count(s); return n >= minTicks && n <= maxTicks; });
  if (step === undefined) return linearTicks(domain, range, minTicks + 1);
  const scale = scaleLinear().domain(domain).range(range);
  const ticks: Tick[] = [];
  for (let k = Math.ceil(lo / step - 1e-9); k * step <= hi + step * 1e-9; k++) {
    const value = k === 0 ? 0 : k * step;
    ticks.push({ value, position: scale(value), label: tickLabel(value), major: true });
  }
  return { kind: "linear", domain, range, ticks };
}

/**
 * Logarithmic ticks: every decade is a major tick; decades are labelled (every 2nd or 3rd when
 * the span is wide, so labels never crowd); minor ticks at 2…9 × 10^k when the span is at most
 * 4 decades, labelled at 2 and 5 when the span is at most 2 decades. When the span is under one
 * decade, 1-2-5 style linear ticks are labelled instead, since a single decade label (or none)
 * would leave a zoomed axis unreadable.
 * Requires 0 < domain[0] < domain[1].
 */
export function logTicks(domain: Domain, range: Domain): AxisModel {
  const [lo, hi] = domain;
  if (!(lo > 0 && hi > lo)) throw new Error(`log axis needs 0 < low < high (got ${lo}, ${hi})`);
  const position = (v: number) => range[0] + ((Math.log10(v) - Math.log10(lo)) / (Math.log10(hi) - Math.log10(lo))) * (range[1] - range[0]);
  const kLo = Math.floor(Math.log10(lo) + 1e-12);
  const kHi = Math.ceil(Math.log10(hi) - 1e-12);
  const decades = Math.log10(hi) - Math.log10(lo);
  const ticks: Tick[] = [];
  if (decades < 1) {
    const lin = scaleLinear().domain(domain).ticks(5);
    for (const value of lin) if (value >= lo && value <= hi) ticks.push({ value, position: position(value), label: tickLabel(value), major: true });
    return { kind: "log", domain, range, ticks };
  }
  const labelEvery = decades > 12 ? 3 : decades > 6 ? 2 : 1;
  const withMinor = decades <= 4;
  for (let k = kLo; k <= kHi; k++) {
    const base = decade(k);
    if (base >= lo * (1 - 1e-12) && base <= hi * (1 + 1e-12)) {
      ticks.push({ value: base, position: position(base), label: k % labelEvery === 0 ? tickLabel(base) : "", major: true });
    }
    if (withMinor) {
      for (let m = 2; m <= 9; m++) {
        const v = k >= 0 ? m * base : m / 10 ** -k;
        // Within two decades the 2 and 5 minors are labelled too, or a zoomed axis could show one label.
        if (v > lo && v < hi) ticks.push({ value: v, position: position(v), label: decades <= 2 && (m === 2 || m === 5) ? tickLabel(v) : "", major: false });
      }
    }
  }
  ticks.sort((a, b) => a.value - b.value);
  return { kind: "log", domain, range, ticks };
}

/** The smallest decade-aligned domain [10^a, 10^b] holding every positive finite value; [1, 10] if none. */
export function decadeDomain(values: readonly number[]): Domain {
  let lo = Infinity;
  let hi = -Infinity;
  for (const v of values) if (v > 0 && Number.isFinite(v)) { lo = Math.min(lo, v); hi = Math.max(hi, v); }
  if (!Number.isFinite(lo)) return [1, 10];
  const a = Math.floor(Math.log10(lo) + 1e-9);
  let b = Math.ceil(Math.log10(hi) - 1e-9);
  if (b <= a) b = a + 1;
  return [decade(a), decade(b)];
}

/**
 * A "nice" linear domain holding every finite value (nulls skipped), padded by `pad` of the span;
 * a constant or empty set gets a unit-wide domain around its value so the scale never collapses.
 */
export function niceDomain(values: Iterable<number | null | undefined>, pad = 0.05, include: number[] = []): Domain {
  let lo = Infinity;
  let hi = -Infinity;
  const take = (v: number | null | undefined) => {
    if (typeof v === "number" && Number.isFinite(v)) { lo = Math.min(lo, v); hi = Math.max(hi, v); }
  };
  for (const v of values) take(v);
  for (const v of include) take(v);
  if (!Number.isFinite(lo)) return [-1, 1];
  if (hi - lo <= Math.max(Math.abs(lo), Math.abs(hi)) * 1e-12) {
    const half = Math.abs(lo) > 0 ? Math.abs(lo) * 0.1 : 1;
    return [lo - half, hi + half];
  }
  const span = hi - lo;
  const d = scaleLinear().domain([lo - pad * span, hi + pad * span]).nice().domain();
  return [d[0]!, d[1]!];
}
