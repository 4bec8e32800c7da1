/**
 * Types of the design requests of the bridge (pole placement for state feedback and observers,
 * Riccati equations, LQR, Kalman filters, Bryson weights, the LQR weight sweep; types only, no
 * numerics). Listed in `EngineMethods` (contract.ts); same conventions as `contractTypes.ts`.
 * The remaining design requests are in `servoContractTypes.ts`.
 */
import type { ComplexValue, Diagnostics } from "./contractTypes";

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
