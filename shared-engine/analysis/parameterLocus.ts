/**
 * Parameter locus: the eigenvalues of a closed-loop matrix that depends on one parameter
 * (a plant coefficient, a weight, a design knob), traced as smooth branches over a range.
 */
import { Matrix } from "ml-matrix";
import { EngineError } from "../errors";
import { eigenvalues, type Complex } from "../linalg";
import { DEFAULT_TRACE_OPTIONS, matchPoles, poleSpread, tracePoles } from "./poleTracker";

export interface ParameterLocus {
  /** Parameter values, increasing, from range[0] to range[1] (adaptive, at least `points`). */
  values: number[];
  /** branches[b][k]: eigenvalue b at values[k]. */
  branches: Complex[][];
}

export interface ParameterLocusOptions {
  /** Least number of values (the step never exceeds the span/(points − 1)); default 101. */
  points?: number;
  /** Step in the value ("linear") or in its logarithm ("log", both ends > 0). Default linear. */
  scale?: "linear" | "log";
}

/**
 * Computes: the eigenvalues λ_b(v) of M(v) = closedLoopMatrix(v) (n×n for every v) for
 *   v ∈ [range[0], range[1]], ordered into branches that are continuous in v.
 * Requires: range[0] < range[1], finite (both > 0 for "log"); M(v) square, finite and of the
 *   same size for every v; points an integer in [2, 100000].
 * Method: eigenvalues by balanced Francis QR; predictor–corrector continuation with
 *   minimal-distance matching (`tracePoles`: steps halved when a pole strays from its
 *   prediction by more than a quarter of its distance to the nearest other pole or moves more
 *   than 2 % of the locus scale, doubled when smooth; Kuhn's Hungarian assignment when the
 *   nearest-neighbour matching is not a permutation).
 * Cost: one n×n eigenvalue problem (≈ 10n³ flops) and one call of closedLoopMatrix per trial
 *   value; at least points − 1 accepted steps.
 * Accuracy: each point is an eigenvalue set of M(v) with backward error O(ε‖M(v)‖).
 * Errors: "invalid-argument" (range, options, closedLoopMatrix not a function or its result not
 *   a square matrix of fixed size), "non-finite" (entries of M(v)), "no-convergence" (tracing
 *   cap of 200000 evaluations, or the eigenvalue iteration).
 * Example: parameterLocus(k => [[0, 1], [-k, -2]], [0, 2]) has branches −1 ± √(1 − k); check
 *   at k = 2 both are −1 ± j to 1e-12.
 */
export function parameterLocus(closedLoopMatrix: (value: number) => number[][], range: [number, number], options: ParameterLocusOptions = {}): ParameterLocus {
  if (typeof closedLoopMatrix !== "function") {
    throw new EngineError("invalid-argument", "closedLoopMatrix must be a function from the parameter value to a square matrix", { argument: "closedLoopMatrix" });
  }
  if (!Array.isArray(range) || range.length !== 2 || !range.every((v) => typeof v === "number")) {
    throw new EngineError("invalid-argument", "range must be [from, to] with two numbers", { argument: "range" });
  }
  const [from, to] = range;
  if (!Number.isFinite(from) || !Number.isFinite(to)) throw new EngineError("non-finite", `range is [${from}, ${to}]; both ends must be finite`, { argument: "range" });
  if (!(from < to)) throw new EngineError("invalid-argument", `range must be increasing (from ${from} < to ${to})`, { argument: "range" });
  const scaleKind = options.scale ?? "linear";
  if (scaleKind !== "linear" && scaleKind !== "log") throw new EngineError("invalid-argument", `scale must be "linear" or "log", not '${String(scaleKind)}'`, { argument: "scale" });
  if (scaleKind === "log" && !(from > 0)) throw new EngineError("invalid-argument", `a log scale needs a positive range (from is ${from})`, { argument: "range" });
  const points = options.points ?? 101;
  if (!Number.isInteger(points) || points < 2 || points > 100_000) {
    throw new EngineError("invalid-argument", `points must be an integer from 2 to 100000, not ${points}`, { argument: "points" });
  }
  let size = -1;
  const polesAtValue = (v: number): Complex[] => {
    const rows = closedLoopMatrix(v);
    if (!Array.isArray(rows) || rows.length === 0 || rows.some((r) => !Array.isArray(r) || r.length !== rows.length)) {
      throw new EngineError("invalid-argument", `closedLoopMatrix(${v}) must return a non-empty square matrix (rows of equal length)`, { value: v });
    }
    if (size >= 0 && rows.length !== size) {
      throw new EngineError("invalid-argument", `closedLoopMatrix(${v}) is ${rows.length}×${rows.length} but was ${size}×${size}; the size must not change with the parameter`, { value: v });
    }
    size = rows.length;
    rows.forEach((row, i) =>
      row.forEach((x, j) => {
        if (typeof x !== "number" || !Number.isFinite(x)) throw new EngineError("non-finite", `closedLoopMatrix(${v})[${i}][${j}] is ${x}; entries must be finite numbers`, { value: v, row: i, col: j });
      }),
    );
    return eigenvalues(new Matrix(rows));
  };
  const toValue = (s: number): number => (scaleKind === "log" ? Math.exp(s) : s);
  const s0 = scaleKind === "log" ? Math.log(from) : from;
  const s1 = scaleKind === "log" ? Math.log(to) : to;
  const first = polesAtValue(from);
  const last = polesAtValue(to);
  const trace = tracePoles((s) => polesAtValue(toValue(s)), first, s0, s1, {
    ...DEFAULT_TRACE_OPTIONS,
    scale: poleSpread([...first, ...last]),
    minSteps: points - 1,
  });
  const values = trace.params.map(toValue);
  values[0] = from;
  values[values.length - 1] = to;
  // The final point is re-evaluated at exactly `to` (exp(log(to)) may differ by an ulp).
  if (scaleKind === "log") {
    const end = matchPoles(trace.branches.map((br) => br[br.length - 1]!), last);
    trace.branches.forEach((br, i) => (br[br.length - 1] = end[i]!));
  }
  return { values, branches: trace.branches };
}
