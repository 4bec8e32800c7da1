/**
 * Time responses of linear state-space models: exact sampled simulation of an arbitrary input
 * sequence (zero- or first-order hold between the given times), and the step, impulse and
 * initial-condition responses built on it.
 */
import { Matrix } from "ml-matrix";
import { EngineError } from "../errors";
import { eigenvalues, expm } from "../linalg";
// vanLoan is not (yet) re-exported by linalg/index.ts, so it is imported from its module file.
import { expmIntegral } from "../linalg/vanLoan";
import type { StateSpace } from "../model";

export interface TimeResponse {
  /** Sample times in seconds (a copy of the grid used). */
  time: number[];
  /** outputs[i][k]: output i at time[k]. */
  outputs: number[][];
  /** states[i][k]: state i at time[k]. */
  states: number[][];
  /** inputs[j][k]: input j at time[k] (the sequence actually applied). */
  inputs: number[][];
  /** disturbances[l][k] when a disturbance sequence was applied (step on a disturbance, or `w`). */
  disturbances?: number[][];
  /** Plain-language remarks: growth of an unstable model, omitted impulse terms, grid notes. */
  warnings: string[];
}

export type TimeGrid = number[] | { horizonSec?: number; points?: number };

export interface SimulateOptions {
  x0?: number[];
  /** w[k][l]: disturbance l at time[k]; omitted = no disturbance. */
  w?: number[][];
  /** How the input moves between two sample times (continuous models only). Default "zoh". */
  hold?: "zoh" | "foh";
}

/** Most samples a generated grid may have (guards against a horizon of 10⁹ sample periods). */
const MAX_SAMPLES = 1_000_000;
/** Default number of points of a continuous grid. */
const DEFAULT_POINTS = 501;
/** Relative tolerance for "this time is an integer multiple of T" (sampled models). */
const SAMPLE_ALIGNMENT_TOL = 1e-9;

/**
 * Computes: a horizon t_end (seconds) long enough to show the whole transient of `model`:
 *   - each stable pole λ contributes 7/σ with σ = −Re λ (continuous) or σ = −ln|z|/T (sampled):
 *     7 time constants, after which the mode has decayed to e⁻⁷ ≈ 0.09 % (so the ±2 % settling
 *     band is reached inside the horizon even with a 20× residue);
 *   - each undamped oscillation (pole on the stability boundary, ω ≠ 0) contributes 5 periods;
 *   - each unstable pole contributes 5/σ (the mode grows by e⁵ ≈ 150, enough to show the
 *     divergence without overflowing the plot);
 *   - a sampled deadbeat pole (z = 0) contributes n samples.
 *   The horizon is the largest contribution when the model is stable; when it is unstable the
 *   fastest-growing mode decides (min of the stable horizon and 5/σ_max). Models with no time
 *   scale at all (n = 0, or only poles at s = 0 / z = 1) get 10 s (a convention). Sampled
 *   horizons are rounded up to a multiple of T and are at least 10 T.
 * Requires: a validated model. Method: eigenvalues of A (balanced Francis QR).
 * Cost: one eigenvalue problem, about 10 n³ flops. Accuracy: a heuristic; no residual.
 * Errors: "no-convergence" from the eigenvalue routine.
 * Example: defaultHorizon(1/(s+2) realisation) === 3.5 (7 time constants of 0.5 s).
 */
export function defaultHorizon(model: StateSpace): number {
  const n = model.A.rows;
  const T = model.sampleTime;
  const poles = n === 0 ? [] : eigenvalues(model.A);
  let stable = 0;
  let growth = 0;
  for (const p of poles) {
    let sigma: number;
    let omega: number;
    if (T === null) {
      sigma = -p.re;
      omega = Math.abs(p.im);
    } else {
      const r = Math.hypot(p.re, p.im);
      if (r === 0) {
        stable = Math.max(stable, n * T);
        continue;
      }
      sigma = -Math.log(r) / T;
      omega = Math.abs(Math.atan2(p.im, p.re)) / T;
    }
    const scale = T === null ? Math.max(Math.hypot(p.re, p.im), 1e-300) : 1 / T;
    if (sigma > 1e-9 * scale) stable = Math.max(stable, 7 / sigma);
    else if (sigma < -1e-9 * scale) growth = Math.max(growth, -sigma);
    else if (omega > 0) stable = Math.max(stable, (5 * 2 * Math.PI) / omega);
  }
  let horizon = stable > 0 ? stable : 10;
  if (growth > 0) horizon = stable > 0 ? Math.min(stable, 5 / growth) : 5 / growth;
  if (T !== null) horizon = Math.max(10, Math.ceil(horizon / T - 1e-9)) * T;
  return horizon;
}

