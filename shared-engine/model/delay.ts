/**
 * Time delays: exact input/output delays of sampled models by added states, and the Padé
 * approximant of a continuous delay.
 */
import { Matrix } from "ml-matrix";
import { EngineError } from "../errors";
import { dimensions, stateSpaceFromMatrices, type StateSpace } from "./stateSpace";
import { realizeTransferFunction } from "./transferFunction";
import { uniqueNames } from "./interconnect";

function requireDelayCounts(samples: number | number[], count: number, what: "input" | "output"): number[] {
  const list = typeof samples === "number" ? new Array<number>(count).fill(samples) : samples;
  if (!Array.isArray(list) || list.length !== count) {
    throw new EngineError("shape-mismatch", `${what} delays must list one sample count per ${what} (the model has ${count} ${what}s, got ${Array.isArray(list) ? list.length : "no list"})`, {
      argument: `${what}Delays`,
    });
  }
  list.forEach((d, i) => {
    if (typeof d !== "number" || !Number.isInteger(d) || d < 0) {
      throw new EngineError("invalid-argument", `${what} delay ${i + 1} is ${String(d)}; delays are whole numbers of samples ≥ 0`, { argument: `${what}Delays`, index: i });
    }
  });
  return list;
}

function requireSampled(model: StateSpace, operation: string): number {
  if (model.sampleTime === null) {
    throw new EngineError("invalid-argument", `${operation} needs a sampled model (delays are exact only in discrete time); discretize the model first or use padeDelay for a continuous approximation`, {});
  }
  return model.sampleTime;
}

/**
 * Computes: the sampled model in which input j reaches the plant d_j samples late:
 *   u_j,plant[k] = u_j[k − d_j]. Each delayed input gets a shift register of d_j states
 *   z₁[k+1] = u_j[k], z_i[k+1] = z_{i−1}[k], and the plant sees z_{d_j} in place of u_j
 *   (its B and D columns move to that state). States are appended after the plant states and
 *   named "<input>_delay1", ... (made unique).
 * Requires: a sampled model; one whole number ≥ 0 per input (or one number for all).
 * Method: exact: z⁻ᵈ realized by d unit delays. Cost: O((n + Σd)²). Accuracy: exact (no
 *   arithmetic, entries are copied).
 * Errors: "invalid-argument" (continuous model; negative or fractional count),
 *   "shape-mismatch" (wrong number of counts).
 * Example: addInputDelay(x[k+1] = 0.5x[k] + u[k], 2) has 3 states and transfer function
 *   z⁻²/(z − 0.5); check its A has eigenvalues {0.5, 0, 0}.
 */
export function addInputDelay(model: StateSpace, samplesPerInput: number | number[]): StateSpace {
  requireSampled(model, "addInputDelay");
  const { n, m, p, q } = dimensions(model);
  const delays = requireDelayCounts(samplesPerInput, m, "input");
  const total = delays.reduce((s, d) => s + d, 0);
  const N = n + total;
  const A = Matrix.zeros(N, N);
  const B = Matrix.zeros(N, m);
  const C = Matrix.zeros(p, N);
  const D = model.D.clone();
  const F = Matrix.zeros(N, q);
  if (n > 0) A.setSubMatrix(model.A, 0, 0);
  for (let i = 0; i < n; i++) for (let j = 0; j < q; j++) F.set(i, j, model.F.get(i, j));
  for (let i = 0; i < p; i++) for (let j = 0; j < n; j++) C.set(i, j, model.C.get(i, j));
  const stateNames = [...model.names.states];
  const stateUnits = [...model.units.states];
  let offset = n;
  delays.forEach((d, j) => {
    if (d === 0) {
      for (let i = 0; i < n; i++) B.set(i, j, model.B.get(i, j));
      return;
    }
    B.set(offset, j, 1); // z₁[k+1] = u_j[k]
    for (let k = 1; k < d; k++) A.set(offset + k, offset + k - 1, 1); // shift register
    const last = offset + d - 1;
    for (let i = 0; i < n; i++) A.set(i, last, model.B.get(i, j)); // plant sees u_j[k − d]
    for (let i = 0; i < p; i++) {
      C.set(i, last, model.D.get(i, j));
      D.set(i, j, 0);
    }
    for (let k = 1; k <= d; k++) {
      stateNames.push(`${model.names.inputs[j]}_delay${k}`);
      stateUnits.push(model.units.inputs[j]!);
    }
    offset += d;
  });
  return stateSpaceFromMatrices({
    ...model,
    A,
    B,
    C,
    D,
    F,
    names: { ...model.names, states: uniqueNames(stateNames) },
    units: { ...model.units, states: stateUnits },
  });
}

