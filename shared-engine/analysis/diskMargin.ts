/**
 * Symmetric disk margin of a SISO loop, and the scalar searches along the frequency axis that
 * `loopMargins` shares with it: peak refinement (|S − ½|, |S|, |T|; Brent's minimisation in
 * peakSearch.ts) and Brent's root finder (crossovers, bandwidth).
 */
import { EngineError } from "../errors";
import { maximiseOnInterval } from "./peakSearch";

export interface DiskMargin {
  /** α_max = 1/‖S − ½‖∞ = 2/‖S − T‖∞; 0 when the nominal closed loop is unstable. */
  alpha: number;
  /** Guaranteed gain range [(1 − α/2)/(1 + α/2), (1 + α/2)/(1 − α/2)]; null = unbounded (α ≥ 2). */
  gainRange: [number, number | null];
  /** The same in dB; null = −∞ (lower) or +∞ (upper). */
  gainRangeDb: [number | null, number | null];
  /** Guaranteed phase variation ±2·atan(α/2) in degrees. */
  phaseDeg: number;
  /** Frequency where |S − ½| peaks (the highest grid frequency when the peak is the ω → ∞ limit). */
  frequencyRadPerSec: number;
}

export interface Peak {
  value: number;
  frequencyRadPerSec: number;
}

/** How many of the largest local maxima on the grid are refined (lightly damped loops may have several peaks of similar height). */
const PEAKS_REFINED = 5;
const MAX_BRENT_STEPS = 200;

/**
 * Computes: the symmetric (skew σ = 0) disk margin from the peak P = ‖S − ½‖∞ of the loop's
 *   sensitivity S = 1/(1 + L), with T = L/(1 + L) = 1 − S so that S − ½ = (S − T)/2:
 *   α = 1/P; the loop stays stable for every multiplicative factor f = (1 + δ/2)/(1 − δ/2),
 *   |δ| < α, in the loop, hence for gains in [(1 − α/2)/(1 + α/2), (1 + α/2)/(1 − α/2)]
 *   (δ real) and phase changes within ±2·atan(α/2) (δ imaginary).
 * Requires: P > 0 finite; `closedLoopStable` from the closed-loop eigenvalues (the disk margin
 *   is defined for a stable nominal loop; otherwise α = 0, gain range [1, 1], phase 0).
 * Method: the disk margin of Blight, Dailey & Gangsaas, "Practical control law design for
 *   aircraft using multivariable techniques", Int. J. Control 59(1):93–137, 1994, in the form
 *   of Seiler, Packard & Gahinet, "An introduction to disk margins", IEEE Control Systems
 *   Magazine 40(5):78–95, 2020 (α_max = 1/‖S + (σ − 1)/2‖∞ with σ = 0).
 * Cost: O(1). Accuracy: exact given P. Errors: "invalid-argument" when P is not positive and finite.
 * Example: diskMarginFromPeak(1, 2, true) → α = 1, gain range [1/3, 3], phase 2·atan(½) ≈ 53.13°.
 */
export function diskMarginFromPeak(peak: number, frequencyRadPerSec: number, closedLoopStable: boolean): DiskMargin {
  if (!(peak > 0) || !Number.isFinite(peak)) {
    throw new EngineError("invalid-argument", `the peak of |S − ½| must be positive and finite (it is ${peak})`, { peak });
  }
  if (!closedLoopStable) {
    return { alpha: 0, gainRange: [1, 1], gainRangeDb: [0, 0], phaseDeg: 0, frequencyRadPerSec };
  }
  const alpha = 1 / peak;
  const half = alpha / 2;
  const lower = half >= 1 ? 0 : (1 - half) / (1 + half);
  const upper = half >= 1 ? null : (1 + half) / (1 - half);
  return {
    alpha,
    gainRange: [lower, upper],
    gainRangeDb: [lower === 0 ? null : 20 * Math.log10(lower), upper === null ? null : 20 * Math.log10(upper)],
    phaseDeg: (2 * Math.atan(half) * 180) / Math.PI,
    frequencyRadPerSec,
  };
}

/**
 * Computes: the maximum of a continuous function f(ω) ≥ 0 over the span of an increasing grid:
 *   the largest grid value, improved by a local search on the two grid intervals around each of
 *   the (up to 5) largest local maxima of the grid values `values[k] = f(grid[k])`.
 * Requires: grid increasing, values finite, same length ≥ 1; f finite on the grid's span.
 * Method: Brent's method without derivatives (`maximiseOnInterval`: Brent, "Algorithms for
 *   Minimization without Derivatives", Prentice-Hall 1973, ch. 5) on [ω_{k−1}, ω_{k+1}] in ω,
 *   started at the grid maximum ω_k with the two neighbours as earlier points (its first step is
 *   the parabola through the three grid values), down to a bracket of width at most
 *   1e-12·max(ω_{k−1}, ω_{k+1}) (the tolerance of the golden-section search used before); a
 *   maximum at the first or last grid point is searched from a golden-section point. The best
 *   point ever evaluated is returned, so the result is never below the grid maximum.
 * Cost: for an interior smooth peak about 10–35 evaluations of f (golden section: about 50–55);
 *   a peak at an end of the grid about 50–60, as before; at most 5 peaks. Iteration limit 200
 *   per peak. (Measured on a 100-state resonant loop: 240 → 114 evaluations for |S − ½|.)
 * Accuracy: the maximiser of a unimodal peak located to within 5e-13·max(ω_{k−1}, ω_{k+1}) in
 *   exact arithmetic; in practice to the √ε-relative width where rounding flattens f, where
 *   the value is then accurate to rounding.
 * Errors: "no-convergence" if the iteration limit is reached (details: iterations, bracket),
 *   "non-finite" if f is NaN or ±Infinity at a point of the search (details: x, value),
 *   "invalid-argument" for mismatched lengths.
 * Example: refinePeak((w) => 1 / (1 + (w - 1) ** 2), [0, 0.9, 2], [...]) → value 1 at ω ≈ 1.
 */
