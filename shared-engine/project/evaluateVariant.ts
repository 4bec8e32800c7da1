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
import type { Complex } from "../linalg";
import { discretize, type StateSpace } from "../model";
import { frequencyResponse } from "../analysis/frequencyResponse";
import { frequencyGrid } from "../analysis/frequencyGrid";
import { loopMargins, type LoopMargins } from "../analysis/margins";
import { stepResponse } from "../analysis/timeResponse";
import { responseMetrics } from "../analysis/responseMetrics";
import { poles as plantPoles } from "../analysis/poles";
import { transmissionZeros } from "../analysis/zeros";
import { structure } from "../analysis/structure";
import { dcGain } from "../analysis/dcGain";
import { lqr } from "../design/lqr";
import { placePoles } from "../design/placePoles";
import { placeObserverPoles } from "../design/observerByPoles";
import { kalmanContinuous, kalmanDiscrete } from "../design/kalman";
import { designIntegralLqr, designIntegralPoles } from "../design/integralAction";
import { referenceFeedforward } from "../design/feedforward";
import { assembleCompensator } from "../design/compensator";
import { atPath, buildNonlinearPlant, buildPlantModel, toComplex, type BuiltNonlinearPlant } from "./buildPlant";
import { nonlinearPlantFields, runNonlinearCheck, runRobustness, type FeedbackGains } from "./nonlinearChecks";
import { loopAtInput, stateFeedbackClosedLoop } from "./closedLoop";
import type { PlantSpec, RequirementSpec, VariantSpec } from "./format";
import type { ComplexJson, VariantResult } from "./result";
import { checkRequirements } from "./requirements";
import { assertFiniteResult } from "./finite";
import { disturbanceStep } from "./disturbanceStep";

export interface EvaluateOptions {
  requirements?: RequirementSpec[];
  /** Index of the variant in its project, for error paths ("variants[2]..."). */
  variantIndex?: number;
  plantIndex?: number;
}

/** Tolerance of the Riccati residual check (‖Res‖_F/‖X‖_F); common practice for double precision. */
export const RICCATI_RESIDUAL_LIMIT = 1e-8;

const rows = (m: Matrix): number[][] => m.to2DArray();
const complexList = (list: readonly Complex[]): ComplexJson[] => list.map((c) => ({ re: c.re, im: c.im }));

function isStable(poles: readonly Complex[], sampleTime: number | null): boolean {
  return sampleTime === null ? poles.every((p) => p.re < 0) : poles.every((p) => Math.hypot(p.re, p.im) < 1);
}

interface FeedbackDesign {
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

  if (variant.discretize) {
    const d = variant.discretize;
    const method = d.method === "bilinear" ? "tustin" : d.method;
    model = atPath(`${vpath}.discretize`, () => discretize(model, d.sampleTime, { method, prewarpRadPerSec: d.prewarpRadPerSec }));
    result.discrete = {
      A: rows(model.A), B: rows(model.B), C: rows(model.C), D: rows(model.D),
      ...(model.F.columns > 0 ? { F: rows(model.F), E: rows(model.E) } : {}),
      sampleTime: d.sampleTime,
      method,
    };
  }
  const T = model.sampleTime;
  result.plant = plantReport(model);
  if (nonlinear) Object.assign(result.plant, nonlinearPlantFields(nonlinear));

