/**
 * Actuator limits and integrator anti-windup of `controllerImplementation`: the limit table per
 * input, the anti-windup method, and the back-calculation correction −Kt·Ki⁺ of the integrator
 * rows (K. J. Åström & L. Rundqwist, "Integrator windup and how to avoid it", ACC 1989).
 */
import { Matrix, solve } from "ml-matrix";
import { EngineError } from "../errors";
import { cabs, reciprocalCondition, type Complex } from "../linalg";
import type { AntiWindupMethod } from "./antiWindup";

export interface InputLimit { min?: number; max?: number; rateLimit?: number }

/** The checked limits, one per plant input (null: no limit), in absolute units. */
export function checkLimits(limits: InputLimit[] | undefined, m: number): { min: number | null; max: number | null; rateLimit: number | null }[] {
  if (limits === undefined) return Array.from({ length: m }, () => ({ min: null, max: null, rateLimit: null }));
  if (!Array.isArray(limits) || limits.length !== m) throw new EngineError("shape-mismatch", `limits must have one entry per plant input (${m})`, { argument: "limits" });
  return limits.map((l, i) => {
    const pick = (v: number | undefined, what: string): number | null => {
      if (v === undefined) return null;
      if (typeof v !== "number" || !Number.isFinite(v)) throw new EngineError("invalid-argument", `limits[${i}].${what} is ${String(v)}; it must be a finite number`, { argument: "limits", index: i });
      return v;
    };
    const out = { min: pick(l.min, "min"), max: pick(l.max, "max"), rateLimit: pick(l.rateLimit, "rateLimit") };
    if (out.min !== null && out.max !== null && out.min > out.max) throw new EngineError("invalid-argument", `limits[${i}] has min ${out.min} above max ${out.max}`, { argument: "limits", index: i });
    if (out.rateLimit !== null && out.rateLimit <= 0) throw new EngineError("invalid-argument", `limits[${i}].rateLimit is ${out.rateLimit}; it must be positive`, { argument: "limits", index: i });
    return out;
  });
}

/** The anti-windup method: "none" without integrators, else the requested one (default back-calculation). */
export function antiWindupMethod(integrators: number, requested: AntiWindupMethod | undefined): AntiWindupMethod {
  const method: AntiWindupMethod = integrators === 0 ? "none" : requested ?? "back-calculation";
  if (!["back-calculation", "conditional", "none"].includes(method)) {
    throw new EngineError("invalid-argument", `antiWindup is ${JSON.stringify(method)}; it must be "back-calculation", "conditional" or "none"`, { argument: "antiWindup" });
  }
  return method;
}

/**
 * The integrator rows of the per-second back-calculation correction, −Kt·Ki⁺ (r×m), after
 * checking the tracking gain Kt (a warning when Kt·T exceeds 1).
 */
export function backCalculationRows(Ki: Matrix, trackingGain: number, T: number, warnings: string[]): Matrix {
  if (typeof trackingGain !== "number" || !Number.isFinite(trackingGain) || trackingGain <= 0) {
    throw new EngineError("invalid-argument", `trackingGain is ${String(trackingGain)}; back-calculation needs a positive finite tracking gain Kt (1/s)`, { argument: "trackingGain" });
  }
  if (trackingGain * T > 1) warnings.push(`trackingGain·T = ${(trackingGain * T).toPrecision(3)} exceeds 1: one sample over-corrects the integrators (keep Kt ≤ 1/T)`);
  return pseudoInverse(Ki).mul(-trackingGain);
}

/** Default Kt = 1/max(T, 1/|λ_fastest|) of the state-feedback loop (λ = ln z / T for a sampled design). */
export function defaultTrackingGain(poles: Complex[], T: number, continuous: boolean): number {
  const speeds = poles.map((z) => (continuous ? cabs(z) : Math.hypot(Math.log(Math.max(cabs(z), 1e-300)), Math.atan2(z.im, z.re)) / T));
  // The same default as the nonlinear closed-loop simulation (Tt = max(T, 1/|λ_fastest|)), so
  // the exported controller behaves in saturation as the check that was run on it.
  const fastest = Math.max(...speeds);
  if (!(fastest > 0)) {
    throw new EngineError("invalid-argument", "every closed-loop pole is at the origin (z = 1), so the default tracking gain 1/max(T, 1/|λ_fastest|) is zero: give trackingGain", { argument: "trackingGain" });
  }
  return 1 / Math.max(T, 1 / fastest);
}

/** Ki⁺ = (KiᵀKi)⁻¹Kiᵀ (r×m), as `integratorUpdate` applies it. */
function pseudoInverse(Ki: Matrix): Matrix {
  const G = Ki.transpose().mmul(Ki);
  const rc = reciprocalCondition(G);
  if (!(rc > 1e-14)) throw new EngineError("singular", `back-calculation needs an integrator gain Ki of full column rank (σ_min/σ_max of KiᵀKi is ${rc.toExponential(2)})`, { argument: "Ki" });
  return solve(G, Ki.transpose());
}
