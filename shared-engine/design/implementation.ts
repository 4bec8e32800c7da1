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
import { Matrix, solve } from "ml-matrix";
import { EngineError } from "../errors";
import { asMatrix, cabs, eigenvalues, reciprocalCondition, requireFinite, shapeOf, type Complex, type MatrixInput } from "../linalg";
import { discretize, stateSpaceFromMatrices, type StateSpace } from "../model";
import { simulateLinear } from "../analysis/timeResponse";
import { assembleCompensator } from "./compensator";
import { blockMatrix, columnRange } from "./feedforward";
import type { AntiWindupMethod } from "./antiWindup";

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

export interface InputLimit { min?: number; max?: number; rateLimit?: number }

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

export interface ImplementationCheck { name: string; passed: boolean; detail: string; value: number; limit: number }

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

/** Discrete design: |Δz|/max(1, |z|) allowed between exported and designed poles (as the separation check). */
const DISCRETE_POLE_TOLERANCE = 1e-6;
/** Continuous design sampled at T: |Δz| allowed between the sampled loop's poles and e^{λT}. */
const SAMPLED_POLE_TOLERANCE = 0.05;
const STEP_TOLERANCE = 1e-9;

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
  let ctrl: { A: Matrix; B: Matrix; C: Matrix; D: Matrix; Bu: Matrix; states: string[] };
  let Lp = new Matrix(n, p);
  let compensatorLoop: StateSpace | null = null;
  if (hasObserver) {
    const assembled = assembleCompensator({
      model, K, L: design.L!, Ki: r > 0 ? Ki : undefined, M: design.M, observerForm: design.observerForm ?? "predictor",
      integratedOutputs: outputs, referenceGain: r > 0 ? undefined : Nref,
    });
    warnings.push(...assembled.warnings.filter((w) => !w.includes("margin")));
    const c = assembled.controller;
    compensatorLoop = assembled.closedLoop;
    Lp = design.observerForm === "current" ? model.A.mmul(gain(design.M!, "M", n, p)) : gain(design.L!, "L", n, p);
    const Bu = blockMatrix([[model.B.clone().sub(Lp.mmul(model.D))], [new Matrix(r, m)]]);
    ctrl = { A: c.A, B: c.B, C: c.C, D: c.D, Bu, states: [...c.names.states] };
  } else {
    ctrl = {
      A: continuous ? new Matrix(r, r) : Matrix.eye(r, r),
      B: blockMatrix([[Matrix.eye(r, nr).mul(h), S.clone().mul(-h)]]),
      C: Ki.clone().mul(-1),
      D: blockMatrix([[Nref, K.clone().mul(-1)]]),
      Bu: new Matrix(r, m),
      states: outputs.map((o) => `int_${model.names.outputs[o]}`),
    };
  }
  const nc = ctrl.A.rows;
  const integratorStates = Array.from({ length: r }, (_, j) => nc - r + j);

  // ---- Anti-windup: integrator rows of the continuous-time (or per-second) correction --------
  const method: AntiWindupMethod = r === 0 ? "none" : options.antiWindup ?? "back-calculation";
  if (!["back-calculation", "conditional", "none"].includes(method)) {
    throw new EngineError("invalid-argument", `antiWindup is ${JSON.stringify(method)}; it must be "back-calculation", "conditional" or "none"`, { argument: "antiWindup" });
  }
  const feedbackPoles = stateFeedbackPoles(model, K, Ki, S, h);
  let trackingGain: number | null = null;
  if (method === "back-calculation") {
    trackingGain = options.trackingGain ?? defaultTrackingGain(feedbackPoles, T, continuous);
    if (typeof trackingGain !== "number" || !Number.isFinite(trackingGain) || trackingGain <= 0) {
      throw new EngineError("invalid-argument", `trackingGain is ${String(trackingGain)}; back-calculation needs a positive finite tracking gain Kt (1/s)`, { argument: "trackingGain" });
    }
    if (trackingGain * T > 1) warnings.push(`trackingGain·T = ${(trackingGain * T).toPrecision(3)} exceeds 1: one sample over-corrects the integrators (keep Kt ≤ 1/T)`);
    const back = pseudoInverse(Ki).mul(-trackingGain);
    ctrl.Bu.setSubMatrix(back, nc - r, 0);
  }

  // ---- Sample the controller (continuous design) ----------------------------------------------
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

  // ---- Checks: poles of the exported loop, and its step against the sampled closed loop ------
  const plant = continuous ? discretize(model, T, { method: "zoh" }) : model;
  const loop = closeLoop(plant, { Ac, Bc, Cc, Dc }, nr);
  const expected = [...feedbackPoles, ...(hasObserver ? eigenvalues(model.A.clone().sub(Lp.mmul(model.C))) : [])]
    .map((z) => (continuous ? expComplex(z, T) : z));
  const actual = eigenvalues(loop.A);
  const mismatch = matchMismatch(actual, expected);
  const poleLimit = continuous ? SAMPLED_POLE_TOLERANCE : DISCRETE_POLE_TOLERANCE;
  const largest = Math.max(0, ...actual.map(cabs));
  const checks: ImplementationCheck[] = [
    {
      name: "implementation-poles",
      passed: mismatch <= poleLimit,
      detail: continuous
        ? `poles of the sampled loop (exported controller with the ZOH plant) against e^{λT} of the continuous design: largest |Δz| ${mismatch.toExponential(2)}`
        : `poles of the exported controller closed with the sampled plant against the design's poles: largest relative mismatch ${mismatch.toExponential(2)}`,
      value: mismatch,
      limit: poleLimit,
    },
    { name: "implementation-stable", passed: largest < 1, detail: `largest closed-loop pole magnitude of the sampled loop ${largest.toPrecision(6)} (must be below 1)`, value: largest, limit: 1 },
  ];
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

