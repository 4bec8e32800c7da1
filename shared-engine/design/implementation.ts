/**
 * The controller as a software engineer codes it: one discrete-time difference equation that
 * runs every T seconds, with actuator limits, anti-windup and the execution order per sample.
 *
 *   δr = r[k] − r0,  δy = y[k] − y0                       (absolute signals in, deviations inside)
 *   u_unsat[k] = u0 + Cc·xc[k] + Dc·[δr; δy]
 *   u[k] = sat(u_unsat[k])                                (min/max, and rate ±rateLimit·T from u[k−1])
 *   xc[k+1] = Ac·xc[k] + Bc·[δr; δy] + Bsat·(u[k] − u_unsat[k])
 *
 * Bsat feeds the applied input back into the state update: its estimate rows make the observer
 * see the input the plant really got, its integrator rows are the back-calculation term
 * T·Kt·(−Ki⁺)(u − u_unsat) (zero for conditional integration and for "none").
 */
import { Matrix } from "ml-matrix";
import { eigenvalues, type MatrixInput } from "../linalg";
import { discretize, type StateSpace } from "../model";
import type { AntiWindupMethod } from "./antiWindup";
import { realiseController, sampleController, executionOrder } from "./controllerRealisation";
import { checkVector, gain, periodOf, requireMeasuredStates, selection } from "./implementationInputs";
import { antiWindupMethod, backCalculationRows, checkLimits, defaultTrackingGain, type InputLimit } from "./implementationLimits";
import { closeLoop, designLoop, expComplex, poleChecks, stateFeedbackPoles, stepCheck, type ImplementationCheck } from "./implementationChecks";

/** The design to implement: the plant it was made for and its gains (shapes as in the pipeline). */
export interface ControllerDesign {
  /** The plant model of the design: sampled (a discrete design) or continuous. */
  model: StateSpace;
  /** m×n state-feedback gain: u = −K x̂ (−Ki xᵢ) (+ N r). */
  K: MatrixInput;
  /** m×r integrator gain, with `integratedOutputs` (r plant-output indices). */
  Ki?: MatrixInput;
  integratedOutputs?: number[];
  /** n×p observer (predictor) gain; absent: the states are measured (C = I, D = 0 required). */
  L?: MatrixInput;
  /** n×p current-estimate gain (observerForm "current", sampled designs). */
  M?: MatrixInput;
  observerForm?: "predictor" | "current";
  /** m×m reference feedforward N (without integral action); absent: N = I. */
  referenceGain?: MatrixInput;
}

export type { InputLimit } from "./implementationLimits";

export interface ImplementationOptions {
  /** Sample period (s). Required for a continuous design; must equal the design's for a sampled one. */
  sampleTime?: number;
  /** One entry per plant input, absolute units; rateLimit in units per second. */
  limits?: InputLimit[];
  /** Nonlinear plants: operating-point input u0 (m) and output y0 (p) values, absolute units. */
  operatingPoint?: { inputs: number[]; outputs: number[] };
  /** Integrator protection; default "back-calculation" (ignored without integral action). */
  antiWindup?: AntiWindupMethod;
  /** Back-calculation tracking gain Kt (1/s); default 1/max(T, 1/|fastest closed-loop pole|), as the nonlinear simulation. */
  trackingGain?: number;
  /** The pipeline's sampled loop from the references to [y; u] to compare the step with. */
  referenceLoop?: StateSpace;
  /** Samples in the step comparison (default 60). */
  stepSamples?: number;
}

export type { ImplementationCheck } from "./implementationChecks";

export interface ControllerImplementation {
  sampleTime: number;
  designedIn: "discrete" | "continuous";
  signals: {
    references: { name: string; unit: string }[];
    measurements: { name: string; unit: string }[];
    inputs: { name: string; unit: string }[];
    states: string[];
  };
  /** r0 (the references that hold the operating point), y0, u0; zeros for linear plants. */
  operatingPoint: { references: number[]; measurements: number[]; inputs: number[] };
  Ac: Matrix;
  Bc: Matrix;
  Cc: Matrix;
  Dc: Matrix;
  /** nc×m: xc[k+1] gains Bsat·(u[k] − u_unsat[k]). */
  Bsat: Matrix;
  initialState: number[];
  limits: { min: number | null; max: number | null; rateLimit: number | null }[];
  antiWindup: { method: AntiWindupMethod; trackingGain: number | null; integratorStates: number[] };
  executionOrder: string[];
  checks: ImplementationCheck[];
  warnings: string[];
}

