/**
 * Anti-windup for the servo law u = −Kx·x − Ki·xᵢ when the actuators saturate: a plain-data
 * controller description (for simulation and export) and the integrator update step.
 */
import { EngineError } from "../errors";

export type AntiWindupMethod = "back-calculation" | "conditional" | "none";

/** Plain data (JSON-safe): the servo gains, actuator limits and the anti-windup rule. */
export interface AntiWindupController {
  /** m×n state gain. */
  Kx: number[][];
  /** m×r integrator gain. */
  Ki: number[][];
  /** One {min, max} per input (use ±Infinity-free large numbers for an unlimited input). */
  limits: { min: number; max: number }[];
  method: AntiWindupMethod;
  /**
   * Back-calculation tracking gain Kt = 1/Tt (1/s), in the units of the control input: the
   * integral part of u is pulled towards the saturated value at rate Kt·(u_sat − u_unsat).
   * Required for "back-calculation".
   */
  trackingGain?: number;
}

/**
 * Computes: the integrator state after one step of length dt:
 *   "none":             xᵢ ← xᵢ + dt·e
 *   "back-calculation": xᵢ ← xᵢ + dt·(e + Kt·S·(u_sat − u_unsat)), S = −Ki⁺ (r×m), so the
 *     integral contribution −Ki·xᵢ to u moves by Kt·(u_sat − u_unsat)·dt (exactly when Ki is
 *     square and invertible; the least-squares projection otherwise). For one input and
 *     Ki = −k_i this is Åström's ẋᵢ = e + (Kt/k_i)(u_sat − u_unsat).
 *   "conditional":      xᵢ,j ← xᵢ,j + dt·e_j except when some input k saturates (u_sat,k ≠
 *     u_unsat,k) and the integration would push u_k further into that limit, i.e.
 *     sign(−Ki[k][j]·e_j) = sign(u_unsat,k − u_sat,k); then integrator j is frozen.
 *   Continuous loops call it with the simulation step (forward Euler); sampled loops with the
 *   sample period T, which is the accumulator xᵢ[k+1] = xᵢ[k] + T·e[k] of
 *   `augmentWithIntegrators`.
 * Requires: state and error of length r, uUnsat and uSat of length m, Ki m×r, dt > 0, all
 *   finite; trackingGain > 0 for back-calculation.
 * Method: back-calculation and conditional integration as in K. J. Åström & T. Hägglund,
 *   "Advanced PID Control", ISA 2006, §3.5, and K. J. Åström & L. Rundqwist, "Integrator
 *   windup and how to avoid it", Proc. American Control Conference 1989.
 * Cost: O(m·r) per step (plus O(m·r·min(m, r)) for Ki⁺ with back-calculation).
 * Accuracy: exact arithmetic of the update formula; the result is checked finite.
 * Errors: "shape-mismatch" (lengths), "non-finite" (any input or the result),
 *   "invalid-argument" (dt ≤ 0, unknown method, missing or non-positive tracking gain),
 *   "singular" (back-calculation with Ki = 0).
 * Example:
 *   const form = { Kx: [[1]], Ki: [[-2]], limits: [{ min: -1, max: 1 }], method: "back-calculation", trackingGain: 4 } as const;
 *   integratorUpdate([0.5], [1], [3], [1], 0.01, form); // [0.5 + 0.01·(1 + 4·0.5·(1 − 3))] = [0.47]
 */
export function integratorUpdate(
  state: readonly number[], error: readonly number[], uUnsat: readonly number[], uSat: readonly number[], dt: number, form: AntiWindupController,
): number[] {
  const r = state.length;
  const m = uUnsat.length;
  const Ki = form.Ki;
  checkVector(error, "error", r);
  checkVector(state, "state", r);
  checkVector(uSat, "uSat", m);
  checkVector(uUnsat, "uUnsat", m);
  if (!Array.isArray(Ki) || Ki.length !== m || Ki.some((row) => !Array.isArray(row) || row.length !== r)) {
    throw new EngineError("shape-mismatch", `form.Ki must be ${m}×${r} (one row per input, one column per integrator)`, { argument: "form.Ki" });
  }
  Ki.forEach((row, i) => checkVector(row, `form.Ki[${i}]`, r));
  if (typeof dt !== "number" || !Number.isFinite(dt) || dt <= 0) {
    throw new EngineError("invalid-argument", `dt is ${String(dt)}; the step must be a positive finite number of seconds`, { argument: "dt" });
  }
  const rate = [...error];
  if (form.method === "none") {
    // plain integration
  } else if (form.method === "back-calculation") {
    const kt = form.trackingGain;
    if (typeof kt !== "number" || !Number.isFinite(kt) || kt <= 0) {
      throw new EngineError("invalid-argument", `form.trackingGain is ${String(kt)}; back-calculation needs a positive finite tracking gain Kt = 1/Tt`, { argument: "form.trackingGain" });
    }
    const excess = uSat.map((v, k) => v - uUnsat[k]!);
    const correction = pseudoInverseApply(Ki, excess);
    for (let j = 0; j < r; j++) rate[j] = rate[j]! - kt * correction[j]!;
  } else if (form.method === "conditional") {
    for (let j = 0; j < r; j++) {
      for (let k = 0; k < m; k++) {
        const over = uUnsat[k]! - uSat[k]!;
        if (over === 0) continue;
        const push = -Ki[k]![j]! * error[j]!;
        if (push * over > 0) {
          rate[j] = 0;
          break;
        }
      }
    }
  } else {
    throw new EngineError("invalid-argument", `form.method is ${JSON.stringify(form.method)}; it must be "back-calculation", "conditional" or "none"`, { argument: "form.method" });
  }
  const next = state.map((x, j) => x + dt * rate[j]!);
  checkVector(next, "updated integrator state", r);
  return next;
}

