/**
 * Choice of the Padé degree m and the number of squarings s for expm: Al-Mohy & Higham 2009,
 * Algorithm 3.1, lines 1–16. Internal to linalg/ (expm.ts evaluates the chosen approximant).
 */
import { EngineError } from "../errors";
import { doubleArray, lastColumnSums, oneNormArray, productIntoArray } from "./arrayKernels";
import { estimateProductOneNorm } from "./normEstimate";

// θ_m: the largest θ with h̃_{2m+1}(θ)/θ ≤ u = 2^-53, where h_{2m+1}(x) = log(e^{-x} r_m(x)) =
// Σ_{k≥2m+1} c_k x^k and h̃ has coefficients |c_k| (Higham 2005, Table 2.3; the values were
// recalled from memory and then checked numerically: 150 exact rational series coefficients of
// log(e^{-x} p_m(x)/p_m(−x)) and a bisection in 50-digit arithmetic (mpmath) in
// test/fixtures/linalg/generate_expm_selection.py reproduce every digit below, and
// expmSelection.test.ts compares). WARNING: changing these changes every discretisation result
// the app stores.
export const THETA_3 = 1.495585217958292e-2;
export const THETA_5 = 2.539398330063230e-1;
export const THETA_7 = 9.504178996162932e-1;
export const THETA_9 = 2.097847961257068e0;
// Degree 13 uses 4.25, below the backward-error bound 5.371920351148152 that the same check
// gives for m = 13, as Algorithm 3.1 does (value recalled from memory; scipy 1.17's
// implementations of the algorithm use it too, which generate_expm_selection.py confirms by
// probing). The smaller value only adds squarings, never backward error.
export const THETA_13 = 4.25;
export const THETA_13_BOUND = 5.371920351148152;

// |c_{2m+1}|, the leading coefficient of h_{2m+1}, as reciprocals (they enter ℓ(A, m) of Al-Mohy
// & Higham 2009, Algorithm 3.1). Recalled from memory and checked with the same exact series:
// its leading terms are x^7/100800, x^11/10059033600, x^15/4487938430976000,
// x^19/5914384781877411840000 and x^27/113250775606021113483283660800000000.
export const LEADING_COEFFICIENT_RECIPROCALS: Readonly<Record<number, number>> = {
  3: 100800,
  5: 10059033600,
  7: 4487938430976000,
  9: 5914384781877411840000,
  13: 113250775606021113483283660800000000,
};
const LOG2_C: Readonly<Record<number, number>> = {
  3: -Math.log2(LEADING_COEFFICIENT_RECIPROCALS[3]!),
  5: -Math.log2(LEADING_COEFFICIENT_RECIPROCALS[5]!),
  7: -Math.log2(LEADING_COEFFICIENT_RECIPROCALS[7]!),
  9: -Math.log2(LEADING_COEFFICIENT_RECIPROCALS[9]!),
  13: -Math.log2(LEADING_COEFFICIENT_RECIPROCALS[13]!),
};

// Orders up to which ‖A⁸‖₁ and ‖A¹⁰‖₁ come from one explicit product: cheaper than the
// estimator below about this size (measured, Node 20: exact 13.5 µs against 16 µs at n = 32,
// 43 against 34 µs at n = 48).
const EXACT_POWER_NORMS_UP_TO = 40;

// Slots of the expm workspace (number[] of at least n² entries each) that the selection fills.
export const SLOT_A = 0, SLOT_A2 = 1, SLOT_A4 = 2, SLOT_A6 = 3, SLOT_A8 = 4, SLOT_SCRATCH = 5;

// Above this 1-norm A is first scaled by a power of two down to it, so that no power up to A¹⁰
// formed or estimated during the degree selection can overflow (2^900 < 2^1023); the extra
// squarings are added to s. Only inputs whose exponential is hopeless in double precision
// anyway (rotation angles or growth beyond 1e27) reach it.
const LARGEST_UNSCALED_NORM = 2 ** 90;