/**
 * Computes: the sampled controller of the module comment (Ac: nc×nc, Bc: nc×(nr + p),
 *   Cc: m×nc, Dc: m×(nr + p), Bsat: nc×m) for: state feedback on measured states (C = I, D = 0;
 *   nc = r integrators), or an observer-based compensator (predictor or current form, nc = n + r),
 *   each with or without integral action (xᵢ[k+1] = xᵢ[k] + T(r − y_s)) and feedforward N
 *   (nr = r with integral action, else m). A continuous design becomes a controller at period T
 *   by zero-order hold of the continuous controller (and of its Bsat channel). Also the checks:
 *   "implementation-poles" (closed with the sampled plant: designed poles, or e^{λT} for a
 *   continuous design), "implementation-stable", and "implementation-step" (the difference
 *   equations run sample by sample, unsaturated, against the sampled closed loop's step from
 *   reference 1, relative 1e-9).
 * Requires: K m×n; Ki m×r with distinct output indices; L, M n×p; N m×m; a positive T; limits
 *   with min ≤ max and positive rate limits; trackingGain > 0.
 * Method: compensator assembly (`assembleCompensator`, Luenberger 1966 separation); ZOH by
 *   Van Loan's block exponential (`discretize`); anti-windup by back-calculation or conditional
 *   integration (K. J. Åström & L. Rundqwist, "Integrator windup and how to avoid it", ACC
 *   1989), Kt applied through −Ki⁺ as `integratorUpdate`; the estimator is fed the applied
 *   input (K. J. Åström & B. Wittenmark, "Computer-Controlled Systems", §9, from memory).
 *   Default Kt = 1/max(T, 1/|λ_fastest|) of the state-feedback loop (continuous-equivalent
 *   λ = ln z / T): a starting point only, to be tuned in the nonlinear check.
 * Cost: O((n + nc)³) for the closed-loop poles and the ZOH; O(steps·(n + nc)²) for the step.
 * Accuracy: the checks above are computed before return and reported, never thrown.
 * Errors: "invalid-argument" (no observer and C ≠ I or D ≠ 0: "needs an observer: the plant
 *   measures p of n states"; missing or mismatched T; bad limits, method, tracking gain),
 *   "shape-mismatch" (gain or operating-point sizes), "non-finite", "singular" (Ki without full
 *   column rank for back-calculation; ill-posed algebraic loop), and those of `discretize`.
 * Example:
 *   // x[k+1] = 0.5x + u, y = x, K = 0.3: Dc = [1, −0.3] (u = r − 0.3y), nc = 0
 *   const c = controllerImplementation({ model: createStateSpace({ A: [[0.5]], B: [[1]], C: [[1]], sampleTime: 0.1 }), K: [[0.3]] });
 *   // c.checks every passed; c.Dc ≈ [[1, −0.3]]
 */
