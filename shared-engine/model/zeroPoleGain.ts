/**
 * Zero-pole-gain entry G(s) = k·∏(s − z_i)/∏(s − p_i): its realization as a series of real
 * first- and second-order sections (one input, one output), and the realization of a matrix of
 * such entries (several inputs and outputs) through their transfer functions.
 */
import { EngineError } from "../errors";
import type { Complex } from "../linalg";
import { checkSampleTime } from "./stateSpace";
import type { StateSpace } from "./stateSpace";
import { series } from "./interconnect";
import { polynomialFromRoots } from "./polynomial";
import { realizeTransferFunction, type TransferFunction } from "./transferFunction";

export interface ZeroPoleGain {
  zeros: Complex[];
  poles: Complex[];
  gain: number;
  sampleTime: number | null;
}

// Pairing tolerance for conjugates: values typed by hand are exact conjugates; values computed
// elsewhere differ by rounding. √ε relative accepts the latter and still rejects typos.
const CONJUGATE_TOLERANCE = Math.sqrt(Number.EPSILON);

/**
 * Computes: a validated copy of the zero-pole-gain data with every complex value paired with
 *   its conjugate (pairs replaced by exact conjugates, their average), reals first.
 * Requires: finite values; each non-real value has a partner within √ε·max(1, |z|) of its
 *   conjugate; number of zeros ≤ number of poles (proper); finite gain.
 * Method: greedy nearest pairing. Cost: O(N²) in the number of roots. Accuracy: pairs move by
 *   at most half the allowed mismatch.
 * Errors: "non-finite" (NaN/Infinity), "invalid-argument" (unpaired complex value, improper,
 *   bad sample time).
 * Example: createZeroPoleGain([], [{re:-1,im:1},{re:-1,im:-1}], 2).poles → the same pair.
 */
export function createZeroPoleGain(zeros: Complex[], poles: Complex[], gain: number, sampleTime: number | null = null): ZeroPoleGain {
  const z = pairConjugates(zeros, "zeros");
  const p = pairConjugates(poles, "poles");
  if (typeof gain !== "number" || !Number.isFinite(gain)) {
    throw new EngineError("non-finite", `gain is ${gain}; it must be a finite number`, { argument: "gain" });
  }
  if (z.length > p.length) {
    throw new EngineError("invalid-argument", `improper zero-pole-gain model (${z.length} zeros > ${p.length} poles)`, { zeros: z.length, poles: p.length });
  }
  return { zeros: z, poles: p, gain, sampleTime: checkSampleTime(sampleTime) };
}

/**
 * Computes: a state-space model (n = number of poles, one input, one output) with transfer
 *   function k·∏(s − z_i)/∏(s − p_i).
 * Requires: valid data (see createZeroPoleGain).
 * Method: poles grouped into real second-order factors (each complex pair, then real poles
 *   two at a time) and at most one first-order factor; zeros likewise; complex zero pairs go
 *   to second-order sections first, then real zero pairs, then a single real zero to the
 *   first-order section or an unused second-order one (always possible when the model is
 *   proper). Each section is realized in controller form and the sections are connected in
 *   series; the gain is applied in the first section. This avoids expanding ∏(s − p_i) into a
 *   single high-degree polynomial, whose coefficients are badly conditioned (the "cascade"
 *   or second-order-section structure: A. V. Oppenheim & R. W. Schafer, "Discrete-Time
 *   Signal Processing", §6.3, from memory).
 * Cost: O(n²) (the series connection builds block-triangular matrices).
 * Accuracy: each section's coefficients are formed with one or two roundings; the eigenvalues
 *   of A are the given poles to within a few ε·|p| for well-separated poles.
 * Errors: those of createZeroPoleGain.
 * Example: realizeZeroPoleGain(createZeroPoleGain([{re:-3,im:0}], [{re:-1,im:0},{re:-2,im:0}], 1))
 *   has G(0) = 1.5; check against C(−A)⁻¹B + D.
 */
export function realizeZeroPoleGain(zpk: ZeroPoleGain): StateSpace {
  const { zeros, poles, gain, sampleTime } = createZeroPoleGain(zpk.zeros, zpk.poles, zpk.gain, zpk.sampleTime);
  const quadraticPoles = factorPairs(poles);
  const linearPole = quadraticPoles.leftover;
  const quadraticZeros = factorPairs(zeros);
  const sections: { num: number[]; den: number[] }[] = quadraticPoles.factors.map((den) => ({ num: [1], den }));
  if (linearPole !== null) sections.push({ num: [1], den: linearPole });
  quadraticZeros.factors.forEach((num, k) => (sections[k]!.num = num)); // complex pairs first (factorPairs order)
  if (quadraticZeros.leftover !== null) {
    const target = linearPole !== null ? sections.length - 1 : quadraticZeros.factors.length;
    sections[target]!.num = quadraticZeros.leftover;
  }
  if (sections.length === 0) sections.push({ num: [1], den: [1] });
  sections[0]!.num = sections[0]!.num.map((c) => c * gain);
  let model = realizeTransferFunction({ ...sections[0]!, sampleTime });
  for (let k = 1; k < sections.length; k++) {
    model = series(model, realizeTransferFunction({ ...sections[k]!, sampleTime }));
  }
  return model;
}