function periodOf(model: StateSpace, requested: number | undefined): number {
  if (requested !== undefined && !(typeof requested === "number" && Number.isFinite(requested) && requested > 0)) {
    throw new EngineError("invalid-argument", `sampleTime is ${String(requested)}; it must be a positive finite number of seconds`, { argument: "sampleTime" });
  }
  if (model.sampleTime === null) {
    if (requested === undefined) throw new EngineError("invalid-argument", "the design is continuous: give the sample period T (seconds) at which the controller will run", { argument: "sampleTime" });
    return requested;
  }
  if (requested !== undefined && Math.abs(requested - model.sampleTime) > 1e-12 * model.sampleTime) {
    throw new EngineError("invalid-argument", `the design is sampled at ${model.sampleTime} s, so the controller runs at that period; the requested ${requested} s would need a new design`, { argument: "sampleTime" });
  }
  return model.sampleTime;
}

function requireMeasuredStates(model: StateSpace): void {
  const n = model.A.rows;
  const p = model.C.rows;
  if (p < n) {
    throw new EngineError("invalid-argument", `needs an observer: the plant measures ${p} of ${n} states, and state feedback without an observer reads every state (C = I)`, { measured: p, states: n });
  }
  const identity = p === n && model.C.to2DArray().every((row, i) => row.every((v, j) => v === (i === j ? 1 : 0)));
  const noFeedthrough = model.D.to2DArray().every((row) => row.every((v) => v === 0));
  if (!identity || !noFeedthrough) {
    throw new EngineError("invalid-argument", `needs an observer: state feedback without an observer reads the states directly (C = I, D = 0), but this plant's ${p} outputs are other combinations of the states and inputs`, { measured: p, states: n });
  }
}

