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
