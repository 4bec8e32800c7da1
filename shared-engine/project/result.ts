/**
 * The result of evaluating one design variant: plain JSON with stable field names, the same for
 * the workbench, the command line (`loopwright design --json`) and the design sheet. A field is
 * absent when it was not requested or does not apply. Documented in docs/project-format.md.
 * WARNING: renaming a field breaks scripts and golden files that read this output.
 */
import type { ErrorPayload } from "../errors";

export interface ComplexJson {
  re: number;
  im: number;
}

export interface PlantReport {
  /** Number of states, inputs, outputs and disturbances of the (possibly discretized) plant. */
  dimensions: { states: number; inputs: number; outputs: number; disturbances: number };
  names: { states: string[]; inputs: string[]; outputs: string[]; disturbances: string[] };
  sampleTime: number | null;
  poles: ComplexJson[];
  zeros?: ComplexJson[];
  stable?: boolean;
  controllable?: boolean;
  observable?: boolean;
  stabilizable?: boolean;
  detectable?: boolean;
  uncontrollableModes?: ComplexJson[];
  unobservableModes?: ComplexJson[];
  /** Nonlinear plants: the solved operating point (absolute values, by signal name). */
  operatingPoint?: {
    states: Record<string, number>;
    inputs: Record<string, number>;
    disturbances: Record<string, number>;
    outputs: Record<string, number>;
    /** max |f| and max |y − set-point| at the point. */
    residual: number;
    /** Newton iterations used. */
    iterations: number;
  };
  /**
   * Nonlinear plants: the exact Jacobians at the operating point (continuous time, deviation
   * variables δx' = A δx + B δu + F δw, δy = C δx + D δu + E δw); the design uses this model.
   */
  linearization?: { A: number[][]; B: number[][]; C: number[][]; D: number[][]; F: number[][]; E: number[][] };
}

export interface Check {
  /** Short machine name: "riccati-residual", "closed-loop-stable", "separation", "requirement:<id>", ... */
  name: string;
  passed: boolean;
  /** What was measured and against what, in words. */
  detail: string;
  value?: number;
  limit?: number;
}

