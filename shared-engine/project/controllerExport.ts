/**
 * The controller export: a variant's design as plain JSON that a software engineer codes from
 * (format "loopwright-controller", version 1): the sampled difference equations, the signals
 * with units, the operating point, limits, anti-windup, the execution order per sample, the
 * checks that the exported equations reproduce the design, and the design's fingerprint.
 * Documented in docs/project-format.md ("Controller export").
 * WARNING: renaming a field breaks the code generators and scripts that read this file; add a
 * new version instead.
 */
import { Matrix } from "ml-matrix";
import { EngineError } from "../errors";
import { ENGINE_VERSION } from "../version";
import { discretize, type StateSpace } from "../model";
import { controllerImplementation, type InputLimit } from "../design/implementation";
import { atPath, buildNonlinearPlant, buildPlantModel } from "./buildPlant";
import { evaluateVariant } from "./evaluateVariant";
import { fingerprint } from "./fingerprint";
import type { PlantSpec, VariantSpec } from "./format";
import type { Check } from "./result";

export const CONTROLLER_FORMAT = "loopwright-controller";
export const CONTROLLER_VERSION = 1;

export interface ControllerExport {
  format: typeof CONTROLLER_FORMAT;
  version: typeof CONTROLLER_VERSION;
  engineVersion: string;
  /** The design's fingerprint (plant + variant + engine version), as a sign-off records it. */
  fingerprint: string;
  variant: string;
  plant: string;
  /** Seconds between samples. */
  sampleTime: number;
  /** "discrete": designed on the sampled plant; "continuous": a continuous design sampled at sampleTime. */
  designedIn: "discrete" | "continuous";
  signals: {
    references: { name: string; unit: string }[];
    measurements: { name: string; unit: string }[];
    inputs: { name: string; unit: string }[];
    /** Controller states xc, in order (est_<state>, int_<output>). */
    states: string[];
  };
  /** Nonlinear plants: absolute values at the operating point; the equations run on deviations. */
  operatingPoint?: { references: number[]; measurements: number[]; inputs: number[] };
  matrices: { Ac: number[][]; Bc: number[][]; Cc: number[][]; Dc: number[][]; Bsat: number[][] };
  initialState: number[];
  limits: { input: string; min: number | null; max: number | null; rateLimit: number | null }[];
  antiWindup: { method: "back-calculation" | "conditional" | "none"; trackingGain: number | null; integratorStates: number[] };
  executionOrder: string[];
  checks: Check[];
  warnings: string[];
}

/** Only these keys shape the controller; the export evaluates them and skips plots and sweeps. */
const DESIGN_KEYS = ["id", "name", "plant", "discretize", "stateFeedback", "integralAction", "referenceFeedforward", "observer"] as const;

/**
 * Computes: the controller export of one variant (see `ControllerExport`), at the design's
 *   sample period, or at `options.sampleTime` for a continuous design.
 * Requires: a validated plant and variant (as in a loaded project) with a state-feedback design;
 *   without an observer, a plant whose outputs are its states (C = I, D = 0).
 * Method: the pipeline's design steps (`evaluateVariant` on the design keys), then
 *   `controllerImplementation`; the fingerprint of the full plant and variant (`fingerprint`).
 * Cost: one design (Riccati or placement, observer) plus O((n + nc)³) for the checks.
 * Accuracy: as `controllerImplementation`; numbers are exported in full double precision.
 * Errors: the variant's design error (its kind and message), "invalid-argument" (no state
 *   feedback; needs an observer; missing or conflicting sample period), and those of
 *   `controllerImplementation`.
 * Example:
 *   const out = controllerExport(rackPlant, lqrIntegralVariant, { sampleTime: 1 });
 *   // out.checks.every((c) => c.passed)
 */
