/**
 * Operating points (equilibria) of a nonlinear plant: f(x, u, w, p) = 0, plus chosen outputs at
 * set-points, solved for the states and inputs the user marks as unknown.
 */
import { EngineError } from "../errors";
import type { CompiledNonlinearPlant } from "./plant";

export interface OperatingPointRequest {
  /** Names of states and inputs to solve for; their values below are the initial guesses. */
  unknowns: string[];
  /** State values (fixed, or guesses for unknowns). Default: the state's `initial`, else 0 clipped into its bounds. */
  states?: Record<string, number>;
  /** Input values (fixed, or guesses). Default: 0 clipped into the input's bounds. */
  inputs?: Record<string, number>;
  /** Disturbance values. Default: the declared nominal values. */
  disturbances?: Record<string, number>;
  /** Parameter overrides. Default: the declared values. */
  parameters?: Record<string, number>;
  /** Extra equations y_j = setpoint_j, by output name. */
  outputSetpoints?: Record<string, number>;
  /** Converged when max |residual| ≤ tolerance. Default 1e-10. */
  tolerance?: number;
  /** Newton iteration cap. Default 100. */
  maxIterations?: number;
}

export interface OperatingPoint {
  states: number[];
  inputs: number[];
  disturbances: number[];
  parameters: number[];
  outputs: number[];
  names: { states: string[]; inputs: string[]; disturbances: string[]; parameters: string[]; outputs: string[] };
  /** The unknowns that were solved for. */
  unknowns: string[];
  /** max |f_i| and max |y_j − setpoint_j| at the returned point. */
  residual: number;
  iterations: number;
}

function finiteOr(value: unknown, fallback: number, path: string): number {
  if (value === undefined) return fallback;
  if (typeof value !== "number" || !Number.isFinite(value)) {
    throw new EngineError("invalid-argument", `${path} must be a finite number (it is ${String(value)})`, { argument: path });
  }
  return value;
}

function clip(value: number, lo: number | undefined, hi: number | undefined): number {
  return Math.min(hi ?? Infinity, Math.max(lo ?? -Infinity, value));
}

function checkKeys(record: Record<string, number> | undefined, allowed: string[], what: string): void {
  if (record === undefined) return;
  for (const key of Object.keys(record)) {
    if (!allowed.includes(key)) throw new EngineError("invalid-argument", `${what}.${key}: '${key}' is not a declared ${what.replace(/s$/, "")}`, { argument: `${what}.${key}` });
  }
}

/**
 * Computes: z* (the unknown states and inputs) with f(x, u, w, p) = 0 (n equations) and
 *   g_j(x, u, w, p) = setpoint_j for each requested output, the other values held fixed.
 * Requires: as many unknowns as equations (n + number of set-points); a Jacobian that is
 *   nonsingular near the solution; an initial guess in its basin of attraction.
 * Method: damped Newton's method with a backtracking (Armijo) line search on the merit
 *   φ(z) = ½‖r(z)‖²: step t = 1, ½, ¼, ... until φ(z + tδ) ≤ (1 − 2·10⁻⁴·t)·φ(z) (Dennis &
 *   Schnabel, "Numerical Methods for Unconstrained Optimization and Nonlinear Equations",
 *   Prentice-Hall 1983, Alg. A6.3.1). A trial point where an equation is undefined (sqrt of a
 *   negative, ...) counts as a failed trial. The Jacobian is exact (forward-mode AD); the
 *   Newton system is solved by Gaussian elimination with partial pivoting.
 * Cost: per iteration one Jacobian (O(nodes·unknowns)) and an O(k³) solve, k = unknowns;
 *   at most `maxIterations` (default 100) iterations and 40 halvings per line search.
 * Accuracy: returns when max|r| ≤ tolerance (default 1e-10) and the last Newton correction
 *   was ≤ 1e-9(1 + ‖z‖∞) (so the unknowns are accurate to about 1e-18 relative after
 *   quadratic convergence, i.e. to rounding), or when the full Newton step is at rounding
 *   level (‖δ‖∞ ≤ 8ε(1 + ‖z‖∞)); the residual reached is reported.
 * Errors: "invalid-argument" (unknown name, an unknown that is a disturbance or parameter,
 *   non-finite value, non-square system, a solution outside the declared min/max of a state or
 *   input — naming it); "singular" (the Jacobian is singular: names the unknown whose column
 *   is dependent on the others); "no-convergence" (iteration cap or failed line search, with
 *   iterations and last residual in details); "non-finite"/"parse-error" from the equations at
 *   the initial guess.
 * Example:
 *   // tank h' = q − 0.5√h: solve for q with h = 4 fixed
 *   const op = solveOperatingPoint(tank, { unknowns: ["q"], states: { h: 4 } });
 *   // op.inputs[0] ≈ 1, op.residual ≤ 1e-10
 */
