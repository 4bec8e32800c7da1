/**
 * Entry-wise comparisons against the mpmath references of riccati_precise.json
 * (test/fixtures/design/generate_riccati_precise.py). For plants whose states differ in units by
 * orders of magnitude a normwise comparison says nothing about the small entries of X or K or the
 * slow closed-loop poles, so every entry and every pole is compared relative to itself.
 */
import { expect } from "vitest";
import { expectAtMost, frobenius, frobeniusDifference, toRows, type ComplexLike } from "../../helpers/assertions";

type MatrixLike = Parameters<typeof toRows>[0];

/**
 * Bound on the relative error of each entry of X and K and of each closed-loop pole. Measured
 * (2026-12): ≤ 2e-14 after Newton refinement on every case; the Hamiltonian Schur X of the
 * "eigenvalues 1e8 and 1e-4" case without refinement is off by 1.6e-7 in X₂₂ and in the slow
 * pole, and the discrete pencil X of the sampled hydraulic positioner by 4.5e-10: 1e-10 separates
 * a componentwise-accurate answer from a merely normwise-accurate one with a margin of > 1000
 * over the measured error.
 */
export const ENTRYWISE_TOLERANCE = 1e-10;
/** ‖X − X_ref‖_F / ‖X_ref‖_F: about 450·ε, a backward-stable solve of these well-conditioned cases (measured ≤ 2.5e-14). */
export const NORMWISE_TOLERANCE = 1e-13;

export function expectEntrywiseClose(actual: MatrixLike, expected: number[][], tol: number, what: string): void {
  const a = toRows(actual);
  expect(a.length, `${what}: rows`).toBe(expected.length);
  let worst = 0, where = "";
  expected.forEach((row, i) => row.forEach((e, j) => {
    const err = e === 0 ? Math.abs(a[i]![j]!) : Math.abs(a[i]![j]! - e) / Math.abs(e); // no exact zeros in the fixture
    if (!(err <= worst)) { worst = err; where = `[${i}][${j}] = ${a[i]![j]} vs ${e}`; }
  }));
  expectAtMost(worst, tol, `${what}: worst entry-wise relative error (at ${where})`);
}

export function expectNormwiseClose(actual: MatrixLike, expected: number[][], tol: number, what: string): void {
  expectAtMost(frobeniusDifference(actual, expected) / frobenius(expected), tol, `${what}: ‖actual − reference‖_F / ‖reference‖_F`);
}

/**
 * Each reference pole p must have a computed pole within tol·|p| (pairs taken greedily). Poles
 * below 100·ε·‖A − BK‖_F (a deadbeat mode of a discrete design) are only defined to that
 * absolute level by the data, so that is their bound.
 */
export function expectPolesRelativeClose(actual: ComplexLike[], expected: number[][], closedLoopNorm: number, tol: number, what: string): void {
  expect(actual.length, `${what}: count`).toBe(expected.length);
  const remaining = [...actual];
  const floor = 100 * Number.EPSILON * closedLoopNorm;
  for (const [re, im] of expected) {
    let best = 0, bestDist = Infinity;
    remaining.forEach((p, i) => { const d = Math.hypot(p.re - re!, p.im - im!); if (d < bestDist) { bestDist = d; best = i; } });
    const size = Math.hypot(re!, im!);
    const allowed = size > floor ? tol * size : floor;
    expectAtMost(bestDist, allowed, `${what}: pole ${re}${im! >= 0 ? "+" : ""}${im}i`);
    remaining.splice(best, 1);
  }
}

/** ‖A − B·K‖_F in plain arrays. */
export function closedLoopNorm(A: number[][], B: number[][], K: number[][]): number {
  let s = 0;
  A.forEach((row, i) => row.forEach((a, j) => {
    const v = a - B[i]!.reduce((acc, b, k) => acc + b * K[k]![j]!, 0);
    s += v * v;
  }));
  return Math.sqrt(s);
}