/**
 * Computes: u_sat,k = min(max_k, max(min_k, u_k)) for each input k (the actuator model used with
 *   `integratorUpdate`).
 * Requires: one limit per entry of u, min ≤ max. Method: elementwise clamp (no reference needed).
 * Cost: O(m). Accuracy: exact.
 * Errors: "shape-mismatch" when the lengths differ, "invalid-argument" when a limit has min > max.
 * Example: saturate([3, -5], [{ min: -1, max: 1 }, { min: -2, max: 2 }]) → [1, −2]
 */
export function saturate(u: readonly number[], limits: readonly { min: number; max: number }[]): number[] {
  if (u.length !== limits.length) {
    throw new EngineError("shape-mismatch", `limits must have one entry per input (${u.length}), it has ${limits.length}`, { argument: "limits" });
  }
  return u.map((v, k) => {
    const { min, max } = limits[k]!;
    if (!(min <= max)) throw new EngineError("invalid-argument", `limits[${k}] has min ${min} above max ${max}`, { argument: "limits", index: k });
    return Math.min(max, Math.max(min, v));
  });
}

/** Ki⁺·v (least squares, via the r×r normal equations KiᵀKi z = Kiᵀv; r is tiny). */
function pseudoInverseApply(Ki: number[][], v: number[]): number[] {
  const m = Ki.length;
  const r = Ki[0]?.length ?? 0;
  const G: number[][] = Array.from({ length: r }, (_, i) => Array.from({ length: r }, (_, j) => {
    let s = 0;
    for (let k = 0; k < m; k++) s += Ki[k]![i]! * Ki[k]![j]!;
    return s;
  }));
  const rhs = Array.from({ length: r }, (_, i) => {
    let s = 0;
    for (let k = 0; k < m; k++) s += Ki[k]![i]! * v[k]!;
    return s;
  });
  // Gaussian elimination with partial pivoting on the small SPD system.
  const scale = Math.max(...G.map((row, i) => Math.abs(row[i]!)), 0);
  for (let c = 0; c < r; c++) {
    let piv = c;
    for (let i = c + 1; i < r; i++) if (Math.abs(G[i]![c]!) > Math.abs(G[piv]![c]!)) piv = i;
    if (!(Math.abs(G[piv]![c]!) > 1e-14 * scale) || scale === 0) {
      throw new EngineError("singular", "back-calculation needs an integrator gain Ki of full column rank (KiᵀKi is singular)", { argument: "form.Ki" });
    }
    [G[c], G[piv]] = [G[piv]!, G[c]!];
    [rhs[c], rhs[piv]] = [rhs[piv]!, rhs[c]!];
    for (let i = c + 1; i < r; i++) {
      const f = G[i]![c]! / G[c]![c]!;
      for (let j = c; j < r; j++) G[i]![j] = G[i]![j]! - f * G[c]![j]!;
      rhs[i] = rhs[i]! - f * rhs[c]!;
    }
  }
  const z = new Array<number>(r).fill(0);
  for (let i = r - 1; i >= 0; i--) {
    let s = rhs[i]!;
    for (let j = i + 1; j < r; j++) s -= G[i]![j]! * z[j]!;
    z[i] = s / G[i]![i]!;
  }
  return z;
}

function checkVector(v: readonly number[], name: string, length: number): void {
  if (!Array.isArray(v) || v.length !== length) {
    throw new EngineError("shape-mismatch", `${name} must have ${length} entries (it has ${Array.isArray(v) ? v.length : "none"})`, { argument: name });
  }
  v.forEach((x, i) => {
    if (typeof x !== "number" || !Number.isFinite(x)) {
      throw new EngineError("non-finite", `${name}[${i}] is ${String(x)}; every entry must be a finite number`, { argument: name, index: i });
    }
  });
}