export function solveOperatingPoint(plant: CompiledNonlinearPlant, request: OperatingPointRequest): OperatingPoint {
  const { names, n, m, q, r } = plant;
  const spec = plant.spec;
  checkKeys(request.states, names.states, "states");
  checkKeys(request.inputs, names.inputs, "inputs");
  checkKeys(request.disturbances, names.disturbances, "disturbances");
  checkKeys(request.parameters, names.parameters, "parameters");
  checkKeys(request.outputSetpoints, names.outputs, "outputSetpoints");
  const tolerance = finiteOr(request.tolerance, 1e-10, "tolerance");
  const maxIterations = finiteOr(request.maxIterations, 100, "maxIterations");
  if (!(tolerance > 0) || !(maxIterations >= 1)) {
    throw new EngineError("invalid-argument", `tolerance must be positive and maxIterations at least 1 (they are ${tolerance} and ${maxIterations})`, {});
  }

  const env = new Float64Array(n + m + q + r);
  spec.states.forEach((s, i) => { env[i] = finiteOr(request.states?.[s.name], s.initial ?? clip(0, s.min, s.max), `states.${s.name}`); });
  spec.inputs.forEach((u, i) => { env[n + i] = finiteOr(request.inputs?.[u.name], clip(0, u.min, u.max), `inputs.${u.name}`); });
  const nominalW = plant.nominalDisturbances;
  names.disturbances.forEach((w, i) => { env[n + m + i] = finiteOr(request.disturbances?.[w], nominalW[i]!, `disturbances.${w}`); });
  const nominalP = plant.parameterValues;
  names.parameters.forEach((p, i) => { env[n + m + q + i] = finiteOr(request.parameters?.[p], nominalP[i]!, `parameters.${p}`); });

  if (!Array.isArray(request.unknowns)) throw new EngineError("invalid-argument", "unknowns must be a list of state and input names", { argument: "unknowns" });
  const unknownSlots = request.unknowns.map((name) => {
    const si = names.states.indexOf(name);
    if (si >= 0) return si;
    const ui = names.inputs.indexOf(name);
    if (ui >= 0) return n + ui;
    const kind = names.disturbances.includes(name) ? "a disturbance" : names.parameters.includes(name) ? "a parameter" : "not declared";
    throw new EngineError("invalid-argument", `unknowns: '${name}' cannot be solved for (it is ${kind}; only states and inputs can be unknowns)`, { argument: "unknowns", name });
  });
  if (new Set(unknownSlots).size !== unknownSlots.length) throw new EngineError("invalid-argument", "unknowns: a name is listed twice", { argument: "unknowns" });
  const setpoints = Object.entries(request.outputSetpoints ?? {}).map(([name, value]) => ({
    index: names.outputs.indexOf(name), value: finiteOr(value, 0, `outputSetpoints.${name}`),
  }));
  const k = unknownSlots.length;
  const equations = n + setpoints.length;
  if (k !== equations) {
    throw new EngineError("invalid-argument", `the operating-point system is not square: ${k} unknown${k === 1 ? "" : "s"} (${request.unknowns.join(", ") || "none"}) for ${equations} equations (${n} state equation${n === 1 ? "" : "s"} + ${setpoints.length} output set-point${setpoints.length === 1 ? "" : "s"})`, {
      unknowns: k, equations,
    });
  }

  const residualAt = (e: Float64Array, out: Float64Array): number => {
    for (let i = 0; i < n; i++) out[i] = plant.stateEquations[i]!.evaluate(e);
    setpoints.forEach((s, j) => { out[n + j] = plant.outputEquations[s.index]!.evaluate(e) - s.value; });
    let worst = 0;
    for (let i = 0; i < equations; i++) worst = Math.max(worst, Math.abs(out[i]!));
    return worst;
  };
  const sumSquares = (v: Float64Array): number => { let s = 0; for (const x of v) s += x * x; return s; };

  const res = new Float64Array(equations);
  const trialRes = new Float64Array(equations);
  let worst = residualAt(env, res);
  let iterations = 0;
  const grad = new Float64Array(env.length);
  const J = new Float64Array(k * k);
  // Converged when the residual is within tolerance and the last Newton correction was small
  // (‖δ‖∞ ≤ 1e-9(1 + ‖z‖∞)): equations with small coefficients meet an absolute residual
  // tolerance long before the unknowns are accurate, so one more (cheap, quadratically
  // convergent) step is taken.
  let lastStepSmall = worst === 0;
  while (!(worst <= tolerance && lastStepSmall)) {
    if (iterations >= maxIterations) {
      throw new EngineError("no-convergence", `operating point: Newton's method did not converge in ${iterations} iterations (last residual ${worst.toExponential(3)}, tolerance ${tolerance})`, {
        iterations, residual: worst,
      });
    }
    iterations++;
    // Newton system J δ = −r over the unknown columns.
    for (let i = 0; i < equations; i++) {
      const expr = i < n ? plant.stateEquations[i]! : plant.outputEquations[setpoints[i - n]!.index]!;
      expr.gradient(env, grad);
      for (let c = 0; c < k; c++) J[i * k + c] = grad[unknownSlots[c]!]!;
    }
    const delta = Float64Array.from(res, (v) => -v);
    const dependent = solveInPlace(J, delta, k);
    if (dependent >= 0) {
      throw new EngineError("singular", `operating point: the Jacobian is singular; unknown '${request.unknowns[dependent]}' cannot be determined from the equations (its column depends on the other unknowns' columns)`, {
        unknown: request.unknowns[dependent], iterations, residual: worst,
      });
    }
    let zNorm = 0;
    let stepNorm = 0;
    unknownSlots.forEach((s, c) => { zNorm = Math.max(zNorm, Math.abs(env[s]!)); stepNorm = Math.max(stepNorm, Math.abs(delta[c]!)); });
    lastStepSmall = stepNorm <= 1e-9 * (1 + zNorm);
    const phi = sumSquares(res);
    let t = 1;
    let accepted = false;
    const trial = Float64Array.from(env);
    for (let halving = 0; halving < 40; halving++) {
      unknownSlots.forEach((s, c) => { trial[s] = env[s]! + t * delta[c]!; });
      let trialWorst = Infinity;
      try {
        trialWorst = residualAt(trial, trialRes);
      } catch (error) {
        if (!(error instanceof EngineError && error.kind === "non-finite")) throw error;
      }
      if (Number.isFinite(trialWorst) && sumSquares(trialRes) <= (1 - 2e-4 * t) * phi) {
        env.set(trial);
        res.set(trialRes);
        worst = trialWorst;
        accepted = true;
        break;
      }
      t *= 0.5;
    }
    if (stepNorm <= 8 * Number.EPSILON * (1 + zNorm)) {
      // The Newton correction is at rounding level: no further progress is possible.
      if (accepted) break;
      worst = residualAt(env, res);
      break;
    }
    if (!accepted) {
      throw new EngineError("no-convergence", `operating point: the line search found no decrease after 40 halvings at iteration ${iterations} (last residual ${worst.toExponential(3)}); try another initial guess`, {
        iterations, residual: worst,
      });
    }
  }

  // Declared bounds of states and inputs.
  const bounded = [...spec.states.map((s, i) => ({ s, v: env[i]!, kind: "state" })), ...spec.inputs.map((s, i) => ({ s, v: env[n + i]!, kind: "input" }))];
  for (const { s, v, kind } of bounded) {
    if ((s.min !== undefined && v < s.min) || (s.max !== undefined && v > s.max)) {
      throw new EngineError("invalid-argument", `operating point is outside the declared bounds: ${kind} '${s.name}' = ${v} is ${s.min !== undefined && v < s.min ? `below its min ${s.min}` : `above its max ${s.max}`}`, {
        name: s.name, value: v, min: s.min, max: s.max,
      });
    }
  }
  const outputs = new Float64Array(plant.p);
  plant.outputValues(env, outputs);
  return {
    states: Array.from(env.subarray(0, n)),
    inputs: Array.from(env.subarray(n, n + m)),
    disturbances: Array.from(env.subarray(n + m, n + m + q)),
    parameters: Array.from(env.subarray(n + m + q)),
    outputs: Array.from(outputs),
    names: { states: [...names.states], inputs: [...names.inputs], disturbances: [...names.disturbances], parameters: [...names.parameters], outputs: [...names.outputs] },
    unknowns: [...request.unknowns],
    residual: worst,
    iterations,
  };
}

