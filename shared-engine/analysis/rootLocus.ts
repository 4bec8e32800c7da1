/**
 * Root locus of a single-loop system: the closed-loop poles of u = −k·y around the loop
 * transfer L(s) = c(sI − A)⁻¹b + d as the gain k runs from 0 to a maximum, traced as smooth
 * branches, with the classical construction data (asymptotes, break points, stability-boundary
 * crossings) computed from the model.
 */
import { EngineError } from "../errors";
import { eigenvalues, type Complex } from "../linalg";
import { sisoZerosAndGain, type StateSpace } from "../model";
import { DEFAULT_TRACE_OPTIONS, matchPoles, tracePoles } from "./poleTracker";

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

export interface RootLocusOptions {
  negativeGain?: boolean;
  /** Largest |k|; default: where every finite zero has a pole within 1 % of the scale and the
   * other poles are 3 scales from the centroid. */
  maxGain?: number;
  /** Least number of gains (points per branch); default 200. */
  pointsPerBranch?: number;
  /** Checked between eigenvalue evaluations; returning true stops with kind "cancelled". */
  isCancelled?: () => boolean;
  /** Fraction done in [0, 1], non-decreasing: tracing up to 0.8, then break points and crossings. */
  onProgress?: (fraction: number) => void;
}

const MAX_CROSSING_BISECTIONS = 200;
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
  if (L.B.columns !== 1 || L.C.rows !== 1) {
    throw new EngineError("invalid-argument", `the root locus needs a single-input single-output loop (this model has ${L.B.columns} inputs and ${L.C.rows} outputs)`, {
      inputs: L.B.columns,
      outputs: L.C.rows,
    });
  }
  if (n === 0) throw new EngineError("invalid-argument", "the loop has no states: a static gain has no root locus", {});
  const negativeGain = options.negativeGain ?? false;
  const points = options.pointsPerBranch ?? 200;
  if (!Number.isInteger(points) || points < 2 || points > 100_000) {
    throw new EngineError("invalid-argument", `pointsPerBranch must be an integer from 2 to 100000, not ${points}`, { argument: "pointsPerBranch" });
  }
  if (options.maxGain !== undefined && !(Number.isFinite(options.maxGain) && options.maxGain > 0)) {
    throw new EngineError("invalid-argument", `maxGain must be a finite positive number (|k| at the end of the locus), not ${options.maxGain}`, { argument: "maxGain" });
  }
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
  const effectiveNegative = sign * Math.sign(highFrequencyGain) < 0;
  const asymptotes = { centroid: null as number | null, anglesDeg: [] as number[] };
  if (relativeDegree > 0) {
    const sum = poles.reduce((s, p) => s + p.re, 0) - zeros.reduce((s, z) => s + z.re, 0);
    asymptotes.centroid = sum / relativeDegree;
    asymptotes.anglesDeg = Array.from({ length: relativeDegree }, (_, q) => (effectiveNegative ? (q * 360) / relativeDegree : ((2 * q + 1) * 180) / relativeDegree));
  } else notes.push("relative degree 0: every branch ends at a finite zero, no asymptotes");

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

/**
 * Computes: k = −1/L(s) for a point s of the complex plane (the gain that would put a
 *   closed-loop pole at s), returned as its real part `gain`, and `onLocusError` =
 *   |Im k|/|k|, the sine of the angle by which s misses the angle condition (0 on the locus
 *   of positive or negative gain).
 * Requires: SISO model; s finite and not a zero of L. At an open-loop pole the gain is 0.
 * Method: one complex LU solve of (sI − A)x = b with partial pivoting; L = c x + d.
 * Cost: ≈ (8/3)n³ real flops. Accuracy: backward stable solve; relative error ≈ κ(sI − A)·ε.
 * Errors: "invalid-argument" (not SISO; s is a zero of L), "non-finite" (s not finite).
 * Example: for 1/(s(s+1)(s+2)) at s = j√2: gain 6, onLocusError < 1e-15.
 */
