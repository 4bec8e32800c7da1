/**
 * Types of the nonlinear-plant requests of the bridge (types only, no numerics): the live
 * equation check, operating point, linearization, closed-loop simulation and robustness sweep.
 * Same conventions as `contractTypes.ts`: plain JSON, no NaN/Infinity, `diagnostics` on every
 * result. Plants and requests use the nonlinear layer's own JSON shapes (names, not indices).
 */
import type { NonlinearPlantSpec, OperatingPoint, OperatingPointRequest } from "../nonlinear";
import type { ComplexValue, Diagnostics, FullModelJson } from "./contractTypes";

export type { NonlinearPlantSpec, OperatingPoint, OperatingPointRequest };

/** One equation to check: `field` is echoed in the problems (e.g. "stateEquations.h"). */
export interface EquationToCheck {
  field: string;
  text: string;
}

/**
 * Either a whole (possibly unfinished) plant spec, or loose equations with the names they may
 * use. Without `names`, unknown names are not reported (only syntax is checked).
 */
export type NonlinearCheckParams =
  | { plant: unknown }
  | { equations: EquationToCheck[] | Record<string, string>; names?: string[] };

export interface EquationProblem {
  /** The equation's field ("stateEquations.h", "outputs[0].equation") or the spec path. */
  field: string;
  /** 1-based column in the equation text; null for a problem that is not in an equation. */
  column: number | null;
  message: string;
}

export interface NonlinearCheckResult {
  ok: boolean;
  problems: EquationProblem[];
  /** Per equation: whether it parsed, the names it uses and those not declared. */
  equations: { field: string; parsed: boolean; namesUsed: string[]; unknownNames: string[] }[];
  diagnostics: Diagnostics;
}

export interface NonlinearPlantParams {
  plant: NonlinearPlantSpec;
  request: OperatingPointRequest;
}

export interface OperatingPointResult {
  operatingPoint: OperatingPoint;
  residual: number;
  iterations: number;
  diagnostics: Diagnostics;
}

export interface LinearizeResult {
  /** Continuous model in deviations from the operating point (sampleTime null). */
  model: FullModelJson;
  operatingPoint: OperatingPoint;
  /** max |f(x0, u0, w0, p)| at the point. */
  equilibriumResidual: number;
  poles: ComplexValue[];
  diagnostics: Diagnostics;
}

export interface IntegralActionJson {
  /** Output names whose error e = y − r is integrated. */
  outputs: string[];
  /** m×r gain in the simulator's convention u = u0 + sat(−K δx − Ki ∫(y − r)). */
  Ki: number[][];
  antiWindup?: "back-calculation" | "conditional" | "none";
  trackingTimeSec?: number;
}

export interface ScenarioJson {
  setpointSteps?: { output: string; size: number; time?: number }[];
  disturbanceChanges?: { disturbance: string; kind: "step" | "ramp"; size: number; time?: number }[];
  initialOffset?: Record<string, number>;
}

export interface NonlinearSimulateParams extends NonlinearPlantParams {
  /** m×n state-feedback gain designed at the operating point. */
  K: number[][];
  integral?: IntegralActionJson;
  /** null / omitted: continuous controller; T > 0: sampled with zero-order hold. */
  sampleTime?: number | null;
  scenario?: ScenarioJson;
  /** Output times (s), strictly increasing, first ≥ 0. */
  times: number[];
  rtol?: number;
  atol?: number;
}

export interface SignalsJson {
  /** [time index][signal index]. */
  states: number[][];
  outputs: number[][];
  inputs: number[][];
}

export interface NonlinearSimulateResult extends SignalsJson {
  time: number[];
  linear: SignalsJson;
  largestDivergence: { time: number; output: string; size: number } | null;
  saturated: boolean;
  stoppedEarly: { time: number; reason: string } | null;
  names: { states: string[]; inputs: string[]; outputs: string[] };
  diagnostics: Diagnostics;
}

export interface NonlinearRobustnessParams extends NonlinearPlantParams {
  K: number[][];
  integral?: { outputs: string[]; Ki: number[][] };
  /** Each parameter varied by ±percent of its value. */
  parameters: { name: string; percent: number }[];
  sampling: { kind: "grid"; pointsPerParameter: number } | { kind: "random"; samples: number; seed: number };
  /** Sampled controller: its period in seconds (plant seen through a zero-order hold); null or absent: continuous. */
  sampleTime?: number | null;
}

export interface NonlinearRobustnessResult {
  parameterNames: string[];
  /** The controller's sample period; null when continuous (then the poles are s-plane). */
  sampleTime: number | null;
  samples: {
    values: number[];
    poles: ComplexValue[];
    stable: boolean;
    gainMarginDb: number | null;
    phaseMarginDeg: number | null;
    /** Why the sample's operating point or linearization failed (null when it did not). */
    error: { kind: string; message: string } | null;
  }[];
  allStable: boolean;
  failedSamples: number;
  worstGainMarginDb: number | null;
  worstPhaseMarginDeg: number | null;
  marginsNote: string;
  diagnostics: Diagnostics;
}
