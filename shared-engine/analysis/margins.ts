/**
 * Classical loop margins of a SISO loop transfer L under unity negative feedback: gain and
 * phase crossovers refined to full precision, gain/phase/delay margins, sensitivity peaks,
 * closed-loop bandwidth, symmetric disk margin and closed-loop stability from eigenvalues.
 */
import { EngineError } from "../errors";
import { eigenvalues } from "../linalg";
import type { StateSpace } from "../model";
import { brentRoot, diskMarginFromPeak, refinePeak, type DiskMargin, type Peak } from "./diskMargin";
import { frequencyGrid } from "./frequencyGrid";
import { checkFrequencies, createFrequencyResponseEvaluator, unwrapDegrees, type FrequencyResponseEvaluator } from "./frequencyResponse";

export interface LoopMargins {
  gainCrossoversRadPerSec: number[];
  phaseCrossoversRadPerSec: number[];
  /** At each phase crossover ω_pc: gainDb = −20·log10|L(jω_pc)|. */
  gainMargins: { frequencyRadPerSec: number; gainDb: number }[];
  /** At each gain crossover ω_gc: phaseDeg = 180 + ∠L(jω_gc), reduced to (−180, 180]. */
  phaseMargins: { frequencyRadPerSec: number; phaseDeg: number }[];
  /** The gain margin of smallest |gainDb|; null = no phase crossover (infinite gain margin). */
  gainMarginDb: number | null;
  /**
   * The critical phase margin: the smallest |180° + ∠L| over the gain crossovers (the angle
   * between L and −1 there), positive when the closed loop is stable and negative when it is
   * unstable; null = no gain crossover (infinite phase margin). The per-crossover values in
   * `phaseMargins` keep their wrapped sign.
   */
  phaseMarginDeg: number | null;
  /** Frequency of `phaseMarginDeg`. */
  gainCrossoverRadPerSec: number | null;
  /** Frequency of `gainMarginDb`. */
  phaseCrossoverRadPerSec: number | null;
  /** min over gain crossovers ω_gc > 0 of (PM mod 360°, in rad)/ω_gc; 0 when the closed loop is unstable; null = unbounded (no gain crossover above ω = 0). */
  delayMarginSec: number | null;
  /** Sampled loops: delayMarginSec / T (a fraction of a sample is meaningful); null for continuous loops. */
  delayMarginSamples: number | null;
  /** Ms = max |1/(1 + L)|. */
  sensitivityPeak: Peak;
  /** Mt = max |L/(1 + L)|. */
  complementarySensitivityPeak: Peak;
  /** First frequency where |T| drops below |T(0)|/√2 (−3 dB of the DC value); null when it does not on the grid or T(0) = 0. */
  closedLoopBandwidthRadPerSec: number | null;
  diskMargin: DiskMargin;
  /** From the eigenvalues of A − B(1 + D)⁻¹C, not from the frequency response. */
  closedLoopStable: boolean;
  warnings: string[];
}

const MAX_EXTENSION_DECADES = 12;

