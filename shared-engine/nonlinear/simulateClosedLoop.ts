/**
 * Closed-loop simulation of a nonlinear plant under a linear state-feedback controller designed
 * at an operating point, with actuator limits, optional integral action with anti-windup,
 * continuous or sampled (zero-order hold), beside the exact response of the linearized loop.
 */
import { Matrix } from "ml-matrix";
import { EngineError } from "../errors";
import { asMatrix, eigenvalues, requireFinite, type MatrixInput } from "../linalg";
import { integrateDormandPrince } from "./dormandPrince";
import { linearize } from "./linearize";
import { closedLoopMatrix } from "./closedLoopMatrix";
import { LinearPrediction, type Exogenous } from "./linearPrediction";
import { scenarioEvents } from "./closedLoopScenario";
import type { OperatingPoint } from "./operatingPoint";
import type { CompiledNonlinearPlant } from "./plant";

// Kept exported from here (robustness sweeps and other folders know it as part of this module).
export { closedLoopMatrix } from "./closedLoopMatrix";

export interface ClosedLoopScenario {
  /** Steps of tracked-output set-points (needs integral action on that output). */
  setpointSteps?: { output: string; size: number; time?: number }[];
  /** Disturbance steps (size in the disturbance's unit) or ramps (size = slope per second), from `time` on. */
  disturbanceChanges?: { disturbance: string; kind: "step" | "ramp"; size: number; time?: number }[];
  /** Initial deviations of states from the operating point, by state name. */
  initialOffset?: Record<string, number>;
}

export interface IntegralAction {
  /** Output names whose error e = y − r is integrated (r of them). */
  outputs: string[];
  /** m × r gain: u = u0 + sat(−K(x − x0) − Ki·∫e). */
  Ki: MatrixInput;
  /** Default "back-calculation". */
  antiWindup?: "back-calculation" | "conditional" | "none";
  /** Back-calculation tracking time constant Tt (s). Default max(T, 1/max|λ(closed loop)|). */
  trackingTimeSec?: number;
}

export interface ClosedLoopSimulationRequest {
  plant: CompiledNonlinearPlant;
  operatingPoint: OperatingPoint;
  /** m × n state-feedback gain designed at the operating point. */
  K: MatrixInput;
  integral?: IntegralAction;
  /** null/undefined: continuous controller; T > 0: sampled with zero-order hold. */
  sampleTime?: number | null;
  scenario?: ClosedLoopScenario;
  /** Output times (s), strictly increasing, first ≥ 0; the simulation starts at t = 0. */
  times: number[];
  rtol?: number;
  atol?: number;
  /** Called between samples / output times; returning true stops with kind "cancelled". */
  isCancelled?: () => boolean;
  /** Called with the fraction of the horizon done (0..1). */
  onProgress?: (fraction: number) => void;
}

export interface SimulatedSignals {
  states: number[][];
  outputs: number[][];
  inputs: number[][];
}

export interface ClosedLoopSimulation extends SimulatedSignals {
  time: number[];
  /** The linearized loop (no saturation) simulated exactly on the same times. */
  linear: SimulatedSignals;
  /** Largest |y − y_linear| over times and outputs (null when the plant has no outputs). */
  largestDivergence: { time: number; output: string; size: number } | null;
  /** True when any input hit a magnitude or rate limit. */
  saturated: boolean;
  stoppedEarly: { time: number; reason: string } | null;
  warnings: string[];
  names: { states: string[]; inputs: string[]; outputs: string[] };
}

function finiteMatrix(value: MatrixInput, name: string, rows: number, cols: number): Matrix {
  const M = asMatrix(value, name);
  requireFinite(M, name);
  if (M.rows !== rows || M.columns !== cols) {
    throw new EngineError("shape-mismatch", `${name} must be ${rows}×${cols} (it is ${M.rows}×${M.columns})`, { argument: name });
  }
  return M;
}