/** eig of [[A, 0], [−h·S C, I or 0]] − [B; −h·S D]·[K Ki]: the design's state-feedback loop. */
function stateFeedbackPoles(model: StateSpace, K: Matrix, Ki: Matrix, S: Matrix, h: number): Complex[] {
  const { A, B, C, D } = model;
  const n = A.rows;
  const r = S.rows;
  const hold = model.sampleTime === null ? new Matrix(r, r) : Matrix.eye(r, r);
  const Aaug = blockMatrix([[A, new Matrix(n, r)], [S.mmul(C).mul(-h), hold]]);
  const Baug = blockMatrix([[B], [S.mmul(D).mul(-h)]]);
  return eigenvalues(Aaug.sub(Baug.mmul(blockMatrix([[K, Ki]]))));
}

function defaultTrackingGain(poles: Complex[], T: number, continuous: boolean): number {
  const speeds = poles.map((z) => (continuous ? cabs(z) : Math.hypot(Math.log(Math.max(cabs(z), 1e-300)), Math.atan2(z.im, z.re)) / T));
  // The same default as the nonlinear closed-loop simulation (Tt = max(T, 1/|λ_fastest|)), so
  // the exported controller behaves in saturation as the check that was run on it.
  const fastest = Math.max(...speeds);
  if (!(fastest > 0)) {
    throw new EngineError("invalid-argument", "every closed-loop pole is at the origin (z = 1), so the default tracking gain 1/max(T, 1/|λ_fastest|) is zero: give trackingGain", { argument: "trackingGain" });
  }
  return 1 / Math.max(T, 1 / fastest);
}

/** Plant (sampled) closed with u = Cc xc + Dc [r; y]; outputs [y; u]; states [x; xc]. */
function closeLoop(plant: StateSpace, c: { Ac: Matrix; Bc: Matrix; Cc: Matrix; Dc: Matrix }, nr: number): { A: Matrix; model: StateSpace } {
  const { A, B, C, D } = plant;
  const m = B.columns;
  const p = C.rows;
  const Dr = columnRange(c.Dc, 0, nr);
  const Dy = columnRange(c.Dc, nr, p);
  const Br = columnRange(c.Bc, 0, nr);
  const By = columnRange(c.Bc, nr, p);
  // (I − Dy D) u = Dy C x + Cc xc + Dr r
  const G = Matrix.eye(m, m).sub(Dy.mmul(D));
  const rc = m === 0 ? 1 : reciprocalCondition(G);
  if (!(rc > 1e-12)) throw new EngineError("singular", `I − Dc_y·D is singular (σ_min/σ_max = ${rc.toExponential(2)}): the controller–plant algebraic loop is not well posed`, { reciprocalCondition: rc });
  const W = m === 0 ? new Matrix(0, 0) : solve(G, Matrix.eye(m, m));
  const Ux = W.mmul(Dy).mmul(C);
  const Uz = W.mmul(c.Cc);
  const Ur = W.mmul(Dr);
  const Yx = C.clone().add(D.mmul(Ux));
  const Yz = D.mmul(Uz);
  const Yr = D.mmul(Ur);
  const Acl = blockMatrix([[A.clone().add(B.mmul(Ux)), B.mmul(Uz)], [By.mmul(Yx), c.Ac.clone().add(By.mmul(Yz))]]);
  const Bcl = blockMatrix([[B.mmul(Ur)], [Br.clone().add(By.mmul(Yr))]]);
  const model = stateSpaceFromMatrices({ A: Acl, B: Bcl, C: blockMatrix([[Yx, Yz], [Ux, Uz]]), D: blockMatrix([[Yr], [Ur]]), sampleTime: plant.sampleTime });
  return { A: Acl, model };
}