/**
 * Computes: for a SISO loop L (A: n×n, B: n×1, C: 1×n, D: 1×1; continuous or sampled) under
 *   unity negative feedback, with S = 1/(1 + L) and T = L/(1 + L):
 *   – gain crossovers ω_gc: |L(jω)| = 1; phase crossovers ω_pc: ∠L(jω) = −180° (mod 360°),
 *     i.e. L real and negative (ω = 0 included when L(0) < 0, and π/T for sampled loops; not
 *     when L has a pole there — an eigenvalue of A within 1e-6·max(1, ‖A‖_F) of s = 0, z = 1
 *     or z = −1 —, as with integral action, where L is unbounded and has no margin at DC);
 *   – gain margin at each ω_pc: GM = −20·log10|L(jω_pc)| dB (negative when |L| > 1 there: the
 *     gain may only decrease by that much); critical GM = the one of smallest |GM|;
 *   – phase margin at each ω_gc: PM = 180° + ∠L(jω_gc) reduced to (−180°, 180°]; critical PM =
 *     the smallest. Convention: PM < 0 means the phase lag at that crossover exceeds 180°; for
 *     an open-loop stable loop with one gain crossover this is closed-loop instability. The
 *     eigenvalue test `closedLoopStable` is authoritative in every case;
 *   – delay margin: the smallest pure delay τ making L e^{−jωτ} pass through −1 at a gain
 *     crossover: τ = min (PM mod 360°)·π/180/ω_gc (0 when the closed loop is already unstable);
 *   – Ms = sup|S|, Mt = sup|T| over ω ≥ 0 (including the ω → ∞ limit for continuous loops);
 *   – bandwidth: the first ω with |T(jω)| < |T(0)|/√2;
 *   – symmetric disk margin α = 1/‖S − ½‖∞ (see `diskMarginFromPeak`);
 *   – closed-loop stability from the eigenvalues of A_cl = A − B(1 + D)⁻¹C: all Re λ <
 *     −10·n·ε·max(1, ‖A_cl‖_F) (continuous) or all |λ| < 1 − 10·n·ε (sampled).
 * Requires: L single-input single-output (the input channel; F, E are ignored), 1 + D ≠ 0.
 *   options.grid (rad/s, ≥ 0, ≤ π/T when sampled) replaces the automatic grid.
 * Method: L is evaluated on the grid by the Hessenberg method of `frequencyResponse` (Laub
 *   1981). Default grid: 0 plus `frequencyGrid` with 800 points two decades beyond the
 *   natural frequencies, extended by decades (at most 12 each way) while |L| still changes by
 *   1.5× per decade towards and not yet 10× past 1 (a crossover or the −3 dB point may lie
 *   beyond). Crossovers are bracketed by sign changes on the grid (of log|L| for gain, of the
 *   unwrapped phase against −180° + 360°k for phase) and refined by Brent's method (Brent,
 *   "Algorithms for Minimization without Derivatives", Prentice-Hall 1973, ch. 4) on
 *   log|L(jω)| and on ∠(−L(jω)). Peaks of |S|, |T| and |S − ½| are refined in ω around the
 *   largest grid maxima by Brent's minimisation without derivatives (Brent 1973, ch. 5:
 *   golden section with parabolic interpolation, started from the parabola through the three
 *   grid points; `refinePeak`, `maximiseOnInterval`). Crossovers between grid points where
 *   |L| − 1 or the phase does not change sign (tangencies, two crossings inside one interval)
 *   are not found: dense grids near lightly damped modes make this rare.
 * Cost: one Hessenberg reduction (≈ 5n³ flops), one eigenvalue problem, and O(n²) per grid
 *   point and per refinement step (≤ 200 Brent steps per crossover; per peak typically 10–35
 *   evaluations, about 55 at an end of the grid, ≤ 5 peaks of each of |S|, |T|, |S − ½|,
 *   each capped at 200).
 * Accuracy: crossover frequencies to about 4ε relative in ω (Brent's tolerance, with an
 *   absolute floor of 1e-20 times the bracket end) times the
 *   conditioning of log|L| and ∠L there; margins then follow from one evaluation. Peak
 *   frequencies to 5e-13 relative in exact arithmetic (in practice to the √ε-relative width
 *   where rounding flattens the peak), peak values to rounding; never below the grid maximum.
 * Errors: "shape-mismatch" (L not SISO), "singular" (1 + D = 0: the loop is not well posed),
 *   "invalid-argument" / "non-finite" (bad grid), "non-finite" (|S|, |T| or |S − ½| unbounded
 *   at a frequency met by a peak search: 1 + L = 0 between grid points), "no-convergence"
 *   (a Brent limit; details give iterations and bracket), errors of the eigenvalue routine.
 * Example:
 *   const L = createStateSpace({ A: [[0, 1, 0], [0, 0, 1], [0, -2, -3]], B: [[0], [0], [1]], C: [[2, 0, 0]] });
 *   const r = loopMargins(L); // L = 2/(s(s+1)(s+2))
 *   // r.phaseCrossoverRadPerSec ≈ √2, r.gainMarginDb ≈ 20·log10(3); check |ω − √2| < 1e-12
 */
