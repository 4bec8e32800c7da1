/**
 * Types of the model, analysis and design requests of the bridge (types only, no numerics).
 * `contract.ts` lists them in `EngineMethods`; they are kept here so that file stays short.
 *
 * Conventions across the bridge:
 *   - matrices are number[][] (rows); a k×0 matrix is k empty rows, a 0×k matrix is [];
 *   - complex numbers are { re, im };
 *   - no result contains NaN or ±Infinity: unbounded quantities are null, as the engine
 *     reports them (the dispatcher checks every result before returning it);
 *   - every result carries `diagnostics` (residual, conditioning, warnings) in one shape.
 */
import type { LoopMargins } from "../analysis/margins";

export interface ComplexValue {
  re: number;
  im: number;
}

export interface SignalNamesJson {
  states: string[];
  inputs: string[];
  outputs: string[];
  disturbances: string[];
}

/** A state-space model as plain JSON (the StateSpaceSpec of the model layer). */
export interface ModelJson {
  A: number[][];
  B: number[][];
  C: number[][];
  D?: number[][];
  F?: number[][];
  E?: number[][];
  /** null (or omitted) = continuous time; otherwise the sample period in seconds. */
  sampleTime?: number | null;
  names?: Partial<SignalNamesJson>;
  units?: Partial<SignalNamesJson>;
}

/** A model as the engine returns it: every matrix, name and unit list filled in. */
export interface FullModelJson extends ModelJson {
  D: number[][];
  F: number[][];
  E: number[][];
  sampleTime: number | null;
  names: SignalNamesJson;
  units: SignalNamesJson;
}

/**
 * What every new result echoes. `residual` is the relative residual of the defining equation
 * where one exists (null otherwise); `condition` a conditioning figure named in
 * `conditionMeaning` (null when none applies); `warnings` plain-language remarks.
 */
export interface Diagnostics {
  residual: number | null;
  condition: number | null;
  conditionMeaning: string | null;
  warnings: string[];
}

// ---- model.* ------------------------------------------------------------------------------

export interface FromTransferFunctionParams {
  /** SISO: coefficients, highest power first. MIMO: numerator[i][j] for output i, input j. */
  numerator: number[] | number[][][];
  denominator: number[] | number[][][];
  sampleTime?: number | null;
  /** Diagonal balancing of the realization (default true, as in project files). */
  balance?: boolean;
}

export interface FromZeroPoleGainParams {
  zeros: (ComplexValue | number)[];
  poles: (ComplexValue | number)[];
  gain: number;
  sampleTime?: number | null;
}

export interface ModelResult {
  model: FullModelJson;
  /** Eigenvalues of the resulting A. */
  poles: ComplexValue[];
  diagnostics: Diagnostics;
}

export interface DiscretizeParams {
  model: ModelJson;
  /** Sample period T in seconds. */
  period: number;
  method?: "zoh" | "tustin";
  /** Tustin only: the frequency (rad/s) matched exactly. */
  prewarpRadPerSec?: number;
}

export interface DiscretizeResult extends ModelResult {
  method: "zoh" | "tustin";
  period: number;
  prewarpRadPerSec: number | null;
  continuousPoles: ComplexValue[];
}

// ---- analysis.* ---------------------------------------------------------------------------

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

// ---- design.* -----------------------------------------------------------------------------

export interface PlacePolesParams {
  A: number[][];
  B: number[][];
  poles: (ComplexValue | number)[];
  maxIterations?: number;
  tolerance?: number;
}

export interface PlacementResultJson {
  requestedPoles: ComplexValue[];
  achievedPoles: ComplexValue[];
  maxPoleError: number;
  gainNorm: number;
  gainNorm2: number;
  eigenvectorCondition: number;
  method: "single-input" | "robust-multi-input";
  iterations: number | null;
  diagnostics: Diagnostics;
}

export interface PlacePolesResult extends PlacementResultJson {
  K: number[][];
}

export interface ObserverPolesParams {
  A: number[][];
  C: number[][];
  poles: (ComplexValue | number)[];
  maxIterations?: number;
  tolerance?: number;
}

export interface ObserverPolesResult extends PlacementResultJson {
  L: number[][];
}

export interface RiccatiParams {
  /** "continuous" (CARE) or "discrete" (DARE). */
  kind: "continuous" | "discrete";
  A: number[][];
  B: number[][];
  Q: number[][];
  R: number[][];
  /** Cross weight n×m (default zero). */
  N?: number[][];
  refine?: boolean;
}

export interface RiccatiResultJson {
  X: number[][];
  K: number[][];
  closedLoopPoles: ComplexValue[];
  residual: number;
  conditionIndicator: number;
  refined: boolean;
  method: string;
  diagnostics: Diagnostics;
}

export interface LqrParams {
  A: number[][];
  B: number[][];
  Q: number[][];
  R: number[][];
  N?: number[][];
  /** null / omitted = continuous design; T > 0 = discrete design on (A, B) sampled at T. */
  sampleTime?: number | null;
}

export interface LqrResultJson extends RiccatiResultJson {
  sampleTime: number | null;
  margins: {
    minReturnDifference: number;
    frequencyOfMinReturnDifferenceRadPerSec: number | null;
    phaseMarginDeg: number | null;
    gainCrossoverRadPerSec: number | null;
    lowerGainMargin: number;
    upperGainMargin: number | null;
    guaranteeApplies: boolean;
    guaranteeHolds: boolean;
    gridPoints: number;
  } | null;
}

export interface KalmanParams {
  A: number[][];
  C: number[][];
  /** Noise input matrix n×q (identity when omitted). */
  G?: number[][];
  W: number[][];
  V: number[][];
  /** Cross covariance q×p (zero when omitted). */
  cross?: number[][];
  /** null / omitted = continuous filter; T > 0 = discrete filter. */
  sampleTime?: number | null;
  /** Discrete only (default "predictor"). */
  form?: "predictor" | "current";
}

export interface KalmanResultJson {
  L: number[][];
  P: number[][];
  observerPoles: ComplexValue[];
  residual: number;
  conditionIndicator: number;
  refined: boolean;
  method: string;
  form: "continuous" | "predictor" | "current";
  M?: number[][];
  Z?: number[][];
  diagnostics: Diagnostics;
}

export interface BrysonParams {
  /** Largest acceptable |x_i|; null leaves state i unweighted. */
  maxState: (number | null)[];
  maxInput: number[];
}

export interface BrysonResult {
  Q: number[][];
  R: number[][];
  diagnostics: Diagnostics;
}

export interface LqrSweepParams {
  A: number[][];
  B: number[][];
  Q: number[][];
  R: number[][];
  rhoValues: number[];
  sampleTime?: number | null;
}

export interface LqrSweepResult {
  points: { rho: number; closedLoopPoles: ComplexValue[]; K: number[][] }[];
  diagnostics: Diagnostics;
}
