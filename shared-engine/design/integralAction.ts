/**
 * Integral (servo) action: augment the plant with integrators of the tracking error of chosen
 * outputs, design the gain [Kx Ki] on the augmented system (LQR or pole placement), and build
 * the servo closed loop from the references to [plant outputs; control inputs].
 *
 * Control law: u = −Kx·x − Ki·xᵢ, with xᵢ the integrated tracking errors. Augmented states
 * are ordered [x; xᵢ]; K = [Kx Ki] is m×(n + r).
 */
import { Matrix } from "ml-matrix";
import { EngineError } from "../errors";
import { asMatrix, eigenvalues, numericalRank, shapeOf, type Complex, type MatrixInput } from "../linalg";
import { stateSpaceFromMatrices, type StateSpace } from "../model";
import { lqr } from "./lqr";
import { placePoles } from "./placePoles";
import { blockMatrix, columnRange, rowSelection, steadyStateGain } from "./feedforward";

/** The plant with integrator states appended: a StateSpace plus the reference input matrix. */
export interface IntegratorAugmentation extends StateSpace {
  /** (n + r)×r: how the references r enter the augmented states ([0; I] or [0; T·I]). */
  referenceInput: Matrix;
  /** Names of the integrator states, "int_<output>". */
  integratorNames: string[];
  /** Indices (into the plant outputs) of the integrated outputs, in integrator order. */
  integratedOutputs: number[];
  /** σ_min/σ_max of the Rosenbrock matrix at s = 0 (z = 1): small means a zero near the origin. */
  zeroDistanceIndicator: number;
}

/** Servo design result: the gain split, poles, the servo loop and its DC gain check. */
export interface IntegralDesign {
  /** [Kx Ki], m×(n + r): u = −K·[x; xᵢ]. */
  K: Matrix;
  /** m×n state part. */
  Kx: Matrix;
  /** m×r integrator part. */
  Ki: Matrix;
  /** Eigenvalues of A_aug − B_aug·K. */
  closedLoopPoles: Complex[];
  /** ‖K‖_F. */
  gainNorm: number;
  riccati?: { X: Matrix; residual: number; conditionIndicator: number };
  /**
   * Closed loop: inputs the references of the integrated outputs (r), outputs [y; u] (p + m
   * rows), disturbances the plant's w; states [x; xᵢ].
   */
  servoLoop: StateSpace;
  /** A, B of the augmented system that K acts on (for margins at the plant input). */
  augmented: { A: Matrix; B: Matrix };
  integratorNames: string[];
  /** DC gains of the servo loop to the integrated outputs and their check (I from r, 0 from w). */
  servoDcGain: ServoDcGainCheck;
  warnings: string[];
}

export interface ServoDcGainCheck {
  /** r×r DC gain from the references to the integrated outputs (should be I). */
  fromReference: Matrix;
  /** r×q DC gain from the disturbances to the integrated outputs (should be 0). */
  fromDisturbance: Matrix;
  /** max |entry − target| over both matrices. */
  maxError: number;
  tolerance: number;
  passed: boolean;
}

/** Rank tolerance of the zero-at-origin test, relative to σ_max of the Rosenbrock matrix. */
const ZERO_RANK_TOLERANCE = 1e-11;
/** Below this σ_min/σ_max a zero is near enough to the origin to warn about large gains. */
const NEAR_ZERO_WARNING = 1e-6;

