/**
 * Parameters of the two long nonlinear checks of a variant, built from the document and the
 * variant's evaluated gains: the closed-loop simulation ("nonlinear.simulate") and the
 * robustness sweep ("nonlinear.robustness").
 *
 * Sign convention (as in the project pipeline): the design uses u = −K x − Ki xᵢ with
 * xᵢ' = r − y, the simulator integrates e = y − r, so the simulator's Ki is −Ki.
 */
import type { NonlinearRobustnessParams, NonlinearSimulateParams, ProjectFile, VariantResult, VariantSpec } from "../../../shared-engine/api/contract";
import { nonlinearModelOf, plantSpecOf } from "./nonlinearEditor";

function integralOf(doc: ProjectFile, variant: VariantSpec, result: VariantResult): { outputs: string[]; Ki: number[][] } | undefined {
  const Ki = result.gain?.Ki;
  if (!Ki || !variant.integralAction) return undefined;
  const model = nonlinearModelOf(doc, variant.plant);
  const outputs = variant.integralAction.outputs.map((o) => (typeof o === "number" ? model.outputs[o]?.name ?? String(o) : o));
  return { outputs, Ki: Ki.map((row) => row.map((x) => -x)) };
}

function requireGain(result: VariantResult | null, variant: VariantSpec): VariantResult & { gain: { K: number[][] } } {
  if (!result?.gain?.K) throw new Error(`Variant ${variant.name ?? variant.id} has no designed gain yet; wait for its design to finish.`);
  return result as VariantResult & { gain: { K: number[][] } };
}

/** Default output times when the variant has no `nonlinearCheck`: 0…5·(slowest closed-loop time constant), 101 points. */
export function defaultCheckTimes(result: VariantResult): number[] {
  const slowest = Math.min(...(result.closedLoopPoles ?? []).map((p) => Math.abs(p.re)).filter((x) => x > 0));
  const dt = result.discrete?.sampleTime;
  let horizon = Number.isFinite(slowest) ? 8 / slowest : 10;
  // Sampled loops: the poles are z-plane; use the sample count instead.
  if (dt) horizon = 200 * dt;
  return Array.from({ length: 101 }, (_, k) => (k * horizon) / 100);
}

export function nonlinearSimulateParams(doc: ProjectFile, variant: VariantSpec, evaluated: VariantResult | null): NonlinearSimulateParams {
  const result = requireGain(evaluated, variant);
  const model = nonlinearModelOf(doc, variant.plant);
  const integral = integralOf(doc, variant, result);
  const antiWindup = variant.integralAction?.antiWindup;
  return {
    plant: plantSpecOf(model),
    request: model.operatingPoint,
    K: result.gain.K,
    ...(integral ? { integral: { ...integral, ...(antiWindup ? { antiWindup } : {}) } } : {}),
    sampleTime: variant.discretize?.sampleTime ?? null,
    scenario: variant.nonlinearCheck?.scenario ?? { setpointSteps: model.outputs.length ? [{ output: model.outputs[0]!.name, size: 1, time: 0 }] : [] },
    times: variant.nonlinearCheck?.times ?? defaultCheckTimes(result),
  };
}

/** Robustness sweep: the variant's own spec, else every parameter ±20 % on a 5-point grid (common practice for a first look). */
export function robustnessParams(doc: ProjectFile, variant: VariantSpec, evaluated: VariantResult | null): NonlinearRobustnessParams {
  const result = requireGain(evaluated, variant);
  const model = nonlinearModelOf(doc, variant.plant);
  const integral = integralOf(doc, variant, result);
  const parameters = variant.robustness?.parameters ?? model.parameters.slice(0, 2).map((p) => ({ name: p.name, percent: 20 }));
  if (parameters.length === 0) throw new Error("This plant has no parameters to vary.");
  return {
    plant: plantSpecOf(model),
    request: model.operatingPoint,
    K: result.gain.K,
    ...(integral ? { integral } : {}),
    parameters,
    sampling: variant.robustness?.sampling ?? { kind: "grid", pointsPerParameter: 5 },
    sampleTime: variant.discretize?.sampleTime ?? null,
  };
}