/**
 * Computes: the response of x' = f(x, u, w, p), y = g(x, u, w, p) under
 *   u = u0 + sat(−K(x − x0) − Ki·ξ), ξ' = y_I − r (continuous) or ξ_{k+1} = ξ_k + T(y_I − r)_k
 *   (sampled, forward Euler at the samples), with sat the declared input min/max (and, when
 *   sampled, the rate limits |u_k − u_{k−1}| ≤ rateLimit·T, u_{−1} = u0); w = w0 + steps/ramps,
 *   r = y0_I + set-point steps, x(0) = x0 + offset. Also the linearized loop's response
 *   (same law without saturation) on the same times, and the largest output divergence.
 * Requires: K: m×n, Ki: m×r finite; an operating point of this plant (normally an
 *   equilibrium); times strictly increasing with times[0] ≥ 0.
 * Method: plant integrated by Dormand–Prince 5(4) (`integrateDormandPrince`) piecewise
 *   between break points (samples, scenario events, output times) so no step straddles a
 *   discontinuity of the held input or the exogenous signals. Anti-windup: back-calculation
 *   (K. J. Åström & L. Rundqwist, "Integrator windup and how to avoid it", ACC 1989),
 *   generalised by us to several inputs as ξ' = e + ρ·Kiᵀ(u_unsat − u_sat), ρ = 1/(Tt‖Ki‖_F²),
 *   which moves −Ki·ξ towards the saturated input; or conditional integration (ξ frozen while
 *   an input is saturated and the error would push it further out). Linear prediction:
 *   the augmented linear system [δx; ξ; w; ẇ; r] (plus the held input when sampled) is
 *   propagated exactly by matrix exponentials between break points (C. F. Van Loan,
 *   "Computing integrals involving the matrix exponential", IEEE TAC 23(3), 1978, for the
 *   augmentation idea; `expm` for e^{MΔ}).
 * Cost: DP45 work (6 f-evaluations per step) plus one controller update per sample; linear
 *   part: one expm of size ≤ 2n + 2q + 2r + m per distinct break-point spacing.
 * Accuracy: nonlinear part as DP45 with rtol (default 1e-8) and atol (default 1e-10); linear
 *   part to expm accuracy. A linear plant without saturation matches the prediction to about
 *   rtol (tested to 1e-6 relative).
 * Errors: "shape-mismatch" (K, Ki, operating point sizes), "invalid-argument" (bad times,
 *   unknown names in the scenario, set-point step on an output without integral action,
 *   sample time), "cancelled" (isCancelled() returned true; details.time), "no-convergence"
 *   (DP45 step cap). A solution that becomes non-finite or leaves the equations' domain is
 *   not an error: the result ends at the last good time with `stoppedEarly`.
 * Example:
 *   const sim = simulateClosedLoop({ plant, operatingPoint: op, K: [[2, 1]], times: [0, 0.1, 0.2],
 *     scenario: { initialOffset: { theta: 0.1 } } });
 *   // sim.largestDivergence.size is small for a small offset (check < 1e-3)
 */
