/**
 * From a plant specification in a project file to a StateSpace model. Errors from the model
 * layer are re-raised with the JSON path of the plant, so a message reads
 * "plants[0].model: B must have as many rows as A (A is 4×4, B is 3×1)".
 */
import { EngineError } from "../errors";
import type { Complex } from "../linalg";
import {
  createStateSpace,
  createTransferFunction,
  createZeroPoleGain,
  realizeTransferFunction,
  realizeZeroPoleGain,
  realizeZeroPoleGainMatrix,
  stateSpaceFromMatrices,
  type SignalNames,
  type StateSpace,
  type TransferFunction,
  type ZeroPoleGain,
} from "../model";
import {
  compileNonlinearPlant,
  linearize,
  solveOperatingPoint,
  type CompiledNonlinearPlant,
  type Linearization,
  type OperatingPoint,
  type OperatingPointRequest,
} from "../nonlinear";
import type { ComplexSpec, ModelSpec, NonlinearModelSpec, SignalNamesSpec } from "./format";

export function toComplex(value: ComplexSpec): Complex {
  return typeof value === "number" ? { re: value, im: 0 } : { re: value.re, im: value.im };
}

/** Runs `build`, prefixing any engine error message with `path`. */
export function atPath<T>(path: string, build: () => T): T {
  try {
    return build();
  } catch (error) {
    if (error instanceof EngineError) {
      throw new EngineError(error.kind, `${path}: ${error.message}`, { ...error.details, path });
    }
    throw error;
  }
}

function withNames(model: StateSpace, names: SignalNamesSpec | undefined, units: SignalNamesSpec | undefined): StateSpace {
  if (!names && !units) return model;
  const merge = (base: SignalNames, extra: SignalNamesSpec | undefined): SignalNames => ({
    states: extra?.states ?? base.states,
    inputs: extra?.inputs ?? base.inputs,
    outputs: extra?.outputs ?? base.outputs,
    disturbances: extra?.disturbances ?? base.disturbances,
  });
  return stateSpaceFromMatrices({
    A: model.A, B: model.B, C: model.C, D: model.D, F: model.F, E: model.E,
    sampleTime: model.sampleTime,
    // A realized transfer function has its own state count: names given for states apply only when they fit.
    names: merge(model.names, names?.states && names.states.length !== model.A.rows ? { ...names, states: undefined } : names),
    units: merge(model.units, units?.states && units.states.length !== model.A.rows ? { ...units, states: undefined } : units),
  });
}

/** A nonlinear plant from a project file: compiled, its operating point solved, linearized. */
export interface BuiltNonlinearPlant {
  plant: CompiledNonlinearPlant;
  point: OperatingPoint;
  linearization: Linearization;
  /** The request the point was solved from (the sweep re-solves it per sample). */
  request: OperatingPointRequest;
}

/**
 * Computes: the compiled plant of a `"nonlinear"` model, the operating point its
 *   `operatingPoint` request asks for, and the exact linearization there (continuous
 *   StateSpace A: n×n, B: n×m, C: p×n, D: p×m, F: n×q, E: p×q with the plant's names/units).
 * Requires: a validated model (validateProject); the operating point solvable from the guess.
 * Method: `compileNonlinearPlant`, `solveOperatingPoint` (damped Newton, Dennis & Schnabel
 *   1983), `linearize` (forward-mode automatic differentiation).
 * Cost: O(equation size) to compile; per Newton iteration O(nodes·unknowns + k³).
 * Accuracy: operating-point residual ≤ the request's tolerance (default 1e-10); Jacobians exact
 *   to rounding.
 * Errors: as the three routines ("validation", "parse-error", "invalid-argument", "singular",
 *   "no-convergence", "non-finite"), the message prefixed with `path` and, for the operating
 *   point, `.operatingPoint`.
 * Example:
 *   const built = buildNonlinearPlant(queueModel, "plants[0].model");
 *   // built.point.inputs[0] = λ(K + q)/(μq) = 40 for the queue example; built.point.residual ≤ 1e-10
 */