export function refinePeak(f: (omega: number) => number, grid: number[], values: number[], what = "peak"): Peak {
  if (grid.length !== values.length || grid.length === 0) {
    throw new EngineError("invalid-argument", `grid and values must have the same non-zero length (${grid.length} and ${values.length})`, {});
  }
  const candidates: number[] = [];
  for (let k = 0; k < grid.length; k++) {
    const left = k === 0 ? -Infinity : values[k - 1]!;
    const right = k === grid.length - 1 ? -Infinity : values[k + 1]!;
    if (values[k]! >= left && values[k]! >= right) candidates.push(k);
  }
  candidates.sort((a, b) => values[b]! - values[a]!);
  let best: Peak = { value: values[candidates[0]!]!, frequencyRadPerSec: grid[candidates[0]!]! };
  for (const k of candidates.slice(0, PEAKS_REFINED)) {
    const lo = Math.max(0, k - 1);
    const hi = Math.min(grid.length - 1, k + 1);
    const a = grid[lo]!;
    const b = grid[hi]!;
    if (!(b > a)) continue;
    // Brent's stopping test leaves a bracket of width ≤ 4·tolerance: 1e-12·max(|a|, |b|) as before.
    const tolerance = 0.25e-12 * Math.max(Math.abs(a), Math.abs(b));
    // (Strictly inside: a grid with repeated frequencies gets the plain start.)
    const interior = a < grid[k]! && grid[k]! < b;
    const peak = maximiseOnInterval(f, a, b, {
      tolerance,
      what: `${what} near ${grid[k]} rad/s`,
      ...(interior ? { start: { x: grid[k]!, value: values[k]! }, endValues: { a: values[lo]!, b: values[hi]! } } : {}),
    });
    if (peak.value > best.value) best = { value: peak.value, frequencyRadPerSec: peak.x };
  }
  return best;
}

/**
 * Computes: a root x ∈ [a0, b0] of a continuous scalar function f, given fa0 = f(a0) and
 *   fb0 = f(b0) of opposite signs (or one of them zero).
 * Requires: f continuous on the bracket; f(a0)·f(b0) ≤ 0. `what` names the quantity in errors.
 * Method: Brent, "Algorithms for Minimization without Derivatives", Prentice-Hall 1973,
 *   ch. 4, procedure "zero": inverse quadratic interpolation and secant steps, safeguarded by
 *   bisection so the bracket always shrinks.
 * Cost: at most 200 evaluations of f (typically 6–12 for smooth f).
 * Accuracy: the returned x lies within 2ε|x| + 1e-20·max(|a0|, |b0|) of a sign change of f.
 * Errors: "internal" when the bracket does not change sign; "no-convergence" after 200 steps
 *   (details: iterations, bracket, lastResidual).
 * Example: brentRoot((x) => x * x - 2, 1, 2, -1, 2, "√2") → 1.4142135623730951; |x² − 2| < 1e-15.
 */
export function brentRoot(f: (x: number) => number, a0: number, b0: number, fa0: number, fb0: number, what: string): number {
  let a = a0, b = b0, fa = fa0, fb = fb0;
  if (fa === 0) return a;
  if (fb === 0) return b;
  if (fa * fb > 0) throw new EngineError("internal", `${what}: the bracket [${a0}, ${b0}] does not change sign`, { bracket: [a0, b0] });
  let c = a, fc = fa, d = b - a, e = d;
  // Absolute floor so a root at (or near) 0 ends after ≈ 70 halvings instead of ≈ 1000.
  const floor = 1e-20 * Math.max(Math.abs(a0), Math.abs(b0));
  for (let it = 0; it < MAX_BRENT_STEPS; it++) {
    if ((fb > 0 && fc > 0) || (fb < 0 && fc < 0)) {
      c = a; fc = fa; d = b - a; e = d;
    }
    if (Math.abs(fc) < Math.abs(fb)) {
      a = b; b = c; c = a;
      fa = fb; fb = fc; fc = fa;
    }
    const tol = 2 * Number.EPSILON * Math.abs(b) + floor;
    const m = 0.5 * (c - b);
    if (Math.abs(m) <= tol || fb === 0) return b;
    if (Math.abs(e) < tol || Math.abs(fa) <= Math.abs(fb)) {
      d = m; e = m;
    } else {
      let s = fb / fa, p: number, q: number;
      if (a === c) {
        p = 2 * m * s; q = 1 - s;
      } else {
        const qq = fa / fc, r = fb / fc;
        p = s * (2 * m * qq * (qq - r) - (b - a) * (r - 1));
        q = (qq - 1) * (r - 1) * (s - 1);
      }
      if (p > 0) q = -q; else p = -p;
      s = e; e = d;
      if (2 * p < 3 * m * q - Math.abs(tol * q) && p < Math.abs(0.5 * s * q)) d = p / q;
      else { d = m; e = m; }
    }
    a = b; fa = fb;
    b += Math.abs(d) > tol ? d : m > 0 ? tol : -tol;
    fb = f(b);
  }
  throw new EngineError("no-convergence", `${what}: Brent's method did not converge in ${MAX_BRENT_STEPS} steps on [${a0}, ${b0}]`, {
    iterations: MAX_BRENT_STEPS,
    bracket: [Math.min(b, c), Math.max(b, c)],
    lastResidual: fb,
  });
}