export function simulateClosedLoop(request: ClosedLoopSimulationRequest): ClosedLoopSimulation {
  const { plant, operatingPoint: op } = request;
  const { n, m, q, p } = plant;
  const env0 = plant.environment(op.states, op.inputs, op.disturbances, op.parameters);
  const x0 = Float64Array.from(op.states);
  const u0 = Float64Array.from(op.inputs);
  const w0 = Float64Array.from(op.disturbances);
  const K = finiteMatrix(request.K, "K", m, n);
  const integral = request.integral;
  const trackedNames = integral?.outputs ?? [];
  const tracked = trackedNames.map((name) => {
    const i = plant.names.outputs.indexOf(name);
    if (i < 0) throw new EngineError("invalid-argument", `integral.outputs: '${name}' is not a declared output`, { argument: "integral.outputs", name });
    return i;
  });
  const r = tracked.length;
  const Ki = integral ? finiteMatrix(integral.Ki, "Ki", m, r) : new Matrix(m, 0);
  const antiWindup = integral?.antiWindup ?? "back-calculation";
  const T = request.sampleTime ?? null;
  if (T !== null && !(typeof T === "number" && T > 0 && Number.isFinite(T))) {
    throw new EngineError("invalid-argument", `sampleTime must be a positive finite number of seconds or null (it is ${String(T)})`, { argument: "sampleTime" });
  }
  const times = request.times;
  if (!Array.isArray(times) || times.length === 0) throw new EngineError("empty", "times must list at least one output time", { argument: "times" });
  times.forEach((t, i) => {
    if (typeof t !== "number" || !Number.isFinite(t) || t < 0 || (i > 0 && !(t > times[i - 1]!))) {
      throw new EngineError("invalid-argument", `times must be finite, ≥ 0 and strictly increasing (entry ${i} is ${t})`, { argument: "times", index: i });
    }
  });
  const tEnd = times[times.length - 1]!;
  const warnings: string[] = [];
  const lin = linearize(plant, op);
  if (lin.equilibriumResidual > 1e-6) warnings.push(`the operating point is not an equilibrium (max |f| = ${lin.equilibriumResidual.toExponential(3)}); the plant drifts even without a disturbance`);
  const lower = plant.spec.inputs.map((u) => u.min ?? -Infinity);
  const upper = plant.spec.inputs.map((u) => u.max ?? Infinity);
  const rate = plant.spec.inputs.map((u) => u.rateLimit ?? Infinity);
  if (T === null && rate.some(Number.isFinite)) warnings.push("input rate limits are applied only with a sampled controller (sampleTime); this continuous simulation ignores them");

  // Scenario events.
  const scenario = request.scenario ?? {};
  const { events, offset } = scenarioEvents(scenario, trackedNames, plant);

  // Break points: 0, output times, event times, samples. Points closer than `snap` are merged
  // (k·T and an output time may differ by rounding), so no controller update happens twice.
  const snap = 1e-12 * Math.max(1, tEnd);
  const candidates = [0, ...times, ...events.map((e) => e.time).filter((t) => t <= tEnd)];
  if (T !== null) for (let k = 1; k * T <= tEnd + snap; k++) candidates.push(Math.min(k * T, tEnd));
  candidates.sort((a, b) => a - b);
  const breaks: number[] = [];
  for (const t of candidates) if (breaks.length === 0 || t - breaks[breaks.length - 1]! > snap) breaks.push(t);
  let lastSample = -1;
  const isNewSample = (t: number): boolean => {
    if (T === null) return false;
    const k = Math.round(t / T);
    if (Math.abs(t - k * T) > snap || k <= lastSample) return false;
    lastSample = k;
    return true;
  };

  // Controller pieces shared by the nonlinear run.
  const uUnsat = new Float64Array(m);
  const uSat = new Float64Array(m);
  const controlLaw = (x: ArrayLike<number>, xi: ArrayLike<number>): void => {
    for (let i = 0; i < m; i++) {
      let v = u0[i]!;
      for (let j = 0; j < n; j++) v -= K.get(i, j) * (x[j]! - x0[j]!);
      for (let j = 0; j < r; j++) v -= Ki.get(i, j) * xi[j]!;
      uUnsat[i] = v;
      uSat[i] = Math.min(upper[i]!, Math.max(lower[i]!, v));
    }
  };
  const AclPoles = eigenvalues(closedLoopMatrix(lin.model.A, lin.model.B, lin.model.C, lin.model.D, K, Ki, tracked));
  const fastest = Math.max(...AclPoles.map((z) => Math.hypot(z.re, z.im)), 1e-12);
  const Tt = integral?.trackingTimeSec ?? Math.max(T ?? 0, 1 / fastest);
  const kiNorm2 = Ki.to1DArray().reduce((s, v) => s + v * v, 0);
  const rho = kiNorm2 > 0 ? 1 / (Tt * kiNorm2) : 0;
  // ξ-rate for error e and the applied input (anti-windup per the chosen scheme).
  const integratorRate = (e: Float64Array, applied: Float64Array, out: Float64Array): void => {
    if (antiWindup === "conditional") {
      for (let i = 0; i < m; i++) {
        const gap = uUnsat[i]! - applied[i]!;
        if (gap === 0) continue;
        let push = 0; // (−Ki e)_i: where the integrator is moving input i
        for (let j = 0; j < r; j++) push -= Ki.get(i, j) * e[j]!;
        if (push * gap > 0) { out.fill(0); return; }
      }
      out.set(e);
      return;
    }
    out.set(e);
    if (antiWindup === "back-calculation") {
      for (let j = 0; j < r; j++) {
        let s = 0;
        for (let i = 0; i < m; i++) s += Ki.get(i, j) * (uUnsat[i]! - applied[i]!);
        out[j] = out[j]! + rho * s;
      }
    }
  };

  const exoNL: Exogenous = { wv: new Float64Array(q), ws: new Float64Array(q), dr: new Float64Array(r) };
  const y0 = Float64Array.from(op.outputs);
  const rampList = (scenario.disturbanceChanges ?? []).filter((s) => s.kind === "ramp");
  // Disturbance at time t: steps applied so far (exoNL.wv) plus ramps started by `appliedUpTo`.
  const wAt = (t: number, out: Float64Array, appliedUpTo: number): void => {
    for (let j = 0; j < q; j++) out[j] = w0[j]! + exoNL.wv[j]!;
    for (const s of rampList) {
      const start = s.time ?? 0;
      if (start <= appliedUpTo + snap) {
        const j = plant.names.disturbances.indexOf(s.disturbance);
        out[j] = out[j]! + s.size * (t - start);
      }
    }
  };

  const env = Float64Array.from(env0);
  const wNow = new Float64Array(q);
  const yNow = new Float64Array(p);
  const eNow = new Float64Array(r);
  const dxi = new Float64Array(r);
  const xi = new Float64Array(r);
  const held = Float64Array.from(u0);
  let saturated = false;
  const setEnv = (x: ArrayLike<number>, u: ArrayLike<number>, w: ArrayLike<number>): void => {
    for (let i = 0; i < n; i++) env[i] = x[i]!;
    for (let i = 0; i < m; i++) env[n + i] = u[i]!;
    for (let i = 0; i < q; i++) env[n + m + i] = w[i]!;
  };
  const trackingError = (): void => {
    plant.outputValues(env, yNow);
    for (let j = 0; j < r; j++) eNow[j] = yNow[tracked[j]!]! - (y0[tracked[j]!]! + exoNL.dr[j]!);
  };

  const out: ClosedLoopSimulation = {
    time: [], states: [], outputs: [], inputs: [],
    linear: { states: [], outputs: [], inputs: [] },
    largestDivergence: null, saturated: false, stoppedEarly: null, warnings,
    names: { states: [...plant.names.states], inputs: [...plant.names.inputs], outputs: [...plant.names.outputs] },
  };
  const linearRun = new LinearPrediction(lin.model.A, lin.model.B, lin.model.C, lin.model.D, lin.model.F, lin.model.E, K, Ki, tracked, T);
  linearRun.setInitial(offset);

  let state = Float64Array.from(x0, (v, i) => v + offset[i]!);
  let eventIndex = 0;
  let lastStep: number | undefined;
  let outIndex = 0;
  const rtol = request.rtol ?? 1e-8;
  const atol = request.atol ?? 1e-10;
  const record = (t: number): void => {
    if (T === null) {
      controlLaw(state.subarray(0, n), state.subarray(n));
      held.set(uSat);
    }
    wAt(t, wNow, t);
    setEnv(state, held, wNow);
    plant.outputValues(env, yNow);
    const linear = linearRun.signals(x0, u0, y0);
    // An unstable linearized loop can outgrow floating point before the nonlinear run stops:
    // end the record at the last sample where both are finite, and say why (never a NaN).
    for (const list of [linear.states, linear.inputs, linear.outputs]) {
      if (list.some((v) => !Number.isFinite(v))) {
        throw new EngineError("non-finite", `the linear prediction left the floating-point range at t = ${t} s (the linearized loop is unstable)`, { time: t });
      }
    }
    out.time.push(t);
    out.states.push(Array.from(state.subarray(0, n)));
    out.inputs.push(Array.from(held));
    out.outputs.push(Array.from(yNow));
    out.linear.states.push(linear.states);
    out.linear.inputs.push(linear.inputs);
    out.linear.outputs.push(linear.outputs);
  };

  // Continuous mode integrates [x; ξ]; sampled mode integrates x with ξ updated at samples.
  if (T === null) { const s = new Float64Array(n + r); s.set(state); state = s; }
  const fx = new Float64Array(n);
  let activeUpTo = 0;
  const rhs = (t: number, z: Float64Array, dz: Float64Array): void => {
    wAt(t, wNow, activeUpTo);
    if (T === null) {
      controlLaw(z.subarray(0, n), z.subarray(n));
      setEnv(z, uSat, wNow);
      plant.stateDerivative(env, fx);
      dz.set(fx);
      if (r > 0) {
        trackingError();
        integratorRate(eNow, uSat, dxi);
        for (let j = 0; j < r; j++) dz[n + j] = dxi[j]!;
      }
    } else {
      setEnv(z, held, wNow);
      plant.stateDerivative(env, fx);
      dz.set(fx);
    }
  };

  try {
    for (let b = 0; b < breaks.length; b++) {
      const tb = breaks[b]!;
      if (b > 0) {
        const ta = breaks[b - 1]!;
        const sol = integrateDormandPrince(rhs, ta, state, [tb], { rtol, atol, ...(lastStep !== undefined ? { initialStep: Math.min(lastStep, tb - ta) } : {}) });
        if (sol.stoppedEarly) {
          out.stoppedEarly = { time: sol.stoppedEarly.time, reason: sol.stoppedEarly.reason };
          break;
        }
        state = Float64Array.from(sol.states[0]!);
        lastStep = sol.lastStep > 0 ? sol.lastStep : undefined;
        linearRun.advanceTo(tb);
      }
      // Events at tb take effect now (steps are right-continuous).
      while (eventIndex < events.length && events[eventIndex]!.time <= tb + snap) {
        events[eventIndex]!.apply(exoNL);
        linearRun.applyEvent(events[eventIndex]!);
        eventIndex++;
      }
      activeUpTo = tb;
      if (isNewSample(tb)) {
        // Sampled controller: measure, compute, saturate, rate-limit, hold; then integrate error.
        controlLaw(state, xi);
        for (let i = 0; i < m; i++) {
          const step = rate[i]! * T!;
          const limited = Math.min(held[i]! + step, Math.max(held[i]! - step, uSat[i]!));
          held[i] = Math.min(upper[i]!, Math.max(lower[i]!, limited));
          if (held[i] !== uUnsat[i]) saturated = true;
        }
        if (r > 0) {
          wAt(tb, wNow, tb);
          setEnv(state, held, wNow);
          trackingError();
          integratorRate(eNow, held, dxi);
          for (let j = 0; j < r; j++) xi[j] = xi[j]! + T! * dxi[j]!;
        }
        linearRun.sample();
      } else if (T === null) {
        controlLaw(state.subarray(0, n), state.subarray(n));
        for (let i = 0; i < m; i++) if (uSat[i] !== uUnsat[i]) saturated = true;
      }
      if (outIndex < times.length && Math.abs(times[outIndex]! - tb) <= snap) {
        record(times[outIndex]!);
        outIndex++;
      }
      if (request.isCancelled?.()) {
        throw new EngineError("cancelled", `closed-loop simulation cancelled at t = ${tb}`, { time: tb });
      }
      request.onProgress?.(tEnd > 0 ? tb / tEnd : 1);
    }
  } catch (error) {
    if (error instanceof EngineError && error.kind === "non-finite") {
      const lastTime = out.time.length > 0 ? out.time[out.time.length - 1]! : 0;
      out.stoppedEarly = { time: lastTime, reason: error.message };
    } else {
      throw error;
    }
  }
  out.saturated = saturated;
  if (p > 0 && out.time.length > 0) {
    let best = { time: out.time[0]!, output: plant.names.outputs[0]!, size: 0 };
    out.outputs.forEach((row, k) => row.forEach((v, j) => {
      const d = Math.abs(v - out.linear.outputs[k]![j]!);
      if (d > best.size) best = { time: out.time[k]!, output: plant.names.outputs[j]!, size: d };
    }));
    out.largestDivergence = best;
  }
  return out;
}
