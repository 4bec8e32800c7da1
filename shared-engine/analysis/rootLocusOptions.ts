/**
 * The options of the root locus and the checks a request passes before any tracing: a
 * single-input single-output loop with at least one state, a point count and a gain limit in
 * range. Every error names the option (`details.argument`) or the model's shape.
 */
import { EngineError } from "../errors";
import type { StateSpace } from "../model";

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

/**
 * Computes: the checked settings of a root-locus request: `negativeGain` (default false) and
 *   `points` (`pointsPerBranch`, default 200); `maxGain` and the callbacks are read by the caller.
 * Requires: nothing; this is the check. Method: direct tests, in the order below (shape, states,
 *   pointsPerBranch, maxGain). Cost: O(1).
 * Errors: "invalid-argument" when the loop is not single-input single-output, has no states,
 *   pointsPerBranch is not an integer from 2 to 100000, or maxGain is given and not a finite
 *   positive number.
 * Example: checkRootLocusRequest(1/(s+1) realisation, {}) → { negativeGain: false, points: 200 }.
 */
export function checkRootLocusRequest(L: StateSpace, options: RootLocusOptions): { negativeGain: boolean; points: number } {
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
  return { negativeGain, points };
}
