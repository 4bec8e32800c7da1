/**
 * Types of the remaining design requests (integral action, reference feedforward, compensator
 * assembly, reduced-order observer) and of the weight and observer-speed loci (types only).
 * Same conventions as `contractTypes.ts`.
 */
import type { ComplexValue, Diagnostics, FullModelJson, ModelJson } from "./contractTypes";
import type { PlacementResultJson } from "./designContractTypes";

interface IntegralCommon {
  model: ModelJson;
  /** 0-based indices of the outputs whose tracking error is integrated. */
  outputs: number[];
}

/** Integral (servo) design by LQR on the augmented plant, or by pole placement. */
export type IntegralDesignParams =
  | (IntegralCommon & {
      method: "lqr";
      /** n×n weight on the plant states. */
      Q: number[][];
      R: number[][];
      /** One positive weight per integrator. */
      integratorWeights: number[];
    })
  | (IntegralCommon & {
      method: "poles";
      /** n poles for the plant states. */
      poles: (ComplexValue | number)[];
      /** One pole per integrator. */
      integratorPoles: (ComplexValue | number)[];
    });

export interface IntegralDesignResult {
  /** [Kx Ki]: u = −Kx·x − Ki·xᵢ with xᵢ' = r − y (or xᵢ[k+1] = xᵢ[k] + T(r − y)). */
  K: number[][];
  Kx: number[][];
  Ki: number[][];
  closedLoopPoles: ComplexValue[];
  gainNorm: number;
  integratorNames: string[];
  /** The closed servo loop: references in, [y; u] out, states [x; xᵢ]. */
  servoLoop: FullModelJson;
  augmented: { A: number[][]; B: number[][] };
  servoDcGain: { fromReference: number[][]; fromDisturbance: number[][]; maxError: number; tolerance: number; passed: boolean };
  /** LQR method only. */
  riccati: { X: number[][]; residual: number; conditionIndicator: number } | null;
  diagnostics: Diagnostics;
}

export interface FeedforwardParams {
  model: ModelJson;
  K: number[][];
}

export interface FeedforwardResult {
  /** u = −Kx + N r. */
  N: number[][];
  /** The nominal-model caveat (also in diagnostics.warnings). */
  warning: string;
  closedLoopDcGain: number[][];
  residual: number;
  diagnostics: Diagnostics;
}

export interface CompensatorParams {
  model: ModelJson;
  K: number[][];
  L: number[][];
  Ki?: number[][];
  M?: number[][];
  form: "predictor" | "current";
  /** 0-based output indices with integral action (needs Ki). */
  integratedOutputs?: number[];
  /** m×m reference feedforward (default I; ignored with integral action). */
  referenceGain?: number[][];
}

export interface MarginPairJson {
  gainMarginDb: number | null;
  phaseMarginDeg: number | null;
}

export interface CompensatorResult {
  /** From [r; y] to u; states [x̄; xᵢ]. */
  controller: FullModelJson;
  /** Plant + controller: r in, [y; u] out, states [x; x̄; xᵢ]. */
  closedLoop: FullModelJson;
  closedLoopPoles: ComplexValue[];
  expectedPoles: ComplexValue[];
  separation: { passed: boolean; maxMismatch: number; tolerance: number };
  /** Margins at plant input 0 with the observer vs with full state feedback; null when not computed. */
  margins: { observerLoop: MarginPairJson; stateFeedbackLoop: MarginPairJson } | null;
  diagnostics: Diagnostics;
}

export interface ReducedObserverParams {
  A: number[][];
  B: number[][];
  C: number[][];
  /** n − p observer poles. */
  poles: (ComplexValue | number)[];
  maxIterations?: number;
  tolerance?: number;
}

export interface ReducedObserverResultJson extends PlacementResultJson {
  /** q' = F q + G y + H u, x̂ = M q + N y; z = T x = [y; w]. */
  L: number[][];
  F: number[][];
  G: number[][];
  H: number[][];
  M: number[][];
  N: number[][];
  T: number[][];
  Tinverse: number[][];
}

export interface LqrWeightLocusParams {
  A: number[][];
  B: number[][];
  Q: number[][];
  /** R = ρ·R0. */
  R0: number[][];
  /** [lo, hi], 0 < lo < hi. */
  rhoRange: [number, number];
  /** Least number of ρ values (default 101, at most ANALYSIS_LIMITS.maxSweepValues). */
  points?: number;
  sampleTime?: number | null;
}

export interface LqrWeightLocusResult {
  /** ρ values, increasing (adaptive; at least `points`). */
  rho: number[];
  /** branches[b][k]: closed-loop pole b at rho[k]. */
  branches: ComplexValue[][];
  /** True for one input: the branches are the stable half of the symmetric root locus. */
  symmetricRootLocus: boolean;
  diagnostics: Diagnostics;
}

export interface ObserverSpeedLocusParams {
  A: number[][];
  C: number[][];
  /** Nominal observer poles (factor 1). */
  poles: (ComplexValue | number)[];
  /** [lo, hi], 0 < lo < hi: the observer poles are factor·poles. */
  factorRange: [number, number];
  points?: number;
}

export interface ObserverSpeedLocusResult {
  factors: number[];
  /** branches[b][k]: eigenvalue b of A − L(f)C at factors[k]. */
  branches: ComplexValue[][];
  /** ‖L(f)‖_F at each factor: how the observer's noise gain grows with its speed. */
  gainNorms: number[];
  diagnostics: Diagnostics;
}