/**
 * Computes: the plant augmented with r = outputs.length integrators of the tracking error.
 *   Continuous: ẋᵢ = r − y_s, so A_a = [[A, 0], [−C_s, 0]], B_a = [B; −D_s], F_a = [F; −E_s],
 *   referenceInput = [0; I]. Sampled (period T): accumulators xᵢ[k+1] = xᵢ[k] + T(r[k] − y_s[k])
 *   (forward-Euler integral), so A_a = [[A, 0], [−T·C_s, I]], B_a = [B; −T·D_s],
 *   F_a = [F; −T·E_s], referenceInput = [0; T·I]. T scales the integral gain: the same Ki acts
 *   as Ki·T per sample, so a design made for one T must be redone for another. C_s, D_s, E_s
 *   are the rows of C, D, E for the chosen outputs. Outputs of the augmented model are the
 *   plant outputs y = [C 0]x_a + D u + E w.
 * Requires: outputs a non-empty list of distinct indices in [0, p); r ≤ m (one input per
 *   integrated output at least); no transmission zero at s = 0 (z = 1) on the chosen channels
 *   and no uncontrollable plant mode there: rank [[A − λ₀I, B], [C_s, D_s]] = n + r with
 *   λ₀ = 0 (continuous) or 1 (sampled), which is exactly the condition for the integrator
 *   modes of (A_a, B_a) to be controllable (PBH test at λ₀).
 * Method: block construction; rank by SVD with tolerance 1e-11·σ_max (PBH test: Hautus 1969,
 *   "Controllability and observability conditions of linear autonomous systems"; servo
 *   condition: E. J. Davison, "The robust control of a servomechanism problem for linear
 *   time-invariant multivariable systems", IEEE TAC 21(1), 1976).
 * Cost: one SVD of an (n + r)×(n + m) matrix, O((n + m)³); plus r smaller ones when it fails.
 * Accuracy: exact construction; the rank decision is reported as `zeroDistanceIndicator`.
 * Errors: "invalid-argument" (bad output indices, r > m), "empty" (no outputs),
 *   "not-controllable" (zero or uncontrollable mode at the origin, naming the channel).
 * Example:
 *   const g = createStateSpace({ A: [[-1]], B: [[1]], C: [[1]] });
 *   const a = augmentWithIntegrators(g, [0]); // A_a = [[-1, 0], [-1, 0]], B_a = [[1], [0]]
 *   // a.zeroDistanceIndicator > 0.1
 */
export function augmentWithIntegrators(model: StateSpace, outputs: number[]): IntegratorAugmentation {
  const { n, p, r } = checkOutputs(model, outputs);
  const T = model.sampleTime;
  const Cs = rowSelection(model.C, outputs);
  const Ds = rowSelection(model.D, outputs);
  const Es = rowSelection(model.E, outputs);
  const h = T ?? 1;
  const lambda0 = T === null ? 0 : 1;
  const indicator = checkNoZeroAtOrigin(model, outputs, lambda0);

  const A = blockMatrix([
    [model.A, new Matrix(n, r)],
    [Cs.clone().mul(-h), T === null ? new Matrix(r, r) : Matrix.eye(r, r)],
  ]);
  const B = blockMatrix([[model.B], [Ds.clone().mul(-h)]]);
  const F = blockMatrix([[model.F], [Es.clone().mul(-h)]]);
  const C = blockMatrix([[model.C, new Matrix(p, r)]]);
  const referenceInput = blockMatrix([[new Matrix(n, r)], [Matrix.eye(r, r).mul(h)]]);
  const integratorNames = outputs.map((i) => `int_${model.names.outputs[i]}`);
  const base = stateSpaceFromMatrices({
    A, B, C, D: model.D, F, E: model.E, sampleTime: T,
    names: { ...model.names, states: uniqueStateNames([...model.names.states, ...integratorNames]) },
    units: { ...model.units, states: [...model.units.states, ...outputs.map(() => "")] },
  });
  return Object.freeze({
    ...base,
    referenceInput,
    integratorNames: base.names.states.slice(n),
    integratedOutputs: [...outputs],
    zeroDistanceIndicator: indicator,
  });
}

/**
 * Computes: the LQR servo design on the augmented plant (see `augmentWithIntegrators`) with
 *   weight blkdiag(Q, diag(integratorWeights)) on [x; xᵢ] and R on u: K = [Kx Ki] (m×(n + r)),
 *   the closed-loop poles, the servo loop and its DC gain check.
 * Requires: Q n×n symmetric positive semidefinite, R m×m positive definite, one positive
 *   finite weight per integrated output; (A, B) stabilizable; the conditions of
 *   `augmentWithIntegrators`.
 * Method: `lqr` (Riccati; Kalman 1960) on the augmented pair; servo structure after
 *   P. C. Young & J. C. Willems, "An approach to the linear multivariable servomechanism
 *   problem", Int. J. Control 15(5), 1972.
 * Cost: one Riccati solve of order n + r (≈ 200(n + r)³ continuous, ≈ 500(n + r)³ discrete)
 *   plus O((n + r)³) for the DC gain check.
 * Accuracy: Riccati residual as `lqr`; the DC gain from r to the integrated outputs is checked
 *   against I and from w against 0 to 100·(n + r)·ε/rcond(A_cl) (continuous; I − A_cl
 *   sampled), floor 1e-10; a failure is reported in warnings and `servoDcGain.passed`.
 * Errors: as `augmentWithIntegrators` and `lqr`; "shape-mismatch" (Q, R sizes, weights count),
 *   "invalid-argument" (weight not positive finite).
 * Example:
 *   // ẋ = u, y = x; Q = [[1]], R = [[1]], weight 4: Kx = √5, Ki = −2 (closed form)
 *   const d = designIntegralLqr(createStateSpace({ A: [[0]], B: [[1]], C: [[1]] }), [0], [[1]], [[1]], [4]);
 *   // d.servoDcGain.maxError < 1e-12
 */