export function controllerExport(plantSpec: PlantSpec, variantSpec: VariantSpec, options: { sampleTime?: number } = {}): ControllerExport {
  const vpath = `variant ${variantSpec.id}`;
  const designOnly = Object.fromEntries(DESIGN_KEYS.filter((k) => variantSpec[k] !== undefined).map((k) => [k, variantSpec[k]])) as unknown as VariantSpec;
  const result = evaluateVariant(plantSpec, designOnly);
  if (result.error) throw new EngineError(result.error.kind, result.error.message, result.error.details);
  if (!variantSpec.stateFeedback || !result.gain?.K) {
    throw new EngineError("invalid-argument", `${vpath} has no state-feedback design, so there is no controller to export`, { variant: variantSpec.id });
  }
  const gainRows = result.gain;

  let model: StateSpace;
  let operatingPoint: { inputs: number[]; outputs: number[] } | undefined;
  let limits: InputLimit[] | undefined;
  if (plantSpec.model.type === "nonlinear") {
    const built = buildNonlinearPlant(plantSpec.model, "plant");
    model = built.linearization.model;
    operatingPoint = { inputs: [...built.point.inputs], outputs: [...built.point.outputs] };
    limits = plantSpec.model.inputs.map((u) => ({ min: u.min, max: u.max, rateLimit: u.rateLimit }));
  } else {
    model = buildPlantModel(plantSpec.model, "plant");
  }
  if (variantSpec.discretize) {
    const d = variantSpec.discretize;
    const method = d.method === "bilinear" ? "tustin" : d.method;
    model = discretize(model, d.sampleTime, { method, prewarpRadPerSec: d.prewarpRadPerSec });
  }
  const integratedOutputs = (variantSpec.integralAction?.outputs ?? []).map((o) => (typeof o === "number" ? o : model.names.outputs.indexOf(o)));
  const observerForm = variantSpec.observer?.method === "kalman" && model.sampleTime !== null ? (variantSpec.observer.form ?? "predictor") : "predictor";
  const impl = atPath(vpath, () =>
    controllerImplementation(
      {
        model,
        K: gainRows.K,
        ...(gainRows.Ki ? { Ki: gainRows.Ki, integratedOutputs } : {}),
        ...(gainRows.L ? { L: gainRows.L, observerForm } : {}),
        ...(gainRows.M && observerForm === "current" ? { M: gainRows.M } : {}),
        ...(gainRows.referenceGain ? { referenceGain: gainRows.referenceGain } : {}),
      },
      {
        ...(options.sampleTime !== undefined ? { sampleTime: options.sampleTime } : {}),
        ...(limits ? { limits } : {}),
        ...(operatingPoint ? { operatingPoint } : {}),
        ...(variantSpec.integralAction?.antiWindup ? { antiWindup: variantSpec.integralAction.antiWindup } : {}),
      },
    ),
  );
  // −0 prints as 0 in JSON; normalise it so the object equals its own JSON round trip.
  const rows = (M: Matrix): number[][] => M.to2DArray().map((row) => row.map((v) => (v === 0 ? 0 : v)));
  return {
    format: CONTROLLER_FORMAT,
    version: CONTROLLER_VERSION,
    engineVersion: ENGINE_VERSION,
    fingerprint: fingerprint(plantSpec, variantSpec, ENGINE_VERSION),
    variant: variantSpec.id,
    plant: plantSpec.id,
    sampleTime: impl.sampleTime,
    designedIn: impl.designedIn,
    signals: impl.signals,
    ...(operatingPoint ? { operatingPoint: impl.operatingPoint } : {}),
    matrices: { Ac: rows(impl.Ac), Bc: rows(impl.Bc), Cc: rows(impl.Cc), Dc: rows(impl.Dc), Bsat: rows(impl.Bsat) },
    initialState: impl.initialState,
    limits: impl.limits.map((l, j) => ({ input: impl.signals.inputs[j]!.name, ...l })),
    antiWindup: impl.antiWindup,
    executionOrder: impl.executionOrder,
    checks: impl.checks.map((c) => ({ ...c })),
    warnings: [...result.warnings, ...impl.warnings],
  };
}