/** Real factors: complex pairs → s² − 2Re s + |z|², then reals two at a time, one left over. */
function factorPairs(roots: Complex[]): { factors: number[][]; leftover: number[] | null } {
  const factors: number[][] = [];
  const reals: number[] = [];
  for (const r of roots) {
    if (r.im > 0) factors.push([1, -2 * r.re, r.re * r.re + r.im * r.im]);
    else if (r.im === 0) reals.push(r.re);
  }
  for (let k = 0; k + 1 < reals.length; k += 2) factors.push([1, -(reals[k]! + reals[k + 1]!), reals[k]! * reals[k + 1]!]);
  return { factors, leftover: reals.length % 2 === 1 ? [1, -reals[reals.length - 1]!] : null };
}

function pairConjugates(values: Complex[], name: string): Complex[] {
  if (!Array.isArray(values)) throw new EngineError("invalid-argument", `${name} must be a list of complex numbers {re, im}`, { argument: name });
  values.forEach((v, i) => {
    if (v === null || typeof v !== "object" || typeof v.re !== "number" || typeof v.im !== "number") {
      throw new EngineError("invalid-argument", `${name}[${i}] must be a complex number {re, im}`, { argument: name, index: i });
    }
    if (!Number.isFinite(v.re) || !Number.isFinite(v.im)) {
      throw new EngineError("non-finite", `${name}[${i}] is ${v.re}${v.im >= 0 ? "+" : ""}${v.im}j; it must be finite`, { argument: name, index: i });
    }
  });
  const reals = values.filter((v) => v.im === 0).map((v) => ({ re: v.re, im: 0 }));
  const lower = values.map((v, i) => ({ v, i })).filter((e) => e.v.im < 0);
  const pairs: Complex[] = [];
  for (const [i, v] of values.entries()) {
    if (v.im <= 0) continue;
    let best = -1;
    let bestDistance = Infinity;
    lower.forEach((e, k) => {
      const d = Math.hypot(e.v.re - v.re, e.v.im + v.im);
      if (d < bestDistance) {
        bestDistance = d;
        best = k;
      }
    });
    if (best < 0 || bestDistance > CONJUGATE_TOLERANCE * Math.max(1, Math.hypot(v.re, v.im))) {
      throw new EngineError("invalid-argument", `${name}[${i}] = ${v.re}+${v.im}j has no conjugate partner ${v.re}${-v.im}j; complex ${name} must come in conjugate pairs`, { argument: name, index: i });
    }
    const partner = lower.splice(best, 1)[0]!.v;
    const re = (v.re + partner.re) / 2;
    const im = (v.im - partner.im) / 2;
    pairs.push({ re, im }, { re, im: -im });
  }
  if (lower.length > 0) {
    const { v, i } = lower[0]!;
    throw new EngineError("invalid-argument", `${name}[${i}] = ${v.re}${v.im}j has no conjugate partner ${v.re}+${-v.im}j; complex ${name} must come in conjugate pairs`, { argument: name, index: i });
  }
  return [...reals, ...pairs];
}

/**
 * Computes: the transfer function num(s)/den(s) of one zero-pole-gain entry, coefficients
 *   highest power first: num = k·∏(s − z_i) (degree = number of zeros; [0] when k = 0),
 *   den = ∏(s − p_j) (monic, degree = number of poles).
 * Requires: valid data (see createZeroPoleGain).
 * Method: createZeroPoleGain pairs the conjugates; the roots are then put in a fixed order
 *   (real roots ascending, then the pairs by real part and imaginary part) and multiplied out
 *   by linear and real quadratic factors (polynomialFromRoots). The fixed order makes equal
 *   root sets give bit-identical coefficients, so realizeTransferFunction recognises entries of
 *   one input column that share their poles and gives them one companion block.
 * Cost: O(N²) in the number of roots.
 * Accuracy: each factor is formed with at most two roundings and the expansion is backward
 *   stable in the factors; the coefficients of a high-degree polynomial are nevertheless
 *   sensitive to its roots, which is why the single-entry realizeZeroPoleGain keeps sections.
 * Errors: those of createZeroPoleGain ("non-finite", "invalid-argument").
 * Example: zeroPoleGainToTransferFunction(createZeroPoleGain([{re:-3,im:0}], [{re:-1,im:0},{re:-2,im:0}], 2))
 *   → num [2, 6], den [1, 3, 2]; check num(0)/den(0) = 3 = 2·3/(1·2).
 */