  // ---- State feedback --------------------------------------------------------------------
  let feedback: FeedbackDesign | null = null;
  if (variant.stateFeedback) {
    feedback = atPath(`${vpath}.stateFeedback`, () => designFeedback(model, variant, result));
    result.gain = { K: rows(feedback.K) };
    if (feedback.Ki) result.gain.Ki = rows(feedback.Ki);
    if (feedback.referenceGain) result.gain.referenceGain = rows(feedback.referenceGain);
    result.closedLoopPoles = complexList(feedback.closedLoopPoles);
    const stable = isStable(feedback.closedLoopPoles, T);
    result.checks.push({
      name: "closed-loop-stable",
      passed: stable,
      detail: stable
        ? `every state-feedback closed-loop pole lies ${T === null ? "in the open left half-plane" : "inside the unit circle"}`
        : "a state-feedback closed-loop pole is unstable",
    });
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

  if (servoLoop) {
    result.closedLoop = {
      A: rows(servoLoop.A), B: rows(servoLoop.B), C: rows(servoLoop.C), D: rows(servoLoop.D), F: rows(servoLoop.F), E: rows(servoLoop.E),
      sampleTime: servoLoop.sampleTime,
      names: {
        states: [...servoLoop.names.states],
        inputs: [...servoLoop.names.inputs],
        outputs: [...servoLoop.names.outputs],
        disturbances: [...servoLoop.names.disturbances],
      },
    };
  }

  // ---- Bode ------------------------------------------------------------------------------------
  const inputLoop = compensatorLoop ?? (feedback ? loopAtInput(feedback.loopA, feedback.loopB, feedback.loopK, 0, T) : null);
  if (variant.bode) {
    const system = inputLoop ?? model;
    const fr = atPath(`${vpath}.bode`, () => frequencyResponse(system, variant.bode!.frequencies));
    result.bode = {
      loop: inputLoop ? "plant-input" : "plant",
      input: model.names.inputs[0] ?? "u1",
      output: inputLoop ? model.names.inputs[0] ?? "u1" : model.names.outputs[0] ?? "y1",
      frequency: [...fr.frequencyRadPerSec],
      magnitudeDb: fr.magnitudeDb.map((k) => k[0]![0]!),
      phaseDeg: fr.phaseDeg.map((k) => k[0]![0]!),
    };
    if (fr.unbounded.length > 0) result.warnings.push(`Bode: the response is unbounded at ${fr.unbounded.length} grid frequencies (a pole on the ${T === null ? "imaginary axis" : "unit circle"}); those points are null`);
  }

  // ---- Margins -----------------------------------------------------------------------------------
  if (variant.margins) {
    const spec = variant.margins;
    if ("feedback" in spec) {
      const lm = atPath(`${vpath}.margins`, () => loopMargins(model));
      result.margins = marginsJson(lm, "unity-negative");
    } else {
      if (!inputLoop || !feedback) throw new EngineError("invalid-argument", `${vpath}.margins: margins at the plant input need a state-feedback design`, {});
      const lm = atPath(`${vpath}.margins`, () => loopMargins(inputLoop));
      result.margins = marginsJson(lm, "plant-input");
      if (feedback.loopB.columns > 1 && !compensatorLoop) {
        // A multi-input loop is broken at each input in turn, the other inputs' loops closed;
        // the headline margins are those of the first input.
        result.margins.channels = model.names.inputs.map((name, j) => {
          const ch = atPath(`${vpath}.margins`, () => loopMargins(loopAtInput(feedback.loopA, feedback.loopB, feedback.loopK, j, T)));
          return { input: name, gainDb: ch.gainMarginDb, phaseDeg: ch.phaseMarginDeg, delayMargin: ch.delayMarginSec, sensitivityPeak: ch.sensitivityPeak.value };
        });
      } else if (feedback.loopB.columns > 1) {
        result.warnings.push("margins: the observer-based loop is broken at the first input with the other inputs' loops closed");
      }
      if (compensatorLoop) {
        const sf = loopMargins(loopAtInput(feedback.loopA, feedback.loopB, feedback.loopK, 0, T));
        result.margins.stateFeedbackLoop = { gainDb: sf.gainMarginDb, phaseDeg: sf.phaseMarginDeg };
      }
    }
  }

  // ---- Step --------------------------------------------------------------------------------------
  if (variant.step) {
    const system = servoLoop ?? model;
    const times = variant.step.times;
    checkSampleTimes(times, T, `${vpath}.step.times`);
    const resp = atPath(`${vpath}.step`, () => stepResponse(system, times, { input: 0 }));
    const p = model.C.rows;
    const m = model.B.columns;
    const closed = servoLoop !== null;
    const y0 = resp.outputs[0]!;
    const stable = isStable(plantPoles(system), T);
    const dc = stable ? dcGain(system) : null;
    const finalValue = dc && dc.gain ? dc.gain[0]![0]! : undefined;
    const control = closed ? resp.outputs.slice(p, p + m) : undefined;
    const metrics = responseMetrics(resp.time, y0, {
      reference: closed ? 1 : undefined,
      finalValue,
      stable,
      input: control?.[0],
    });
    result.step = {
      loop: closed ? "closed-loop" : "open-loop",
      input: system.names.inputs[0] ?? "r1",
      time: resp.time,
      output: resp.outputs.slice(0, p),
      outputNames: [...model.names.outputs],
      ...(control ? { control } : {}),
      riseTime: metrics.riseTimeSec,
      settlingTime: metrics.settlingTimeSec,
      overshootPct: metrics.overshootPct,
      peak: metrics.peak,
      peakTime: metrics.peakTimeSec,
      steadyStateValue: metrics.steadyStateValue,
      steadyStateError: closed ? metrics.steadyStateError : null,
      ...(metrics.peakInput !== undefined ? { peakInput: metrics.peakInput } : {}),
      status: metrics.status,
    };
    result.warnings.push(...resp.warnings.map((w) => `step: ${w}`));
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

/** A sampled loop's response exists only at whole sample periods. */
function checkSampleTimes(times: readonly number[], T: number | null, path: string): void {
  if (T === null) return;
  for (const t of times) {
    const k = t / T;
    if (Math.abs(k - Math.round(k)) > 1e-9 * Math.max(1, k)) {
      throw new EngineError("invalid-argument", `${path}: ${t} s is not a whole number of sample periods (T = ${T} s) of the sampled loop`, {});
    }
  }
}

function plantReport(model: StateSpace): NonNullable<VariantResult["plant"]> {
  const p = plantPoles(model);
  const s = structure(model);
  const report: NonNullable<VariantResult["plant"]> = {
    dimensions: { states: model.A.rows, inputs: model.B.columns, outputs: model.C.rows, disturbances: model.F.columns },
    names: {
      states: [...model.names.states],
      inputs: [...model.names.inputs],
      outputs: [...model.names.outputs],
      disturbances: [...model.names.disturbances],
    },
    sampleTime: model.sampleTime,
    poles: complexList(p),
    stable: isStable(p, model.sampleTime),
    controllable: s.controllable,
    observable: s.observable,
    stabilizable: s.stabilizable,
    detectable: s.detectable,
    uncontrollableModes: complexList(s.uncontrollableModes),
    unobservableModes: complexList(s.unobservableModes),
  };
  try {
    report.zeros = complexList(transmissionZeros(model).finite);
  } catch (error) {
    if (!(error instanceof EngineError)) throw error;
    // Zeros are informative here, not required for the design: say why they are missing.
    report.zeros = undefined;
  }
  return report;
}

function integratedOutputIndices(model: StateSpace, variant: VariantSpec): number[] {
  const outs = variant.integralAction?.outputs ?? [];
  return outs.map((o) => (typeof o === "number" ? o : model.names.outputs.indexOf(o)));
}

function designFeedback(model: StateSpace, variant: VariantSpec, result: VariantResult): FeedbackDesign {
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
    if (r.margins && r.margins.guaranteeApplies) {
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

function pushResidualCheck(result: VariantResult, residual: number): void {
  result.checks.push({
    name: "riccati-residual",
    passed: residual <= RICCATI_RESIDUAL_LIMIT,
    detail: `relative Riccati residual ‖Res‖_F/‖X‖_F = ${residual.toExponential(2)} (limit ${RICCATI_RESIDUAL_LIMIT.toExponential(0)})`,
    value: residual,
    limit: RICCATI_RESIDUAL_LIMIT,
  });
}

function marginsJson(lm: LoopMargins, loop: "unity-negative" | "plant-input"): NonNullable<VariantResult["margins"]> {
  const dm = lm.diskMargin;
  return {
    loop,
    gainDb: lm.gainMarginDb,
    phaseDeg: lm.phaseMarginDeg,
    gainCrossover: lm.gainCrossoverRadPerSec,
    phaseCrossover: lm.phaseCrossoverRadPerSec,
    delayMargin: lm.delayMarginSec,
    sensitivityPeak: lm.sensitivityPeak.value,
    complementarySensitivityPeak: lm.complementarySensitivityPeak.value,
    ...(dm.gainRangeDb[0] !== null && dm.gainRangeDb[1] !== null
      ? { diskMargin: { alpha: dm.alpha, gainRangeDb: [dm.gainRangeDb[0], dm.gainRangeDb[1]] as [number, number], phaseDeg: dm.phaseDeg } }
      : {}),
    closedLoopStable: lm.closedLoopStable,
  };
}

/** Used by callers that want the automatic grid for a plant (the workbench's Bode view). */
export function defaultFrequencies(plantSpec: PlantSpec): number[] {
  return frequencyGrid(buildPlantModel(plantSpec.model, "plant"));
}
