/**
 * How far a set of closed-loop poles is from the poles a design promises; shared by the
 * separation check of the compensator assembly and the implementation checks.
 */
import { cabs, type Complex } from "../linalg";

/**
 * Computes: the mismatch between two pole multisets, max |λ_actual − λ_expected| / max(1, |λ_expected|)
 *   over a greedy nearest matching (expected poles taken largest first, each paired with the
 *   nearest actual pole not yet used); Infinity when the counts differ.
 * Requires: nothing beyond finite poles.
 * Method: greedy matching (not an optimal assignment): enough to confirm poles that agree to
 *   rounding, which is what the separation and implementation checks ask.
 * Cost: O(k²) for k poles.
 * Accuracy: exact arithmetic on the given values.
 * Errors: none.
 * Example: poleSetMismatch([{re:-1,im:0}], [{re:-1.001,im:0}]) ≈ 1e-3.
 */
export function poleSetMismatch(actual: Complex[], expected: Complex[]): number {
  if (actual.length !== expected.length) return Infinity;
  const remaining = [...actual];
  let worst = 0;
  const order = [...expected].sort((a, b) => cabs(b) - cabs(a));
  for (const e of order) {
    let best = 0;
    let dist = Infinity;
    remaining.forEach((a, i) => {
      const d = Math.hypot(a.re - e.re, a.im - e.im);
      if (d < dist) { dist = d; best = i; }
    });
    remaining.splice(best, 1);
    worst = Math.max(worst, dist / Math.max(1, cabs(e)));
  }
  return worst;
}