export function gainAtPoint(L: StateSpace, s: Complex): { gain: number; onLocusError: number } {
  if (L.B.columns !== 1 || L.C.rows !== 1) {
    throw new EngineError("invalid-argument", `gainAtPoint needs a single-input single-output loop (this model has ${L.B.columns} inputs and ${L.C.rows} outputs)`, {});
  }
  if (!s || !Number.isFinite(s.re) || !Number.isFinite(s.im)) {
    throw new EngineError("non-finite", `s must be a finite complex number {re, im}, not ${JSON.stringify(s)}`, { argument: "s" });
  }
  const value = evaluateLoop(L, s);
  if (value === null) return { gain: 0, onLocusError: 0 }; // s is an open-loop pole: k = 0
  const mag2 = value.re * value.re + value.im * value.im;
  if (mag2 === 0) {
    throw new EngineError("invalid-argument", `s = ${s.re}${s.im >= 0 ? "+" : "−"}${Math.abs(s.im)}j is a zero of the loop: no finite gain puts a pole there`, { argument: "s" });
  }
  // k = −1/L = −conj(L)/|L|²
  const k = { re: -value.re / mag2, im: value.im / mag2 };
  return { gain: k.re, onLocusError: Math.abs(k.im) / Math.hypot(k.re, k.im) };
}