export function loopMargins(L: StateSpace, options: { grid?: number[] } = {}): LoopMargins {
  if (L.B.columns !== 1 || L.C.rows !== 1) {
    throw new EngineError("shape-mismatch", `L must be single-input single-output (it has ${L.B.columns} inputs and ${L.C.rows} outputs)`, {
      argument: "L",
      inputs: L.B.columns,
      outputs: L.C.rows,
    });
  }
  const d = L.D.get(0, 0);
  if (1 + d === 0) {
    throw new EngineError("singular", "1 + D is 0 (D = −1): the unity negative feedback loop is not well posed", { argument: "L", D: d });
  }
  const T = L.sampleTime;
  const warnings: string[] = [];
  const ev = createFrequencyResponseEvaluator(L);
  // A pole of L at s = 0 (z = 1), or at z = −1 when sampled, makes L unbounded there; the
  // solve at that exact point can still return a huge finite value (a pivot just above its
  // tolerance for larger, integrator-carrying loops), whose arbitrary sign then read as a phase
  // crossover with a gain margin near −300 dB. Those points are treated as poles instead.
  const unboundedAt = boundaryPoles(L);
  const loop = new LoopEvaluator(ev, (w) => (w === 0 && unboundedAt.zero) || (T !== null && w === Math.PI / T && unboundedAt.nyquist));
  const stability = closedLoopStability(L, d);
  if (!stability.stable) warnings.push(`closed loop is unstable (closed-loop eigenvalue ${stability.worst}); margins describe a loop that is already past the stability boundary`);
  const grid = options.grid !== undefined ? checkGrid(options.grid, T) : defaultGrid(L, loop, warnings);

  // Grid values of L (null at axis poles), |L| and the unwrapped phase.
  const values = grid.map((w) => loop.at(w));
  // ω = 0 is left out: an integrator there is the normal case, not worth a warning.
  const unbounded = grid.filter((w, k) => values[k] === null && w > 0);
  if (unbounded.length > 0) warnings.push(`L is unbounded (pole on the stability boundary) at ${unbounded.length} grid frequencies, e.g. ${unbounded[0]} rad/s; those points are skipped`);
  const phase: (number | null)[] = [];
  let last: number | null = null;
  for (const v of values) {
    if (v === null || (v.re === 0 && v.im === 0)) {
      phase.push(null);
      continue;
    }
    last = unwrapDegrees((Math.atan2(v.im, v.re) * 180) / Math.PI, last);
    phase.push(last);
  }

  // Gain crossovers: sign changes of log|L| between consecutive defined points.
  const logMag = (w: number): number => {
    const v = loop.at(w);
    return v === null ? 1e3 : Math.log(Math.hypot(v.re, v.im)); // e^1000 stands in for ∞ inside the bracket only
  };
  const gainCrossovers: number[] = [];
  const phaseCrossovers: number[] = [];
  for (let k = 0; k + 1 < grid.length; k++) {
    const a = values[k];
    const b = values[k + 1];
    if (a === null || b === null) continue;
    const fa = Math.log(Math.hypot(a.re, a.im));
    const fb = Math.log(Math.hypot(b.re, b.im));
    if (fa === 0) addDistinct(gainCrossovers, grid[k]!);
    else if (fa * fb < 0) addDistinct(gainCrossovers, brentRoot(logMag, grid[k]!, grid[k + 1]!, fa, fb, "gain crossover"));
    if (fb === 0) addDistinct(gainCrossovers, grid[k + 1]!);
  }
  // Phase crossovers: the unwrapped phase crosses −180° + 360°j between consecutive points.
  const anglePlus180 = (w: number): number => {
    const v = loop.at(w);
    return v === null ? 0 : Math.atan2(-v.im, -v.re); // ∠(−L): 0 at a phase crossover, continuous near it
  };
  let multiple = false;
  for (let k = 0; k + 1 < grid.length; k++) {
    const pa = phase[k];
    const pb = phase[k + 1];
    if (pa === null || pa === undefined || pb === null || pb === undefined) continue;
    const ja = Math.floor((pa + 180) / 360);
    const jb = Math.floor((pb + 180) / 360);
    if (ja === jb) continue;
    if (Math.abs(ja - jb) > 1) multiple = true;
    const fa = anglePlus180(grid[k]!);
    const fb = anglePlus180(grid[k + 1]!);
    if (fa === 0) addDistinct(phaseCrossovers, grid[k]!);
    else if (fb === 0) addDistinct(phaseCrossovers, grid[k + 1]!);
    else if (fa * fb < 0) addDistinct(phaseCrossovers, brentRoot(anglePlus180, grid[k]!, grid[k + 1]!, fa, fb, "phase crossover"));
    else multiple = true;
  }
  if (multiple) warnings.push("the phase turned by more than 360° between two grid points; some phase crossovers may be missed (use a denser grid)");
  // ω = 0 and Nyquist: L is real there, so L < 0 is a phase crossover.
  for (const w of [0, ...(T === null ? [] : [Math.PI / T])]) {
    if (w < grid[0]! || w > grid[grid.length - 1]!) continue;
    const v = loop.at(w);
    if (v !== null && v.re < 0 && v.im === 0) addDistinct(phaseCrossovers, w);
  }
  gainCrossovers.sort((x, y) => x - y);
  phaseCrossovers.sort((x, y) => x - y);

  const gainMargins = phaseCrossovers.map((w) => ({ frequencyRadPerSec: w, gainDb: -20 * Math.log10(loop.magnitude(w)) }));
  const phaseMargins = gainCrossovers.map((w) => {
    const v = loop.at(w)!;
    return { frequencyRadPerSec: w, phaseDeg: wrapDegrees(180 + (Math.atan2(v.im, v.re) * 180) / Math.PI) };
  });
  const criticalGain = gainMargins.reduce<(typeof gainMargins)[number] | null>((best, g) => (best === null || Math.abs(g.gainDb) < Math.abs(best.gainDb) ? g : best), null);
  // The critical phase margin is the crossover where L(jω) comes nearest −1 in angle, |PM|.
  // Its sign follows closed-loop stability (the project convention: negative when the closed
  // loop is unstable), not the branch of the wrapped angle: an open-loop-unstable loop that is
  // stable when closed can have 180° + ∠L = −165° at its crossover, which is 165° from −1.
  const nearest = phaseMargins.reduce<(typeof phaseMargins)[number] | null>((best, p) => (best === null || Math.abs(p.phaseDeg) < Math.abs(best.phaseDeg) ? p : best), null);
  const criticalPhase = nearest === null ? null : { frequencyRadPerSec: nearest.frequencyRadPerSec, phaseDeg: (stability.stable ? 1 : -1) * Math.abs(nearest.phaseDeg) };
  if (gainCrossovers.length === 0) warnings.push("no gain crossover on the grid: the phase margin is infinite");

  // Delay margin: the smallest PM/ω_c over the gain crossovers. A delay leaves L unchanged at
  // ω = 0, so a crossover there (|L(0)| = 1 exactly, e.g. L = 1/(s + 1)) sets no limit; with no
  // crossover above 0 the delay margin is unbounded (null), never Infinity.
  let delay: number | null = null;
  const positiveCrossings = phaseMargins.filter((p) => p.frequencyRadPerSec > 0);
  if (!stability.stable && phaseMargins.length > 0) delay = 0;
  else if (positiveCrossings.length > 0) {
    delay = Math.min(...positiveCrossings.map((p) => ((((p.phaseDeg % 360) + 360) % 360) * Math.PI) / 180 / p.frequencyRadPerSec));
  }

  // Peaks of |S|, |T|, |S − ½| (S = 0, T = 1 at axis poles of L).
  const sens = (w: number): number => {
    const v = loop.at(w);
    return v === null ? 0 : 1 / Math.hypot(1 + v.re, v.im);
  };
  const comp = (w: number): number => {
    const v = loop.at(w);
    return v === null ? 1 : Math.hypot(v.re, v.im) / Math.hypot(1 + v.re, v.im);
  };
  const diskFn = (w: number): number => {
    const v = loop.at(w);
    return v === null ? 0.5 : Math.hypot(1 - v.re, v.im) / (2 * Math.hypot(1 + v.re, v.im)); // |S − ½| = |1 − L|/(2|1 + L|)
  };
  const top = grid[grid.length - 1]!;
  const limitS = T === null ? 1 / Math.abs(1 + d) : 0;
  const limitT = T === null ? Math.abs(d / (1 + d)) : 0;
  const limitDisk = T === null ? Math.abs(1 - d) / (2 * Math.abs(1 + d)) : 0;
  const sensitivityPeak = withLimit(peakOf(sens, grid, warnings, "|S|"), limitS, top);
  const complementarySensitivityPeak = withLimit(peakOf(comp, grid, warnings, "|T|"), limitT, top);
  const diskPeak = withLimit(peakOf(diskFn, grid, warnings, "|S − ½|"), limitDisk, top);

  // Bandwidth: first drop of |T| below |T(0)|/√2.
  let bandwidth: number | null = null;
  const t0 = comp(0);
  if (t0 === 0) warnings.push("T(0) = 0: the closed-loop bandwidth is not defined");
  else if (!Number.isFinite(t0)) warnings.push("T(0) is unbounded (closed-loop pole at DC): the closed-loop bandwidth is not defined");
  else {
    const level = t0 / Math.SQRT2;
    const g = (w: number): number => comp(w) - level;
    let prev = 0;
    let fPrev = t0 - level;
    for (const w of grid) {
      if (w <= 0) continue;
      const fw = g(w);
      if (fw < 0) {
        bandwidth = brentRoot(g, prev, w, fPrev, fw, "closed-loop bandwidth");
        break;
      }
      prev = w;
      fPrev = fw;
    }
    if (bandwidth === null) warnings.push("|T| does not fall 3 dB below its DC value on the grid: bandwidth not found");
  }

  return {
    gainCrossoversRadPerSec: gainCrossovers,
    phaseCrossoversRadPerSec: phaseCrossovers,
    gainMargins,
    phaseMargins,
    gainMarginDb: criticalGain?.gainDb ?? null,
    phaseMarginDeg: criticalPhase?.phaseDeg ?? null,
    gainCrossoverRadPerSec: criticalPhase?.frequencyRadPerSec ?? null,
    phaseCrossoverRadPerSec: criticalGain?.frequencyRadPerSec ?? null,
    delayMarginSec: delay,
    delayMarginSamples: delay === null || T === null ? null : delay / T,
    sensitivityPeak,
    complementarySensitivityPeak,
    closedLoopBandwidthRadPerSec: bandwidth,
    diskMargin: diskMarginFromPeak(diskPeak.value > 0 ? diskPeak.value : Number.MIN_VALUE, diskPeak.frequencyRadPerSec, stability.stable),
    closedLoopStable: stability.stable,
    warnings,
  };
}