/**
 * Computes: the response to a unit step on input `input` (default 0) or on disturbance
 *   `input` when `from` is "disturbance", starting from x = 0: u_j(t) = 1 for t ≥ t₀.
 * Requires: input index in range; a grid as for `simulateLinear`, or `{ horizonSec, points }`
 *   (defaults: `defaultHorizon(model)` and 501 points; sampled models always use t_k = k·T up
 *   to the horizon, `points` then caps the number of samples).
 * Method: `simulateLinear` with a constant input, which is exact for a step (zero-order hold).
 * Cost/Accuracy: as `simulateLinear`; measured against scipy.signal.step / lsim / dstep
 *   fixtures: relative error ≤ 1e-12.
 * Errors: "invalid-argument" (bad index or grid), and those of `simulateLinear`.
 * Example: stepResponse(1/(s+1), [0, 1]).outputs[0][1] ≈ 1 − e⁻¹ (check |error| < 1e-15).
 */
export function stepResponse(model: StateSpace, times: TimeGrid, options: { input?: number; from?: "input" | "disturbance" } = {}): TimeResponse {
  const { index, fromDisturbance } = checkChannel(model, options);
  const t = resolveGrid(model, times);
  const width = fromDisturbance ? model.F.columns : model.B.columns;
  const unit = Array.from({ length: t.length }, () => Array.from({ length: width }, (_, j) => (j === index ? 1 : 0)));
  const zerosU = Array.from({ length: t.length }, () => new Array<number>(model.B.columns).fill(0));
  return fromDisturbance ? simulateLinear(model, t, zerosU, { w: unit }) : simulateLinear(model, t, unit);
}

/**
 * Computes: the impulse response from input (or disturbance) `input`.
 *   Continuous: y(t) = C e^{A(t − t₀)} b for t ≥ t₀ (x(t₀⁺) = b, the column of B or F); the
 *   D·δ(t) term cannot be sampled and is omitted (a warning says so when D ≠ 0).
 *   Sampled: the unit pulse u[0] = 1, u[k] = 0 afterwards, so y[0] = d and y[k] = C A^{k−1} b.
 * Requires/Cost/Errors: as `stepResponse`. Method: initial-state response (continuous) or
 *   `simulateLinear` with the pulse sequence (sampled).
 * Accuracy: measured against scipy.signal.impulse / dimpulse fixtures: relative ≤ 1e-12.
 * Example: impulseResponse(1/(s+1), [0, 1]).outputs[0][1] ≈ e⁻¹.
 */
export function impulseResponse(model: StateSpace, times: TimeGrid, options: { input?: number; from?: "input" | "disturbance" } = {}): TimeResponse {
  const { index, fromDisturbance } = checkChannel(model, options);
  const t = resolveGrid(model, times);
  const m = model.B.columns;
  const q = model.F.columns;
  if (model.sampleTime !== null) {
    const pulse = (width: number) => t.map((_, k) => Array.from({ length: width }, (_, j) => (k === 0 && j === index ? 1 : 0)));
    return fromDisturbance ? simulateLinear(model, t, pulse(0).map(() => new Array<number>(m).fill(0)), { w: pulse(q) }) : simulateLinear(model, t, pulse(m));
  }
  const G = fromDisturbance ? model.F : model.B;
  const H = fromDisturbance ? model.E : model.D;
  const x0 = Array.from({ length: model.A.rows }, (_, i) => G.get(i, index));
  const result = simulateLinear(model, t, t.map(() => new Array<number>(m).fill(0)), { x0 });
  let feedthrough = false;
  for (let i = 0; i < H.rows; i++) if (H.get(i, index) !== 0) feedthrough = true;
  if (feedthrough) result.warnings.push(`the direct term ${fromDisturbance ? "E" : "D"}·δ(t) of channel ${index + 1} is an impulse at t = ${t[0]} and is not included in the samples`);
  return result;
}

/**
 * Computes: the free response y(t) = C e^{A(t − t₀)} x0 (continuous) or C A^k x0 (sampled).
 * Requires: x0 of length n, finite. Method/Cost/Accuracy/Errors: as `simulateLinear` with u = 0.
 * Example: initialResponse(1/(s+1) realisation, [2], [0, 1]).states[0][1] ≈ 2e⁻¹.
 */