function locusScale(poles: Complex[], zeros: Complex[], sampled: boolean): number {
  const all = [...poles, ...zeros];
  const mean = all.reduce((s, p) => ({ re: s.re + p.re / all.length, im: s.im + p.im / all.length }), { re: 0, im: 0 });
  let spread = 0;
  let magnitude = 0;
  for (const p of all) {
    spread = Math.max(spread, Math.hypot(p.re - mean.re, p.im - mean.im));
    magnitude = Math.max(magnitude, Math.hypot(p.re, p.im));
  }
  let scale = spread > 0 ? spread : magnitude > 0 ? magnitude : 1;
  if (sampled) scale = Math.max(scale, 1); // the unit circle belongs to the picture
  return scale;
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

const dist = (a: Complex, b: Complex): number => Math.hypot(a.re - b.re, a.im - b.im);

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

function findCrossings(gains: number[], branches: Complex[][], closedLoop: (k: number) => Complex[], sampled: boolean): { point: Complex; gain: number }[] {
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

// Real-axis break points: sign changes of L'(x) between the real poles and zeros, refined by
// bisection, kept when K(x) = −1/L(x) has the sign of the locus (so x lies on it).
function findBreakPoints(L: StateSpace, poles: Complex[], zeros: Complex[], scale: number, sign: number): { point: Complex; gain: number }[] {
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

/** L(s) = c(sI − A)⁻¹b + d at complex s, or null when sI − A is exactly singular (s a pole). */
function evaluateLoop(L: StateSpace, s: Complex): Complex | null {
  const n = L.A.rows;
  const re = new Float64Array(n * n);
  const im = new Float64Array(n * n);
  const xr = new Float64Array(n);
  const xi = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < n; j++) re[i * n + j] = (i === j ? s.re : 0) - L.A.get(i, j);
    im[i * n + i] = s.im;
    xr[i] = L.B.get(i, 0);
  }
  // Gaussian elimination with partial pivoting (Golub & Van Loan, Alg. 3.4.1) in complex form.
  for (let k = 0; k < n; k++) {
    let piv = k;
    for (let i = k + 1; i < n; i++) if (Math.hypot(re[i * n + k]!, im[i * n + k]!) > Math.hypot(re[piv * n + k]!, im[piv * n + k]!)) piv = i;
    if (re[piv * n + k] === 0 && im[piv * n + k] === 0) return null;
    if (piv !== k) {
      for (let j = 0; j < n; j++) {
        swap(re, k * n + j, piv * n + j);
        swap(im, k * n + j, piv * n + j);
      }
      swap(xr, k, piv);
      swap(xi, k, piv);
    }
    const pr = re[k * n + k]!;
    const pi = im[k * n + k]!;
    const p2 = pr * pr + pi * pi;
    for (let i = k + 1; i < n; i++) {
      const ar = re[i * n + k]!;
      const ai = im[i * n + k]!;
      const lr = (ar * pr + ai * pi) / p2;
      const li = (ai * pr - ar * pi) / p2;
      if (lr === 0 && li === 0) continue;
      for (let j = k + 1; j < n; j++) {
        const br = re[k * n + j]!;
        const bi = im[k * n + j]!;
        re[i * n + j] -= lr * br - li * bi;
        im[i * n + j] -= lr * bi + li * br;
      }
      const yr = xr[k]!;
      const yi = xi[k]!;
      xr[i] -= lr * yr - li * yi;
      xi[i] -= lr * yi + li * yr;
    }
  }
  for (let k = n - 1; k >= 0; k--) {
    let sr = xr[k]!;
    let si = xi[k]!;
    for (let j = k + 1; j < n; j++) {
      sr -= re[k * n + j]! * xr[j]! - im[k * n + j]! * xi[j]!;
      si -= re[k * n + j]! * xi[j]! + im[k * n + j]! * xr[j]!;
    }
    const pr = re[k * n + k]!;
    const pi = im[k * n + k]!;
    const p2 = pr * pr + pi * pi;
    xr[k] = (sr * pr + si * pi) / p2;
    xi[k] = (si * pr - sr * pi) / p2;
  }
  let vr = L.D.get(0, 0);
  let vi = 0;
  for (let j = 0; j < n; j++) {
    vr += L.C.get(0, j) * xr[j]!;
    vi += L.C.get(0, j) * xi[j]!;
  }
  return Number.isFinite(vr) && Number.isFinite(vi) ? { re: vr, im: vi } : null;
}

/** L(x) and L'(x) = −c(xI − A)⁻²b at real x (one LU, two solves); null when singular. */
function realLoopAndDerivative(L: StateSpace, x: number): { value: number; derivative: number } | null {
  const n = L.A.rows;
  const M = new Float64Array(n * n);
  for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) M[i * n + j] = (i === j ? x : 0) - L.A.get(i, j);
  const perm = Int32Array.from({ length: n }, (_, i) => i);
  for (let k = 0; k < n; k++) {
    let piv = k;
    for (let i = k + 1; i < n; i++) if (Math.abs(M[i * n + k]!) > Math.abs(M[piv * n + k]!)) piv = i;
    if (M[piv * n + k] === 0) return null;
    if (piv !== k) {
      for (let j = 0; j < n; j++) swap(M, k * n + j, piv * n + j);
      const t = perm[k]!;
      perm[k] = perm[piv]!;
      perm[piv] = t;
    }
    for (let i = k + 1; i < n; i++) {
      const l = (M[i * n + k]! /= M[k * n + k]!);
      if (l !== 0) for (let j = k + 1; j < n; j++) M[i * n + j] -= l * M[k * n + j]!;
    }
  }
  const solve = (rhs: Float64Array): Float64Array => {
    const y = Float64Array.from(perm, (p) => rhs[p]!);
    for (let i = 0; i < n; i++) for (let j = 0; j < i; j++) y[i] -= M[i * n + j]! * y[j]!;
    for (let i = n - 1; i >= 0; i--) {
      for (let j = i + 1; j < n; j++) y[i] -= M[i * n + j]! * y[j]!;
      y[i] /= M[i * n + i]!;
    }
    return y;
  };
  const y = solve(Float64Array.from({ length: n }, (_, i) => L.B.get(i, 0)));
  const z = solve(y);
  let value = L.D.get(0, 0);
  let derivative = 0;
  for (let j = 0; j < n; j++) {
    value += L.C.get(0, j) * y[j]!;
    derivative -= L.C.get(0, j) * z[j]!;
  }
  return Number.isFinite(value) && Number.isFinite(derivative) ? { value, derivative } : null;
}

function swap(a: Float64Array, i: number, j: number): void {
  const t = a[i]!;
  a[i] = a[j]!;
  a[j] = t;
}
