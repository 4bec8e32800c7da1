/**
 * One-dimensional maximisation without derivatives on a bracketing interval: the peak searches
 * of the margin routines (|S|, |T|, |S − ½| in `loopMargins`, the return-difference minimum of
 * the LQR loop check) all refine a grid extremum with it.
 */
import { EngineError } from "../errors";

/** Where the search stopped: the best point evaluated (or the given start) and its value. */
export interface IntervalMaximum {
  x: number;
  value: number;
  /** Evaluations of f made by the search (the start and end values, when given, are not counted). */
  evaluations: number;
}

export interface MaximiseOptions {
  /** Absolute tolerance t > 0 on x (see Accuracy). */
  tolerance: number;
  /** Relative tolerance r ≥ 0 on x: the stopping tolerance is r·|x| + t. Default 0. */
  relativeTolerance?: number;
  /** A point strictly inside (a, b) with its known value f(start.x): saves one evaluation and starts at the grid maximum. */
  start?: { x: number; value: number };
  /**
   * Known f(a) and f(b), both ≤ start.value (needs `start`): then the first step is the
   * parabola through the three points instead of a golden-section step.
   */
  endValues?: { a: number; b: number };
  /** Iteration cap (one evaluation per iteration). Default 200. */
  maxIterations?: number;
  /** Names the searched quantity in error messages, e.g. "|S| peak". */
  what: string;
}

/** (3 − √5)/2: the golden-section fraction of Brent's procedure. */
const GOLDEN_FRACTION = (3 - Math.sqrt(5)) / 2;
const DEFAULT_MAX_ITERATIONS = 200;

/**
 * Computes: a local maximiser x ∈ [a, b] of a scalar function f and its value f(x); for f
 *   unimodal on [a, b] (one maximum, no plateau), the maximum. The result is the best point
 *   the search evaluated (or `start`), so its value is never below f(start.x) nor any other
 *   evaluated value.
 * Requires: a < b finite; f finite on [a, b] (a NaN or ±Infinity is an error, never skipped);
 *   tolerance > 0; when given, start.x ∈ (a, b) and the start/end values finite, with
 *   endValues ≤ start.value (so the three points bracket a maximum).
 * Method: Brent's method for minimisation without derivatives, applied to −f: R. P. Brent,
 *   "Algorithms for Minimization without Derivatives", Prentice-Hall 1973, ch. 5 (procedure
 *   "localmin"; written here from memory of that procedure): golden-section steps, replaced by
 *   a parabolic interpolation step through x, w, v (the best, second-best and previous
 *   second-best points) whenever that step falls inside the bracket and is shorter than half
 *   the step before last, so the search converges superlinearly on smooth peaks and falls
 *   back to golden section otherwise (the iteration cap below bounds every case). Our
 *   addition (a warm start, not in Brent): with `start` and `endValues` the two ends act as
 *   the earlier points, so the first step is the parabola through the three grid points.
 * Cost: one evaluation of f per iteration, at most `maxIterations` (default 200). On a smooth
 *   peak bracketed by two grid intervals, with a bracket tolerance of 1e-12 relative: about 5
 *   evaluations to reach the √ε-relative width where rounding flattens f, then golden-section
 *   steps to close the bracket, about 10–35 in all (golden section: about 55); see
 *   test/engine/analysis/peakSearch.test.ts. A maximum at an end of [a, b]: about as many as
 *   golden section.
 * Accuracy: stops when max(x − a, b − x) ≤ 2·tol, tol = relativeTolerance·|x| + tolerance,
 *   for the current bracket [a, b] (so b − a ≤ 4·tol): for unimodal f the maximiser lies
 *   within 2·tol of x. Near a smooth maximum f varies only by O(δ²), so below δ ≈ √ε·|x| the
 *   steps are steered by rounding; the bracket still shrinks to the tolerance (golden-section
 *   fallback), and the value returned is the largest seen.
 * Errors: "invalid-argument" for a bad interval, tolerance, start or end values; "non-finite"
 *   when f returns NaN or ±Infinity (details: x, value); "no-convergence" when the cap is
 *   reached (details: iterations, bracket, best).
 * Example:
 *   const r = maximiseOnInterval((x) => -((x - 2) ** 2), 0, 5, { tolerance: 1e-10, what: "test" });
 *   // r.x ≈ 2, |r.x − 2| ≤ 2e-10, r.value ≈ 0
 */