/**
 * Computes: the sampled model in which output i is observed d_i samples late:
 *   y_i,new[k] = y_i[k − d_i]. Each delayed output gets d_i states z₁[k+1] = C_i x + D_i u +
 *   E_i w, z_l[k+1] = z_{l−1}[k], and y_i,new = z_{d_i}. States "<output>_delay1", ...
 * Requires/Method/Cost/Accuracy/Errors: as addInputDelay, per output.
 * Example: addOutputDelay(static gain 2 sampled at 0.1 s, 1) → y[k] = 2u[k−1]: A = [[0]],
 *   B = [[2]], C = [[1]], D = [[0]].
 */
export function addOutputDelay(model: StateSpace, samplesPerOutput: number | number[]): StateSpace {
  requireSampled(model, "addOutputDelay");
  const { n, m, p, q } = dimensions(model);
  const delays = requireDelayCounts(samplesPerOutput, p, "output");
  const total = delays.reduce((s, d) => s + d, 0);
  const N = n + total;
  const A = Matrix.zeros(N, N);
  const B = Matrix.zeros(N, m);
  const F = Matrix.zeros(N, q);
  const C = Matrix.zeros(p, N);
  const D = model.D.clone();
  const E = model.E.clone();
  if (n > 0) A.setSubMatrix(model.A, 0, 0);
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < m; j++) B.set(i, j, model.B.get(i, j));
    for (let j = 0; j < q; j++) F.set(i, j, model.F.get(i, j));
  }
  const stateNames = [...model.names.states];
  const stateUnits = [...model.units.states];
  let offset = n;
  delays.forEach((d, i) => {
    if (d === 0) {
      for (let j = 0; j < n; j++) C.set(i, j, model.C.get(i, j));
      return;
    }
    // z₁[k+1] = y_i[k] = C_i x + D_i u + E_i w
    for (let j = 0; j < n; j++) A.set(offset, j, model.C.get(i, j));
    for (let j = 0; j < m; j++) B.set(offset, j, model.D.get(i, j));
    for (let j = 0; j < q; j++) F.set(offset, j, model.E.get(i, j));
    for (let k = 1; k < d; k++) A.set(offset + k, offset + k - 1, 1);
    C.set(i, offset + d - 1, 1);
    for (let j = 0; j < m; j++) D.set(i, j, 0);
    for (let j = 0; j < q; j++) E.set(i, j, 0);
    for (let k = 1; k <= d; k++) {
      stateNames.push(`${model.names.outputs[i]}_delay${k}`);
      stateUnits.push(model.units.outputs[i]!);
    }
    offset += d;
  });
  return stateSpaceFromMatrices({
    ...model,
    A,
    B,
    C,
    D,
    F,
    E,
    names: { ...model.names, states: uniqueNames(stateNames) },
    units: { ...model.units, states: stateUnits },
  });
}

/** Highest Padé order accepted: beyond it the coefficients span more than ~30 decades. */
export const MAX_PADE_ORDER = 10;

export interface PadeDelay {
  model: StateSpace;
  /** Frequency (rad/s) below which the approximation is considered valid: order/τ. */
  validBelowRadPerSec: number;
  warning: string;
}

