/**
 * Root locus of a single-loop system: the closed-loop poles of u = −k·y around the loop
 * transfer L(s) = c(sI − A)⁻¹b + d as the gain k runs from 0 to a maximum, traced as smooth
 * branches, with the classical construction data (asymptotes, break points, stability-boundary
 * crossings) computed from the model.
 *
 * The checks of a request and its options live in `rootLocusOptions.ts`, the construction data
 * (asymptotes, break points, crossings) in `locusConstruction.ts`, the loop evaluated at one point
 * (and `gainAtPoint`) in `loopEvaluation.ts`; this file traces the branches. `gainAtPoint` and
 * `RootLocusOptions` are re-exported so that `analysis/rootLocus` stays their import path.
 */
import { EngineError } from "../errors";
import { eigenvalues, type Complex } from "../linalg";
import { sisoZerosAndGain, type StateSpace } from "../model";
import { dist, findBreakPoints, findCrossings, locusAsymptotes } from "./locusConstruction";
import { DEFAULT_TRACE_OPTIONS, matchPoles, poleSpread, tracePoles } from "./poleTracker";
import { checkRootLocusRequest, type RootLocusOptions } from "./rootLocusOptions";

export { gainAtPoint } from "./loopEvaluation";
export type { RootLocusOptions } from "./rootLocusOptions";

export interface RootLocus {
  /** Gains k (negative when negativeGain), starting at 0, increasing in |k|. */
  gains: number[];
  /** branches[b][k]: closed-loop pole b at gains[k]. */
  branches: Complex[][];
  /** Centroid (Σp − Σz)/(n − m) and angles; centroid null when n = m (no asymptotes). */
  asymptotes: { centroid: number | null; anglesDeg: number[] };
  /** Real points where branches meet and leave (or enter) the real axis, with their gain. */
  breakPoints: { point: Complex; gain: number }[];
  /** Crossings of the imaginary axis (continuous) or the unit circle (sampled). */
  crossings: { point: Complex; gain: number }[];
  openLoopPoles: Complex[];
  openLoopZeros: Complex[];
  negativeGain: boolean;
  /** Remarks: where maxGain came from, forced steps at break points, capped ranges. */
  notes: string[];
}

const MAX_GAIN_DECADES = 40;

/**
 * Computes: the closed-loop poles λ(k) = eig(A − k/(1 + k d)·b c) of the loop L(s) =
 *   c(sI − A)⁻¹b + d (A: n×n, b: n×1, c: 1×n) under u = −k·y, for k ∈ [0, maxGain] (or
 *   [−maxGain, 0] with negativeGain), so that 1 + k L(λ) = 0. Also: open-loop poles and zeros;
 *   asymptote centroid (Σp − Σz)/(n − m) and angles (2q + 1)·180°/(n − m) (or q·360°/(n − m)
 *   when the sign of k times the loop's high-frequency gain is negative), q = 0…n−m−1;
 *   break points: real roots of dK/ds = 0 with K(s) = −1/L(s) (equivalently L'(s) = 0) at
 *   which K has the sign of the locus; crossings of the stability boundary (Re s = 0, or
 *   |z| = 1 when sampled) with their gain.
 * Requires: a single-input single-output model with n ≥ 1 and L ≢ 0; maxGain finite > 0;
 *   pointsPerBranch an integer in [2, 100000].
 * Method: eigenvalues by balanced Francis QR at each gain; continuation in log|k| with
 *   predictor–corrector steps and minimal-distance matching (`tracePoles`), started at a gain
 *   10⁻⁹·k₀ (k₀ = scaleⁿ⁻ᵐ/|g|) and matched to eig(A) at k = 0. Break points by sign changes of
 *   L' on a grid of the real axis refined by bisection; crossings by bisection on k of the real
 *   part (continuous) or |z| − 1 (sampled) of the branch. Construction rules as in W. R. Evans,
 *   "Control system synthesis by root locus method", Trans. AIEE 69, 1950.
 * Cost: one n×n eigenvalue problem (≈ 10n³ flops) per trial gain; typically a few hundred
 *   gains, plus ≈ 60 per crossing; break points O(n³) per grid point (≈ 600 points).
 * Accuracy: every locus point is an eigenvalue set with backward error O(ε‖A − k b c‖); for
 *   very large k the poles near zeros lose accuracy in proportion to k‖bc‖. Crossing gains are
 *   bisected to 1e-13 relative; break points to 1e-14·scale.
 * Errors: "invalid-argument" (not SISO, n = 0, L ≡ 0, bad options), "no-convergence" (tracing
 *   or eigenvalue iteration caps), "cancelled" (the optional `isCancelled` returned true).
 * Example: rootLocus(k/(s(s+1)(s+2))).crossings → ±j√2 at k = 6; check |k − 6| < 1e-8.
 */
