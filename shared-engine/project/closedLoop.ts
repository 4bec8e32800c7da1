/**
 * Closed loops that the pipeline builds from a plant and a state-feedback gain, as StateSpace
 * models whose extra outputs are the control inputs (so a step response also shows u).
 */
import { Matrix } from "ml-matrix";
import { stateSpaceFromMatrices, type StateSpace } from "../model";

/**
 * Plant under u = −K x + Nr r: x' = (A − BK)x + B Nr r + F w; outputs [y; u] with
 * y = (C − DK)x + D Nr r + E w and u = −K x + Nr r. Input names become r_<input>.
 */
export function stateFeedbackClosedLoop(plant: StateSpace, K: Matrix, Nr?: Matrix): StateSpace {
  const m = plant.B.columns;
  const N = Nr ?? Matrix.eye(m, m);
  const A = plant.A.clone().sub(plant.B.mmul(K));
  const B = plant.B.mmul(N);
  const Cy = plant.C.clone().sub(plant.D.mmul(K));
  const Dy = plant.D.mmul(N);
  const Cu = K.clone().mul(-1);
  const out = {
    A,
    B,
    C: stack(Cy, Cu),
    D: stack(Dy, N),
    F: plant.F,
    E: stack(plant.E, new Matrix(m, plant.E.columns)),
    sampleTime: plant.sampleTime,
    names: {
      states: plant.names.states,
      inputs: plant.names.inputs.map((n) => `r_${n}`),
      outputs: [...plant.names.outputs, ...plant.names.inputs],
      disturbances: plant.names.disturbances,
    },
    units: {
      states: plant.units.states,
      inputs: plant.units.inputs,
      outputs: [...plant.units.outputs, ...plant.units.inputs],
      disturbances: plant.units.disturbances,
    },
  };
  return stateSpaceFromMatrices(out);
}

// The loop broken at one input lives in analysis/ (the sweep and the compensator use it too).
export { loopAtInput } from "../analysis";

export function stack(top: Matrix, bottom: Matrix): Matrix {
  const out = new Matrix(top.rows + bottom.rows, Math.max(top.columns, bottom.columns));
  if (top.rows > 0 && top.columns > 0) out.setSubMatrix(top, 0, 0);
  if (bottom.rows > 0 && bottom.columns > 0) out.setSubMatrix(bottom, top.rows, 0);
  return out;
}