export function initialResponse(model: StateSpace, x0: number[], times: TimeGrid): TimeResponse {
  const t = resolveGrid(model, times);
  return simulateLinear(model, t, t.map(() => new Array<number>(model.B.columns).fill(0)), { x0 });
}

/**
 * Computes: x(t_k), y(t_k) = C x + D u + E w for the given input samples u[k] (m entries) and
 *   optional disturbance samples w[k] (q entries) at the strictly increasing times t_k.
 *   Continuous, "zoh": u, w constant on [t_k, t_{k+1}); x_{k+1} = Φ(h)x_k + Γ(h)[u_k; w_k] with
 *   h = t_{k+1} − t_k, Φ = e^{Ah}, Γ = ∫₀^h e^{As}ds·[B F]. "foh": u, w linear between samples,
 *   x_{k+1} = Φx_k + (Γ₁ − Γ₂)v_k + Γ₂v_{k+1} with Γ₁ = Γ(h) and
 *   Γ₂ = (1/h)∫₀^h e^{A(h−τ)} τ dτ·[B F] (the triangle-hold discretisation). Sampled (period T): every t_k must be an integer multiple
 *   of T; between t_k and t_{k+1} = t_k + jT the input is held for j samples, so for j = 1
 *   this is the exact recursion x[k+1] = A x[k] + B u[k] + F w[k].
 * Requires: times finite and strictly increasing (any spacing); u.length = times.length, each
 *   row with m entries; w likewise with q entries; x0 with n entries (default 0); all finite.
 * Method: Van Loan's block exponential (C. F. Van Loan, "Computing integrals involving the
 *   matrix exponential", IEEE TAC 23(3), 1978) through `expmIntegral` for the zero-order hold,
 *   and the 3-block exponential exp([[Ah, Gh, 0], [0, 0, I], [0, 0, 0]]) for the first-order
 *   hold (G. F. Franklin, J. D. Powell & M. L. Workman, "Digital Control of Dynamic Systems",
 *   3rd ed., §6.3.2 "triangle hold equivalent", from memory). One exponential per distinct
 *   step h (steps equal to 13 significant digits share it), so a uniform grid costs one. Sampled
 *   gaps of j periods use [[A, G], [0, I]]^j by repeated squaring.
 * Cost: per distinct step one expm of order n+m+q (≈ 15(n+m+q)³ flops); per sample
 *   O(n(n+m+q)) for the recursion and O(p(n+m+q)) for the outputs. Memory O((n+p+m)·N).
 * Accuracy: the recursion is exact up to the accuracy of Φ, Γ (backward error of expm) and the
 *   rounding of the N-step recursion. Measured against scipy.signal.lsim (interp False/True) and
 *   dlsim fixtures: ≤ 1e-12 relative to the largest output magnitude. Before returning every
 *   value is checked finite; an unstable model that overflows throws (never a silent Infinity).
 * Errors: "invalid-argument" (times not strictly increasing, not multiples of T, wrong lengths,
 *   hold unknown, more than 10⁶ samples), "non-finite" (NaN/Infinity in times, u, w, x0, or the
 *   response overflows), "empty" (no times).
 * Example: simulateLinear(1/(s+1), [0, 1, 2], [[1], [1], [1]]).outputs[0][2] ≈ 1 − e⁻²
 *   (check |error| < 1e-15).
 */
