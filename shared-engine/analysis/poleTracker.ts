/**
 * Continuation of the eigenvalues of a one-parameter matrix family M(s): adaptive steps in s
 * and a minimal-distance matching of the eigenvalues between steps, so that every branch is a
 * smooth, complete path. Shared by the root locus and the parameter loci.
 */
import { EngineError } from "../errors";
import type { Complex } from "../linalg";

export interface TraceOptions {
  /** Length scale of the plot (the spread of the poles and zeros). */
  scale: number;
  /** Largest movement of any pole per step, as a fraction of `scale` (plot resolution). */
  maxMoveFraction: number;
  /** Largest deviation from the predicted position, as a fraction of the pole's separation. */
  separationFraction: number;
  /** Separations below floorFraction·scale count as that (poles meeting at a break point). */
  floorFraction: number;
  /** Number of initial steps across [s0, s1] (the step never exceeds (s1 − s0)/minSteps). */
  minSteps: number;
  /** Cap on evaluations of the family (accepted and rejected steps together). */
  maxEvaluations: number;
  /** Checked before every evaluation; returning true stops with kind "cancelled". Default: never. */
  isCancelled?: () => boolean;
  /** Called after every accepted step with the fraction (s − s0)/(s1 − s0) traced, in [0, 1]. */
  onProgress?: (fraction: number) => void;
}

export interface Trace {
  params: number[];
  /** branches[b][k]: branch b at params[k]. */
  branches: Complex[][];
  /** Steps accepted at the minimum step size although the test failed (poles meeting). */
  forcedSteps: number;
  evaluations: number;
}

export const DEFAULT_TRACE_OPTIONS: Omit<TraceOptions, "scale"> = {
  maxMoveFraction: 0.02,
  separationFraction: 0.25,
  floorFraction: 1e-4,
  minSteps: 50,
  maxEvaluations: 200_000,
};

/**
 * The length scale of a set of poles for tracing: the largest distance from their centroid, or,
 * when they all coincide, the largest magnitude (1 for a set of zeros). Used by root and parameter
 * loci for their step-size and separation tests. Cost O(n). Example: poleSpread([{re: -1, im: 0},
 * {re: -3, im: 0}]) = 1.
 */
export function poleSpread(points: readonly Complex[]): number {
  const mean = points.reduce((s, p) => ({ re: s.re + p.re / points.length, im: s.im + p.im / points.length }), { re: 0, im: 0 });
  let spread = 0;
  let magnitude = 0;
  for (const p of points) {
    spread = Math.max(spread, Math.hypot(p.re - mean.re, p.im - mean.im));
    magnitude = Math.max(magnitude, Math.hypot(p.re, p.im));
  }
  return spread > 0 ? spread : magnitude > 0 ? magnitude : 1;
}

/**
 * Computes: `next` reordered so that next'[i] is assigned to previous[i] with the least total
 *   distance Σ|previous[i] − next'[i]| (a minimal-distance assignment).
 * Requires: equal lengths. Method: each previous point takes its nearest new point; when those
 *   are all distinct the assignment is optimal (every term is at its lower bound). Otherwise the
 *   Hungarian method in its shortest-augmenting-path form (H. W. Kuhn, "The Hungarian method for
 *   the assignment problem", Naval Res. Logist. Q. 2, 1955; R. Jonker & A. Volgenant, Computing
 *   38, 1987). Cost: O(n²) for the fast path, O(n³) otherwise. Accuracy: exact assignment.
 * Errors: "shape-mismatch" for different lengths.
 * Example: matchPoles([{re:0,im:0},{re:1,im:0}], [{re:1.1,im:0},{re:0.1,im:0}]) → [0.1, 1.1].
 */
export function matchPoles(previous: Complex[], next: Complex[]): Complex[] {
  const n = previous.length;
  if (next.length !== n) {
    throw new EngineError("shape-mismatch", `pole matching needs equal counts (previous has ${n}, next has ${next.length})`, {});
  }
  const cost = new Float64Array(n * n);
  for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) cost[i * n + j] = Math.hypot(previous[i]!.re - next[j]!.re, previous[i]!.im - next[j]!.im);
  const nearest = new Int32Array(n);
  const used = new Uint8Array(n);
  let distinct = true;
  for (let i = 0; i < n; i++) {
    let best = 0;
    for (let j = 1; j < n; j++) if (cost[i * n + j]! < cost[i * n + best]!) best = j;
    nearest[i] = best;
    if (used[best]) distinct = false;
    used[best] = 1;
  }
  const assignment = distinct ? nearest : hungarian(cost, n);
  return Array.from(assignment, (j) => next[j]!);
}

// Shortest augmenting path Hungarian method on a dense n×n cost; returns column of each row.
function hungarian(cost: Float64Array, n: number): Int32Array {
  const u = new Float64Array(n + 1);
  const v = new Float64Array(n + 1);
  const p = new Int32Array(n + 1); // p[j]: row matched to column j (1-based; 0 = none)
  const way = new Int32Array(n + 1);
  for (let i = 1; i <= n; i++) {
    p[0] = i;
    let j0 = 0;
    const minv = new Float64Array(n + 1).fill(Infinity);
    const usedCol = new Uint8Array(n + 1);
    do {
      usedCol[j0] = 1;
      const i0 = p[j0]!;
      let delta = Infinity;
      let j1 = 0;
      for (let j = 1; j <= n; j++) {
        if (usedCol[j]) continue;
        const cur = cost[(i0 - 1) * n + (j - 1)]! - u[i0]! - v[j]!;
        if (cur < minv[j]!) {
          minv[j] = cur;
          way[j] = j0;
        }
        if (minv[j]! < delta) {
          delta = minv[j]!;
          j1 = j;
        }
      }
      for (let j = 0; j <= n; j++) {
        if (usedCol[j]) {
          u[p[j]!] += delta;
          v[j] -= delta;
        } else minv[j] -= delta;
      }
      j0 = j1;
    } while (p[j0] !== 0);
    do {
      const j1 = way[j0]!;
      p[j0] = p[j1]!;
      j0 = j1;
    } while (j0 !== 0);
  }
  const rowToCol = new Int32Array(n);
  for (let j = 1; j <= n; j++) if (p[j]! > 0) rowToCol[p[j]! - 1] = j - 1;
  return rowToCol;
}