export interface VariantResult {
  id: string;
  name: string;
  plant?: PlantReport;
  discrete?: { A: number[][]; B: number[][]; C: number[][]; D: number[][]; F?: number[][]; E?: number[][]; sampleTime: number; method: "zoh" | "tustin" };
  gain?: {
    /** State-feedback gain on the plant states: u = −K x + r (m×n). */
    K: number[][];
    /** Observer gain (n×p). */
    L?: number[][];
    /** Integral gain on the integrator states (m×(number of integrated outputs)). */
    Ki?: number[][];
    /** Reference feedforward gain (m×p), when requested. */
    referenceGain?: number[][];
    /** Current-estimate observer gain for sampled Kalman designs (n×p). */
    M?: number[][];
  };
  /**
   * The designed closed loop as a model (with integrators and the observer when present):
   * inputs are the references, outputs the plant outputs followed by the control inputs,
   * disturbances those of the plant. What the workbench simulates for any other scenario.
   */
  closedLoop?: {
    A: number[][]; B: number[][]; C: number[][]; D: number[][]; F: number[][]; E: number[][];
    sampleTime: number | null;
    names: { states: string[]; inputs: string[]; outputs: string[]; disturbances: string[] };
  };
  /** Poles of the state-feedback loop (with integrators when present). */
  closedLoopPoles?: ComplexJson[];
  observerPoles?: ComplexJson[];
  design?: {
    method: string;
    gainNorm: number;
    eigenvectorCondition?: number;
    maxPoleError?: number;
  };
  riccati?: { X: number[][]; residual: number; conditionIndicator: number };
  kalman?: { P: number[][]; residual: number };
  bode?: {
    loop: "plant" | "plant-input";
    input: string;
    output: string;
    frequency: number[];
    /** null where the response is unbounded (a pole on the axis). */
    magnitudeDb: (number | null)[];
    phaseDeg: (number | null)[];
  };
  margins?: {
    loop: "unity-negative" | "plant-input";
    gainDb: number | null;
    phaseDeg: number | null;
    gainCrossover: number | null;
    phaseCrossover: number | null;
    delayMargin: number | null;
    sensitivityPeak: number;
    complementarySensitivityPeak: number;
    diskMargin?: { alpha: number; gainRangeDb: [number, number]; phaseDeg: number };
    closedLoopStable: boolean;
    stateFeedbackLoop?: { gainDb: number | null; phaseDeg: number | null };
    /** Multi-input loops: the loop broken at each input in turn, the others closed. */
    channels?: { input: string; gainDb: number | null; phaseDeg: number | null; delayMargin: number | null; sensitivityPeak: number }[];
  };
  /** Step of one disturbance (through F and E) from rest, scaled by its size. */
  disturbanceStep?: {
    loop: "closed-loop" | "open-loop";
    disturbance: string;
    size: number;
    time: number[];
    /** output[i][k]: output i at time k. */
    output: number[][];
    outputNames: string[];
    control?: number[][];
    /** Largest deviation of the first output (signed), and when. */
    peakDeviation: number;
    peakTime: number;
    /** Final value of the first output (DC gain × size); 0 with integral action on it; null when unstable. */
    steadyStateValue: number | null;
    /** Last time outside ±2 % of the peak deviation around the final value; null when it never settles. */
    settlingTime: number | null;
    status: "settled" | "not-settled-within-horizon" | "unstable";
  };
  step?: {
    /** "closed-loop" when there is state feedback, else "open-loop". */
    loop: "closed-loop" | "open-loop";
    input: string;
    time: number[];
    /** output[i][k]: output i at time k. */
    output: number[][];
    outputNames: string[];
    /** control input u[j][k] (closed loop only). */
    control?: number[][];
    riseTime: number | null;
    settlingTime: number | null;
    overshootPct: number;
    peak: number;
    peakTime: number;
    steadyStateValue: number | null;
    steadyStateError: number | null;
    peakInput?: number;
    status: string;
  };
  /**
   * `nonlinearCheck`: the nonlinear plant under the designed state feedback (states measured),
   * beside the linear prediction. Absolute values; output[i][k] is output i at time k.
   */
  nonlinear?: {
    time: number[];
    outputNames: string[];
    inputNames: string[];
    output: number[][];
    /** The linearized loop's prediction on the same times (no saturation). */
    linearOutput: number[][];
    input: number[][];
    /** Largest |y − y_linear| over outputs and times, with where it happened; null without outputs. */
    largestDivergence: { time: number; output: string; size: number } | null;
    /** Largest |y_linear − y0| (the size of the predicted response), the scale of the check. */
    linearExcursion: number;
    /** True when an input hit its min/max (or, sampled, its rate limit). */
    saturated: boolean;
    /** The simulation ended before the last time (the solution left the equations' domain). */
    stoppedEarly: { time: number; reason: string } | null;
    /** "continuous" or the controller's sample period in seconds. */
    controller: "continuous" | number;
    warnings: string[];
  };
  /** `robustness`: the fixed gain over parameter changes (operating point re-solved each sample). */
  robustness?: {
    parameterNames: string[];
    samples: number;
    allStable: boolean;
    failedSamples: number;
    /** Over samples, the worst loop margins at the plant input (loop at a time for several inputs; null when infinite everywhere). */
    worstGainMarginDb: number | null;
    worstPhaseMarginDeg: number | null;
    /** The closed-loop poles of every sample, together. */
    poleCloud: ComplexJson[];
    /** The controller's sample period (s), null for a continuous controller (s-plane poles). */
    sampleTime: number | null;
    /** Continuous: the largest real part in the pole cloud (null when sampled or every sample failed). */
    largestRealPart: number | null;
    /** Sampled: the largest pole magnitude |z| in the cloud (null when continuous or every sample failed). */
    largestPoleMagnitude: number | null;
    marginsNote: string;
  };
  checks: Check[];
  warnings: string[];
  error?: ErrorPayload;
}

export interface DesignRunResult {
  format: "loopwright-design-result";
  engineVersion: string;
  project: string;
  variants: VariantResult[];
  warnings: { path: string; message: string }[];
}
