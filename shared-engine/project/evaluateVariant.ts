/**
 * The one evaluation pipeline: from a plant and a design variant (as in a project file) to a
 * VariantResult. The workbench, the command line and the design sheet all call this, so a
 * design is computed the same way everywhere.
 *
 * Order: build the plant model → discretize (when asked) → structure of the plant → state
 * feedback (LQR or poles, with integral action or reference feedforward) → observer (poles or
 * Kalman) and the assembled compensator → Bode, margins, step → checks → requirements.
 *
 * Failures never escape as exceptions: a variant that cannot be designed carries
 * `error: {kind, message}` and no gain, and its result holds no NaN (checked before return).
 */
import type { Matrix } from "ml-matrix";
import { EngineError, toErrorPayload } from "../errors";
import type { StateSpace } from "../model";
import { frequencyGrid } from "../analysis/frequencyGrid";
import { stepResponse } from "../analysis/timeResponse";
import { poles as plantPoles } from "../analysis/poles";
import { placeObserverPoles } from "../design/observerByPoles";
import { kalmanContinuous, kalmanDiscrete } from "../design/kalman";
import { assembleCompensator } from "../design/compensator";
import { atPath, buildNonlinearPlant, buildPlantModel, toComplex, type BuiltNonlinearPlant } from "./buildPlant";
import { nonlinearPlantFields, runNonlinearCheck, runRobustness, type FeedbackGains } from "./nonlinearChecks";
import { loopAtInput } from "./closedLoop";
import type { PlantSpec, RequirementSpec, VariantSpec } from "./format";
import type { VariantResult } from "./result";
import { checkRequirements } from "./requirements";
import { assertFiniteResult } from "./finite";
import { disturbanceStep } from "./disturbanceStep";
import { closedLoopJson, complexList, rows } from "./resultJson";
import { discretizeForVariant } from "./discretizeVariant";
import { designFeedback, integratedOutputIndices, reportFeedback, type FeedbackDesign } from "./feedbackDesign";
import { plantReport } from "./plantReport";
import { addBodeResult, addStepResult, checkSampleTimes } from "./responseResults";
import { addMarginsResult } from "./marginsResult";

export interface EvaluateOptions {
  requirements?: RequirementSpec[];
  /** Index of the variant in its project, for error paths ("variants[2]..."). */
  variantIndex?: number;
  plantIndex?: number;
}

export { RICCATI_RESIDUAL_LIMIT } from "./feedbackDesign";

export function evaluateVariant(plantSpec: PlantSpec, variant: VariantSpec, options: EvaluateOptions = {}): VariantResult {
  const result: VariantResult = { id: variant.id, name: variant.name ?? variant.id, checks: [], warnings: [] };
  try {
    run(plantSpec, variant, options, result);
    assertFiniteResult(result);
  } catch (error) {
    const payload = toErrorPayload(error);
    return {
      id: variant.id,
      name: variant.name ?? variant.id,
      ...(result.plant ? { plant: result.plant } : {}),
      checks: result.checks.filter((c) => !c.name.startsWith("requirement:")),
      warnings: result.warnings,
      error: { kind: payload.kind, message: payload.message, details: payload.details },
    };
  }
  return result;
}