/** The design's own sampled servo loop (no observer): states [x; xᵢ], inputs r, outputs [y; u]. */
function designLoop(model: StateSpace, sf: { K: Matrix; Ki: Matrix; S: Matrix; Nref: Matrix }): StateSpace {
  const { A, B, C, D } = model;
  const T = model.sampleTime!;
  const n = A.rows;
  const r = sf.S.rows;
  const nr = sf.Nref.columns;
  const Kaug = blockMatrix([[sf.K, sf.Ki]]);
  const Aaug = blockMatrix([[A, new Matrix(n, r)], [sf.S.mmul(C).mul(-T), Matrix.eye(r, r)]]);
  const Baug = blockMatrix([[B], [sf.S.mmul(D).mul(-T)]]);
  const Bref = blockMatrix([[B.mmul(sf.Nref)], [Matrix.eye(r, nr).mul(T)]]);
  const Caug = blockMatrix([[C, new Matrix(C.rows, r)]]);
  return stateSpaceFromMatrices({
    A: Aaug.sub(Baug.mmul(Kaug)), B: Bref,
    C: blockMatrix([[Caug.sub(D.mmul(Kaug))], [Kaug.clone().mul(-1)]]),
    D: blockMatrix([[D.mmul(sf.Nref)], [sf.Nref]]), sampleTime: T,
  });
}

/** Runs the execution order (no limits) from rest with δr = e₀ and compares [y; u] with `reference`. */
function stepCheck(plant: StateSpace, c: { Ac: Matrix; Bc: Matrix; Cc: Matrix; Dc: Matrix }, reference: StateSpace, steps: number, T: number): ImplementationCheck {
  const { A, B, C, D } = plant;
  const n = A.rows, m = B.columns, p = C.rows, nc = c.Ac.rows, nr = c.Bc.columns - p;
  if (reference.B.columns !== nr || reference.C.rows !== p + m) {
    throw new EngineError("shape-mismatch", `referenceLoop must have ${nr} reference inputs and ${p + m} outputs [y; u] (it has ${reference.B.columns} and ${reference.C.rows})`, { argument: "referenceLoop" });
  }
  const times = Array.from({ length: steps }, (_, k) => k * T);
  const ref = simulateLinear(reference, times, times.map(() => Array.from({ length: nr }, (_, j) => (j === 0 ? 1 : 0))));
  // With D ≠ 0 the plant and the controller form an algebraic loop: u = (I − Dc_y·D)⁻¹(Cc xc + Dc_r δr + Dc_y C x).
  const Dy = columnRange(c.Dc, nr, p);
  const W = m === 0 ? new Matrix(0, 0) : solve(Matrix.eye(m, m).sub(Dy.mmul(D)), Matrix.eye(m, m));
  let x = new Array<number>(n).fill(0);
  let xc = new Array<number>(nc).fill(0);
  const v = new Array<number>(nr + p).fill(0);
  v[0] = 1;
  let worst = 0;
  let scale = 0;
  for (let k = 0; k < steps; k++) {
    const Cx = mulVec(C, x);
    for (let i = 0; i < p; i++) v[nr + i] = Cx[i]!; // read y[k] (D = 0: y = Cx)
    const uFree = add(mulVec(c.Cc, xc), mulVec(c.Dc, v)); // u_unsat = Cc xc + Dc [δr; δy]; no limits
    const u = mulVec(W, uFree);
    const y = add(Cx, mulVec(D, u));
    [...y, ...u].forEach((value, i) => {
      const want = ref.outputs[i]![k]!;
      worst = Math.max(worst, Math.abs(value - want));
      scale = Math.max(scale, Math.abs(want));
    });
    for (let i = 0; i < p; i++) v[nr + i] = y[i]!;
    xc = add(mulVec(c.Ac, xc), mulVec(c.Bc, v)); // update the controller state
    x = add(mulVec(A, x), mulVec(B, u)); // the plant moves under u[k]
  }
  const rel = worst / Math.max(scale, Number.MIN_VALUE);
  return {
    name: "implementation-step",
    passed: rel <= STEP_TOLERANCE,
    detail: `difference equations run for ${steps} samples against the sampled closed loop's step from ${m > 0 ? "the first reference" : "rest"}: largest difference ${rel.toExponential(2)} of the largest signal`,
    value: rel,
    limit: STEP_TOLERANCE,
  };
}