export function designIntegralLqr(
  model: StateSpace, outputs: number[], Q: MatrixInput, R: MatrixInput, integratorWeights: number[],
): IntegralDesign {
  const aug = augmentWithIntegrators(model, outputs);
  const n = model.A.rows;
  const r = outputs.length;
  const Qm = asMatrix(Q, "Q");
  if (Qm.rows !== n || Qm.columns !== n) {
    throw new EngineError("shape-mismatch", `Q must be ${n}×${n}, one row per plant state (A is ${shapeOf(model.A)}, Q is ${shapeOf(Qm)}); integrator weights go in integratorWeights`, { argument: "Q" });
  }
  if (!Array.isArray(integratorWeights) || integratorWeights.length !== r) {
    throw new EngineError("shape-mismatch", `integratorWeights must have one entry per integrated output (${r}), it has ${Array.isArray(integratorWeights) ? integratorWeights.length : "none"}`, { argument: "integratorWeights" });
  }
  integratorWeights.forEach((w, i) => {
    if (typeof w !== "number" || !Number.isFinite(w) || w <= 0) {
      throw new EngineError("invalid-argument", `integratorWeights[${i}] is ${String(w)}; each integrator weight must be a positive finite number (a zero weight leaves that integrator undamped)`, { argument: "integratorWeights", index: i });
    }
  });
  const Qa = new Matrix(n + r, n + r);
  Qa.setSubMatrix(Qm, 0, 0);
  integratorWeights.forEach((w, i) => Qa.set(n + i, n + i, w));
  const design = lqr(aug.A, aug.B, Qa, R, null, model.sampleTime);
  const result = finishDesign(model, aug, design.K, design.warnings);
  result.riccati = { X: design.X, residual: design.residual, conditionIndicator: design.conditionIndicator };
  return result;
}

/**
 * Computes: the servo gain K = [Kx Ki] (m×(n + r)) placing eig(A_a − B_a K) at `poles` (n
 *   values) together with `integratorPoles` (r values), the servo loop and its DC gain check.
 * Requires: both lists closed under conjugation, counts n and r; the conditions of
 *   `augmentWithIntegrators` and `placePoles` on the augmented pair.
 * Method: `placePoles` (Miminis–Paige single input; Kautz–Nichols–Van Dooren robust
 *   multi-input) on the augmented pair. The split into "plant" and "integrator" poles is only
 *   a bookkeeping of the request: all n + r poles belong to the whole loop.
 * Cost: as `placePoles` with order n + r, plus O((n + r)³).
 * Accuracy: placement error as `placePoles` (warned above 1e-6); DC gain check as
 *   `designIntegralLqr`.
 * Errors: as `augmentWithIntegrators` and `placePoles`; "invalid-argument" (pole counts).
 * Example:
 *   // ẋ = u, y = x; poles −1 and −2: s² + Kx s − Ki = (s + 1)(s + 2), Kx = 3, Ki = −2
 *   const d = designIntegralPoles(createStateSpace({ A: [[0]], B: [[1]], C: [[1]] }), [0],
 *     [{ re: -1, im: 0 }], [{ re: -2, im: 0 }]); // d.servoDcGain.maxError < 1e-12
 */
export function designIntegralPoles(model: StateSpace, outputs: number[], poles: Complex[], integratorPoles: Complex[]): IntegralDesign {
  const aug = augmentWithIntegrators(model, outputs);
  const n = model.A.rows;
  const r = outputs.length;
  if (!Array.isArray(poles) || poles.length !== n) {
    throw new EngineError("invalid-argument", `poles must list ${n} closed-loop poles (one per plant state), it has ${Array.isArray(poles) ? poles.length : "none"}`, { argument: "poles" });
  }
  if (!Array.isArray(integratorPoles) || integratorPoles.length !== r) {
    throw new EngineError("invalid-argument", `integratorPoles must list ${r} poles (one per integrated output), it has ${Array.isArray(integratorPoles) ? integratorPoles.length : "none"}`, { argument: "integratorPoles" });
  }
  const placed = placePoles(aug.A, aug.B, [...poles, ...integratorPoles]);
  return finishDesign(model, aug, placed.K, placed.warnings);
}

