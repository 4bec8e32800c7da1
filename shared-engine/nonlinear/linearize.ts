/** Exact linearization of a nonlinear plant at an operating point. */
import { Matrix } from "ml-matrix";
import { stateSpaceFromMatrices, type StateSpace } from "../model";
import type { OperatingPoint } from "./operatingPoint";
import type { CompiledNonlinearPlant } from "./plant";

export interface Linearization {
  /** δx' = A δx + B δu + F δw, δy = C δx + D δu + E δw in deviations from `operatingPoint`. */
  model: StateSpace;
  /** The point the model was taken at (copy). */
  operatingPoint: OperatingPoint;
  /** max |f(x0, u0, w0, p)|: how far the point is from an equilibrium (0 at an exact one). */
  equilibriumResidual: number;
}

/**
 * Computes: A = ∂f/∂x (n×n), B = ∂f/∂u (n×m), F = ∂f/∂w (n×q), C = ∂g/∂x (p×n),
 *   D = ∂g/∂u (p×m), E = ∂g/∂w (p×q) at (x0, u0, w0, p), as a continuous StateSpace in
 *   deviation variables with the plant's names and units.
 * Requires: a plant and an operating point with matching dimensions (normally from
 *   `solveOperatingPoint` for the same plant). The point need not be an equilibrium; then
 *   the model describes deviations only to first order around a moving point, and
 *   `equilibriumResidual` says how far off it is.
 * Method: forward-mode automatic differentiation of the compiled equations (exact up to
 *   rounding, no finite-difference step), see `compileExpression`.
 * Cost: O(nodes·(n + m + q)) for the Jacobians plus the model copy.
 * Accuracy: entries exact to a few ulps of the intermediate values; every entry is checked
 *   finite by the model constructor.
 * Errors: "shape-mismatch" (point does not fit the plant), "non-finite" (an equation or a
 *   derivative is undefined at the point, e.g. √h at h = 0, naming the sub-expression).
 * Example:
 *   const lin = linearize(tank, solveOperatingPoint(tank, { unknowns: ["q"], states: { h: 4 } }));
 *   // lin.model.A.get(0, 0) === −0.5/(2·√4) = −0.125 (closed form)
 */
export function linearize(plant: CompiledNonlinearPlant, point: OperatingPoint): Linearization {
  const { n, m, q, p } = plant;
  const env = plant.environment(point.states, point.inputs, point.disturbances, point.parameters);
  const { f, g, slots } = plant.jacobians(env);
  const block = (data: Float64Array, rows: number, offset: number, cols: number): Matrix => {
    const M = new Matrix(rows, cols);
    for (let i = 0; i < rows; i++) for (let j = 0; j < cols; j++) M.set(i, j, data[i * slots + offset + j]!);
    return M;
  };
  const dx = new Float64Array(n);
  plant.stateDerivative(env, dx);
  let equilibriumResidual = 0;
  for (const v of dx) equilibriumResidual = Math.max(equilibriumResidual, Math.abs(v));
  const model = stateSpaceFromMatrices({
    A: block(f, n, 0, n), B: block(f, n, n, m), F: block(f, n, n + m, q),
    C: block(g, p, 0, n), D: block(g, p, n, m), E: block(g, p, n + m, q),
    sampleTime: null,
    names: { states: plant.names.states, inputs: plant.names.inputs, outputs: plant.names.outputs, disturbances: plant.names.disturbances },
    units: { states: plant.units.states, inputs: plant.units.inputs, outputs: plant.units.outputs, disturbances: plant.units.disturbances },
  });
  return { model, operatingPoint: structuredCloneOf(point), equilibriumResidual };
}

function structuredCloneOf(point: OperatingPoint): OperatingPoint {
  return JSON.parse(JSON.stringify(point)) as OperatingPoint;
}
