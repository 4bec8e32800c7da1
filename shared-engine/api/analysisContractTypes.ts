/**
 * Types of the analysis requests of the bridge (poles, structure, zeros, modal form, gramians,
 * frequency response, margins, step response, root locus; types only, no numerics). Listed in
 * `EngineMethods` (contract.ts); same conventions as `contractTypes.ts`. The simulation requests
 * are in `simulationContractTypes.ts`.
 */
import type { LoopMargins } from "../analysis/margins";
import type { ComplexValue, Diagnostics, FullModelJson, ModelJson } from "./contractTypes";

export interface ModelParams {
  model: ModelJson;
}

export interface PolesResult {
  poles: ComplexValue[];
  stability: {
    timeDomain: "continuous" | "discrete";
    stable: boolean;
    marginal: boolean;
    unstablePoles: ComplexValue[];
    boundaryPoles: ComplexValue[];
    defectiveBoundaryPoles: ComplexValue[];
    spectralAbscissa: number | null;
    spectralRadius: number | null;
    tolerance: number;
  };
  /** G(0) (or G(1) when sampled); null with a reason when a pole makes it unbounded. */
  dcGain: { gain: number[][] | null; reason: string | null };
  diagnostics: Diagnostics;
}

export interface StructureParams extends ModelParams {
  /** Overrides both staircase rank thresholds. */
  tolerance?: number;
}

export interface StructureResult {
  controllable: boolean;
  observable: boolean;
  stabilizable: boolean;
  detectable: boolean;
  uncontrollableModes: ComplexValue[];
  unobservableModes: ComplexValue[];
  unstableUncontrollableModes: ComplexValue[];
  unstableUnobservableModes: ComplexValue[];
  controllableDimension: number;
  observableDimension: number;
  tolerance: { controllability: number; observability: number; stability: number };
  diagnostics: Diagnostics;
}

export interface ZerosParams extends ModelParams {
  /** 0-based input indices to keep (default all). */
  inputs?: number[];
  /** 0-based output indices to keep (default all). */
  outputs?: number[];
}

export interface ZerosResult {
  finite: ComplexValue[];
  infiniteCount: number;
  decouplingZeros: ComplexValue[];
  tolerance: number;
  diagnostics: Diagnostics;
}

export interface ModalFormResult {
  model: FullModelJson;
  /** x = T z. */
  T: number[][];
  blocks: { start: number; size: 1 | 2; eigenvalue: ComplexValue }[];
  condition: number;
  residual: number;
  coupling: {
    states: string[];
    modes: { eigenvalue: ComplexValue; participation: number[]; dominantStates: string[] }[];
    offDiagonalRatio: number;
    eigenvectorCondition: number;
  };
  diagnostics: Diagnostics;
}

export interface GramiansResult {
  controllability: number[][];
  observability: number[][];
  residuals: { controllability: number; observability: number };
  hankelSingularValues: number[];
  diagnostics: Diagnostics;
}

export interface FrequencyResponseParams extends ModelParams {
  /** Explicit grid in rad/s; when omitted an automatic grid is built (see `grid`). */
  frequenciesRadPerSec?: number[];
  grid?: { points?: number; minRadPerSec?: number; maxRadPerSec?: number };
  from?: "input" | "disturbance";
}

export interface FrequencyResponseResult {
  frequencyRadPerSec: number[];
  values: (ComplexValue | null)[][][];
  magnitudeDb: (number | null)[][][];
  phaseDeg: (number | null)[][][];
  unbounded: { frequencyRadPerSec: number; output: number; input: number }[];
  diagnostics: Diagnostics;
}

export interface MarginsParams extends ModelParams {
  /** Replaces the automatic grid (rad/s). */
  frequenciesRadPerSec?: number[];
}

/** The engine's loop margins (analysis/margins.ts), its warnings moved into `diagnostics`. */
export type MarginsResult = Omit<LoopMargins, "warnings"> & { diagnostics: Diagnostics };

export interface StepParams extends ModelParams {
  /** 0-based input (or disturbance) index stepped (default 0). */
  input?: number;
  from?: "input" | "disturbance";
  /** Explicit time grid (s), or a horizon and number of points. */
  times?: number[];
  horizonSec?: number;
  points?: number;
  /** Settling band as a fraction of the final value (default 0.02). */
  settlingBand?: number;
}

export interface StepMetricsJson {
  output: string;
  riseTimeSec: number | null;
  settlingTimeSec: number | null;
  overshootPct: number;
  peak: number;
  peakTimeSec: number;
  steadyStateValue: number | null;
  steadyStateError: number | null;
  integralAbsoluteError: number;
  status: "settled" | "not-settled-within-horizon" | "unstable" | "zero-final-value";
  notes: string[];
}

export interface StepResult {
  time: number[];
  outputs: number[][];
  states: number[][];
  inputs: number[][];
  disturbances?: number[][];
  /** One entry per output. */
  metrics: StepMetricsJson[];
  stable: boolean;
  diagnostics: Diagnostics;
}

export interface RootLocusParams extends ModelParams {
  negativeGain?: boolean;
  maxGain?: number;
  pointsPerBranch?: number;
  /** For a model with several inputs or outputs: the 0-based channel used as the loop. */
  input?: number;
  output?: number;
}

export interface RootLocusResult {
  gains: number[];
  branches: ComplexValue[][];
  asymptotes: { centroid: number | null; anglesDeg: number[] };
  breakPoints: { point: ComplexValue; gain: number }[];
  crossings: { point: ComplexValue; gain: number }[];
  openLoopPoles: ComplexValue[];
  openLoopZeros: ComplexValue[];
  negativeGain: boolean;
  diagnostics: Diagnostics;
}
