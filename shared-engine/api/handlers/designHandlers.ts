/**
 * Bridge handlers of the design layer: pole placement (controller and observer), Riccati
 * equations, LQR, Kalman filters, Bryson weights, and the LQR weight sweep (with progress and
 * cancellation between its solves).
 */
import type { Matrix } from "ml-matrix";
import { EngineError } from "../../errors";
import {
  brysonWeights,
  kalmanContinuous,
  kalmanDiscrete,
  lqr,
  lqrWeightSweep,
  placeObserverPoles,
  placePoles,
  solveContinuousRiccati,
  solveDiscreteRiccati,
  type PlacementOptions,
  type RiccatiSolution,
} from "../../design";
import type {
  BrysonResult,
  KalmanResultJson,
  LqrResultJson,
  LqrSweepResult,
  ObserverPolesResult,
  PlacePolesResult,
  PlacementResultJson,
  RiccatiResultJson,
} from "../designContractTypes";
import { diagnostics, throwIfCancelled, type RequestHandler } from "../handlerSupport";
import {
  ANALYSIS_LIMITS,
  optionalBooleanParam,
  optionalEnumParam,
  optionalMatrixParam,
  optionalNumberParam,
  optionalSampleTimeParam,
  requireComplexListParam,
  requireMatrixParam,
  requireNumberListParam,
  requireObjectParams,
  requireStateMatrixParam,
} from "../params";

/** Meaning of RiccatiSolution.conditionIndicator, echoed with every Riccati-based result. */
export const RICCATI_CONDITION = "reciprocal 1-norm condition of U11 in X = U21·U11⁻¹ (near 1: well conditioned; near ε: near the stabilizability/detectability boundary)";

export function placementOptions(p: Record<string, unknown>): PlacementOptions {
  const maxIterations = optionalNumberParam(p, "maxIterations", { integer: true, min: 1, max: 10_000 });
  const tolerance = optionalNumberParam(p, "tolerance", { positive: true, max: 1 });
  return { ...(maxIterations !== undefined ? { maxIterations } : {}), ...(tolerance !== undefined ? { tolerance } : {}) };
}

export function placementJson(r: { requestedPoles: PlacementResultJson["requestedPoles"]; achievedPoles: PlacementResultJson["achievedPoles"]; maxPoleError: number; gainNorm: number; gainNorm2: number; eigenvectorCondition: number; method: PlacementResultJson["method"]; iterations?: number; warnings: string[] }): PlacementResultJson {
  return {
    requestedPoles: r.requestedPoles,
    achievedPoles: r.achievedPoles,
    maxPoleError: r.maxPoleError,
    gainNorm: r.gainNorm,
    gainNorm2: r.gainNorm2,
    eigenvectorCondition: r.eigenvectorCondition,
    method: r.method,
    iterations: r.iterations ?? null,
    diagnostics: diagnostics({
      residual: r.maxPoleError,
      condition: r.eigenvectorCondition,
      conditionMeaning: "κ₂ of the closed-loop eigenvector matrix (placed poles move by about κ₂·ε·‖A‖)",
      warnings: r.warnings,
    }),
  };
}

function riccatiJson(s: RiccatiSolution): RiccatiResultJson {
  return {
    X: s.X.to2DArray(),
    K: s.K.to2DArray(),
    closedLoopPoles: s.closedLoopPoles,
    residual: s.residual,
    conditionIndicator: s.conditionIndicator,
    refined: s.refined,
    method: s.method,
    diagnostics: diagnostics({ residual: s.residual, condition: s.conditionIndicator, conditionMeaning: RICCATI_CONDITION, warnings: s.warnings }),
  };
}

/** A, B, Q, R (and optional N) of a regulator request, with square/shape checks by the engine. */
function regulatorMatrices(p: Record<string, unknown>): { A: number[][]; B: number[][]; Q: number[][]; R: number[][]; N: number[][] | undefined } {
  return {
    A: requireStateMatrixParam(p, "A", { square: true }),
    B: requireStateMatrixParam(p, "B"),
    Q: requireStateMatrixParam(p, "Q", { square: true }),
    R: requireMatrixParam(p, "R", { square: true }),
    N: optionalMatrixParam(p, "N"),
  };
}

const rows = (m: Matrix | undefined): number[][] | undefined => (m ? m.to2DArray() : undefined);

