/**
 * The Loopwright project file, format "loopwright-project", version 1: plain JSON that a design
 * lives in, so it can be kept under version control, reviewed, and re-checked by the command
 * line. The JSON Schema is shared-engine/project/loopwright-project.schema.json; the reference
 * page is docs/project-format.md. WARNING: changing a field's meaning breaks saved projects;
 * add a new version and a migration (migrations.ts) instead.
 */

import type { NonlinearPlantSpec, OperatingPointRequest, ClosedLoopScenario, SweepSampling } from "../nonlinear";

export const PROJECT_FORMAT = "loopwright-project";
export const PROJECT_VERSION = 1;

export type ComplexSpec = number | { re: number; im: number };

export interface SignalNamesSpec {
  states?: string[];
  inputs?: string[];
  outputs?: string[];
  disturbances?: string[];
}

export interface StateSpaceModelSpec {
  type: "state-space";
  A: number[][];
  B: number[][];
  C: number[][];
  D?: number[][];
  F?: number[][];
  E?: number[][];
  /** null for continuous time; the sample period in seconds for a sampled plant. */
  sampleTime: number | null;
  names?: SignalNamesSpec;
  units?: SignalNamesSpec;
}

export interface TransferFunctionModelSpec {
  type: "transfer-function";
  /** Coefficients, highest power first. SISO: number[]; MIMO: one entry per (output, input). */
  numerator: number[] | number[][][];
  denominator: number[] | number[][][];
  sampleTime: number | null;
  names?: SignalNamesSpec;
  units?: SignalNamesSpec;
}

/**
 * G(s) = k·∏(s − z_i)/∏(s − p_i). SISO: `zeros` and `poles` lists and a number `gain`. MIMO:
 * one entry per (output, input) pair, indexed [output][input] like the transfer-function
 * form: `zeros[i][j]` and `poles[i][j]` lists (empty for none) and `gain[i][j]`. The form is
 * MIMO exactly when `gain` is a list of rows. Complex values come in conjugate pairs within
 * each list.
 */
export interface ZeroPoleGainModelSpec {
  type: "zero-pole-gain";
  zeros: ComplexSpec[] | ComplexSpec[][][];
  poles: ComplexSpec[] | ComplexSpec[][][];
  gain: number | number[][];
  sampleTime: number | null;
  names?: SignalNamesSpec;
  units?: SignalNamesSpec;
}

/**
 * A nonlinear plant x' = f(x, u, w, p), y = g(x, u, w, p) typed as equations (the fields of the
 * nonlinear layer's NonlinearPlantSpec), with the operating point the design linearizes at.
 * The design uses the exact linearization there; `nonlinearCheck` and `robustness` variant keys
 * go back to the equations.
 */
export interface NonlinearModelSpec extends NonlinearPlantSpec {
  type: "nonlinear";
  /** Which states and inputs to solve for, and the fixed values and output set-points. */
  operatingPoint: OperatingPointRequest;
  /** Always null: the equations are continuous-time (a variant may discretize the linearization). */
  sampleTime: null;
}

export type ModelSpec = StateSpaceModelSpec | TransferFunctionModelSpec | ZeroPoleGainModelSpec | NonlinearModelSpec;

export interface PlantSpec {
  id: string;
  name?: string;
  description?: string;
  model: ModelSpec;
}

export type StateFeedbackSpec =
  | { method: "lqr"; Q: number[][]; R: number[][]; N?: number[][] }
  | { method: "poles"; poles: ComplexSpec[] };

export interface IntegralActionSpec {
  /** Names (or 0-based indices) of the outputs whose tracking error is integrated. */
  outputs: (string | number)[];
  /** LQR: weight on each integrator state (default 1). Poles: the extra closed-loop poles. */
  weights?: number[];
  poles?: ComplexSpec[];
  /** Anti-windup form used in simulation and export. */
  antiWindup?: "back-calculation" | "conditional" | "none";
}

export type ObserverSpec =
  | { method: "poles"; poles: ComplexSpec[] }
  | {
      method: "kalman";
      /** Process noise covariance, entering through F (or through B when the plant has no F). */
      processNoise: number[][];
      measurementNoise: number[][];
      /** Discrete plants: predictor (x̂[k+1|k]) or current-estimate (x̂[k|k]) form. */
      form?: "predictor" | "current";
    };

export interface VariantSpec {
  id: string;
  name?: string;
  description?: string;
  plant: string;
  parent?: string;
  baseline?: boolean;
  discretize?: { sampleTime: number; method: "zoh" | "tustin" | "bilinear"; prewarpRadPerSec?: number };
  stateFeedback?: StateFeedbackSpec;
  integralAction?: IntegralActionSpec;
  referenceFeedforward?: boolean;
  observer?: ObserverSpec;
  bode?: { frequencies: number[] };
  margins?: { feedback: "unity-negative" } | { at: "plant-input" };
  step?: { times: number[] };
  /** Step of one disturbance (name or 0-based index; default the first) of the given size (default 1). */
  disturbanceStep?: { times: number[]; disturbance?: string | number; size?: number };
  /**
   * Nonlinear plants only: simulate the nonlinear plant under the designed state feedback
   * (measured states, actuator limits, sampled when the variant discretizes) beside the linear
   * prediction. `relativeTolerance` (default 0.1) bounds the largest output divergence relative
   * to the linear prediction's largest output excursion (check "nonlinear-agrees").
   */
  nonlinearCheck?: { times: number[]; scenario: ClosedLoopScenario; relativeTolerance?: number };
  /** Nonlinear plants only: re-solve, re-linearize and re-check the fixed gain over parameter changes. */
  robustness?: { parameters: { name: string; percent: number }[]; sampling: SweepSampling };
  notes?: string;
}

export interface RequirementSpec {
  id: string;
  /** A metric name from the result (overshootPct, settlingTime, riseTime, phaseMarginDeg, gainMarginDb, peakInput, ...). */
  metric: string;
  min?: number;
  max?: number;
  description?: string;
}

export interface SignOffSpec {
  variant: string;
  role: "prepared" | "reviewed" | "approved";
  name: string;
  date: string;
  fingerprint: string;
  comment?: string;
}

export interface ProjectFile {
  format: typeof PROJECT_FORMAT;
  version: typeof PROJECT_VERSION;
  name: string;
  description?: string;
  plants: PlantSpec[];
  variants: VariantSpec[];
  requirements?: RequirementSpec[];
  notes?: string;
  signOffs?: SignOffSpec[];
}
