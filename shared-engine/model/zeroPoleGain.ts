/**
 * Zero-pole-gain entry G(s) = k·∏(s − z_i)/∏(s − p_i) and its realization as a series of
 * real first- and second-order sections.
 */
import { EngineError } from "../errors";
import type { Complex } from "../linalg";
import { checkSampleTime } from "./stateSpace";
import type { StateSpace } from "./stateSpace";
import { series } from "./interconnect";
import { realizeTransferFunction } from "./transferFunction";

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
