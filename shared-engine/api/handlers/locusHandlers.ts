/**
 * Bridge handlers of the parameter loci that can be stated as JSON (the engine's
 * `parameterLocus` takes a function, which cannot cross the bridge): the LQR weight locus
 * (closed-loop poles as R = ρ·R0 varies) and the observer speed locus (observer poles scaled by
 * a factor). Both report progress and honour cancellation between evaluations.
 */
import { Matrix } from "ml-matrix";
import { EngineError } from "../../errors";
import { parameterLocus } from "../../analysis";
import { placeObserverPoles, solveContinuousRiccati, solveDiscreteRiccati } from "../../design";
import type { Complex } from "../../linalg";
import type { LqrWeightLocusResult, ObserverSpeedLocusResult } from "../servoContractTypes";
import { diagnostics, progressForwarder, throwIfCancelled, withFieldPaths, type RequestContext, type RequestHandler } from "../handlerSupport";
import {
  ANALYSIS_LIMITS,
  optionalNumberParam,
  optionalSampleTimeParam,
  requireComplexListParam,
  requireMatrixParam,
  requireNumberListParam,
  requireObjectParams,
  requireStateMatrixParam,
} from "../params";

/** Evaluations allowed per requested point (adaptive steps halve near break points). */
const EVALUATIONS_PER_POINT = 40;
const EVALUATIONS_BASE = 2000;

/** [lo, hi] with 0 < lo < hi, both finite. */
function requirePositiveRange(p: Record<string, unknown>, field: string): [number, number] {
  const v = p[field];
  if (!Array.isArray(v) || v.length !== 2) throw new EngineError("invalid-argument", `${field} must be [lo, hi] (two numbers)`, { field });
  const [lo, hi] = requireNumberListParam(p, field);
  if (!(lo! > 0) || !(hi! > lo!)) throw new EngineError("invalid-argument", `${field} must satisfy 0 < lo < hi (it is [${lo}, ${hi}])`, { field });
  return [lo!, hi!];
}

/**
 * Wraps the matrix family for `parameterLocus` with cancellation, an evaluation cap and progress.
 * parameterLocus evaluates both ends before tracing, so progress counts from the third call on
 * (as the furthest fraction of the range reached).
 */
function instrumented(
  family: (value: number) => number[][],
  context: RequestContext,
  method: string,
  fractionOf: (value: number) => number,
  points: number,
): { family: (value: number) => number[][]; progress: (fraction: number) => void } {
  const progress = progressForwarder(context, method);
  const cap = EVALUATIONS_PER_POINT * points + EVALUATIONS_BASE;
  let evaluations = 0;
  return {
    progress,
    family: (value) => {
      throwIfCancelled(context, method, `after ${evaluations} evaluations`);
      if (++evaluations > cap) {
        throw new EngineError("no-convergence", `${method}: the locus needed more than ${cap} evaluations (stopped at ${value})`, { iterations: evaluations, residual: 1 - fractionOf(value), method });
      }
      const rows = family(value);
      if (evaluations > 2) progress(fractionOf(value));
      return rows;
    },
  };
}

const closedLoopRows = (A: Matrix, B: Matrix, K: Matrix): number[][] => A.clone().sub(B.mmul(K)).to2DArray();

export const locusHandlers = {
  "analysis.lqrWeightLocus": ((params, context) => {
    const method = "analysis.lqrWeightLocus";
    const p = requireObjectParams(params, method);
    const A = new Matrix(requireStateMatrixParam(p, "A", { square: true }));
    const B = new Matrix(requireStateMatrixParam(p, "B"));
    const Q = requireStateMatrixParam(p, "Q", { square: true });
    const R0 = new Matrix(requireMatrixParam(p, "R0", { square: true }));
    const [lo, hi] = requirePositiveRange(p, "rhoRange");
    const points = optionalNumberParam(p, "points", { integer: true, min: 2, max: ANALYSIS_LIMITS.maxSweepValues }) ?? 101;
    const sampleTime = optionalSampleTimeParam(p);
    const span = Math.log(hi / lo);
    const { family, progress } = instrumented(
      (rho) => {
        const R = R0.clone().mul(rho);
        const s = sampleTime === null ? solveContinuousRiccati(A, B, Q, R) : solveDiscreteRiccati(A, B, Q, R);
        return closedLoopRows(A, B, s.K);
      },
      context,
      method,
      (rho) => Math.log(rho / lo) / span,
      points,
    );
    const locus = withFieldPaths(() => parameterLocus(family, [lo, hi], { points, scale: "log" }), { rename: { R: "R0", range: "rhoRange" } });
    progress(1);
    const single = B.columns === 1;
    return {
      rho: locus.values,
      branches: locus.branches,
      symmetricRootLocus: single,
      diagnostics: diagnostics({
        warnings: single
          ? [sampleTime === null ? "single input: the branches are the stable half of the symmetric root locus 1 + G(−s)ᵀG(s)/ρ = 0 (Q = HᵀH, G = H(sI − A)⁻¹B)" : "single input: the branches are the stable half of the reciprocal root locus of the sampled design"]
          : [],
      }),
    };
  }) as RequestHandler<LqrWeightLocusResult>,

  "analysis.observerSpeedLocus": ((params, context) => {
    const method = "analysis.observerSpeedLocus";
    const p = requireObjectParams(params, method);
    const A = new Matrix(requireStateMatrixParam(p, "A", { square: true }));
    const C = new Matrix(requireMatrixParam(p, "C"));
    const poles = requireComplexListParam(p, "poles");
    const [lo, hi] = requirePositiveRange(p, "factorRange");
    const points = optionalNumberParam(p, "points", { integer: true, min: 2, max: ANALYSIS_LIMITS.maxSweepValues }) ?? 101;
    // ‖L(f)‖_F by factor: the linear scale hands the family exactly the values it returns.
    const gainNorm = new Map<number, number>();
    const gainAt = (f: number): Matrix => {
      const scaled = poles.map((z): Complex => ({ re: f * z.re, im: f * z.im }));
      const L = placeObserverPoles(A, C, scaled).L;
      gainNorm.set(f, L.norm("frobenius"));
      return L;
    };
    const { family, progress } = instrumented((f) => closedLoopRows(A, gainAt(f), C), context, method, (f) => (f - lo) / (hi - lo), points);
    const locus = withFieldPaths(() => parameterLocus(family, [lo, hi], { points }), { rename: { range: "factorRange" } });
    progress(1);
    const gainNorms = locus.values.map((f) => gainNorm.get(f) ?? gainAt(f).norm("frobenius"));
    return {
      factors: locus.values,
      branches: locus.branches,
      gainNorms,
      diagnostics: diagnostics({ warnings: ["a faster observer amplifies measurement noise: its gain grows with the factor (see gainNorms)"] }),
    };
  }) as RequestHandler<ObserverSpeedLocusResult>,
};
