/**
 * Automatic frequency grids for Bode and margin computations: logarithmic spacing over the
 * range set by the poles and zeros, plus dense clusters at lightly damped poles and zeros so
 * resonance peaks and notches are resolved.
 */
import { EngineError } from "../errors";
import type { Complex } from "../linalg/complex";
import { eigenvalues } from "../linalg";
import { sisoZerosAndGain, type StateSpace } from "../model";

export interface FrequencyGridOptions {
  /** Number of logarithmically spaced base points (default 400, at least 2). */
  points?: number;
  /** Lower end in rad/s (> 0). Default: a decade below the smallest natural frequency. */
  minRadPerSec?: number;
  /** Upper end in rad/s. Default: a decade above the largest natural frequency; π/T when sampled. */
  maxRadPerSec?: number;
  /** Decades added beyond the natural frequencies on each side (default 1). */
  decadesBeyond?: number;
}

/** Damping below which a pole or zero gets a dense cluster of points (common practice). */
const LIGHT_DAMPING = 0.3;
/** Zeros are only sought when the model has at most this many channels (cost O(n³) each). */
const MAX_ZERO_CHANNELS = 16;
/**
 * Offsets u of the cluster ω_n·exp(ζ'u): step 0.2 inside |u| ≤ 3 (the half-power band is
 * |u| ≲ 1, so a peak is sampled within 0.1ζ' of its top: ≤ 0.5% low), then sparser to |u| = 10.
 */
const CLUSTER: readonly number[] = [
  ...[-10, -8, -6, -5, -4],
  ...Array.from({ length: 31 }, (_, k) => Math.round((-3 + 0.2 * k) * 10) / 10),
  ...[4, 5, 6, 8, 10],
];

/**
 * Computes: an increasing list of distinct positive frequencies (rad/s) for plotting or
 *   margin search: `points` values log-spaced over [min, max], merged with a cluster of 41
 *   points ω_n·exp(ζ'·u), u = −3, −2.8, …, 3 and ±4, ±5, ±6, ±8, ±10 (ζ' = max(|ζ|, 1e-4)) around the natural frequency
 *   ω_n = |λ| of every pole and zero λ with damping ζ = −Re λ/|λ|, |ζ| < 0.3 (unstable
 *   ones included, with |ζ|). For sampled models
 *   (period T) each z-plane point maps to λ = ln(z)/T first, and the grid ends at π/T
 *   (Nyquist), which is always included. For an undamped pole (ζ = 0) the point u = 0 (the
 *   pole itself) is left out, so the grid never lands exactly on it.
 * Requires: a valid model. Zeros are those of each input→output channel (SISO zeros by
 *   deflation) when the model has at most 16 channels; otherwise only poles are used.
 * Method: common practice for Bode grids: the default range spans one decade beyond the
 *   smallest and largest nonzero natural frequencies (0.1 to 10 rad/s when there are none).
 * Cost: one eigenvalue problem (≈ 10n³ flops) plus one zero computation per channel (O(n³)),
 *   plus O(N log N) to sort N points.
 * Accuracy: exact construction; duplicates within 1e-12 relative are merged.
 * Errors: "invalid-argument" (points < 2 or not an integer, min ≤ 0, max ≤ min, max above
 *   π/T for a sampled model), "non-finite" (NaN/Infinity option), "no-convergence" from the
 *   eigenvalue routine.
 * Example:
 *   const g = createStateSpace({ A: [[0, 1], [-4, -0.04]], B: [[0], [4]], C: [[1, 0]] });
 *   const w = frequencyGrid(g); // 400 + 41 points in [0.2, 20]; points within 1% of 2 rad/s
 *   // check: w is strictly increasing and w[0] ≈ 0.2
 */