export type Triangle = "upper" | "lower" | "none";

/** Everything expm needs to know before evaluating r_m: see planExpm. */
export interface ExpmPlan extends PadeChoice {
  /** μ of the trace shift A − μI (0 when the shift does not lower ‖A‖₁). */
  traceShift: number;
  /** ‖A‖₁ of the input, for messages. */
  inputNorm: number;
  /** A − μI = 0, so e^A = e^μ I (the other fields are then meaningless). */
  zero: boolean;
  /** s of the Padé scaling 2^-s relative to slot 0 (squarings minus the pre-scaling). */
  padeSquarings: number;
  /** Power of two by which A was pre-scaled (‖A‖₁ > 2^90), included in squarings. */
  preScaling: number;
  /** ‖A‖₁ of the shifted, pre-scaled A in slot 0. */
  scaledNorm: number;
  /** Whether A is upper or lower triangular (for Code Fragment 2.1). */
  triangle: Triangle;
  /** Diagonal (n entries) then first off-diagonal (n − 1) of the shifted, unscaled triangular A. */
  bands: Float64Array | null;
}

/**
 * Prepares A in slots[0] (row-major n×n, overwritten) for the Padé evaluation: trace shift,
 * finiteness of ‖A‖₁, triangular structure, pre-scaling of huge norms, then the choice of
 * (m, s) with the powers left in slots 1–4 (choosePadeDegree). Throws "non-finite" (naming
 * `name`) when ‖A‖₁ overflows.
 */
export function planExpm(slots: readonly number[][], n: number, name: string): ExpmPlan {
  const nn = n * n;
  const a = slots[SLOT_A]!;
  // Preprocessing: trace reduction (Higham 2005, §2), kept only if it lowers the 1-norm.
  let mu = 0;
  for (let i = 0; i < n; i++) mu += a[i * n + i]!;
  mu /= n;
  const inputNorm = oneNormArray(a, n);
  let norm = inputNorm;
  if (mu !== 0) {
    // ‖A − μI‖₁ differs from ‖A‖₁ only through the diagonal: adjust each column sum.
    const shiftedNorm = oneNormShifted(a, n, mu);
    if (shiftedNorm < norm) {
      for (let i = 0; i < n; i++) a[i * n + i] -= mu;
      norm = shiftedNorm;
    } else {
      mu = 0;
    }
  }
  if (!Number.isFinite(norm)) {
    throw new EngineError("non-finite", `‖${name}‖₁ overflows the double range; e^${name} cannot be formed`, { argument: name });
  }
  const plan: ExpmPlan = {
    degree: 0, squarings: 0, highestPower: 0, traceShift: mu, inputNorm, zero: norm === 0, padeSquarings: 0,
    preScaling: 0, scaledNorm: norm, triangle: "none", bands: null,
  };
  if (plan.zero) return plan;
  plan.triangle = n > 1 ? triangularShape(a, n) : "none";
  if (plan.triangle !== "none") plan.bands = savedBands(a, n, plan.triangle);
  let preScaling = 0;
  if (norm > LARGEST_UNSCALED_NORM) {
    preScaling = Math.ceil(Math.log2(norm / LARGEST_UNSCALED_NORM));
    const factor = Math.pow(2, -preScaling); // powers of two: the scaling is exact
    for (let i = 0; i < nn; i++) a[i] *= factor;
    norm *= factor;
  }
  plan.preScaling = preScaling;
  plan.scaledNorm = norm;
  const choice = choosePadeDegree(slots, n, norm);
  plan.degree = choice.degree;
  plan.highestPower = choice.highestPower;
  plan.padeSquarings = choice.squarings;
  plan.squarings = choice.squarings + preScaling;
  return plan;
}

/**
 * (m, s, μ) that expm uses for the row-major n×n `a` (not modified): for tests that compare the
 * selection with a reference implementation. m = 0 when A − μI = 0.
 */