function run(plantSpec: PlantSpec, variant: VariantSpec, options: EvaluateOptions, result: VariantResult): void {
  const vpath = `variants[${options.variantIndex ?? 0}]`;
  const ppath = `plants[${options.plantIndex ?? 0}].model`;
  let nonlinear: BuiltNonlinearPlant | null = null;
  let model: StateSpace;
  if (plantSpec.model.type === "nonlinear") {
    nonlinear = buildNonlinearPlant(plantSpec.model, ppath);
    model = nonlinear.linearization.model;
  } else {
    model = buildPlantModel(plantSpec.model, ppath);
  }

  model = discretizeForVariant(model, variant, vpath, result);
  const T = model.sampleTime;
  result.plant = plantReport(model);
  if (nonlinear) Object.assign(result.plant, nonlinearPlantFields(nonlinear));

  // ---- State feedback --------------------------------------------------------------------
  let feedback: FeedbackDesign | null = null;
  if (variant.stateFeedback) {
    feedback = atPath(`${vpath}.stateFeedback`, () => designFeedback(model, variant, result, { guaranteedMarginCheck: true }));
    reportFeedback(feedback, T, result);
  }

  // ---- Observer ----------------------------------------------------------------------------
  let observerL: Matrix | null = null;
  let currentM: Matrix | null = null;
  if (variant.observer) {
    const o = variant.observer;
    atPath(`${vpath}.observer`, () => {
      if (o.method === "poles") {
        const placed = placeObserverPoles(model.A, model.C, o.poles.map(toComplex));
        observerL = placed.L;
        result.observerPoles = complexList(placed.achievedPoles);
        result.warnings.push(...placed.warnings.map((w) => `observer: ${w}`));
      } else {
        const G = model.F.columns > 0 ? model.F : model.B;
        if (T === null) {
          const k = kalmanContinuous(model.A, model.C, G, o.processNoise, o.measurementNoise);
          observerL = k.L;
          result.observerPoles = complexList(k.observerPoles);
          result.kalman = { P: rows(k.P), residual: k.residual };
          result.warnings.push(...k.warnings.map((w) => `Kalman filter: ${w}`));
        } else {
          const k = kalmanDiscrete(model.A, model.C, G, o.processNoise, o.measurementNoise, o.form ?? "predictor");
          observerL = k.L;
          if (k.M) currentM = k.M;
          result.observerPoles = complexList(k.observerPoles);
          result.kalman = { P: rows(k.P), residual: k.residual };
          result.warnings.push(...k.warnings.map((w) => `Kalman filter: ${w}`));
        }
      }
    });
    if (observerL) {
      result.gain = { ...(result.gain ?? { K: [] }), L: rows(observerL) };
      if (currentM) result.gain.M = rows(currentM);
      if (!feedback) delete (result.gain as { K?: unknown }).K;
    }
  }

  // ---- Compensator assembly (observer + feedback) --------------------------------------------
  let compensatorLoop: StateSpace | null = null;
  let servoLoop = feedback?.servoLoop ?? null;
  if (feedback && observerL) {
    const form = variant.observer?.method === "kalman" && T !== null ? (variant.observer.form ?? "predictor") : "predictor";
    const assembled = atPath(`${vpath}.observer`, () =>
      assembleCompensator({
        model,
        K: feedback!.K,
        L: observerL!,
        Ki: feedback!.Ki,
        M: currentM ?? undefined,
        observerForm: form,
        integratedOutputs: integratedOutputIndices(model, variant),
        referenceGain: feedback!.referenceGain,
      }),
    );
    result.checks.push({
      name: "separation",
      passed: assembled.separation.passed,
      detail: `closed-loop poles equal the feedback poles with the observer poles (largest mismatch ${assembled.separation.maxMismatch.toExponential(2)})`,
      value: assembled.separation.maxMismatch,
      limit: assembled.separation.tolerance,
    });
    compensatorLoop = assembled.loopAtPlantInput;
    servoLoop = assembled.servoLoop;
    result.warnings.push(...assembled.warnings);
  }

  if (servoLoop) result.closedLoop = closedLoopJson(servoLoop);

  // ---- Bode ------------------------------------------------------------------------------------
  const inputLoop = compensatorLoop ?? (feedback ? loopAtInput(feedback.loopA, feedback.loopB, feedback.loopK, 0, T) : null);
  if (variant.bode) addBodeResult(model, inputLoop, variant.bode.frequencies, vpath, result);

  // ---- Margins -----------------------------------------------------------------------------------
  addMarginsResult(model, variant, { feedback, inputLoop, compensatorLoop }, vpath, result);

  // ---- Step --------------------------------------------------------------------------------------
  if (variant.step) {
    const system = servoLoop ?? model;
    const times = variant.step.times;
    checkSampleTimes(times, T, `${vpath}.step.times`);
    const resp = atPath(`${vpath}.step`, () => stepResponse(system, times, { input: 0 }));
    addStepResult(model, system, resp, plantPoles(system), servoLoop !== null, result);
  }

  // ---- Disturbance step ----------------------------------------------------------------------------
  if (variant.disturbanceStep) {
    const spec = variant.disturbanceStep;
    checkSampleTimes(spec.times, T, `${vpath}.disturbanceStep.times`);
    const system = servoLoop ?? model;
    result.disturbanceStep = atPath(`${vpath}.disturbanceStep`, () => disturbanceStep(system, model, spec, servoLoop !== null, `${vpath}.disturbanceStep`));
  }

  // ---- Nonlinear plant: simulation and parameter sweep ------------------------------------------
  if (variant.nonlinearCheck || variant.robustness) {
    const which = variant.nonlinearCheck ? "nonlinearCheck" : "robustness";
    if (!nonlinear) throw new EngineError("invalid-argument", `${vpath}.${which}: applies only to a plant of type "nonlinear"`, {});
    if (!feedback) throw new EngineError("invalid-argument", `${vpath}.${which}: needs a stateFeedback design`, {});
    const gains: FeedbackGains = {
      K: feedback.K,
      Ki: feedback.Ki,
      integratedOutputs: integratedOutputIndices(model, variant).map((i) => model.names.outputs[i]!),
    };
    if (variant.nonlinearCheck) atPath(`${vpath}.nonlinearCheck`, () => runNonlinearCheck(nonlinear!, variant, gains, result));
    if (variant.robustness) atPath(`${vpath}.robustness`, () => runRobustness(nonlinear!, variant, gains, result));
  }

  if (options.requirements && options.requirements.length > 0) result.checks.push(...checkRequirements(options.requirements, result));
}

/** Used by callers that want the automatic grid for a plant (the workbench's Bode view). */
export function defaultFrequencies(plantSpec: PlantSpec): number[] {
  return frequencyGrid(buildPlantModel(plantSpec.model, "plant"));
}