function executionOrder(T: number, nc: number, method: AntiWindupMethod, rate: boolean, offsets: boolean): string[] {
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

function checkLimits(limits: InputLimit[] | undefined, m: number): { min: number | null; max: number | null; rateLimit: number | null }[] {
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

/** Ki⁺ = (KiᵀKi)⁻¹Kiᵀ (r×m), as `integratorUpdate` applies it. */
function pseudoInverse(Ki: Matrix): Matrix {
  const G = Ki.transpose().mmul(Ki);
  const rc = reciprocalCondition(G);
  if (!(rc > 1e-14)) throw new EngineError("singular", `back-calculation needs an integrator gain Ki of full column rank (σ_min/σ_max of KiᵀKi is ${rc.toExponential(2)})`, { argument: "Ki" });
  return solve(G, Ki.transpose());
}

function expComplex(z: Complex, T: number): Complex {
  const mag = Math.exp(z.re * T);
  return { re: mag * Math.cos(z.im * T), im: mag * Math.sin(z.im * T) };
}

/** Greedy nearest matching of two pole multisets; max |Δ|/max(1, |λ_expected|). */
function matchMismatch(actual: Complex[], expected: Complex[]): number {
  if (actual.length !== expected.length) return Infinity;
  const remaining = [...actual];
  let worst = 0;
  for (const e of [...expected].sort((a, b) => cabs(b) - cabs(a))) {
    let best = 0;
    let dist = Infinity;
    remaining.forEach((a, i) => {
      const d = Math.hypot(a.re - e.re, a.im - e.im);
      if (d < dist) { dist = d; best = i; }
    });
    remaining.splice(best, 1);
    worst = Math.max(worst, dist / Math.max(1, cabs(e)));
  }
  return worst;
}

function add(a: readonly number[], b: readonly number[]): number[] {
  return a.map((v, i) => v + b[i]!);
}

function mulVec(M: Matrix, v: readonly number[]): number[] {
  const out = new Array<number>(M.rows).fill(0);
  for (let i = 0; i < M.rows; i++) for (let j = 0; j < M.columns; j++) out[i] = out[i]! + M.get(i, j) * v[j]!;
  return out;
}

function selection(outputs: number[], p: number): Matrix {
  const S = new Matrix(outputs.length, p);
  const seen = new Set<number>();
  outputs.forEach((o, i) => {
    if (!Number.isInteger(o) || o < 0 || o >= p || seen.has(o)) {
      throw new EngineError("invalid-argument", `integratedOutputs[${i}] is ${String(o)}; it must be a distinct output index from 0 to ${p - 1}`, { argument: "integratedOutputs", index: i });
    }
    seen.add(o);
    S.set(i, o, 1);
  });
  return S;
}

function gain(value: MatrixInput, name: string, rows: number, cols: number): Matrix {
  const raw = asMatrix(value, name);
  const G = raw.rows === 0 && rows * cols === 0 ? new Matrix(rows, cols) : raw;
  if (G.rows !== rows || G.columns !== cols) throw new EngineError("shape-mismatch", `${name} must be ${rows}×${cols} (it is ${shapeOf(G)})`, { argument: name });
  requireFinite(G, name);
  return G.clone();
}

function checkVector(v: readonly number[], name: string, length: number): void {
  if (!Array.isArray(v) || v.length !== length) throw new EngineError("shape-mismatch", `${name} must have ${length} entries (it has ${Array.isArray(v) ? v.length : "none"})`, { argument: name });
  v.forEach((x, i) => {
    if (typeof x !== "number" || !Number.isFinite(x)) throw new EngineError("non-finite", `${name}[${i}] is ${String(x)}; it must be a finite number`, { argument: name, index: i });
  });
}

