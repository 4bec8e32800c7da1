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
  stateSpaceFromMatrices,
  type SignalNames,
  type StateSpace,
  type TransferFunction,
} from "../model";
import type { ComplexSpec, ModelSpec, SignalNamesSpec } from "./format";

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

export function buildPlantModel(spec: ModelSpec, path: string): StateSpace {
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
        const zpk = createZeroPoleGain(spec.zeros.map(toComplex), spec.poles.map(toComplex), spec.gain, spec.sampleTime);
        return withNames(realizeZeroPoleGain(zpk), spec.names, spec.units);
      }
    }
  });
}