export function expmParameters(a: Float64Array, n: number): { degree: number; squarings: number; traceShift: number } {
  const slots: number[][] = [];
  for (let k = 0; k < 8; k++) slots.push(doubleArray(n * n));
  for (let i = 0; i < n * n; i++) slots[SLOT_A]![i] = a[i]!;
  const plan = planExpm(slots, n, "A");
  return { degree: plan.degree, squarings: plan.squarings, traceShift: plan.traceShift };
}

/**
 * 1-norm of A − μI for a row-major n×n `a`, without forming the shifted matrix: the column sums
 * of |A| (left in oneNormArray's scratch by the call just before) with |a_jj| replaced by
 * |a_jj − μ|.
 */
function oneNormShifted(a: number[], n: number, mu: number): number {
  const sums = lastColumnSums();
  let best = 0;
  for (let j = 0; j < n; j++) {
    const d = a[j * n + j]!;
    const sum = sums[j]! - Math.abs(d) + Math.abs(d - mu);
    if (sum > best || Number.isNaN(sum)) best = sum;
  }
  return best;
}

function triangularShape(a: number[], n: number): Triangle {
  let upper = true, lower = true;
  for (let i = 0; i < n && (upper || lower); i++) {
    const io = i * n;
    for (let j = 0; j < i && upper; j++) if (a[io + j] !== 0) upper = false;
    for (let j = i + 1; j < n && lower; j++) if (a[io + j] !== 0) lower = false;
  }
  return upper ? "upper" : lower ? "lower" : "none";
}

function savedBands(a: number[], n: number, triangle: Triangle): Float64Array {
  const saved = new Float64Array(2 * n - 1);
  for (let j = 0; j < n; j++) saved[j] = a[j * n + j]!;
  for (let j = 0; j + 1 < n; j++) saved[n + j] = triangle === "upper" ? a[j * n + j + 1]! : a[(j + 1) * n + j]!;
  return saved;
}

export interface PadeChoice {
  /** Padé degree m ∈ {3, 5, 7, 9, 13}. */
  degree: number;
  /** Number of squarings s (A is to be scaled by 2^-s). */
  squarings: number;
  /** Highest even power of A held in the workspace slots: 2, 4, 6 or 8. */
  highestPower: number;
}

/**
 * Chooses (m, s) for A in slots[0] (n×n row-major, ‖A‖₁ = normA > 0, ‖A‖₁ ≤ 2^90 so no
 * power up to A¹⁰ overflows), forming A², A⁴, A⁶, A⁸ in slots 1–4 as far as they are needed
 * (the evaluation reuses them).
 *
 * Method: Al-Mohy & Higham, "A new scaling and squaring algorithm for the matrix exponential",
 * SIAM J. Matrix Anal. Appl. 31(3):970–989, 2009, Algorithm 3.1 lines 1–16: the tests use
 * d_k = ‖A^k‖₁^{1/k}, η_1 = max(d_4, d_6) for m = 3, 5, η_3 = max(d_6, d_8) for m = 7, 9, and
 * s = max(⌈log₂(η_5/θ_13)⌉, 0) + ℓ(2^-s A, 13) with η_5 = min(η_3, max(d_8, d_10)); every
 * degree is accepted only if ℓ(A, m) = 0 (no overscaling correction needed). Refinements that
 * only save work (the first may replace one of the paper's estimates by the exact norm, which
 * the estimate never exceeds; the others leave every decision as it is):
 * - Norms of powers that are formed anyway are exact (scipy's sparse-matrix implementation of
 *   the algorithm also uses exact norms below n = 200); others are first bounded by
 *   submultiplicativity (‖A⁸‖ ≤ ‖A⁴‖², ‖A¹⁰‖ ≤ ‖A⁴‖‖A⁶‖, …) and formed (n ≤ 40) or estimated
 *   (`estimateProductOneNorm`) only when the bound cannot decide.
 * - α(2^-s A) = 2^-26s α(A) for m = 13, so s0 + ℓ(2^-s0 A, 13) = max(s0, ℓ(A, 13)); when the
 *   bound on s0 is already ≤ ℓ(A, 13), d_8 and d_10 are not needed at all.
 * - ‖|A|^{2m+1}‖₁ in ℓ stops early once Collatz–Wielandt bounds fix ℓ (overscalingCorrection).
 */
