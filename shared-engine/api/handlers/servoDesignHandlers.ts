/**
 * Bridge handlers of the remaining design routines: integral (servo) action by LQR or pole
 * placement, reference feedforward, observer-based compensator assembly, and the reduced-order
 * observer.
 */
import { EngineError } from "../../errors";
import { assembleCompensator, designIntegralLqr, designIntegralPoles, reducedOrderObserver, referenceFeedforward } from "../../design";
import type { CompensatorResult, FeedforwardResult, IntegralDesignResult, ReducedObserverResultJson } from "../servoContractTypes";
import { diagnostics, modelToJson, withFieldPaths, type RequestHandler } from "../handlerSupport";
import {
  ANALYSIS_LIMITS,
  optionalEnumParam,
  optionalIndexListParam,
  optionalMatrixParam,
  requireComplexListParam,
  requireMatrixParam,
  requireModelParam,
  requireNumberListParam,
  requireObjectParams,
  requireStateMatrixParam,
} from "../params";
import { placementJson, placementOptions, RICCATI_CONDITION } from "./designHandlers";

export const servoDesignHandlers = {
  "design.integral": ((params) => {
    const p = requireObjectParams(params, "design.integral");
    const model = requireModelParam(p);
    const outputs = optionalIndexListParam(p, "outputs", model.C.rows, "output");
    if (outputs === undefined) throw new EngineError("invalid-argument", "outputs is required: the 0-based indices of the outputs to integrate", { field: "outputs" });
    const method = optionalEnumParam(p, "method", ["lqr", "poles"] as const);
    if (method === undefined) throw new EngineError("invalid-argument", 'method is required: "lqr" (Q, R, integratorWeights) or "poles" (poles, integratorPoles)', { field: "method" });
    const design =
      method === "lqr"
        ? (() => {
            const Q = requireStateMatrixParam(p, "Q", { square: true });
            const R = requireMatrixParam(p, "R", { square: true });
            const weights = requireNumberListParam(p, "integratorWeights", { maxLength: ANALYSIS_LIMITS.maxStates });
            return withFieldPaths(() => designIntegralLqr(model, outputs, Q, R, weights));
          })()
        : (() => {
            const poles = requireComplexListParam(p, "poles");
            const integratorPoles = requireComplexListParam(p, "integratorPoles");
            return withFieldPaths(() => designIntegralPoles(model, outputs, poles, integratorPoles));
          })();
    const check = design.servoDcGain;
    return {
      K: design.K.to2DArray(),
      Kx: design.Kx.to2DArray(),
      Ki: design.Ki.to2DArray(),
      closedLoopPoles: design.closedLoopPoles,
      gainNorm: design.gainNorm,
      integratorNames: [...design.integratorNames],
      servoLoop: modelToJson(design.servoLoop),
      augmented: { A: design.augmented.A.to2DArray(), B: design.augmented.B.to2DArray() },
      servoDcGain: { fromReference: check.fromReference.to2DArray(), fromDisturbance: check.fromDisturbance.to2DArray(), maxError: check.maxError, tolerance: check.tolerance, passed: check.passed },
      riccati: design.riccati ? { X: design.riccati.X.to2DArray(), residual: design.riccati.residual, conditionIndicator: design.riccati.conditionIndicator } : null,
      diagnostics: diagnostics({
        residual: design.riccati ? design.riccati.residual : check.maxError,
        condition: design.riccati ? design.riccati.conditionIndicator : null,
        conditionMeaning: design.riccati ? RICCATI_CONDITION : null,
        warnings: design.warnings,
      }),
    };
  }) as RequestHandler<IntegralDesignResult>,

  "design.feedforward": ((params) => {
    const p = requireObjectParams(params, "design.feedforward");
    const model = requireModelParam(p);
    const K = requireMatrixParam(p, "K");
    const f = withFieldPaths(() => referenceFeedforward(model, K));
    return {
      N: f.N.to2DArray(),
      warning: f.warning,
      closedLoopDcGain: f.closedLoopDcGain.to2DArray(),
      residual: f.residual,
      diagnostics: diagnostics({ residual: f.residual, warnings: [f.warning] }),
    };
  }) as RequestHandler<FeedforwardResult>,

  "design.compensator": ((params) => {
    const p = requireObjectParams(params, "design.compensator");
    const model = requireModelParam(p);
    const K = requireMatrixParam(p, "K");
    const L = requireMatrixParam(p, "L");
    const Ki = optionalMatrixParam(p, "Ki");
    const M = optionalMatrixParam(p, "M");
    const referenceGain = optionalMatrixParam(p, "referenceGain");
    const form = optionalEnumParam(p, "form", ["predictor", "current"] as const);
    if (form === undefined) throw new EngineError("invalid-argument", 'form is required: "predictor" or "current"', { field: "form" });
    const integratedOutputs = optionalIndexListParam(p, "integratedOutputs", model.C.rows, "output");
    const c = withFieldPaths(
      () =>
        assembleCompensator({
          model,
          K,
          L,
          observerForm: form,
          ...(Ki ? { Ki } : {}),
          ...(M ? { M } : {}),
          ...(referenceGain ? { referenceGain } : {}),
          ...(integratedOutputs ? { integratedOutputs } : {}),
        }),
      { rename: { observerForm: "form" } },
    );
    const warnings = [...c.warnings];
    if (!c.separation.passed) warnings.push(`the closed-loop poles differ from the regulator and observer poles by ${c.separation.maxMismatch.toExponential(2)} (tolerance ${c.separation.tolerance.toExponential(2)})`);
    return {
      controller: modelToJson(c.controller),
      closedLoop: modelToJson(c.closedLoop),
      closedLoopPoles: c.closedLoopPoles,
      expectedPoles: c.expectedPoles,
      separation: { ...c.separation },
      margins: c.margins ? { observerLoop: { ...c.margins.observerLoop }, stateFeedbackLoop: { ...c.margins.stateFeedbackLoop } } : null,
      diagnostics: diagnostics({ residual: c.separation.maxMismatch, warnings }),
    };
  }) as RequestHandler<CompensatorResult>,

  "design.reducedObserver": ((params) => {
    const p = requireObjectParams(params, "design.reducedObserver");
    const A = requireStateMatrixParam(p, "A", { square: true });
    const B = requireStateMatrixParam(p, "B");
    const C = requireMatrixParam(p, "C");
    const poles = requireComplexListParam(p, "poles");
    const r = withFieldPaths(() => reducedOrderObserver(A, B, C, poles, placementOptions(p)));
    return {
      L: r.L.to2DArray(),
      F: r.F.to2DArray(),
      G: r.G.to2DArray(),
      H: r.H.to2DArray(),
      M: r.M.to2DArray(),
      N: r.N.to2DArray(),
      T: r.T.to2DArray(),
      Tinverse: r.Tinverse.to2DArray(),
      ...placementJson(r),
    };
  }) as RequestHandler<ReducedObserverResultJson>,
};
