/**
 * The classical construction data of a root locus (W. R. Evans, "Control system synthesis by root
 * locus method", Trans. AIEE 69, 1950): the asymptotes (centroid and angles), the break points
 * on the real axis where branches meet and leave it, and the gains at which branches cross the
 * stability boundary (the imaginary axis, or the unit circle when sampled).
 */
import type { Complex } from "../linalg";
import type { StateSpace } from "../model";
import { realLoopAndDerivative } from "./loopEvaluation";

const MAX_CROSSING_BISECTIONS = 200;

/**
 * Computes: the asymptotes of a locus with relative degree r = n − m > 0: centroid
 *   (Σ Re p − Σ Re z)/r and angles (2q + 1)·180°/r, or q·360°/r when `negative` (the sign of k
 *   times the loop's high-frequency gain is negative), q = 0…r−1. For r = 0: centroid null and
 *   no angles (every branch ends at a finite zero).
 * Requires: poles (n) and finite zeros (m) of the loop; r = n − m ≥ 0.
 * Method: Evans' asymptote rule (see the file comment). Cost: O(n). Errors: none.
 * Example: poles {0, −1, −2}, no zeros, positive gain → centroid −1, angles 60°, 180°, 300°.
 */
export function locusAsymptotes(poles: Complex[], zeros: Complex[], relativeDegree: number, negative: boolean): { centroid: number | null; anglesDeg: number[] } {
  const asymptotes = { centroid: null as number | null, anglesDeg: [] as number[] };
  if (relativeDegree > 0) {
    const sum = poles.reduce((s, p) => s + p.re, 0) - zeros.reduce((s, z) => s + z.re, 0);
    asymptotes.centroid = sum / relativeDegree;
    asymptotes.anglesDeg = Array.from({ length: relativeDegree }, (_, q) => (negative ? (q * 360) / relativeDegree : ((2 * q + 1) * 180) / relativeDegree));
  }
  return asymptotes;
}

/** Distance |a − b| between two points of the complex plane. */
export const dist = (a: Complex, b: Complex): number => Math.hypot(a.re - b.re, a.im - b.im);

/**
 * Computes: the points where the traced branches cross the stability boundary (Re s = 0, or
 *   |z| = 1 when `sampled`), with the gain of each crossing.
 * Requires: gains increasing in |k| and branches[b][k] the closed-loop poles at gains[k], as
 *   traced; `closedLoop(k)` the closed-loop poles at gain k.
 * Method: a sign change of the boundary function between two traced gains is refined by
 *   bisection on k, following the branch by the pole nearest the interpolated position, until
 *   the gain interval is 1e-13 relative (at most 200 bisections).
 * Cost: one closedLoop evaluation (an n×n eigenvalue problem) per bisection, ≈ 60 per crossing.
 * Errors: those of `closedLoop`.
 * Example: for k/(s(s+1)(s+2)) the two crossings ±j√2 at k = 6.
 */
export function findCrossings(gains: number[], branches: Complex[][], closedLoop: (k: number) => Complex[], sampled: boolean): { point: Complex; gain: number }[] {
  const boundary = (p: Complex): number => (sampled ? Math.hypot(p.re, p.im) - 1 : p.re);
  const out: { point: Complex; gain: number }[] = [];
  for (const branch of branches) {
    for (let k = 0; k + 1 < gains.length; k++) {
      const fa = boundary(branch[k]!);
      const fb = boundary(branch[k + 1]!);
      if (!(fa * fb < 0)) continue;
      let lo = gains[k]!;
      let hi = gains[k + 1]!;
      let pLo = branch[k]!;
      let pHi = branch[k + 1]!;
      let point = fa < 0 ? pLo : pHi;
      for (let it = 0; it < MAX_CROSSING_BISECTIONS; it++) {
        const mid = (lo + hi) / 2;
        if (mid === lo || mid === hi || Math.abs(hi - lo) <= 1e-13 * Math.abs(mid)) break;
        const guess = { re: (pLo.re + pHi.re) / 2, im: (pLo.im + pHi.im) / 2 };
        const candidates = closedLoop(mid);
        let best = candidates[0]!;
        for (const q of candidates) if (dist(q, guess) < dist(best, guess)) best = q;
        point = best;
        if (boundary(best) * fa > 0) {
          lo = mid;
          pLo = best;
        } else {
          hi = mid;
          pHi = best;
        }
      }
      out.push({ point, gain: (lo + hi) / 2 });
    }
  }
  return out;
}

