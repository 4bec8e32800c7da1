/**
 * The controller of `controllerImplementation` as difference equations: realised in the
 * design's time domain (integrators on measured states, or the observer-based compensator),
 * then sampled by zero-order hold when the design is continuous; and the execution order per
 * sample that the exported controller documents.
 */
import { Matrix } from "ml-matrix";
import { discretize, stateSpaceFromMatrices, type StateSpace } from "../model";
import { assembleCompensator } from "./compensator";
import { blockMatrix, columnRange } from "./feedforward";
import type { AntiWindupMethod } from "./antiWindup";
import type { ControllerDesign } from "./implementation";
import { gain } from "./implementationInputs";

/**
 * The controller in the design's time domain: ẋc (or xc[k+1]) = A xc + B v + Bu (u − u_unsat),
 * u = C xc + D v, with v = [δr; δy]; `states` names xc.
 */
export interface ControllerBlocks { A: Matrix; B: Matrix; C: Matrix; D: Matrix; Bu: Matrix; states: string[] }

/** The exported difference equations: xc[k+1] = Ac xc + Bc v + Bsat (u − u_unsat), u_unsat = Cc xc + Dc v. */
export interface SampledController { Ac: Matrix; Bc: Matrix; Cc: Matrix; Dc: Matrix }

/** The checked gains and sizes the realisation needs (as `controllerImplementation` derives them). */
export interface RealisationGains {
  K: Matrix;
  Ki: Matrix;
  /** r×p selection of the integrated outputs. */
  S: Matrix;
  /** m×nr reference gain (zero with integral action). */
  Nref: Matrix;
  outputs: number[];
  /** 1 for a continuous design (rates), T for a sampled one. */
  h: number;
  continuous: boolean;
}

/**
 * Realises the controller: with an observer, the compensator of `assembleCompensator` (its
 * warnings added, margin remarks left out) and Bu feeding the applied input to the estimator;
 * without, r integrators xᵢ' = r − S y (or xᵢ[k+1] = xᵢ + T(r − S y)) and u = N r − K y − Ki xᵢ.
 * Also returns Lp (the predictor-form observer gain; zero without observer) and the
 * compensator's closed loop.
 */
export function realiseController(model: StateSpace, design: ControllerDesign, g: RealisationGains, warnings: string[]): { ctrl: ControllerBlocks; Lp: Matrix; compensatorLoop: StateSpace | null } {
  const { K, Ki, S, Nref, outputs, h, continuous } = g;
  const n = model.A.rows;
  const m = model.B.columns;
  const p = model.C.rows;
  const r = outputs.length;
  const nr = r > 0 ? r : m;
  if (design.L !== undefined) {
    const assembled = assembleCompensator({
      model, K, L: design.L, Ki: r > 0 ? Ki : undefined, M: design.M, observerForm: design.observerForm ?? "predictor",
      integratedOutputs: outputs, referenceGain: r > 0 ? undefined : Nref,
    });
    warnings.push(...assembled.warnings.filter((w) => !w.includes("margin")));
    const c = assembled.controller;
    const Lp = design.observerForm === "current" ? model.A.mmul(gain(design.M!, "M", n, p)) : gain(design.L, "L", n, p);
    const Bu = blockMatrix([[model.B.clone().sub(Lp.mmul(model.D))], [new Matrix(r, m)]]);
    return { ctrl: { A: c.A, B: c.B, C: c.C, D: c.D, Bu, states: [...c.names.states] }, Lp, compensatorLoop: assembled.closedLoop };
  }
  const ctrl: ControllerBlocks = {
    A: continuous ? new Matrix(r, r) : Matrix.eye(r, r),
    B: blockMatrix([[Matrix.eye(r, nr).mul(h), S.clone().mul(-h)]]),
    C: Ki.clone().mul(-1),
    D: blockMatrix([[Nref, K.clone().mul(-1)]]),
    Bu: new Matrix(r, m),
    states: outputs.map((o) => `int_${model.names.outputs[o]}`),
  };
  return { ctrl, Lp: new Matrix(n, p), compensatorLoop: null };
}

/**
 * The controller at period T: a continuous one by zero-order hold of [B Bu] (Van Loan's block
 * exponential, `discretize`); a sampled one as is, its back-calculation rows (per second)
 * scaled by T. Returns Bsat beside the difference equations.
 */
export function sampleController(
  ctrl: ControllerBlocks,
  at: { T: number; continuous: boolean; method: AntiWindupMethod; integratorStates: number[]; m: number; nr: number; p: number },
): SampledController & { Bsat: Matrix } {
  const { T, continuous, method, integratorStates, m, nr, p } = at;
  const nc = ctrl.A.rows;
  const Cc = ctrl.C, Dc = ctrl.D;
  let Ac = ctrl.A, Bc = ctrl.B, Bsat = ctrl.Bu;
  if (continuous && nc > 0) {
    const sampled = discretize(stateSpaceFromMatrices({ A: ctrl.A, B: blockMatrix([[ctrl.B, ctrl.Bu]]), C: ctrl.C, D: blockMatrix([[ctrl.D, new Matrix(m, m)]]), sampleTime: null }), T, { method: "zoh" });
    Ac = sampled.A;
    Bc = columnRange(sampled.B, 0, nr + p);
    Bsat = columnRange(sampled.B, nr + p, m);
  } else if (!continuous && method === "back-calculation") {
    // xᵢ[k+1] = xᵢ[k] + T(r − y) + T·Kt·(−Ki⁺)(u − u_unsat): the per-second rate times T.
    for (const j of integratorStates) for (let k = 0; k < m; k++) Bsat.set(j, k, Bsat.get(j, k) * T);
  }
  return { Ac, Bc, Cc, Dc, Bsat };
}

/** The steps the exported controller runs every sample, as sentences (limits, rate, offsets as configured). */
export function executionOrder(T: number, nc: number, method: AntiWindupMethod, rate: boolean, offsets: boolean): string[] {
  const steps = [
    `Every T = ${T} s (sample k), start with the stored controller state xc[k] (${nc} values; xc[0] = initialState)${rate ? " and the last applied input u[k−1] (u[−1] = u0)" : ""}.`,
    "Read the measurements y[k] and the references r[k] (absolute units).",
    offsets ? "Form the deviations δy = y[k] − y0 and δr = r[k] − r0 (operatingPoint)." : "Set δy = y[k] and δr = r[k] (a linear plant: y0 = r0 = 0, u0 = 0).",
    "Compute u_unsat[k] = u0 + Cc·xc[k] + Dc·[δr; δy].",
    `Saturate each input j: u[k] = min(max_j, max(min_j, u_unsat[k]))${rate ? ", and also within u[k−1] ± rateLimit_j·T" : ""} (no limit where a bound is null).`,
    "Write u[k] to the actuators.",
    method === "conditional"
      ? "Update xc[k+1] = Ac·xc[k] + Bc·[δr; δy] + Bsat·(u[k] − u_unsat[k]); conditional integration: for an integrator state whose error would push a saturated input further into its limit, keep its old value instead."
      : "Update xc[k+1] = Ac·xc[k] + Bc·[δr; δy] + Bsat·(u[k] − u_unsat[k]) (anti-windup and the estimator's view of the applied input).",
    `Store xc[k+1]${rate ? " and u[k]" : ""} for the next sample.`,
  ];
  return steps;
}
