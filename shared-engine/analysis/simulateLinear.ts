/**
 * Exact sampled simulation of a linear state-space model driven by an arbitrary input sequence
 * (and disturbance sequence) on any strictly increasing time grid: the recursion over the
 * transition matrices of each step, the outputs, and the checks of the input samples and of the
 * result (finite values, a warning when the model is unstable).
 */
import { Matrix } from "ml-matrix";
import { EngineError } from "../errors";
import { eigenvalues } from "../linalg";
import type { StateSpace } from "../model";
import { checkTimes } from "./timeGrid";
import { fohStep, flat, sampledStep, zohStep, type StepMatrices } from "./transitionMatrices";

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

export interface SimulateOptions {
  x0?: number[];
  /** w[k][l]: disturbance l at time[k]; omitted = no disturbance. */
  w?: number[][];
  /** How the input moves between two sample times (continuous models only). Default "zoh". */
  hold?: "zoh" | "foh";
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
 *   gaps of j periods use [[A, G], [0, I]]^j by repeated squaring. The step matrices come from
 *   `transitionMatrices.ts`.
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