export function frequencyGrid(model: StateSpace, options: FrequencyGridOptions = {}): number[] {
  const points = options.points ?? 400;
  if (!Number.isInteger(points) || points < 2) {
    throw new EngineError("invalid-argument", `points must be an integer ≥ 2 (it is ${points})`, { argument: "points" });
  }
  const decades = options.decadesBeyond ?? 1;
  checkPositive(decades, "decadesBeyond", true);
  const T = model.sampleTime;
  const nyquist = T === null ? null : Math.PI / T;
  const features = naturalFrequencies(model);
  const positive = features.map((f) => f.omega).filter((w) => w > 0);
  const lo = positive.length > 0 ? Math.min(...positive) : 1;
  const hi = positive.length > 0 ? Math.max(...positive) : 1;
  let min = options.minRadPerSec ?? lo * 10 ** -decades;
  let max = options.maxRadPerSec ?? (nyquist ?? hi * 10 ** decades);
  checkPositive(min, "minRadPerSec", false);
  checkPositive(max, "maxRadPerSec", false);
  if (nyquist !== null) {
    if (options.maxRadPerSec !== undefined && max > nyquist * (1 + 1e-12)) {
      throw new EngineError("invalid-argument", `maxRadPerSec is ${max}, above the Nyquist frequency π/T = ${nyquist} of the sampled model`, { argument: "maxRadPerSec", nyquist });
    }
    max = Math.min(max, nyquist);
    if (options.minRadPerSec === undefined) min = Math.min(min, max / 1000);
  }
  if (!(max > min)) {
    throw new EngineError("invalid-argument", `maxRadPerSec (${max}) must exceed minRadPerSec (${min})`, { argument: "maxRadPerSec" });
  }
  const out: number[] = [];
  const l0 = Math.log(min);
  const l1 = Math.log(max);
  for (let k = 0; k < points; k++) out.push(k === 0 ? min : k === points - 1 ? max : Math.exp(l0 + ((l1 - l0) * k) / (points - 1)));
  for (const f of features) {
    if (!(f.omega > 0) || Math.abs(f.damping) >= LIGHT_DAMPING) continue;
    const z = Math.max(Math.abs(f.damping), 1e-4);
    for (const u of CLUSTER) {
      if (u === 0 && f.damping === 0) continue;
      const w = f.omega * Math.exp(z * u);
      if (w >= min && w <= max) out.push(w);
    }
  }
  out.sort((a, b) => a - b);
  const merged: number[] = [];
  for (const w of out) {
    const last = merged[merged.length - 1];
    if (last === undefined || w - last > 1e-12 * w) merged.push(w);
  }
  return merged;
}

/**
 * Computes: natural frequency ω_n = |λ| and damping ζ = −Re λ/|λ| (ζ = 1 for λ = 0) of every
 *   pole and, for models with at most 16 channels, every channel zero; sampled models map
 *   z to λ = ln(z)/T first (z = 0 is skipped).
 * Requires: a validated model. Method: `eigenvalues` of A and `sisoZerosAndGain` per channel.
 * Cost: O(n³) per channel plus one eigenvalue problem. Accuracy: that of the eigenvalues.
 * Errors: "no-convergence" from the eigenvalue routine.
 * Example: naturalFrequencies(model of 4/(s² + 0.04s + 4)) → two entries {omega: 2, damping: 0.01}.
 */
export function naturalFrequencies(model: StateSpace): { omega: number; damping: number }[] {
  const n = model.A.rows;
  if (n === 0) return [];
  const roots: Complex[] = [...eigenvalues(model.A)];
  const m = model.B.columns;
  const p = model.C.rows;
  if (m * p <= MAX_ZERO_CHANNELS) {
    for (let i = 0; i < p; i++) {
      for (let j = 0; j < m; j++) {
        const b = model.B.getColumn(j);
        const c = model.C.getRow(i);
        if (b.every((v) => v === 0) || c.every((v) => v === 0)) continue;
        roots.push(...sisoZerosAndGain(model.A, b, c, model.D.get(i, j)).zeros);
      }
    }
  }
  const T = model.sampleTime;
  const out: { omega: number; damping: number }[] = [];
  for (const r of roots) {
    let s = r;
    if (T !== null) {
      const mod = Math.hypot(r.re, r.im);
      if (mod === 0) continue; // z = 0: infinitely fast, no frequency feature
      s = { re: Math.log(mod) / T, im: Math.atan2(r.im, r.re) / T };
    }
    const omega = Math.hypot(s.re, s.im);
    if (!Number.isFinite(omega)) continue;
    out.push({ omega, damping: omega === 0 ? 1 : -s.re / omega });
  }
  return out;
}

function checkPositive(value: number, name: string, allowZero: boolean): void {
  if (typeof value !== "number") {
    throw new EngineError("invalid-argument", `${name} must be a number`, { argument: name });
  }
  if (!Number.isFinite(value)) {
    throw new EngineError("non-finite", `${name} is ${value}; it must be a finite number`, { argument: name });
  }
  if (allowZero ? value < 0 : value <= 0) {
    throw new EngineError("invalid-argument", `${name} is ${value}; it must be ${allowZero ? "≥ 0" : "positive"}`, { argument: name, value });
  }
}