export function rootLocus(L: StateSpace, options: RootLocusOptions = {}): RootLocus {
  const n = L.A.rows;
  const { negativeGain, points } = checkRootLocusRequest(L, options);
  const b = L.B.getColumn(0);
  const c = L.C.getRow(0);
  const d = L.D.get(0, 0);
  const { zeros, gain: highFrequencyGain } = sisoZerosAndGain(L.A, b, c, d);
  if (highFrequencyGain === 0) throw new EngineError("invalid-argument", "the loop transfer c(sI − A)⁻¹b + d is identically zero: every gain leaves the poles where they are", {});
  const poles = eigenvalues(L.A);
  const notes: string[] = [];
  const sign = negativeGain ? -1 : 1;
  const sampled = L.sampleTime !== null;
  const relativeDegree = n - zeros.length;
  const scale = locusScale(poles, zeros, sampled);
  const closedLoop = (k: number): Complex[] => {
    const f = k / (1 + k * d);
    const M = L.A.clone();
    for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) M.set(i, j, M.get(i, j) - f * b[i]! * c[j]!);
    return eigenvalues(M);
  };

  // Asymptotes: the angle rule depends on the sign of k·g (g the high-frequency gain).
  const asymptotes = locusAsymptotes(poles, zeros, relativeDegree, sign * Math.sign(highFrequencyGain) < 0);
  if (relativeDegree <= 0) notes.push("relative degree 0: every branch ends at a finite zero, no asymptotes");

  // Gain range. 1 + k·d = 0 sends poles to infinity: stop just before it.
  const k0 = Math.pow(scale, relativeDegree) / Math.abs(highFrequencyGain);
  const gainCap = d !== 0 && sign * d < 0 ? (1 - 1e-6) / Math.abs(d) : Infinity;
  let maxGain = options.maxGain ?? autoMaxGain(closedLoop, sign, k0, zeros, asymptotes.centroid ?? 0, scale, relativeDegree, gainCap, notes);
  if (maxGain >= gainCap) {
    maxGain = gainCap;
    notes.push(`|k| is capped below 1/|d| = ${1 / Math.abs(d)}, where 1 + k·d = 0 and the loop is ill-posed`);
  }
  const kLow = Math.min(1e-9 * k0, 1e-6 * maxGain);
  const atLog = (s: number): Complex[] => closedLoop(sign * Math.exp(s));
  const start = matchPoles(poles, atLog(Math.log(kLow)));
  const onProgress = options.onProgress ?? ((): void => undefined);
  const isCancelled = options.isCancelled;
  onProgress(0);
  const trace = tracePoles(atLog, start, Math.log(kLow), Math.log(maxGain), {
    ...DEFAULT_TRACE_OPTIONS,
    scale,
    ...(isCancelled ? { isCancelled } : {}),
    onProgress: (f) => onProgress(0.8 * f),
  });
  if (trace.forcedSteps > 0) notes.push(`${trace.forcedSteps} step(s) taken at the minimum step where poles meet (break points)`);
  let gains = [0, ...trace.params.map((s) => sign * Math.exp(s))];
  let branches = poles.map((p, i) => [p, ...trace.branches[i]!]);
  gains[gains.length - 1] = sign * maxGain;
  ({ gains, branches } = densify(gains, branches, points, closedLoop));
  if (isCancelled?.()) throw new EngineError("cancelled", "root locus cancelled after tracing the branches", {});
  onProgress(0.85);
  const breakPoints = findBreakPoints(L, poles, zeros, scale, sign);
  if (isCancelled?.()) throw new EngineError("cancelled", "root locus cancelled after the break points", {});
  onProgress(0.9);
  const crossings = findCrossings(gains, branches, closedLoop, sampled);
  onProgress(1);

  return {
    gains,
    branches,
    asymptotes,
    breakPoints,
    crossings,
    openLoopPoles: poles,
    openLoopZeros: zeros,
    negativeGain,
    notes,
  };
}

// Length scale of the plot: the spread of the poles and zeros about their mean (their largest
// magnitude, or 1, when they coincide); at least 1 when sampled.
function locusScale(poles: Complex[], zeros: Complex[], sampled: boolean): number {
  const scale = poleSpread([...poles, ...zeros]);
  return sampled ? Math.max(scale, 1) : scale; // the unit circle belongs to the picture
}

// Smallest |k| = k0·10^j at which every finite zero has a pole within 1 % of the scale and the
// remaining poles lie 3 scales from the centroid (they have joined the asymptotes).
function autoMaxGain(closedLoop: (k: number) => Complex[], sign: number, k0: number, zeros: Complex[], centroid: number, scale: number, relativeDegree: number, cap: number, notes: string[]): number {
  let k = k0;
  for (let decade = 0; decade < MAX_GAIN_DECADES; decade++, k *= 10) {
    if (k >= cap) return cap; // the caller notes the cap
    const poles = closedLoop(sign * k);
    const free = [...poles];
    let ok = true;
    for (const z of zeros) {
      let best = 0;
      for (let i = 1; i < free.length; i++) if (dist(free[i]!, z) < dist(free[best]!, z)) best = i;
      if (dist(free[best]!, z) > 0.01 * scale) ok = false;
      free.splice(best, 1);
    }
    if (relativeDegree > 0 && free.some((p) => Math.hypot(p.re - centroid, p.im) < 3 * scale)) ok = false;
    if (ok) return k;
  }
  notes.push(`maxGain stopped at ${k / 10}: the branches had not reached the zeros and asymptotes within ${MAX_GAIN_DECADES} decades`);
  return k / 10;
}

// Doubles the point count by inserting midpoint gains (matched to the interpolated branch
// position) until there are at least `points` gains.
function densify(gains: number[], branches: Complex[][], points: number, closedLoop: (k: number) => Complex[]): { gains: number[]; branches: Complex[][] } {
  while (gains.length < points) {
    const newGains: number[] = [gains[0]!];
    const newBranches = branches.map((br) => [br[0]!]);
    for (let k = 0; k + 1 < gains.length; k++) {
      const mid = gains[k] === 0 ? gains[k + 1]! / 2 : Math.sign(gains[k]!) * Math.sqrt(gains[k]! * gains[k + 1]!);
      const guess = branches.map((br) => ({ re: (br[k]!.re + br[k + 1]!.re) / 2, im: (br[k]!.im + br[k + 1]!.im) / 2 }));
      const matched = matchPoles(guess, closedLoop(mid));
      newGains.push(mid, gains[k + 1]!);
      newBranches.forEach((br, i) => br.push(matched[i]!, branches[i]![k + 1]!));
    }
    gains = newGains;
    branches = newBranches;
  }
  return { gains, branches };
}