export function choosePadeDegree(slots: readonly number[][], n: number, normA: number): PadeChoice {
  const a = slots[SLOT_A]!;
  const norm2 = productNorm(slots, n, SLOT_A, SLOT_A, SLOT_A2);
  startAbsolutePowers(a, n, normA);
  // ‖A⁴‖, ‖A⁶‖, ‖A⁸‖ once known (−1: not yet); d_k bounds use ‖A^{i+j}‖ ≤ ‖A^i‖‖A^j‖.
  let norm4 = -1, norm6 = -1, norm8 = -1;
  let highest = 2;

  // m = 3 and m = 5 (lines 2–6): η = max(d_4, d_6) with d_4 ≤ ‖A²‖^{1/2}, d_6 ≤ ‖A²‖^{1/2}.
  for (let m = 3; m <= 5; m += 2) {
    const theta = m === 3 ? THETA_3 : THETA_5;
    if (Math.sqrt(norm2) > theta) {
      if (norm4 < 0) { norm4 = productNorm(slots, n, SLOT_A2, SLOT_A2, SLOT_A4); highest = 4; }
      if (Math.pow(norm4, 1 / 4) > theta) continue;
      if (Math.pow(norm2 * norm4, 1 / 6) > theta) {
        if (norm6 < 0) { norm6 = productNorm(slots, n, SLOT_A4, SLOT_A2, SLOT_A6); highest = 6; }
        if (Math.pow(norm6, 1 / 6) > theta) continue;
      }
    }
    if (overscalingCorrection(n, normA, m) === 0) return { degree: m, squarings: 0, highestPower: highest };
  }

  // m = 7 and m = 9 (lines 7–12): A⁶ formed (line 7), η_3 = max(d_6, d_8) with
  // d_8 ≤ min(‖A⁴‖², ‖A²‖‖A⁶‖)^{1/8} until ‖A⁸‖ is needed.
  if (norm4 < 0) norm4 = productNorm(slots, n, SLOT_A2, SLOT_A2, SLOT_A4);
  if (norm6 < 0) norm6 = productNorm(slots, n, SLOT_A4, SLOT_A2, SLOT_A6);
  highest = 6;
  const d6 = Math.pow(norm6, 1 / 6);
  let d8 = Math.pow(Math.min(norm4 * norm4, norm2 * norm6), 1 / 8);
  for (let m = 7; m <= 9; m += 2) {
    const theta = m === 7 ? THETA_7 : THETA_9;
    if (d6 > theta) continue;
    if (d8 > theta && norm8 < 0) {
      norm8 = powerNorm(slots, n, SLOT_A4, SLOT_A4, SLOT_A8);
      if (n <= EXACT_POWER_NORMS_UP_TO) highest = 8; // A⁸ now sits in its slot
      d8 = Math.pow(norm8, 1 / 8);
    }
    if (d8 > theta) continue;
    if (overscalingCorrection(n, normA, m) === 0) return { degree: m, squarings: 0, highestPower: highest };
  }

  // m = 13 (lines 13–16): s = s0 + ℓ(2^-s0 A, 13) = max(s0, ℓ(A, 13)).
  const ell13 = overscalingCorrection(n, normA, 13);
  let d10 = Math.pow(Math.min(norm4 * norm6, norm8 >= 0 ? norm2 * norm8 : Infinity), 1 / 10);
  let s0 = squaringsFor(Math.min(Math.max(d6, d8), Math.max(d8, d10)));
  if (s0 > ell13) {
    // The bounds overestimate s0 by enough to matter: take d_8 and d_10 themselves.
    if (norm8 < 0) { norm8 = powerNorm(slots, n, SLOT_A4, SLOT_A4, SLOT_A8); d8 = Math.pow(norm8, 1 / 8); }
    d10 = Math.pow(powerNorm(slots, n, SLOT_A4, SLOT_A6, SLOT_SCRATCH), 1 / 10);
    s0 = squaringsFor(Math.min(Math.max(d6, d8), Math.max(d8, d10)));
  }
  return { degree: 13, squarings: Math.max(s0, ell13), highestPower: highest };
}