export const designHandlers = {
  "design.placePoles": ((params) => {
    const p = requireObjectParams(params, "design.placePoles");
    const A = requireStateMatrixParam(p, "A", { square: true });
    const B = requireStateMatrixParam(p, "B");
    const poles = requireComplexListParam(p, "poles");
    const r = placePoles(A, B, poles, placementOptions(p));
    return { K: r.K.to2DArray(), ...placementJson(r) };
  }) as RequestHandler<PlacePolesResult>,

  "design.observerPoles": ((params) => {
    const p = requireObjectParams(params, "design.observerPoles");
    const A = requireStateMatrixParam(p, "A", { square: true });
    const C = requireMatrixParam(p, "C");
    const poles = requireComplexListParam(p, "poles");
    const r = placeObserverPoles(A, C, poles, placementOptions(p));
    return { L: r.L.to2DArray(), ...placementJson(r) };
  }) as RequestHandler<ObserverPolesResult>,

  "design.riccati": ((params) => {
    const p = requireObjectParams(params, "design.riccati");
    const kind = optionalEnumParam(p, "kind", ["continuous", "discrete"] as const);
    if (kind === undefined) throw new EngineError("invalid-argument", 'kind is required: "continuous" or "discrete"', { field: "kind" });
    const { A, B, Q, R, N } = regulatorMatrices(p);
    const refine = optionalBooleanParam(p, "refine");
    const options = refine === undefined ? {} : { refine };
    const s = kind === "continuous" ? solveContinuousRiccati(A, B, Q, R, N ?? null, options) : solveDiscreteRiccati(A, B, Q, R, N ?? null, options);
    return riccatiJson(s);
  }) as RequestHandler<RiccatiResultJson>,

  "design.lqr": ((params) => {
    const p = requireObjectParams(params, "design.lqr");
    const { A, B, Q, R, N } = regulatorMatrices(p);
    const sampleTime = optionalSampleTimeParam(p);
    const d = lqr(A, B, Q, R, N ?? null, sampleTime);
    return { ...riccatiJson(d), sampleTime: d.sampleTime, margins: d.margins ? { ...d.margins } : null };
  }) as RequestHandler<LqrResultJson>,

  "design.kalman": ((params) => {
    const p = requireObjectParams(params, "design.kalman");
    const A = requireStateMatrixParam(p, "A", { square: true });
    const C = requireMatrixParam(p, "C");
    const G = optionalMatrixParam(p, "G");
    const W = requireMatrixParam(p, "W", { square: true });
    const V = requireMatrixParam(p, "V", { square: true });
    const cross = optionalMatrixParam(p, "cross");
    const sampleTime = optionalSampleTimeParam(p);
    const form = optionalEnumParam(p, "form", ["predictor", "current"] as const);
    if (sampleTime === null && form !== undefined) {
      throw new EngineError("invalid-argument", "form applies only to a discrete filter (give sampleTime)", { field: "form" });
    }
    const f = sampleTime === null ? kalmanContinuous(A, C, G ?? null, W, V, cross ?? null) : kalmanDiscrete(A, C, G ?? null, W, V, form ?? "predictor", cross ?? null);
    const discrete = "form" in f ? (f as { form: "predictor" | "current"; M?: Matrix; Z?: Matrix }) : null;
    return {
      L: f.L.to2DArray(),
      P: f.P.to2DArray(),
      observerPoles: f.observerPoles,
      residual: f.residual,
      conditionIndicator: f.conditionIndicator,
      refined: f.refined,
      method: f.method,
      form: discrete ? discrete.form : "continuous",
      ...(discrete?.M ? { M: rows(discrete.M) } : {}),
      ...(discrete?.Z ? { Z: rows(discrete.Z) } : {}),
      diagnostics: diagnostics({ residual: f.residual, condition: f.conditionIndicator, conditionMeaning: RICCATI_CONDITION, warnings: f.warnings }),
    };
  }) as RequestHandler<KalmanResultJson>,

  "design.brysonWeights": ((params) => {
    const p = requireObjectParams(params, "design.brysonWeights");
    const raw = p.maxState;
    if (!Array.isArray(raw)) throw new EngineError("invalid-argument", "maxState must be an array of positive numbers (null for an unweighted state)", { field: "maxState" });
    if (raw.length > ANALYSIS_LIMITS.maxStates) throw new EngineError("invalid-argument", `maxState has ${raw.length} entries; at most ${ANALYSIS_LIMITS.maxStates}`, { field: "maxState" });
    // JSON has no Infinity: null stands for "no limit" (Qii = 0), which the engine writes as Infinity.
    const maxState = requireNumberListParam({ maxState: raw.map((x: unknown) => (x === null ? 1 : x)) }, "maxState").map((x, i) => (raw[i] === null ? Infinity : x));
    const maxInput = requireNumberListParam(p, "maxInput", { maxLength: ANALYSIS_LIMITS.maxStates });
    const { Q, R } = brysonWeights(maxState, maxInput);
    const unweighted = raw.filter((x: unknown) => x === null).length;
    return {
      Q: Q.to2DArray(),
      R: R.to2DArray(),
      diagnostics: diagnostics({ warnings: unweighted > 0 ? [`${unweighted} state(s) unweighted (Qii = 0): the pair (Q, A) must still be detectable for an LQR design`] : [] }),
    };
  }) as RequestHandler<BrysonResult>,

  "design.lqrSweep": ((params, context) => {
    const p = requireObjectParams(params, "design.lqrSweep");
    const A = requireStateMatrixParam(p, "A", { square: true });
    const B = requireStateMatrixParam(p, "B");
    const Q = requireStateMatrixParam(p, "Q", { square: true });
    const R = requireMatrixParam(p, "R", { square: true });
    const rhoValues = requireNumberListParam(p, "rhoValues", { maxLength: ANALYSIS_LIMITS.maxSweepValues });
    rhoValues.forEach((rho, i) => {
      if (!(rho > 0)) throw new EngineError("invalid-argument", `rhoValues[${i}] must be positive (it is ${rho})`, { field: "rhoValues", index: i });
    });
    const sampleTime = optionalSampleTimeParam(p);
    // One Riccati solve per ρ: cancellation is checked and progress reported between solves.
    const points: LqrSweepResult["points"] = [];
    rhoValues.forEach((rho, i) => {
      throwIfCancelled(context, "design.lqrSweep", `after ${i} of ${rhoValues.length} weights`);
      points.push(...lqrWeightSweep(A, B, Q, R, [rho], sampleTime));
      context.reportProgress({ fraction: (i + 1) / rhoValues.length, label: `LQR sweep: ${i + 1} of ${rhoValues.length} weights` });
    });
    return { points, diagnostics: diagnostics() };
  }) as RequestHandler<LqrSweepResult>,
};
