/**
 * Shared shapes and conventions of the bridge's request types (types only, no numerics): complex
 * values, models as JSON, and the diagnostics every result carries. The request types themselves
 * are split by area: `modelContractTypes.ts` (model.*), `analysisContractTypes.ts` (analysis.*),
 * `designContractTypes.ts` (design.*), `nonlinearContractTypes.ts`, `servoContractTypes.ts`
 * and `simulationContractTypes.ts`; `contract.ts` lists them all in `EngineMethods`.
 *
 * Conventions across the bridge:
 *   - matrices are number[][] (rows); a k×0 matrix is k empty rows, a 0×k matrix is [];
 *   - complex numbers are { re, im };
 *   - no result contains NaN or ±Infinity: unbounded quantities are null, as the engine
 *     reports them (the dispatcher checks every result before returning it);
 *   - every result carries `diagnostics` (residual, conditioning, warnings) in one shape.
 */
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