/**
 * Computes: the real-axis break points of the locus of gain sign `sign`: real x with L'(x) = 0
 *   (equivalently dK/ds = 0 for K(s) = −1/L(s)) at which K(x) has the sign of the locus, each
 *   with its gain K(x).
 * Requires: a SISO loop L with its poles and finite zeros; `scale` the length scale of the plot.
 * Method: sign changes of L' on 64 points of every interval between consecutive real poles and
 *   zeros (and 5 scales beyond them), refined by bisection to 1e-15·max(scale, |x|); points
 *   within 1e-8·scale of a pole or zero, or repeated within 1e-9·scale, are dropped.
 * Cost: one LU of xI − A (O(n³)) per grid point and bisection step. Errors: none (points where
 *   xI − A is singular are skipped).
 * Example: for k/(s(s+1)(s+2)) one break point at −1 + 1/√3 with gain 2/(3√3).
 */
export function findBreakPoints(L: StateSpace, poles: Complex[], zeros: Complex[], scale: number, sign: number): { point: Complex; gain: number }[] {
  const realTol = 1e-6 * scale;
  const all = [...poles, ...zeros];
  const reals = all.filter((p) => Math.abs(p.im) <= realTol).map((p) => p.re);
  const lo = Math.min(...all.map((p) => p.re)) - 5 * scale;
  const hi = Math.max(...all.map((p) => p.re)) + 5 * scale;
  const edges = [lo, ...reals, hi].sort((a, b) => a - b);
  const derivative = (x: number): number | null => realLoopAndDerivative(L, x)?.derivative ?? null;
  const out: { point: Complex; gain: number }[] = [];
  const SAMPLES = 64;
  for (let e = 0; e + 1 < edges.length; e++) {
    const a = edges[e]!;
    const b = edges[e + 1]!;
    if (!(b - a > 2 * realTol)) continue;
    let xPrev = NaN;
    let gPrev: number | null = null;
    for (let i = 0; i < SAMPLES; i++) {
      const x = a + ((b - a) * (i + 0.5)) / SAMPLES;
      const g = derivative(x);
      if (g !== null && gPrev !== null && g * gPrev < 0) {
        const root = bisectRoot(derivative, xPrev, x, gPrev, scale);
        const at = realLoopAndDerivative(L, root);
        const nearSingular = all.some((p) => Math.hypot(p.re - root, p.im) <= 1e-8 * scale);
        if (at !== null && at.value !== 0 && !nearSingular) {
          const gain = -1 / at.value;
          if (gain * sign > 0 && !out.some((q) => Math.abs(q.point.re - root) <= 1e-9 * scale)) out.push({ point: { re: root, im: 0 }, gain });
        }
      }
      if (g !== null) {
        xPrev = x;
        gPrev = g;
      }
    }
  }
  return out;
}

// Bisection for a sign change of f on [a, b] (f(a) = fa); a null value of f ends it there.
function bisectRoot(f: (x: number) => number | null, a: number, b: number, fa: number, scale: number): number {
  for (let it = 0; it < 200; it++) {
    const mid = (a + b) / 2;
    if (mid === a || mid === b || b - a <= 1e-15 * Math.max(scale, Math.abs(mid))) return mid;
    const fm = f(mid);
    if (fm === null || fm === 0) return mid;
    if (fm * fa > 0) {
      a = mid;
      fa = fm;
    } else b = mid;
  }
  return (a + b) / 2;
}