function finishDesign(model: StateSpace, aug: IntegratorAugmentation, K: Matrix, designWarnings: string[]): IntegralDesign {
  const n = model.A.rows;
  const r = aug.integratedOutputs.length;
  const warnings = [...designWarnings];
  if (aug.zeroDistanceIndicator < NEAR_ZERO_WARNING) {
    warnings.push(`the plant has a zero close to ${model.sampleTime === null ? "s = 0" : "z = 1"} on the integrated channels (σ_min/σ_max = ${aug.zeroDistanceIndicator.toExponential(2)}): expect large integral gains and slow error decay`);
  }
  const Kx = columnRange(K, 0, n);
  const Ki = columnRange(K, n, r);
  const Acl = aug.A.clone().sub(aug.B.mmul(K));
  const closedLoopPoles = eigenvalues(Acl);
  const servoLoop = integralServoLoop(model, aug, K);
  const servoDcGain = checkServoDcGain(servoLoop, aug.integratedOutputs);
  if (!servoDcGain.passed) {
    warnings.push(`the servo loop's DC gain misses I from the references (or 0 from the disturbances) on the integrated outputs by ${servoDcGain.maxError.toExponential(2)} (tolerance ${servoDcGain.tolerance.toExponential(2)}); the closed loop may be unstable or nearly singular`);
  }
  return {
    K: K.clone(),
    Kx,
    Ki,
    closedLoopPoles,
    gainNorm: K.norm("frobenius"),
    servoLoop,
    augmented: { A: aug.A.clone(), B: aug.B.clone() },
    integratorNames: [...aug.integratorNames],
    servoDcGain,
    warnings,
  };
}

/** Closed loop of the augmented plant under u = −K[x; xᵢ]; inputs r, outputs [y; u]. */
function integralServoLoop(model: StateSpace, aug: IntegratorAugmentation, K: Matrix): StateSpace {
  const m = model.B.columns;
  const p = model.C.rows;
  const A = aug.A.clone().sub(aug.B.mmul(K));
  const Cy = aug.C.clone().sub(model.D.mmul(K));
  const Cu = K.clone().mul(-1);
  const r = aug.integratedOutputs.length;
  return stateSpaceFromMatrices({
    A,
    B: aug.referenceInput,
    C: blockMatrix([[Cy], [Cu]]),
    D: new Matrix(p + m, r),
    F: aug.F,
    E: blockMatrix([[model.E], [new Matrix(m, model.E.columns)]]),
    sampleTime: model.sampleTime,
    names: {
      states: aug.names.states,
      inputs: aug.integratedOutputs.map((i) => `r_${model.names.outputs[i]}`),
      outputs: [...model.names.outputs, ...model.names.inputs],
      disturbances: model.names.disturbances,
    },
    units: {
      states: aug.units.states,
      inputs: aug.integratedOutputs.map((i) => model.units.outputs[i]!),
      outputs: [...model.units.outputs, ...model.units.inputs],
      disturbances: model.units.disturbances,
    },
  });
}

/**
 * Computes: the DC gains of a servo loop (inputs r, disturbances w) to the outputs `integrated`
 *   and compares them with I (from r; requires as many inputs as integrated outputs) and 0 (from w).
 * Requires: the loop has no pole at s = 0 (z = 1). Method: `steadyStateGain`.
 * Cost: O(N³) for N states. Accuracy: tolerance 100·N·ε/rcond, floor 1e-10.
 * Errors: "singular" (closed-loop pole at the origin).
 * Example: checkServoDcGain(designIntegralLqr(...).servoLoop, [0]).passed === true
 */
export function checkServoDcGain(loop: StateSpace, integrated: number[]): ServoDcGainCheck {
  const fromInputs = steadyStateGain(loop.A, loop.B, loop.C, loop.D, loop.sampleTime, "servo loop");
  const fromDist = steadyStateGain(loop.A, loop.F, loop.C, loop.E, loop.sampleTime, "servo loop");
  const fromReference = columnRange(rowSelection(fromInputs.gain, integrated), 0, integrated.length);
  const fromDisturbance = loop.F.columns > 0 ? rowSelection(fromDist.gain, integrated) : new Matrix(integrated.length, 0);
  let maxError = 0;
  for (let i = 0; i < fromReference.rows; i++) {
    for (let j = 0; j < fromReference.columns; j++) maxError = Math.max(maxError, Math.abs(fromReference.get(i, j) - (i === j ? 1 : 0)));
    for (let j = 0; j < fromDisturbance.columns; j++) maxError = Math.max(maxError, Math.abs(fromDisturbance.get(i, j)));
  }
  const N = loop.A.rows;
  const tolerance = Math.max(1e-10, (100 * Math.max(N, 1) * Number.EPSILON) / fromInputs.reciprocalCondition);
  return { fromReference, fromDisturbance, maxError, tolerance, passed: maxError <= tolerance };
}