/** Scalar L(jω) from the shared evaluator, with reusable buffers. */
class LoopEvaluator {
  private readonly re = new Float64Array(1);
  private readonly im = new Float64Array(1);
  // L(jω) by ω: the crossover search, the three peaks and the bandwidth all walk the same
  // grid, so each grid point is solved once instead of five times (values are immutable).
  private readonly memo = new Map<number, { re: number; im: number } | null>();
  constructor(
    private readonly ev: FrequencyResponseEvaluator,
    private readonly isPole: (omega: number) => boolean = () => false,
  ) {}
  at(omega: number): { re: number; im: number } | null {
    const known = this.memo.get(omega);
    if (known !== undefined) return known;
    const value = !this.isPole(omega) && this.ev.evaluateFrequency(omega, this.re, this.im) ? { re: this.re[0]!, im: this.im[0]! } : null;
    this.memo.set(omega, value);
    return value;
  }
  magnitude(omega: number): number {
    const v = this.at(omega);
    return v === null ? Infinity : Math.hypot(v.re, v.im);
  }
}

/**
 * Whether L has a pole at the real points of the stability boundary: s = 0 (continuous) or
 * z = 1 (sampled), and z = −1 (sampled). A pole counts when an eigenvalue of A lies within
 * 1e-6·max(1, ‖A‖_F) of the point: far above rounding (a double integrator's eigenvalues come out
 * within about √ε·‖A‖ of 0) and far below any pole a margin at that frequency could describe.
 */