export function buildNonlinearPlant(spec: NonlinearModelSpec, path: string): BuiltNonlinearPlant {
  const plant = atPath(path, () => compileNonlinearPlant(spec));
  const request: unknown = spec.operatingPoint;
  if (request === null || typeof request !== "object" || Array.isArray(request)) {
    throw new EngineError("validation", `${path}.operatingPoint: must be an object naming the unknowns (states and inputs to solve for)`, { path: `${path}.operatingPoint` });
  }
  const point = atPath(`${path}.operatingPoint`, () => solveOperatingPoint(plant, spec.operatingPoint));
  const lin = atPath(`${path}.operatingPoint`, () => linearize(plant, point));
  return { plant, point, linearization: lin, request: spec.operatingPoint };
}

/**
 * Computes: the StateSpace model (A n×n, B n×m, C p×n, D p×m, F, E) of a plant's model spec,
 *   with the spec's signal names and units (state names only where they fit the realization).
 * Requires: a validated spec (validateProject).
 * Method: state-space: createStateSpace; transfer function (SISO or [output][input] grid):
 *   realizeTransferFunction (companion blocks per input column, balanced); zero-pole-gain SISO:
 *   realizeZeroPoleGain (cascade of real second-order sections); zero-pole-gain grid:
 *   realizeZeroPoleGainMatrix (each entry to its transfer function, then the transfer-function
 *   realization); nonlinear: buildNonlinearPlant's linearization.
 * Cost: that of the routine used (O(n²) for the linear forms, plus balancing).
 * Accuracy: as the routine used; every model is checked finite.
 * Errors: the model layer's errors ("invalid-argument", "non-finite", "shape-mismatch",
 *   "empty", ...) with the message prefixed by `path`.
 * Example: buildPlantModel({ type: "zero-pole-gain", zeros: [[[], []]], poles: [[[-1], [-2]]],
 *   gain: [[2, 1]], sampleTime: null }, "plants[0].model") has 1 output, 2 inputs and
 *   G(0) = [[2, 0.5]]; check against −C A⁻¹ B + D.
 */
export function buildPlantModel(spec: ModelSpec, path: string): StateSpace {
  // buildNonlinearPlant prefixes its own paths (the operating point has a deeper one).
  if (spec.type === "nonlinear") return buildNonlinearPlant(spec, path).linearization.model;
  return atPath(path, () => {
    switch (spec.type) {
      case "state-space":
        return createStateSpace({
          A: spec.A, B: spec.B, C: spec.C, D: spec.D, F: spec.F, E: spec.E,
          sampleTime: spec.sampleTime,
          names: spec.names,
          units: spec.units,
        });
      case "transfer-function": {
        const mimo = Array.isArray(spec.numerator[0]);
        let tf: TransferFunction | TransferFunction[][];
        if (!mimo) {
          tf = createTransferFunction(spec.numerator as number[], spec.denominator as number[], spec.sampleTime);
        } else {
          const num = spec.numerator as number[][][];
          const den = spec.denominator as number[][][];
          tf = num.map((row, i) => row.map((n, j) => createTransferFunction(n, den[i]![j]!, spec.sampleTime, `entry (${i + 1}, ${j + 1})`)));
        }
        return withNames(realizeTransferFunction(tf), spec.names, spec.units);
      }
      case "zero-pole-gain": {
        if (Array.isArray(spec.gain)) {
          // MIMO: one entry per (output, input), realized through the transfer-function grid.
          const zeros = spec.zeros as ComplexSpec[][][];
          const poles = spec.poles as ComplexSpec[][][];
          const entries = spec.gain.map((row, i) =>
            row.map((gain, j): ZeroPoleGain => ({ zeros: zeros[i]![j]!.map(toComplex), poles: poles[i]![j]!.map(toComplex), gain, sampleTime: spec.sampleTime })),
          );
          return withNames(realizeZeroPoleGainMatrix(entries), spec.names, spec.units);
        }
        const zpk = createZeroPoleGain((spec.zeros as ComplexSpec[]).map(toComplex), (spec.poles as ComplexSpec[]).map(toComplex), spec.gain, spec.sampleTime);
        return withNames(realizeZeroPoleGain(zpk), spec.names, spec.units);
      }
    }
  });
}