/**
 * Computes: a continuous SISO model of the [N/N] Padé approximant of e^{−sτ}:
 *   p(−sτ)/p(sτ), p(x) = Σ_{k=0}^{N} c_k x^k, c_k = (2N−k)!·N! / ((2N)!·k!·(N−k)!),
 *   with a `warning` about its range of validity.
 * Requires: τ finite ≥ 0 (τ = 0 gives the static gain 1); N an integer 1..10.
 * Method: closed-form Padé coefficients of the exponential (G. A. Baker & P. Graves-Morris,
 *   "Padé Approximants", 2nd ed., CUP 1996, §1.2, from memory), realized by
 *   realizeTransferFunction (controller form with balancing).
 * Cost: O(N²). Accuracy: |approximant(jω)| = 1 exactly in exact arithmetic (all-pass); the
 *   phase matches −ωτ closely only for ωτ well below N. Rule used (common practice): valid
 *   for ω ≤ N/τ. Measured phase error at ωτ = N (scipy.interpolate.pade coefficients):
 *   4.2° (N = 1), 2.0° (N = 2), 0.86° (N = 3), < 0.4° for N ≥ 4; at ωτ = 2N it exceeds 24°.
 * Errors: "invalid-argument" (τ < 0, order not an integer in 1..10), "non-finite" (τ).
 * Example: padeDelay(0.2, 1).model has transfer function (1 − 0.1s)/(1 + 0.1s): A = [[−10]]
 *   up to scaling, D = [[−1]]; check G(0) = 1.
 */
export function padeDelay(tauSeconds: number, order: number): PadeDelay {
  if (typeof tauSeconds !== "number" || !Number.isFinite(tauSeconds)) {
    throw new EngineError("non-finite", `tauSeconds is ${String(tauSeconds)}; the delay must be a finite number of seconds`, { argument: "tauSeconds" });
  }
  if (tauSeconds < 0) {
    throw new EngineError("invalid-argument", `tauSeconds is ${tauSeconds}; a delay cannot be negative`, { argument: "tauSeconds" });
  }
  if (!Number.isInteger(order) || order < 1 || order > MAX_PADE_ORDER) {
    throw new EngineError("invalid-argument", `Padé order is ${String(order)}; it must be a whole number from 1 to ${MAX_PADE_ORDER}`, { argument: "order" });
  }
  if (tauSeconds === 0) {
    const model = stateSpaceFromMatrices({ A: [], B: [], C: [], D: [[1]] });
    return { model, validBelowRadPerSec: Infinity, warning: "zero delay: the model is the static gain 1" };
  }
  const c = padeCoefficients(order);
  // highest power first: coefficient of s^k is c_k τ^k
  const den: number[] = [];
  const num: number[] = [];
  for (let k = order; k >= 0; k--) {
    const v = c[k]! * tauSeconds ** k;
    den.push(v);
    num.push(k % 2 === 0 ? v : -v);
  }
  const model = realizeTransferFunction({ num, den, sampleTime: null });
  const validBelowRadPerSec = order / tauSeconds;
  return {
    model,
    validBelowRadPerSec,
    warning:
      `Padé approximation of order ${order} of a ${tauSeconds} s delay: gain exact (all-pass), phase accurate only for ω·τ well below ${order}; ` +
      `treat it as valid below ${validBelowRadPerSec.toPrecision(3)} rad/s (common practice). It adds ${order} right-half-plane zero(s).`,
  };
}

/** c_k = (2N−k)!·N! / ((2N)!·k!·(N−k)!), k = 0..N, computed by the ratio c_{k+1}/c_k. */
function padeCoefficients(N: number): number[] {
  const c = [1];
  for (let k = 0; k < N; k++) c.push((c[k]! * (N - k)) / ((2 * N - k) * (k + 1)));
  return c;
}