function boundaryPoles(L: StateSpace): { zero: boolean; nyquist: boolean } {
  const n = L.A.rows;
  if (n === 0) return { zero: false, nyquist: false };
  const tol = 1e-6 * Math.max(1, L.A.norm("frobenius"));
  const poles = eigenvalues(L.A);
  const near = (re: number): boolean => poles.some((p) => Math.hypot(p.re - re, p.im) <= tol);
  return L.sampleTime === null ? { zero: near(0), nyquist: false } : { zero: near(1), nyquist: near(-1) };
}

function closedLoopStability(L: StateSpace, d: number): { stable: boolean; worst: string } {
  const n = L.A.rows;
  if (n === 0) return { stable: true, worst: "none" };
  const Acl = L.A.clone();
  let norm = 0;
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < n; j++) {
      const v = Acl.get(i, j) - (L.B.get(i, 0) * L.C.get(0, j)) / (1 + d);
      Acl.set(i, j, v);
      norm += v * v;
    }
  }
  const lambda = eigenvalues(Acl);
  const tol = 10 * n * Number.EPSILON;
  const measure = (l: { re: number; im: number }): number => (L.sampleTime === null ? l.re : Math.hypot(l.re, l.im));
  const worst = lambda.reduce((w, l) => (measure(l) > measure(w) ? l : w));
  const stable = L.sampleTime === null ? measure(worst) < -tol * Math.max(1, Math.sqrt(norm)) : measure(worst) < 1 - tol;
  return { stable, worst: `${worst.re}${worst.im >= 0 ? "+" : "−"}${Math.abs(worst.im)}j` };
}