function checkOutputs(model: StateSpace, outputs: number[]): { n: number; m: number; p: number; r: number } {
  const n = model.A.rows;
  const m = model.B.columns;
  const p = model.C.rows;
  if (!Array.isArray(outputs)) {
    throw new EngineError("invalid-argument", "outputs must be a list of output indices to integrate", { argument: "outputs" });
  }
  if (outputs.length === 0) {
    throw new EngineError("empty", "outputs is empty; integral action needs at least one output to integrate", { argument: "outputs" });
  }
  const seen = new Set<number>();
  outputs.forEach((o, i) => {
    if (!Number.isInteger(o) || o < 0 || o >= p) {
      throw new EngineError("invalid-argument", `outputs[${i}] is ${String(o)}; it must be an output index from 0 to ${p - 1} (the plant has ${p} outputs)`, { argument: "outputs", index: i });
    }
    if (seen.has(o)) {
      throw new EngineError("invalid-argument", `outputs lists output ${model.names.outputs[o]} twice; integrate each output once`, { argument: "outputs", index: i });
    }
    seen.add(o);
  });
  if (outputs.length > m) {
    throw new EngineError("invalid-argument", `integrating ${outputs.length} outputs needs at least ${outputs.length} inputs, but the plant has ${m}: each integrated output needs its own input to be held at zero error`, { argument: "outputs", inputs: m });
  }
  return { n, m, p, r: outputs.length };
}

/** PBH/Rosenbrock test at λ₀ (0 or 1); throws naming the channel. Returns σ_min/σ_max. */
function checkNoZeroAtOrigin(model: StateSpace, outputs: number[], lambda0: number): number {
  const n = model.A.rows;
  const m = model.B.columns;
  const where = lambda0 === 0 ? "s = 0" : "z = 1";
  const shifted = model.A.clone().sub(Matrix.eye(n, n).mul(lambda0));
  const inputs = model.names.inputs;
  const inputText = m === 1 ? inputs[0]! : `the inputs (${inputs.join(", ")})`;
  if (n > 0) {
    const top = blockMatrix([[shifted, model.B]]);
    const sv = numericalRank(top).singularValues;
    const rank = sv.filter((s) => s > ZERO_RANK_TOLERANCE * (sv[0] ?? 0)).length;
    if (rank < n) {
      throw new EngineError("not-controllable", `the plant has a mode at ${where} that no input moves (rank [A${lambda0 === 0 ? "" : " − I"}, B] = ${rank} < ${n}), so the integrated loop cannot be stabilised`, { where, rank, states: n });
    }
  }
  const rosenbrock = (rows: number[]): Matrix => blockMatrix([[shifted, model.B], [rowSelection(model.C, rows), rowSelection(model.D, rows)]]);
  const full = numericalRank(rosenbrock(outputs));
  const sigma = full.singularValues;
  const smax = sigma[0] ?? 0;
  const needed = n + outputs.length;
  const rank = sigma.filter((s) => s > ZERO_RANK_TOLERANCE * smax).length;
  const indicator = smax > 0 && sigma.length >= needed ? sigma[needed - 1]! / smax : 0;
  if (rank >= needed) return indicator;
  for (const o of outputs) {
    const sv = numericalRank(rosenbrock([o])).singularValues;
    const s1 = sv[0] ?? 0;
    if (sv.filter((s) => s > ZERO_RANK_TOLERANCE * s1).length < n + 1) {
      const y = model.names.outputs[o]!;
      throw new EngineError("not-controllable", `the plant has a zero at ${where} from ${inputText} to ${y}, so an integrator on ${y} cannot be stabilised`, { where, output: o });
    }
  }
  const names = outputs.map((o) => model.names.outputs[o]!).join(", ");
  throw new EngineError("not-controllable", `the plant has a transmission zero at ${where} from ${inputText} to (${names}): the inputs cannot hold these outputs independently, so integrators on all of them cannot be stabilised`, { where, outputs: [...outputs] });
}

function uniqueStateNames(names: string[]): string[] {
  const seen = new Set<string>();
  return names.map((name) => {
    let candidate = name;
    let k = 2;
    while (seen.has(candidate)) candidate = `${name}_${k++}`;
    seen.add(candidate);
    return candidate;
  });
}