// Smallest s ≥ 0 with 2^-s η ≤ θ_13 (line 15); 0 for η = 0 (nilpotent A).
function squaringsFor(eta: number): number {
  return Math.max(Math.ceil(Math.log2(eta / THETA_13)), 0);
}

// ‖A^i A^j‖₁ with the product formed into slot `target` (and kept there).
function productNorm(slots: readonly number[][], n: number, left: number, right: number, target: number): number {
  return oneNormArray(productIntoArray(slots[left]!, slots[right]!, null, n, n, n, slots[target]!), n);
}

// ‖A^i A^j‖₁ for the powers in slots `left` and `right`: by one product into slot `target` for
// small n (A⁸ then stays available to the degree-9 evaluation), else estimated.
function powerNorm(slots: readonly number[][], n: number, left: number, right: number, target: number): number {
  if (n <= EXACT_POWER_NORMS_UP_TO) return productNorm(slots, n, left, right, target);
  return estimateProductOneNorm([slots[left]!, slots[right]!], n);
}

/**
 * ℓ(A, m) = max(⌈log₂(α/u)/(2m)⌉, 0) with α = |c_{2m+1}| ‖|A|^{2m+1}‖₁ / ‖A‖₁ (Al-Mohy &
 * Higham 2009, Algorithm 3.1; formula recalled from memory, and the (m, s) it gives agree with
 * scipy's on every fixture of generate_expm_selection.py): the extra squarings that keep the relative
 * backward error of the leading term of h_{2m+1} below u. Evaluated in log₂ so that it cannot
 * overflow.
 *
 * ‖|A|^p‖₁ = max_j (eᵀ|A|^p)_j exactly, since |A| ≥ 0: the row vector r_k = eᵀ|A|^k is carried
 * forward one vector–matrix product at a time (2m+1 of them for the largest m, as the paper
 * notes), from the last p asked for. Cost-only shortcut: for B = |A| ≥ 0 and r_k ≥ 0 with
 * λ_min r_k ≤ r_k B ≤ λ_max r_k componentwise, induction gives λ_min^q r_k ≤ r_k B^q ≤ λ_max^q r_k
 * (the Collatz–Wielandt bounds, e.g. Horn & Johnson, "Matrix Analysis", §8.1, from memory),
 * so after k steps log₂‖|A|^p‖₁ lies within log₂ max_j (r_{k+1})_j + (p−k−1)·log₂[λ_min, λ_max]
 * with λ from the ratios (r_{k+1})_j/(r_k)_j. Once both ends give the same ℓ (with 1e-9 of
 * slack for rounding) that is ℓ, and the remaining products are skipped; for a positive |A|
 * the ratios settle within a few steps.
 */
function overscalingCorrection(n: number, normA: number, m: number): number {
  const p = 2 * m + 1;
  const offset = LOG2_C[m]! - Math.log2(normA) + 53; // log₂(α/u) = log₂‖|A|^p‖₁ + offset
  const ell = (log2Norm: number) => Math.max(Math.ceil((log2Norm + offset) / (2 * m)), 0); // −∞ gives 0
  while (absPower < p) {
    const [low, high] = stepAbsolutePowers(n, p);
    if (absPower < p && ell(low - 1e-9) === ell(high + 1e-9)) return ell(low);
  }
  return ell(absLog2Norm);
}