function checkGrid(list: number[], T: number | null): number[] {
  const grid = checkFrequencies(list, "options.grid");
  if (grid.length < 2) throw new EngineError("invalid-argument", `options.grid needs at least 2 frequencies (it has ${grid.length})`, { argument: "options.grid" });
  grid.forEach((w, k) => {
    if (w < 0) throw new EngineError("invalid-argument", `options.grid[${k}] is ${w}; frequencies must be ≥ 0`, { argument: "options.grid", index: k });
    if (T !== null && w > (Math.PI / T) * (1 + 1e-12)) {
      throw new EngineError("invalid-argument", `options.grid[${k}] is ${w}, above the Nyquist frequency π/T = ${Math.PI / T}`, { argument: "options.grid", index: k });
    }
  });
  const sorted = [...grid].sort((a, b) => a - b);
  return sorted.filter((w, k) => k === 0 || w > sorted[k - 1]!);
}

function defaultGrid(L: StateSpace, loop: LoopEvaluator, warnings: string[]): number[] {
  const base = frequencyGrid(L, { points: 800, decadesBeyond: 2 });
  const low: number[] = [];
  const high: number[] = [];
  // Extend by decades while |L| still changes by 1.5× per decade and is not yet far (10×) from 1
  // on the side it moves to: a crossover or the −3 dB point of T may lie beyond.
  let w = base[0]!;
  for (let k = 0; k < MAX_EXTENSION_DECADES; k++) {
    const m0 = loop.magnitude(w);
    const m1 = loop.magnitude(w / 10);
    if (!(m0 < 10 && m1 > 1.5 * m0) && !(m0 > 0.1 && m1 < m0 / 1.5)) break;
    for (let j = 1; j <= 40; j++) low.push(w * 10 ** (-j / 40));
    w /= 10;
    if (k === MAX_EXTENSION_DECADES - 1) warnings.push(`grid extended ${MAX_EXTENSION_DECADES} decades below the natural frequencies without settling`);
  }
  if (L.sampleTime === null) {
    w = base[base.length - 1]!;
    for (let k = 0; k < MAX_EXTENSION_DECADES; k++) {
      const m0 = loop.magnitude(w);
      const m1 = loop.magnitude(w * 10);
      if (!(m0 > 0.1 && m1 < m0 / 1.5) && !(m0 < 10 && m1 > 1.5 * m0)) break;
      for (let j = 1; j <= 40; j++) high.push(w * 10 ** (j / 40));
      w *= 10;
      if (k === MAX_EXTENSION_DECADES - 1) warnings.push(`grid extended ${MAX_EXTENSION_DECADES} decades above the natural frequencies without settling`);
    }
  }
  return [0, ...low.reverse(), ...base, ...high];
}

function peakOf(f: (w: number) => number, grid: number[], warnings: string[], what: string): Peak {
  const values = grid.map(f);
  const bad = values.findIndex((v) => !Number.isFinite(v));
  if (bad >= 0) {
    warnings.push(`${what} is unbounded at ${grid[bad]} rad/s (1 + L = 0: a closed-loop pole on the stability boundary); that point is skipped`);
    const keep = values.map((v) => Number.isFinite(v));
    return refinePeak((w) => (Number.isFinite(f(w)) ? f(w) : 0), grid.filter((_, k) => keep[k]), values.filter((_, k) => keep[k]), what);
  }
  return refinePeak(f, grid, values, what);
}

/** The ω → ∞ limit (continuous loops) replaces the peak when larger; it is reported at the top grid frequency. */
function withLimit(peak: Peak, limit: number, top: number): Peak {
  return limit > peak.value ? { value: limit, frequencyRadPerSec: top } : peak;
}

function wrapDegrees(x: number): number {
  const r = x - 360 * Math.ceil((x - 180) / 360);
  return r <= -180 ? r + 360 : r;
}

function addDistinct(list: number[], w: number): void {
  if (!list.some((x) => Math.abs(x - w) <= 1e-9 * Math.max(Math.abs(x), Math.abs(w)))) list.push(w);
}
