/**
 * Small pure helpers behind the design panels: the log-scale weight slider, Bryson's rule,
 * conjugate-pair bookkeeping for typed or dragged poles, and the dense time and frequency grids
 * the workspace asks the engine for (display resolution, never written into the document).
 */
import type { VariantResult, VariantSpec } from "../../../shared-engine/api/contract";
import type { ComplexSpec } from "./documentEdits";

export interface Pole {
  re: number;
  im: number;
}

/** Slider positions run over 0…SLIDER_STEPS; the value is 10^(lo + (hi − lo)·t). */
export const SLIDER_STEPS = 1000;

export function sliderToWeight(position: number, log10Min: number, log10Max: number): number {
  const t = Math.min(1, Math.max(0, position / SLIDER_STEPS));
  // Round to 3 significant digits so a slider value reads cleanly in the exact field.
  return Number((10 ** (log10Min + (log10Max - log10Min) * t)).toPrecision(3));
}

export function weightToSlider(weight: number, log10Min: number, log10Max: number): number {
  if (!(weight > 0)) return 0;
  const t = (Math.log10(weight) - log10Min) / (log10Max - log10Min);
  return Math.round(Math.min(1, Math.max(0, t)) * SLIDER_STEPS);
}

/** Slider range: six decades below to six above the weight, in whole decades. */
export function sliderRange(weight: number): [number, number] {
  const center = weight > 0 ? Math.round(Math.log10(weight)) : 0;
  return [center - 6, center + 6];
}

/**
 * Bryson's rule (A. E. Bryson and Y.-C. Ho, "Applied Optimal Control", 1975, §5.4 — common
 * practice): weight each state and input by 1/(largest acceptable deviation)².
 */
export function brysonWeights(maxDeviations: readonly number[], what: string): number[] {
  return maxDeviations.map((d, i) => {
    if (!(Number.isFinite(d) && d > 0)) throw new Error(`The largest acceptable deviation of ${what} ${i + 1} must be a positive number; got ${d}.`);
    return 1 / (d * d);
  });
}

export function asPole(z: ComplexSpec): Pole {
  return typeof z === "number" ? { re: z, im: 0 } : { re: z.re, im: z.im };
}

/** Index of the conjugate partner of pole `index` (its neighbour with the opposite imaginary part), or −1. */
export function partnerOf(poles: readonly Pole[], index: number): number {
  const p = poles[index];
  if (!p || p.im === 0) return -1;
  for (const k of [index + 1, index - 1]) {
    const q = poles[k];
    if (q && q.re === p.re && q.im === -p.im) return k;
  }
  return poles.findIndex((q, k) => k !== index && q.re === p.re && q.im === -p.im);
}

/**
 * Sets pole `index` to `value`, keeping the list closed under conjugation: a complex pole moves
 * its partner with it; making a real pole complex turns its real neighbour into the partner;
 * making a complex pole real splits the pair into two distinct real poles.
 */
export function setPoleKeepingPairs(poles: readonly Pole[], index: number, value: Pole): Pole[] {
  const next = poles.map((p) => ({ ...p }));
  const partner = partnerOf(poles, index);
  next[index] = { ...value };
  if (value.im !== 0) {
    let k = partner;
    if (k < 0) {
      k = [index + 1, index - 1].find((j) => next[j] !== undefined && next[j]!.im === 0) ?? -1;
      if (k < 0) k = next.findIndex((q, j) => j !== index && q.im === 0);
    }
    if (k < 0) {
      // No real pole left to pair with: keep the pole real rather than break the conjugate rule.
      next[index] = { re: value.re, im: 0 };
    } else {
      next[k] = { re: value.re, im: -value.im };
    }
  } else if (partner >= 0) {
    next[partner] = { re: value.re === 0 ? -1 : value.re * 1.5, im: 0 };
  }
  return next;
}

function niceCeil(x: number): number {
  const exponent = Math.floor(Math.log10(x));
  const base = 10 ** exponent;
  for (const f of [1, 2, 5, 10]) if (f * base >= x) return f * base;
  return 10 * base;
}

export const STEP_SAMPLES = 500;
export const BODE_POINTS = 400;

/** Horizon of the step response: the variant's own last time, else ~8 time constants of the slowest closed-loop pole of the last result. */
export function stepHorizon(variant: VariantSpec, last: VariantResult | null): number {
  const own = variant.step?.times;
  if (own && own.length > 1) return own[own.length - 1]!;
  const poles = last?.closedLoopPoles ?? last?.plant?.poles ?? [];
  const ts = last?.plant?.sampleTime ?? variant.discretize?.sampleTime ?? null;
  const rates = poles
    .map((p) => (ts ? -Math.log(Math.max(1e-12, Math.hypot(p.re, p.im))) / ts : -p.re))
    .filter((r) => r > 1e-9);
  if (rates.length === 0) return 10;
  return niceCeil(Math.min(1e6, Math.max(1e-6, 8 / Math.min(...rates))));
}

/**
 * Highest frequency drawn for a sampled loop: just below the Nyquist frequency π/T, where the
 * response of a sampled system folds back. Infinity for a continuous loop.
 */
export function nyquistLimit(sampleTime: number | null): number {
  return sampleTime !== null && sampleTime > 0 ? (0.999 * Math.PI) / sampleTime : Number.POSITIVE_INFINITY;
}

/** Frequencies of the Bode plot: the variant's own range, else two decades around the plant's poles. */
export function bodeRange(variant: VariantSpec, last: VariantResult | null): [number, number] {
  const own = variant.bode?.frequencies;
  if (own && own.length > 1) return [own[0]!, own[own.length - 1]!];
  const ts = variant.discretize?.sampleTime ?? last?.plant?.sampleTime ?? null;
  const mags = [...(last?.plant?.poles ?? []), ...(last?.closedLoopPoles ?? [])]
    .map((p) => (ts ? Math.abs(Math.log(Math.max(1e-12, Math.hypot(p.re, p.im)))) / ts : Math.hypot(p.re, p.im)))
    .filter((m) => m > 1e-9 && Number.isFinite(m));
  let lo = mags.length ? 10 ** (Math.floor(Math.log10(Math.min(...mags))) - 2) : 1e-2;
  let hi = mags.length ? 10 ** (Math.ceil(Math.log10(Math.max(...mags))) + 2) : 1e2;
  if (ts) hi = Math.min(hi, nyquistLimit(ts));
  if (!(lo < hi)) lo = hi / 1e4;
  return [lo, hi];
}

/** The variant as sent for display: the document's variant with dense step and Bode grids. */
export function variantForDisplay(variant: VariantSpec, last: VariantResult | null): VariantSpec {
  const horizon = stepHorizon(variant, last);
  const ts = variant.discretize?.sampleTime ?? last?.plant?.sampleTime ?? null;
  let times: number[];
  if (ts) {
    const count = Math.min(STEP_SAMPLES, Math.max(2, Math.floor(horizon / ts) + 1));
    times = Array.from({ length: count }, (_, k) => k * ts);
  } else {
    times = Array.from({ length: STEP_SAMPLES }, (_, k) => (horizon * k) / (STEP_SAMPLES - 1));
  }
  const [lo, hi] = bodeRange(variant, last);
  const a = Math.log10(lo);
  const b = Math.log10(hi);
  const frequencies = Array.from({ length: BODE_POINTS }, (_, k) => 10 ** (a + ((b - a) * k) / (BODE_POINTS - 1)));
  return { ...variant, step: { times }, bode: { frequencies }, margins: variant.margins ?? { at: "plant-input" } };
}