export function controllerImplementation(design: ControllerDesign, options: ImplementationOptions = {}): ControllerImplementation {
  const { model } = design;
  const n = model.A.rows;
  const m = model.B.columns;
  const p = model.C.rows;
  // The structural refusal comes first: no period makes a partly measured plant exportable.
  if (design.L === undefined) requireMeasuredStates(model);
  const T = periodOf(model, options.sampleTime);
  const continuous = model.sampleTime === null;
  const K = gain(design.K, "K", m, n);
  const outputs = design.integratedOutputs ?? [];
  const r = outputs.length;
  const Ki = r > 0 ? gain(design.Ki ?? [], "Ki", m, r) : new Matrix(m, 0);
  const hasObserver = design.L !== undefined;
  const warnings: string[] = [];
  if (continuous) {
    warnings.push(`the gains were designed in continuous time and are sampled here at T = ${T} s; sampling costs margin (a continuous design's poles only approximately map to e^{λT}): prefer discretizing the plant and designing in discrete time`);
  }
  const S = selection(outputs, p);
  const Nref = r > 0 ? new Matrix(m, r) : design.referenceGain === undefined ? Matrix.eye(m, m) : gain(design.referenceGain, "referenceGain", m, m);
  const nr = r > 0 ? r : m;
  const h = continuous ? 1 : T;

  // ---- The controller in the design's time domain: ẋc (or xc[k+1]) = Ac xc + Bc v, u = Cc xc + Dc v
  const { ctrl, Lp, compensatorLoop } = realiseController(model, design, { K, Ki, S, Nref, outputs, h, continuous }, warnings);
  const nc = ctrl.A.rows;
  const integratorStates = Array.from({ length: r }, (_, j) => nc - r + j);

  // ---- Anti-windup: integrator rows of the continuous-time (or per-second) correction --------
  const method = antiWindupMethod(r, options.antiWindup);
  const feedbackPoles = stateFeedbackPoles(model, K, Ki, S, h);
  let trackingGain: number | null = null;
  if (method === "back-calculation") {
    trackingGain = options.trackingGain ?? defaultTrackingGain(feedbackPoles, T, continuous);
    ctrl.Bu.setSubMatrix(backCalculationRows(Ki, trackingGain, T, warnings), nc - r, 0);
  }

  // ---- Sample the controller (continuous design) ----------------------------------------------
  const { Ac, Bc, Cc, Dc, Bsat } = sampleController(ctrl, { T, continuous, method, integratorStates, m, nr, p });

  // ---- Checks: poles of the exported loop, and its step against the sampled closed loop ------
  const plant = continuous ? discretize(model, T, { method: "zoh" }) : model;
  const loop = closeLoop(plant, { Ac, Bc, Cc, Dc }, nr);
  const expected = [...feedbackPoles, ...(hasObserver ? eigenvalues(model.A.clone().sub(Lp.mmul(model.C))) : [])]
    .map((z) => (continuous ? expComplex(z, T) : z));
  const actual = eigenvalues(loop.A);
  const { checks, mismatch } = poleChecks(actual, expected, continuous);
  // The design's own sampled loop (a continuous design has none: then the interconnection at T).
  const reference = options.referenceLoop ?? (continuous ? loop.model : compensatorLoop ?? designLoop(model, { K, Ki, S, Nref }));
  checks.push(stepCheck(plant, { Ac, Bc, Cc, Dc }, reference, options.stepSamples ?? 60, T));
  if (!checks[0]!.passed && continuous) warnings.push(`the sampled loop's poles moved by up to ${mismatch.toPrecision(3)} from e^{λT}: T = ${T} s is too slow for this continuous design`);

  // ---- Signals, operating point, limits, execution order -------------------------------------
  const refIndex = r > 0 ? outputs : design.referenceGain !== undefined && p === m ? Array.from({ length: m }, (_, i) => i) : null;
  const op = options.operatingPoint;
  if (op) {
    checkVector(op.inputs, "operatingPoint.inputs", m);
    checkVector(op.outputs, "operatingPoint.outputs", p);
  }
  const u0 = op ? [...op.inputs] : new Array<number>(m).fill(0);
  const y0 = op ? [...op.outputs] : new Array<number>(p).fill(0);
  const references = refIndex
    ? refIndex.map((o) => ({ name: `r_${model.names.outputs[o]}`, unit: model.units.outputs[o] ?? "" }))
    : model.names.inputs.map((u, i) => ({ name: `r_${u}`, unit: model.units.inputs[i] ?? "" }));
  const r0 = refIndex ? refIndex.map((o) => y0[o]!) : [...u0];
  const limits = checkLimits(options.limits, m);
  const directFeedthrough = Dc.to2DArray().some((row) => row.slice(nr).some((v) => v !== 0));
  if (directFeedthrough) warnings.push("u[k] depends on y[k] of the same sample (Dc has measurement columns): the design assumes the computation time is negligible against T");
  return {
    sampleTime: T,
    designedIn: continuous ? "continuous" : "discrete",
    signals: {
      references,
      measurements: model.names.outputs.map((name, i) => ({ name, unit: model.units.outputs[i] ?? "" })),
      inputs: model.names.inputs.map((name, i) => ({ name, unit: model.units.inputs[i] ?? "" })),
      states: ctrl.states,
    },
    operatingPoint: { references: r0, measurements: y0, inputs: u0 },
    Ac: Ac.clone(), Bc: Bc.clone(), Cc: Cc.clone(), Dc: Dc.clone(), Bsat: Bsat.clone(),
    initialState: new Array<number>(nc).fill(0),
    limits,
    antiWindup: { method, trackingGain, integratorStates },
    executionOrder: executionOrder(T, nc, method, limits.some((l) => l.rateLimit !== null), op !== undefined),
    checks,
    warnings,
  };
}