// State of the row vector r = eᵀ|A|^power (module level: the selection is synchronous and never
// re-entered; startAbsolutePowers resets it for each matrix). absLog2Norm = log₂ max_j r_j.
let absRow = doubleArray(0);
let absNext = doubleArray(0);
let absMatrix = absRow;
let absPower = 0;
let absLog2Scale = 0;
let absLog2Norm = 0;
let absRenormalise = false;
const absBounds: [number, number] = [0, 0];

// Starts r = eᵀ for the matrix a (kept by reference; it is not modified meanwhile).
function startAbsolutePowers(a: number[], n: number, normA: number): void {
  if (absRow.length < n) { absRow = doubleArray(n); absNext = doubleArray(n); }
  for (let j = 0; j < n; j++) absRow[j] = 1;
  absMatrix = a;
  absPower = 0;
  absLog2Scale = 0;
  absLog2Norm = 0;
  // ‖|A|^p‖₁ ≤ ‖A‖₁^p: below 2^±36 no power up to 27 leaves the double range, so the vector
  // needs no rescaling (underflow of a tiny power only makes ℓ = 0, which it is then anyway).
  absRenormalise = !(normA <= 2 ** 36);
}

// One step r ← r·|A|. Returns bounds [low, high] on log₂‖|A|^p‖₁ from the Collatz–Wielandt
// ratios of this step (see overscalingCorrection; −∞/+∞ where a ratio is undefined).
function stepAbsolutePowers(n: number, p: number): [number, number] {
  const r = absRow, next = absNext, a = absMatrix;
  // next = r·|A|: rows of |A| four at a time (the first sweep assigns, so no clearing pass)
  const n4 = n - (n % 4);
  for (let i = 0; i < n4; i += 4) {
    const o0 = i * n, o1 = o0 + n, o2 = o1 + n, o3 = o2 + n;
    const r0 = r[i]!, r1 = r[i + 1]!, r2 = r[i + 2]!, r3 = r[i + 3]!;
    if (i === 0) {
      for (let j = 0; j < n; j++) next[j] = r0 * Math.abs(a[o0 + j]!) + r1 * Math.abs(a[o1 + j]!) + r2 * Math.abs(a[o2 + j]!) + r3 * Math.abs(a[o3 + j]!);
    } else {
      for (let j = 0; j < n; j++) next[j] += r0 * Math.abs(a[o0 + j]!) + r1 * Math.abs(a[o1 + j]!) + r2 * Math.abs(a[o2 + j]!) + r3 * Math.abs(a[o3 + j]!);
    }
  }
  if (n4 === 0) for (let j = 0; j < n; j++) next[j] = 0;
  for (let i = n4; i < n; i++) {
    const o = i * n, ri = r[i]!;
    for (let j = 0; j < n; j++) next[j] += ri * Math.abs(a[o + j]!);
  }
  let big = 0, ratioLow = Infinity, ratioHigh = 0;
  for (let j = 0; j < n; j++) {
    const x = next[j]!, y = r[j]!;
    if (x > big) big = x;
    if (y > 0) {
      const ratio = x / y;
      if (ratio < ratioLow) ratioLow = ratio;
      if (ratio > ratioHigh) ratioHigh = ratio;
    } else if (x > 0) {
      ratioLow = 0; ratioHigh = Infinity; // r_j = 0 < (r|A|)_j: no multiplicative bound
    }
  }
  if (ratioLow === Infinity) ratioLow = 0; // r = 0
  absPower++;
  absLog2Norm = Math.log2(big) + absLog2Scale; // −∞ when |A|^power = 0
  if (absRenormalise && big > 0) {
    const inv = 1 / big;
    for (let j = 0; j < n; j++) next[j] *= inv;
    absLog2Scale += Math.log2(big);
  }
  absRow = next;
  absNext = r;
  const remaining = p - absPower;
  absBounds[0] = remaining === 0 ? absLog2Norm : absLog2Norm + remaining * Math.log2(ratioLow);
  absBounds[1] = remaining === 0 ? absLog2Norm : absLog2Norm + remaining * Math.log2(ratioHigh);
  return absBounds;
}
