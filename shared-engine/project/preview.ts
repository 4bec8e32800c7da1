/**
 * The lean pipeline behind dragging a pole (or scrubbing a weight): only what the workbench
 * redraws while the hand moves — gain, closed-loop poles, the step response with its metrics and
 * the Bode curve of the loop at the plant input. Plant structure, transmission zeros, margins
 * (with their grid refinement) and requirement checks are skipped; the full `evaluateVariant`
 * runs once when the gesture ends and supplies them.
 *
 * The shared fields are computed by the very same modules, in the same order, as
 * `evaluateVariant` (discretizeVariant, feedbackDesign, resultJson, responseResults); only the
 * step samples take a fast path on uniform grids (uniformStep). So they agree to rounding (test/engine/project/preview.test.ts checks
 * 1e-10 relative agreement). Variants whose design the preview does not cover (observers,
 * nonlinear plants and their simulations) fall back to the full pipeline, flagged `preview: false`.
 */
import { toErrorPayload } from "../errors";
import { stepResponse } from "../analysis/timeResponse";
import { poles as systemPoles } from "../analysis/poles";
import { atPath, buildPlantModel } from "./buildPlant";
import { loopAtInput } from "./closedLoop";
import { evaluateVariant, type EvaluateOptions } from "./evaluateVariant";
import type { PlantSpec, VariantSpec } from "./format";
import type { VariantResult } from "./result";
import { assertFiniteResult } from "./finite";
import { closedLoopJson } from "./resultJson";
import { discretizeForVariant } from "./discretizeVariant";
import { designFeedback, reportFeedback } from "./feedbackDesign";
import { addBodeResult, addStepResult, checkSampleTimes } from "./responseResults";
import { uniformStep } from "./uniformStep";

/**
 * A preview: a VariantResult without `plant`, `margins`, `disturbanceStep` and requirement
 * checks (when `preview` is true). `checks` holds only what the preview computes
 * (closed-loop stability, Riccati residual).
 */
export type VariantPreview = VariantResult & {
  /** True: the lean pipeline ran; false: the variant needed the full pipeline (see module note). */
  preview: boolean;
};

/** Whether the lean pipeline covers this variant on this plant (else the full one runs). */
export function previewCovers(plant: PlantSpec, variant: VariantSpec): boolean {
  return plant.model.type !== "nonlinear" && !variant.observer && !variant.nonlinearCheck && !variant.robustness && !!variant.stateFeedback;
}

/**
 * Computes: for plant (A: n×n, B: n×m, C: p×n, D: p×m) and a variant's state-feedback spec, the
 *   gain K (m×n, with Ki and the reference gain when asked), the closed-loop poles eig(A − BK),
 *   the step response of the servo loop at `variant.step.times` with its metrics, and the loop
 *   −K(sI − A)⁻¹B broken at the first plant input at `variant.bode.frequencies` — the same
 *   fields, by the same routines, as `evaluateVariant`.
 * Requires: a validated plant and variant (as after `loadProjectValue`); linear plant model,
 *   no observer (else the full pipeline runs and `preview` is false).
 * Method: pole placement as `placePoles` (controllability staircase, then Miminis & Paige
 *   deflation for one input or Kautsky, Nichols & Van Dooren, "Robust pole assignment in linear
 *   state feedback", Int. J. Control 41, 1985, for several) or LQR via the Riccati equation (Laub, "A Schur method for solving algebraic
 *   Riccati equations", IEEE TAC 24, 1979); step response by the exact zero-order-hold
 *   discretisation of the closed loop, one matrix exponential per distinct step (Van Loan,
 *   "Computing integrals involving the matrix exponential", IEEE TAC 23, 1978) and then one
 *   matrix–vector product per sample; frequency response by Hessenberg reduction of A and one
 *   Hessenberg solve per frequency (Laub, "Efficient multivariable frequency response
 *   computations", IEEE TAC 26, 1981).
 * Cost: O(n³) for the design and the exponential, O(N·n²) for N step samples and O(F·n²) for F
 *   frequencies; no margins search, no structure or zero computation.
 * Accuracy: as evaluateVariant for the shared fields (identical arithmetic); the result is
 *   checked for NaN/Infinity before return.
 * Errors: none thrown — a failure is carried as `error: {kind, message, details}` (kinds as
 *   evaluateVariant: "invalid-argument", "uncontrollable", "no-convergence", ...).
 * Example: previewVariant({id:"p", model:{type:"state-space", A:[[0]], B:[[1]], C:[[1]],
 *   sampleTime:null}}, {id:"v", plant:"p", stateFeedback:{method:"poles", poles:[-2]}}).gain.K
 *   is [[2]]; residual check: eig(A − BK) = −2 exactly.
 */
export function previewVariant(plantSpec: PlantSpec, variant: VariantSpec, options: EvaluateOptions = {}): VariantPreview {
  if (!previewCovers(plantSpec, variant)) return { ...evaluateVariant(plantSpec, variant, options), preview: false };
  const result: VariantPreview = { id: variant.id, name: variant.name ?? variant.id, checks: [], warnings: [], preview: true };
  try {
    run(plantSpec, variant, options, result);
    assertFiniteResult(result);
  } catch (error) {
    const payload = toErrorPayload(error);
    return {
      id: variant.id,
      name: variant.name ?? variant.id,
      checks: [],
      warnings: result.warnings,
      error: { kind: payload.kind, message: payload.message, details: payload.details },
      preview: true,
    };
  }
  return result;
}

// Mirrors evaluateVariant's run() for a linear plant without observer, through the same shared
// steps; keep the two in step (the agreement test fails when they drift).
function run(plantSpec: PlantSpec, variant: VariantSpec, options: EvaluateOptions, result: VariantPreview): void {
  const vpath = `variants[${options.variantIndex ?? 0}]`;
  const model = discretizeForVariant(buildPlantModel(plantSpec.model, `plants[${options.plantIndex ?? 0}].model`), variant, vpath, result);
  const T = model.sampleTime;

  const feedback = atPath(`${vpath}.stateFeedback`, () => designFeedback(model, variant, result, { guaranteedMarginCheck: false }));
  reportFeedback(feedback, T, result);
  result.closedLoop = closedLoopJson(feedback.servoLoop);

  if (variant.bode) addBodeResult(model, loopAtInput(feedback.loopA, feedback.loopB, feedback.loopK, 0, T), variant.bode.frequencies, vpath, result);

  if (variant.step) {
    const system = feedback.servoLoop;
    const times = variant.step.times;
    checkSampleTimes(times, T, `${vpath}.step.times`);
    const loopPoles = systemPoles(system);
    const resp = atPath(`${vpath}.step`, () => uniformStep(system, times, loopPoles) ?? stepResponse(system, times, { input: 0 }));
    addStepResult(model, system, resp, loopPoles, true, result);
  }
}
