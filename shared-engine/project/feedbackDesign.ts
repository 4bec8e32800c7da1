/**
 * The pipeline's state-feedback step, shared by the full evaluation and the drag preview: the
 * gain (LQR or pole placement, with integral action or reference feedforward), the servo loop
 * used for step responses, and what the result reports about them.
 */
import type { Matrix } from "ml-matrix";
import type { Complex } from "../linalg";
import type { StateSpace } from "../model";
import { lqr } from "../design/lqr";
import { placePoles } from "../design/placePoles";
import { designIntegralLqr, designIntegralPoles } from "../design/integralAction";
import { referenceFeedforward } from "../design/feedforward";
import { toComplex } from "./buildPlant";
import { stateFeedbackClosedLoop } from "./closedLoop";
import type { VariantSpec } from "./format";
import type { VariantResult } from "./result";
import { complexList, isStable, rows } from "./resultJson";

/** Tolerance of the Riccati residual check (‖Res‖_F/‖X‖_F); common practice for double precision. */
export const RICCATI_RESIDUAL_LIMIT = 1e-8;

export interface FeedbackDesign {
  K: Matrix;
  Ki?: Matrix;
  closedLoopPoles: Complex[];
  /** The loop used for step responses (outputs: plant outputs then control inputs). */
  servoLoop: StateSpace;
  /** A, B of the system the gain [K Ki] acts on (augmented with integrators when present). */
  loopA: Matrix;
  loopB: Matrix;
  loopK: Matrix;
  referenceGain?: Matrix;
}

export interface FeedbackDesignOptions {
  /**
   * Add the "lqr-guaranteed-margins" check of single-input continuous LQR (the full pipeline
   * does; the drag preview reports only closed-loop stability and the Riccati residual).
   */
  guaranteedMarginCheck: boolean;
}

/** Indices of the outputs that `variant.integralAction` integrates (names resolved on `model`). */
export function integratedOutputIndices(model: StateSpace, variant: VariantSpec): number[] {
  const outs = variant.integralAction?.outputs ?? [];
  return outs.map((o) => (typeof o === "number" ? o : model.names.outputs.indexOf(o)));
}

/**
 * Designs the state feedback that `variant.stateFeedback` asks for on `model`, writing
 * `result.design`, `result.riccati` (LQR), the Riccati residual check and the design warnings.
 * The caller wraps it in `atPath` so errors name `<vpath>.stateFeedback`.
 */
export function designFeedback(model: StateSpace, variant: VariantSpec, result: VariantResult, options: FeedbackDesignOptions): FeedbackDesign {
  const sf = variant.stateFeedback!;
  const T = model.sampleTime;
  const integrated = integratedOutputIndices(model, variant);
  if (variant.integralAction) {
    const ia = variant.integralAction;
    const design =
      sf.method === "lqr"
        ? designIntegralLqr(model, integrated, sf.Q, sf.R, ia.weights ?? integrated.map(() => 1))
        : designIntegralPoles(model, integrated, sf.poles.map(toComplex), (ia.poles ?? []).map(toComplex));
    result.design = { method: sf.method === "lqr" ? "LQR with integral action" : "pole placement with integral action", gainNorm: design.gainNorm };
    if (design.riccati) {
      result.riccati = { X: rows(design.riccati.X), residual: design.riccati.residual, conditionIndicator: design.riccati.conditionIndicator };
      pushResidualCheck(result, design.riccati.residual);
    }
    result.warnings.push(...design.warnings);
    return {
      K: design.Kx,
      Ki: design.Ki,
      closedLoopPoles: design.closedLoopPoles,
      servoLoop: design.servoLoop,
      loopA: design.augmented.A,
      loopB: design.augmented.B,
      loopK: design.K,
    };
  }
  let K: Matrix;
  let closedLoopPoles: Complex[];
  if (sf.method === "lqr") {
    const r = lqr(model.A, model.B, sf.Q, sf.R, sf.N ?? null, T);
    K = r.K;
    closedLoopPoles = r.closedLoopPoles;
    result.riccati = { X: rows(r.X), residual: r.residual, conditionIndicator: r.conditionIndicator };
    result.design = { method: T === null ? "continuous LQR" : "discrete LQR", gainNorm: K.norm("frobenius") };
    pushResidualCheck(result, r.residual);
    if (options.guaranteedMarginCheck && r.margins && r.margins.guaranteeApplies) {
      result.checks.push({
        name: "lqr-guaranteed-margins",
        passed: r.margins.guaranteeHolds,
        detail: "single-input continuous LQR: |1 + L(jω)| ≥ 1, so gain margin [1/2, ∞) and phase margin ≥ 60° (Safonov & Athans 1977)",
        value: r.margins.minReturnDifference,
        limit: 1,
      });
    }
    result.warnings.push(...r.warnings);
  } else {
    const placed = placePoles(model.A, model.B, sf.poles.map(toComplex));
    K = placed.K;
    closedLoopPoles = placed.achievedPoles;
    result.design = {
      method: placed.method === "single-input" ? "pole placement (single input)" : "pole placement (robust, multi-input)",
      gainNorm: placed.gainNorm,
      eigenvectorCondition: placed.eigenvectorCondition,
      maxPoleError: placed.maxPoleError,
    };
    result.warnings.push(...placed.warnings);
  }
  let referenceGain: Matrix | undefined;
  if (variant.referenceFeedforward) {
    const ff = referenceFeedforward(model, K);
    referenceGain = ff.N;
    result.warnings.push(ff.warning);
  }
  return {
    K,
    closedLoopPoles,
    servoLoop: stateFeedbackClosedLoop(model, K, referenceGain),
    loopA: model.A,
    loopB: model.B,
    loopK: K,
    referenceGain,
  };
}

/**
 * Reports a designed feedback: `result.gain` (K, Ki, reference gain), `result.closedLoopPoles`
 * and the "closed-loop-stable" check, judged for a model with sample period `sampleTime`.
 */
export function reportFeedback(feedback: FeedbackDesign, sampleTime: number | null, result: VariantResult): void {
  result.gain = { K: rows(feedback.K) };
  if (feedback.Ki) result.gain.Ki = rows(feedback.Ki);
  if (feedback.referenceGain) result.gain.referenceGain = rows(feedback.referenceGain);
  result.closedLoopPoles = complexList(feedback.closedLoopPoles);
  const stable = isStable(feedback.closedLoopPoles, sampleTime);
  result.checks.push({
    name: "closed-loop-stable",
    passed: stable,
    detail: stable
      ? `every state-feedback closed-loop pole lies ${sampleTime === null ? "in the open left half-plane" : "inside the unit circle"}`
      : "a state-feedback closed-loop pole is unstable",
  });
}

function pushResidualCheck(result: VariantResult, residual: number): void {
  result.checks.push({
    name: "riccati-residual",
    passed: residual <= RICCATI_RESIDUAL_LIMIT,
    detail: `relative Riccati residual ‖Res‖_F/‖X‖_F = ${residual.toExponential(2)} (limit ${RICCATI_RESIDUAL_LIMIT.toExponential(0)})`,
    value: residual,
    limit: RICCATI_RESIDUAL_LIMIT,
  });
}