export function zeroPoleGainToTransferFunction(zpk: ZeroPoleGain): TransferFunction {
  const { zeros, poles, gain, sampleTime } = createZeroPoleGain(zpk.zeros, zpk.poles, zpk.gain, zpk.sampleTime);
  const den = polynomialFromRoots(canonicalOrder(poles));
  const num = gain === 0 ? [0] : polynomialFromRoots(canonicalOrder(zeros)).map((x) => x * gain);
  return { num, den, sampleTime };
}

/**
 * Computes: a state-space model (A n×n, B n×m, C p×n, D p×m, no disturbances) whose transfer
 *   matrix has entry (i, j) = k_ij·∏(s − z_ijl)/∏(s − p_ijl) for the p×m grid `entries`
 *   (row i: output i, column j: input j).
 * Requires: a non-empty grid of equally long rows; every entry valid (see createZeroPoleGain:
 *   conjugate pairs, proper, finite gain), all with the same sample time.
 * Method: each entry becomes its transfer function (zeroPoleGainToTransferFunction) and the
 *   transfer matrix is realized by realizeTransferFunction: controller canonical form per input
 *   column, one companion block per distinct denominator of the column, balanced (T. Kailath,
 *   "Linear Systems", Prentice-Hall 1980, §2.1, from memory). n = Σ over columns of the degrees
 *   of the distinct pole sets; NOT minimal in general (entries of one output row with equal
 *   poles are not merged across columns). A 1×1 grid gives the same transfer function as
 *   realizeZeroPoleGain but through one companion block instead of sections.
 * Cost: O(N²) per entry to expand (N roots) plus O(n²) for the blocks and the balancing.
 * Accuracy: the transfer function of the realization equals the expanded polynomials to
 *   rounding; it matches k·∏(s − z)/∏(s − p) as far as the expansion is well conditioned (fine
 *   for the low degrees typed per entry; high-degree entries with clustered poles are better
 *   entered as sections: one input and one output, or a state-space model). The result is
 *   checked finite.
 * Errors: "empty" (no rows or columns), "shape-mismatch" (ragged grid), "non-finite" and
 *   "invalid-argument" from the entries, each message prefixed with the entry
 *   ("zero-pole-gain entry (2, 1) (output 2, input 1): zeros[0] = ..."); "invalid-argument" for
 *   mixed sample times.
 * Example: realizeZeroPoleGainMatrix([[zpk([], [-1], 2), zpk([], [-2], 1)], [zpk([-3], [-1, -2], 1), zpk([], [], 0.5)]])
 *   (zpk(z, p, k) = createZeroPoleGain(z as Complex[], p as Complex[], k)) has
 *   G(0) = [[2, 0.5], [1.5, 0.5]]; check against −C A⁻¹ B + D.
 */
export function realizeZeroPoleGainMatrix(entries: ZeroPoleGain[][]): StateSpace {
  if (!Array.isArray(entries) || entries.length === 0 || !Array.isArray(entries[0]) || entries[0].length === 0) {
    throw new EngineError("empty", "zero-pole-gain matrix is empty; it needs at least one row (output) and one column (input)", {});
  }
  const m = entries[0].length;
  const tf = entries.map((row, i) => {
    if (!Array.isArray(row) || row.length !== m) {
      throw new EngineError("shape-mismatch", `zero-pole-gain matrix row ${i + 1} has ${Array.isArray(row) ? row.length : 0} entries but row 1 has ${m}`, { row: i });
    }
    return row.map((entry, j) => {
      try {
        if (entry === null || typeof entry !== "object") throw new EngineError("invalid-argument", "must be an object with zeros, poles, gain and sampleTime", {});
        return zeroPoleGainToTransferFunction(entry);
      } catch (error) {
        if (!(error instanceof EngineError)) throw error;
        throw new EngineError(error.kind, `zero-pole-gain entry (${i + 1}, ${j + 1}) (output ${i + 1}, input ${j + 1}): ${error.message}`, { ...error.details, row: i, column: j });
      }
    });
  });
  return realizeTransferFunction(tf);
}

/** Reals ascending, then conjugate pairs (upper, lower) by real part, then imaginary part. */
function canonicalOrder(roots: Complex[]): Complex[] {
  const reals = roots.filter((r) => r.im === 0).sort((a, b) => a.re - b.re);
  const upper = roots.filter((r) => r.im > 0).sort((a, b) => a.re - b.re || a.im - b.im);
  return [...reals, ...upper.flatMap((r) => [r, { re: r.re, im: -r.im }])];
}
