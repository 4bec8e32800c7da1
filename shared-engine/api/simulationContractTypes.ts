/**
 * Types of the simulation requests of the bridge (types only, no numerics): an arbitrary input
 * sequence ("analysis.simulate") and the free response from an initial state
 * ("analysis.initial"). Listed in `EngineMethods` (contract.ts).
 */
import type { Diagnostics, ModelJson } from "./contractTypes";

export interface SimulateParams {
  model: ModelJson;
  /** Sample times in seconds, strictly increasing; sampled models: integer multiples of T. */
  times: number[];
  /** u[k][j]: input j at times[k] (one row per time, one entry per input). */
  u: number[][];
  /** Initial state (n entries, default 0). */
  x0?: number[];
  /** w[k][l]: disturbance l at times[k] (default none). */
  w?: number[][];
  /** Continuous models: "zoh" (held between samples, default) or "foh" (linear between samples). */
  hold?: "zoh" | "foh";
}

/** A simulated response; signal-major arrays: outputs[i][k] is output i at time[k]. */
export interface SimulationResult {
  time: number[];
  outputs: number[][];
  states: number[][];
  inputs: number[][];
  disturbances?: number[][];
  outputNames: string[];
  stateNames: string[];
  inputNames: string[];
  diagnostics: Diagnostics;
}

export interface InitialParams {
  model: ModelJson;
  /** Initial state, n entries. */
  x0: number[];
  /** Sample times (s), strictly increasing; sampled models: integer multiples of T. */
  times: number[];
}