/**
 * Computes: the eigenvalue branches of a parameter family, from s0 to s1 (s0 < s1), with the
 *   eigenvalues at s0 given by `start` (already ordered) and those at any s by `polesAt(s)`.
 * Requires: polesAt returns the same number of values for every s; s0 < s1 finite.
 * Method: predictor–corrector continuation. The predictor extrapolates each branch linearly
 *   from the last two accepted points; the new eigenvalues are matched to the predictions by
 *   `matchPoles`. A step is rejected and halved when any matched pole deviates from its
 *   prediction by more than separationFraction × (its distance to the nearest other predicted
 *   pole, floored at floorFraction·scale), or moves by more than maxMoveFraction·max(scale, |p|); it is
 *   doubled after an easy step (all ratios below 1/4). At the minimum step (1e-12·(s1 − s0))
 *   the step is accepted anyway and counted in `forcedSteps` (poles meeting at a break point,
 *   where any assignment gives continuous branches).
 * Cost: one `polesAt` per trial step; typically 1–3 trials per accepted step.
 * Accuracy: each accepted point is an exact (backward stable) eigenvalue set of M(s).
 * Errors: "no-convergence" when maxEvaluations is reached (details: evaluations, parameter);
 *   "cancelled" when the optional `isCancelled` returns true (checked before each evaluation).
 * Example: tracePoles(s => eigenvalues([[0, 1], [-s, -3]]), ...) traces the locus of
 *   s² + 3s + k = 0; check each branch point is a root to 1e-12.
 */
export function tracePoles(polesAt: (s: number) => Complex[], start: Complex[], s0: number, s1: number, options: TraceOptions): Trace {
  const params = [s0];
  const branches: Complex[][] = start.map((p) => [p]);
  const n = start.length;
  const span = s1 - s0;
  const maxStep = span / options.minSteps;
  const minStep = span * 1e-12;
  const floor = options.floorFraction * options.scale;
  const maxMove = options.maxMoveFraction * options.scale;
  let s = s0;
  let h = maxStep;
  let current = start;
  let previous: Complex[] | null = null;
  let previousStep = 0;
  let forcedSteps = 0;
  let evaluations = 0;
  while (s < s1) {
    const step = Math.min(h, s1 - s);
    const sNew = s1 - s - step <= minStep ? s1 : s + step;
    const actual = sNew - s;
    if (options.isCancelled?.()) {
      throw new EngineError("cancelled", `pole tracing was cancelled at ${s} of [${s0}, ${s1}] after ${evaluations} evaluations`, { evaluations, parameter: s });
    }
    if (++evaluations > options.maxEvaluations) {
      throw new EngineError("no-convergence", `pole tracing did not reach the end of the parameter range within ${options.maxEvaluations} evaluations (stopped at ${s} of [${s0}, ${s1}])`, {
        evaluations,
        parameter: s,
        iterations: evaluations,
        residual: s1 - s,
      });
    }
    const raw = polesAt(sNew);
    const prediction = previous === null ? current : current.map((c, i) => ({ re: c.re + ((c.re - previous![i]!.re) * actual) / previousStep, im: c.im + ((c.im - previous![i]!.im) * actual) / previousStep }));
    const matched = matchPoles(prediction, raw);
    let worst = 0;
    for (let i = 0; i < n; i++) {
      let separation = Infinity;
      for (let j = 0; j < n; j++) if (j !== i) separation = Math.min(separation, Math.hypot(prediction[i]!.re - prediction[j]!.re, prediction[i]!.im - prediction[j]!.im));
      separation = Math.max(separation, floor);
      const deviation = Math.hypot(matched[i]!.re - prediction[i]!.re, matched[i]!.im - prediction[i]!.im);
      const move = Math.hypot(matched[i]!.re - current[i]!.re, matched[i]!.im - current[i]!.im);
      // Far from the origin (branches heading out along asymptotes) the allowed move grows with
      // |p|, so the number of steps grows like log|p| rather than |p|.
      const allowedMove = maxMove * Math.max(1, Math.hypot(current[i]!.re, current[i]!.im) / options.scale);
      worst = Math.max(worst, deviation / (options.separationFraction * separation), move / allowedMove);
    }
    if (worst > 1 && actual > minStep) {
      h = actual / 2;
      continue;
    }
    if (worst > 1) forcedSteps++;
    params.push(sNew);
    for (let i = 0; i < n; i++) branches[i]!.push(matched[i]!);
    previous = current;
    previousStep = actual;
    current = matched;
    s = sNew;
    options.onProgress?.(Math.min(1, (s - s0) / span));
    h = worst < 0.25 ? Math.min(2 * actual, maxStep) : actual;
  }
  return { params, branches, forcedSteps, evaluations };
}
