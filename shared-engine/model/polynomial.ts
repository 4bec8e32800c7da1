/**
 * Real polynomials as coefficient arrays, highest power first ([1, 3, 2] is s² + 3s + 2), the
 * convention of TransferFunction. Helpers never mutate their arguments.
 */
import { EngineError } from "../errors";
import type { Complex } from "../linalg";

/** Drops leading exact zeros; the zero polynomial stays [0]. */
export function trimLeadingZeros(p: readonly number[]): number[] {
  let k = 0;
  while (k < p.length - 1 && p[k] === 0) k++;
  return p.length === 0 ? [0] : p.slice(k);
}

/** Degree after trimming leading zeros (the zero polynomial has degree 0 here). */
export function polynomialDegree(p: readonly number[]): number {
  return trimLeadingZeros(p).length - 1;
}

/** Product of two coefficient arrays (convolution). */
export function multiplyPolynomials(a: readonly number[], b: readonly number[]): number[] {
  const out = new Array<number>(a.length + b.length - 1).fill(0);
  for (let i = 0; i < a.length; i++) for (let j = 0; j < b.length; j++) out[i + j] += a[i]! * b[j]!;
  return out;
}

/**
 * Computes: p(s) at a complex point s by Horner's rule.
 * Requires: finite coefficients. Method: Horner. Cost: 4·deg multiplications.
 * Accuracy: backward stable (each coefficient perturbed by ≤ 2·deg·ε relative).
 * Errors: none. Example: evaluatePolynomial([1, 0, 1], {re: 0, im: 1}) → {re: 0, im: 0}.
 */
export function evaluatePolynomial(p: readonly number[], s: Complex): Complex {
  let re = 0;
  let im = 0;
  for (const c of p) {
    const nre = re * s.re - im * s.im + c;
    im = re * s.im + im * s.re;
    re = nre;
  }
  return { re, im };
}

/**
 * Computes: the monic real polynomial ∏(s − r_k) of degree N = roots.length.
 * Requires: non-real roots in conjugate pairs: every root with im > 0 has one partner with
 *   im < 0 (values are paired in order of appearance; the partner's exact value is not used:
 *   each pair contributes s² − 2·Re(r)·s + |r|², so the result is real by construction).
 * Method: multiplication by linear and real quadratic factors. Cost: O(N²).
 * Accuracy: each factor is formed exactly up to one rounding; the expansion is backward stable
 *   in the factors, but coefficients of high-degree polynomials are sensitive, so use them
 *   for display, not for computing roots again.
 * Errors: "invalid-argument" when the numbers of roots with im > 0 and im < 0 differ.
 * Example: polynomialFromRoots([{re:-1,im:2},{re:-1,im:-2}]) → [1, 2, 5].
 */
export function polynomialFromRoots(roots: readonly Complex[]): number[] {
  let p = [1];
  let upper = 0;
  let lower = 0;
  for (const r of roots) {
    if (r.im === 0) p = multiplyPolynomials(p, [1, -r.re]);
    else if (r.im > 0) {
      upper++;
      p = multiplyPolynomials(p, [1, -2 * r.re, r.re * r.re + r.im * r.im]);
    } else lower++;
  }
  if (upper !== lower) {
    throw new EngineError("invalid-argument", `roots must come in conjugate pairs (${upper} with positive and ${lower} with negative imaginary part)`, {
      positive: upper,
      negative: lower,
    });
  }
  return p;
}