export function simulateLinear(model: StateSpace, times: number[], u: number[][], options: SimulateOptions = {}): TimeResponse {
  const n = model.A.rows;
  const m = model.B.columns;
  const p = model.C.rows;
  const q = model.F.columns;
  const t = checkTimes(times, model.sampleTime);
  const N = t.length;
  const hold = options.hold ?? "zoh";
  if (hold !== "zoh" && hold !== "foh") {
    throw new EngineError("invalid-argument", `hold must be "zoh" or "foh", not '${String(hold)}'`, { argument: "hold" });
  }
  if (hold === "foh" && model.sampleTime !== null) {
    throw new EngineError("invalid-argument", "hold 'foh' applies to continuous models only; a sampled model's input is a sequence", { argument: "hold" });
  }
  const uRows = checkSamples(u, "u", N, m);
  const wRows = options.w === undefined ? null : checkSamples(options.w, "w", N, q);
  const x0 = options.x0 === undefined ? new Float64Array(n) : checkVector(options.x0, "x0", n);
  const r = m + q; // width of the combined input v = [u; w]
  const v = new Float64Array(N * r);
  for (let k = 0; k < N; k++) {
    for (let j = 0; j < m; j++) v[k * r + j] = uRows[k]![j]!;
    if (wRows) for (let l = 0; l < q; l++) v[k * r + m + l] = wRows[k]![l]!;
  }
  const G = new Matrix(n, r);
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < m; j++) G.set(i, j, model.B.get(i, j));
    for (let l = 0; l < q; l++) G.set(i, m + l, model.F.get(i, l));
  }
  const cache = new Map<string, StepMatrices>();
  const stepFor = (k: number): StepMatrices => {
    const h = t[k + 1]! - t[k]!;
    const key = model.sampleTime === null ? h.toPrecision(13) : String(Math.round(h / model.sampleTime));
    let entry = cache.get(key);
    if (!entry) {
      entry = model.sampleTime !== null ? sampledStep(model.A, G, Math.round(h / model.sampleTime)) : hold === "zoh" ? zohStep(model.A, G, h) : fohStep(model.A, G, h);
      cache.set(key, entry);
    }
    return entry;
  };

  const X = new Float64Array(N * n);
  X.set(x0, 0);
  for (let k = 0; k + 1 < N; k++) {
    if (n === 0) break;
    const { Phi, Gamma0, Gamma1 } = stepFor(k);
    const xk = k * n;
    const xn = (k + 1) * n;
    for (let i = 0; i < n; i++) {
      let s = 0;
      for (let c = 0; c < n; c++) s += Phi[i * n + c]! * X[xk + c]!;
      for (let c = 0; c < r; c++) s += Gamma0[i * r + c]! * v[k * r + c]!;
      if (Gamma1) for (let c = 0; c < r; c++) s += Gamma1[i * r + c]! * v[(k + 1) * r + c]!;
      X[xn + i] = s;
    }
  }

  const Cf = flat(model.C);
  const Df = flat(model.D);
  const Ef = flat(model.E);
  const outputs = Array.from({ length: p }, () => new Array<number>(N).fill(0));
  for (let k = 0; k < N; k++) {
    for (let i = 0; i < p; i++) {
      let s = 0;
      for (let c = 0; c < n; c++) s += Cf[i * n + c]! * X[k * n + c]!;
      for (let j = 0; j < m; j++) s += Df[i * m + j]! * v[k * r + j]!;
      for (let l = 0; l < q; l++) s += Ef[i * q + l]! * v[k * r + m + l]!;
      outputs[i]![k] = s;
    }
  }
  const states = Array.from({ length: n }, (_, i) => Array.from({ length: N }, (_, k) => X[k * n + i]!));
  for (let k = 0; k < N; k++) {
    for (let i = 0; i < n; i++) if (!Number.isFinite(X[k * n + i]!)) throw overflow("state", i, t[k]!, k);
    for (let i = 0; i < p; i++) if (!Number.isFinite(outputs[i]![k]!)) throw overflow("output", i, t[k]!, k);
  }
  const result: TimeResponse = {
    time: [...t],
    outputs,
    states,
    inputs: Array.from({ length: m }, (_, j) => uRows.map((row) => row[j]!)),
    warnings: [],
  };
  if (wRows) result.disturbances = Array.from({ length: q }, (_, l) => wRows.map((row) => row[l]!));
  addGrowthWarning(model, result);
  return result;
}

interface StepMatrices {
  Phi: Float64Array; // n×n
  Gamma0: Float64Array; // n×r, multiplies v_k
  Gamma1: Float64Array | null; // n×r, multiplies v_{k+1} (first-order hold only)
}

function zohStep(A: Matrix, G: Matrix, h: number): StepMatrices {
  if (G.columns === 0) return { Phi: flat(expm(A.clone().mul(h))), Gamma0: new Float64Array(0), Gamma1: null };
  const { Phi, Gamma } = expmIntegral(A, G, h);
  return { Phi: flat(Phi), Gamma0: flat(Gamma), Gamma1: null };
}