/**
 * Solves the k×k row-major system in place (b becomes the solution) by Gaussian elimination
 * with partial pivoting. Returns −1, or the index of the first column whose pivot is negligible
 * (≤ 64·k·ε·max|J|): that column is numerically a combination of the earlier ones.
 */
function solveInPlace(J: Float64Array, b: Float64Array, k: number): number {
  let scale = 0;
  for (const v of J) scale = Math.max(scale, Math.abs(v));
  const threshold = 64 * k * Number.EPSILON * scale;
  if (scale === 0) return 0;
  for (let c = 0; c < k; c++) {
    let p = c;
    for (let i = c + 1; i < k; i++) if (Math.abs(J[i * k + c]!) > Math.abs(J[p * k + c]!)) p = i;
    if (Math.abs(J[p * k + c]!) <= threshold) return c;
    if (p !== c) {
      for (let j = 0; j < k; j++) { const t = J[c * k + j]!; J[c * k + j] = J[p * k + j]!; J[p * k + j] = t; }
      const t = b[c]!; b[c] = b[p]!; b[p] = t;
    }
    const pivot = J[c * k + c]!;
    for (let i = c + 1; i < k; i++) {
      const factor = J[i * k + c]! / pivot;
      if (factor === 0) continue;
      for (let j = c; j < k; j++) J[i * k + j] = J[i * k + j]! - factor * J[c * k + j]!;
      b[i] = b[i]! - factor * b[c]!;
    }
  }
  for (let i = k - 1; i >= 0; i--) {
    let s = b[i]!;
    for (let j = i + 1; j < k; j++) s -= J[i * k + j]! * b[j]!;
    b[i] = s / J[i * k + i]!;
  }
  return -1;
}