export function maximiseOnInterval(f: (x: number) => number, a0: number, b0: number, options: MaximiseOptions): IntervalMaximum {
  const { tolerance, what } = options;
  const relative = options.relativeTolerance ?? 0;
  const cap = options.maxIterations ?? DEFAULT_MAX_ITERATIONS;
  checkArguments(a0, b0, options, tolerance, relative, cap);

  let evaluations = 0;
  // g = −f is minimised, as in Brent's procedure.
  const g = (x: number): number => {
    const value = f(x);
    evaluations++;
    if (!Number.isFinite(value)) {
      throw new EngineError("non-finite", `${what}: the searched function is ${value} at x = ${x}`, { x, value });
    }
    return -value;
  };

  let a = a0;
  let b = b0;
  // x: best point so far; w: second best; v: previous w (Brent 1973, ch. 5).
  let x: number, fx: number, w: number, fw: number, v: number, fv: number;
  // e: the step before last; d: the last step.
  let d: number, e: number;
  if (options.start !== undefined) {
    x = options.start.x;
    fx = -options.start.value;
  } else {
    x = a + GOLDEN_FRACTION * (b - a);
    fx = g(x);
  }
  if (options.endValues !== undefined) {
    // Warm start: the ends are the earlier points; pretend long earlier steps so the first
    // parabolic step is allowed (it must still fall inside the bracket).
    w = b; fw = -options.endValues.b;
    v = a; fv = -options.endValues.a;
    if (fv < fw) { [v, fv, w, fw] = [w, fw, v, fv]; }
    d = b - a; e = b - a;
  } else {
    w = x; fw = fx;
    v = x; fv = fx;
    d = 0; e = 0;
  }

  for (let it = 0; it < cap; it++) {
    const m = 0.5 * (a + b);
    const tol = relative * Math.abs(x) + tolerance;
    const tol2 = 2 * tol;
    // Stop when x is within 2·tol of both ends of the bracket.
    if (Math.abs(x - m) <= tol2 - 0.5 * (b - a)) return { x, value: -fx, evaluations };
    let golden = true;
    if (Math.abs(e) > tol) {
      // Parabola through (v, fv), (w, fw), (x, fx): step p/q from x to its vertex.
      let r = (x - w) * (fx - fv);
      let q = (x - v) * (fx - fw);
      let p = (x - v) * q - (x - w) * r;
      q = 2 * (q - r);
      if (q > 0) p = -p;
      else q = -q;
      r = e;
      e = d;
      // Accept only a step inside (a, b) and shorter than half the step before last.
      if (Math.abs(p) < Math.abs(0.5 * q * r) && p > q * (a - x) && p < q * (b - x)) {
        d = p / q;
        const u = x + d;
        // Never evaluate within 2·tol of an end.
        if (u - a < tol2 || b - u < tol2) d = x < m ? tol : -tol;
        golden = false;
      }
    }
    if (golden) {
      // Golden-section step into the larger part of the bracket.
      e = (x < m ? b : a) - x;
      d = GOLDEN_FRACTION * e;
    }
    // Never a step shorter than tol: f could not tell the two points apart.
    const u = Math.abs(d) >= tol ? x + d : d > 0 ? x + tol : x - tol;
    const fu = g(u);
    // Shrink the bracket and update x, w, v.
    if (fu <= fx) {
      if (u < x) b = x;
      else a = x;
      v = w; fv = fw;
      w = x; fw = fx;
      x = u; fx = fu;
    } else {
      if (u < x) a = u;
      else b = u;
      if (fu <= fw || w === x) {
        v = w; fv = fw;
        w = u; fw = fu;
      } else if (fu <= fv || v === x || v === w) {
        v = u; fv = fu;
      }
    }
  }
  throw new EngineError("no-convergence", `${what}: Brent's peak search did not narrow [${a0}, ${b0}] to the tolerance within ${cap} iterations`, {
    iterations: cap,
    bracket: [a, b],
    best: { x, value: -fx },
  });
}

function checkArguments(a: number, b: number, options: MaximiseOptions, tolerance: number, relative: number, cap: number): void {
  const what = options.what;
  if (!Number.isFinite(a) || !Number.isFinite(b) || !(a < b)) {
    throw new EngineError("invalid-argument", `${what}: the interval [${a}, ${b}] must be finite with a < b`, { interval: [a, b] });
  }
  if (!(tolerance > 0) || !Number.isFinite(tolerance) || !(relative >= 0) || !Number.isFinite(relative)) {
    throw new EngineError("invalid-argument", `${what}: tolerance must be positive and relativeTolerance ≥ 0 (they are ${tolerance} and ${relative})`, {
      tolerance,
      relativeTolerance: relative,
    });
  }
  if (!Number.isInteger(cap) || cap < 1) {
    throw new EngineError("invalid-argument", `${what}: maxIterations must be a positive integer (it is ${cap})`, { maxIterations: cap });
  }
  const { start, endValues } = options;
  if (start !== undefined && (!(start.x > a && start.x < b) || !Number.isFinite(start.value))) {
    throw new EngineError("invalid-argument", `${what}: start must lie strictly inside [${a}, ${b}] with a finite value (it is x = ${start.x}, f = ${start.value})`, {
      start,
    });
  }
  if (endValues !== undefined) {
    if (start === undefined) throw new EngineError("invalid-argument", `${what}: endValues need a start point`, {});
    if (!Number.isFinite(endValues.a) || !Number.isFinite(endValues.b) || endValues.a > start.value || endValues.b > start.value) {
      throw new EngineError("invalid-argument", `${what}: endValues must be finite and not above the start value ${start.value} (they are ${endValues.a}, ${endValues.b})`, {
        endValues,
      });
    }
  }
}