// Triangle hold: exp([[A h, G h, 0], [0, 0, I], [0, 0, 0]]) = [[Φ, Γ₁, Γ₂], [0, I, I], [0, 0, I]],
// x_{k+1} = Φ x_k + (Γ₁ − Γ₂) v_k + Γ₂ v_{k+1}.
function fohStep(A: Matrix, G: Matrix, h: number): StepMatrices {
  const n = A.rows;
  const r = G.columns;
  const M = new Matrix(n + 2 * r, n + 2 * r);
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < n; j++) M.set(i, j, A.get(i, j) * h);
    for (let j = 0; j < r; j++) M.set(i, n + j, G.get(i, j) * h);
  }
  for (let j = 0; j < r; j++) M.set(n + j, n + r + j, 1);
  const E = expm(M);
  const Phi = new Float64Array(n * n);
  const Gamma0 = new Float64Array(n * r);
  const Gamma1 = new Float64Array(n * r);
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < n; j++) Phi[i * n + j] = E.get(i, j);
    for (let j = 0; j < r; j++) {
      Gamma1[i * r + j] = E.get(i, n + r + j);
      Gamma0[i * r + j] = E.get(i, n + j) - E.get(i, n + r + j);
    }
  }
  return { Phi, Gamma0, Gamma1 };
}

// [[A, G], [0, I]]^j = [[A^j, Σ_{i<j} A^i G], [0, I]], by repeated squaring.
function sampledStep(A: Matrix, G: Matrix, j: number): StepMatrices {
  const n = A.rows;
  const r = G.columns;
  const M = Matrix.eye(n + r);
  for (let i = 0; i < n; i++) {
    for (let c = 0; c < n; c++) M.set(i, c, A.get(i, c));
    for (let c = 0; c < r; c++) M.set(i, n + c, G.get(i, c));
  }
  let result = Matrix.eye(n + r);
  let base = M;
  for (let e = j; e > 0; e = Math.floor(e / 2)) {
    if (e % 2 === 1) result = result.mmul(base);
    if (e > 1) base = base.mmul(base);
  }
  const Phi = new Float64Array(n * n);
  const Gamma0 = new Float64Array(n * r);
  for (let i = 0; i < n; i++) {
    for (let c = 0; c < n; c++) Phi[i * n + c] = result.get(i, c);
    for (let c = 0; c < r; c++) Gamma0[i * r + c] = result.get(i, n + c);
  }
  return { Phi, Gamma0, Gamma1: null };
}

function flat(M: Matrix): Float64Array {
  const out = new Float64Array(M.rows * M.columns);
  for (let i = 0; i < M.rows; i++) for (let j = 0; j < M.columns; j++) out[i * M.columns + j] = M.get(i, j);
  return out;
}

function overflow(what: string, index: number, time: number, k: number): EngineError {
  return new EngineError("non-finite", `${what} ${index + 1} overflows at t = ${time} s (sample ${k + 1}); the model is unstable over this horizon, shorten it`, {
    sample: k,
    time,
  });
}

function addGrowthWarning(model: StateSpace, result: TimeResponse): void {
  if (model.A.rows === 0) return;
  const poles = eigenvalues(model.A);
  const T = model.sampleTime;
  const unstable = poles.filter((p) => (T === null ? p.re > 1e-12 * Math.max(1, Math.hypot(p.re, p.im)) : Math.hypot(p.re, p.im) > 1 + 1e-12));
  if (unstable.length > 0) {
    result.warnings.push(`the model has ${unstable.length} unstable pole(s) (${T === null ? "Re s > 0" : "|z| > 1"}); the response grows without bound`);
  }
}

function checkChannel(model: StateSpace, options: { input?: number; from?: "input" | "disturbance" }): { index: number; fromDisturbance: boolean } {
  const from = options.from ?? "input";
  if (from !== "input" && from !== "disturbance") {
    throw new EngineError("invalid-argument", `from must be "input" or "disturbance", not '${String(from)}'`, { argument: "from" });
  }
  const count = from === "input" ? model.B.columns : model.F.columns;
  const index = options.input ?? 0;
  if (!Number.isInteger(index) || index < 0 || index >= count) {
    throw new EngineError("invalid-argument", `input must be an ${from} index from 0 to ${count - 1} (the model has ${count} ${from}s), not ${index}`, {
      argument: "input",
      index,
      count,
    });
  }
  return { index, fromDisturbance: from === "disturbance" };
}

