/**
 * Types of the model requests of the bridge ("model.fromTransferFunction",
 * "model.fromZeroPoleGain", "model.discretize"; types only, no numerics). Listed in
 * `EngineMethods` (contract.ts); same conventions as `contractTypes.ts`.
 */
import type { ComplexValue, Diagnostics, FullModelJson, ModelJson } from "./contractTypes";

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