/** The explicit grid, or one built from { horizonSec, points } (see stepResponse). */
function resolveGrid(model: StateSpace, times: TimeGrid): number[] {
  if (Array.isArray(times)) return times;
  if (times === null || typeof times !== "object") {
    throw new EngineError("invalid-argument", "times must be a list of seconds or { horizonSec, points }", { argument: "times" });
  }
  const horizon = times.horizonSec ?? defaultHorizon(model);
  if (typeof horizon !== "number" || !Number.isFinite(horizon) || horizon <= 0) {
    throw new EngineError("invalid-argument", `horizonSec must be a finite positive number of seconds, not ${horizon}`, { argument: "horizonSec" });
  }
  const points = times.points;
  if (points !== undefined && (!Number.isInteger(points) || points < 2 || points > MAX_SAMPLES)) {
    throw new EngineError("invalid-argument", `points must be an integer from 2 to ${MAX_SAMPLES}, not ${points}`, { argument: "points" });
  }
  const T = model.sampleTime;
  if (T !== null) {
    let count = Math.ceil(horizon / T - 1e-9) + 1;
    if (points !== undefined) count = Math.min(count, points);
    if (count > MAX_SAMPLES) {
      throw new EngineError("invalid-argument", `a horizon of ${horizon} s is ${count} samples of ${T} s; at most ${MAX_SAMPLES} are allowed`, { argument: "horizonSec" });
    }
    return Array.from({ length: Math.max(count, 2) }, (_, k) => k * T);
  }
  const count = points ?? DEFAULT_POINTS;
  return Array.from({ length: count }, (_, k) => (k === count - 1 ? horizon : (horizon * k) / (count - 1)));
}

function checkTimes(times: number[], T: number | null): number[] {
  if (!Array.isArray(times)) throw new EngineError("invalid-argument", "times must be a list of seconds", { argument: "times" });
  if (times.length === 0) throw new EngineError("empty", "times is empty; at least one sample time is needed", { argument: "times" });
  if (times.length > MAX_SAMPLES) throw new EngineError("invalid-argument", `times has ${times.length} samples; at most ${MAX_SAMPLES} are allowed`, { argument: "times" });
  for (let k = 0; k < times.length; k++) {
    const v = times[k];
    if (typeof v !== "number" || !Number.isFinite(v)) {
      throw new EngineError("non-finite", `times[${k}] is ${v}; every time must be a finite number of seconds`, { argument: "times", index: k });
    }
    if (k > 0 && !(v > times[k - 1]!)) {
      throw new EngineError("invalid-argument", `times must be strictly increasing (times[${k - 1}] = ${times[k - 1]}, times[${k}] = ${v})`, { argument: "times", index: k });
    }
    if (T !== null) {
      const ratio = v / T;
      if (Math.abs(ratio - Math.round(ratio)) > SAMPLE_ALIGNMENT_TOL * Math.max(1, Math.abs(ratio))) {
        throw new EngineError("invalid-argument", `times[${k}] = ${v} s is not a multiple of the sample period ${T} s; a sampled model is defined only at its sample instants`, {
          argument: "times",
          index: k,
          sampleTime: T,
        });
      }
    }
  }
  return times;
}

function checkSamples(rows: number[][], name: string, N: number, width: number): number[][] {
  if (!Array.isArray(rows) || rows.length !== N) {
    throw new EngineError("invalid-argument", `${name} must have one row per time sample (${N} rows), but it has ${Array.isArray(rows) ? rows.length : "none"}`, { argument: name });
  }
  rows.forEach((row, k) => {
    if (!Array.isArray(row) || row.length !== width) {
      throw new EngineError("shape-mismatch", `${name}[${k}] must have ${width} entries (one per ${name === "u" ? "input" : "disturbance"}), but it has ${Array.isArray(row) ? row.length : "none"}`, {
        argument: name,
        index: k,
      });
    }
    row.forEach((x, j) => {
      if (typeof x !== "number" || !Number.isFinite(x)) {
        throw new EngineError("non-finite", `${name}[${k}][${j}] is ${x}; samples must be finite numbers`, { argument: name, index: k, channel: j });
      }
    });
  });
  return rows;
}

function checkVector(x: number[], name: string, n: number): Float64Array {
  if (!Array.isArray(x) || x.length !== n) {
    throw new EngineError("shape-mismatch", `${name} must have ${n} entries (one per state), but it has ${Array.isArray(x) ? x.length : "none"}`, { argument: name });
  }
  x.forEach((v, i) => {
    if (typeof v !== "number" || !Number.isFinite(v)) throw new EngineError("non-finite", `${name}[${i}] is ${v}; it must be a finite number`, { argument: name, index: i });
  });
  return Float64Array.from(x);
}
