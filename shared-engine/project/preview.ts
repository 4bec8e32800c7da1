/**
 * The lean pipeline behind dragging a pole (or scrubbing a weight): only what the workbench
 * redraws while the hand moves — gain, closed-loop poles, the step response with its metrics and
 * the Bode curve of the loop at the plant input. Plant structure, transmission zeros, margins
 * (with their grid refinement) and requirement checks are skipped; the full `evaluateVariant`
 * runs once when the gesture ends and supplies them.
 *
 * The shared fields are computed by the very same routines, in the same order, as
 * `evaluateVariant`, so they agree to rounding (test/engine/project/preview.test.ts checks
 * 1e-10 relative agreement). Variants whose design the preview does not cover (observers,
 * nonlinear plants and their simulations) fall back to the full pipeline, flagged `preview: false`.
 */
import { Matrix } from "ml-matrix";
import { EngineError, toErrorPayload } from "../errors";
import type { Complex } from "../linalg";
import { discretize, type StateSpace } from "../model";
import { frequencyResponse } from "../analysis/frequencyResponse";
import { stepResponse } from "../analysis/timeResponse";
// As in timeResponse.ts: vanLoan is not re-exported by linalg/index.ts.
import { expmIntegral } from "../linalg/vanLoan";
import { responseMetrics } from "../analysis/responseMetrics";
import { poles as systemPoles } from "../analysis/poles";
import { dcGain } from "../analysis/dcGain";
import { lqr } from "../design/lqr";
import { placePoles } from "../design/placePoles";
import { designIntegralLqr, designIntegralPoles } from "../design/integralAction";
import { referenceFeedforward } from "../design/feedforward";
import { atPath, buildPlantModel, toComplex } from "./buildPlant";
import { loopAtInput, stateFeedbackClosedLoop } from "./closedLoop";
import { evaluateVariant, RICCATI_RESIDUAL_LIMIT, type EvaluateOptions } from "./evaluateVariant";
import type { PlantSpec, VariantSpec } from "./format";
import type { ComplexJson, VariantResult } from "./result";
import { assertFiniteResult } from "./finite";

/**
 * A preview: a VariantResult without `plant`, `margins`, `disturbanceStep` and requirement
 * checks (when `preview` is true). `checks` holds only what the preview computes
 * (closed-loop stability, Riccati residual).
 */
export type VariantPreview = VariantResult & {
  /** True: the lean pipeline ran; false: the variant needed the full pipeline (see module note). */
  preview: boolean;
};

const rows = (m: Matrix): number[][] => m.to2DArray();
const complexList = (list: readonly Complex[]): ComplexJson[] => list.map((c) => ({ re: c.re, im: c.im }));
const isStable = (poles: readonly Complex[], T: number | null): boolean =>
  T === null ? poles.every((p) => p.re < 0) : poles.every((p) => Math.hypot(p.re, p.im) < 1);

/** Whether the lean pipeline covers this variant on this plant (else the full one runs). */
export function previewCovers(plant: PlantSpec, variant: VariantSpec): boolean {
  return plant.model.type !== "nonlinear" && !variant.observer && !variant.nonlinearCheck && !variant.robustness && !!variant.stateFeedback;
}

/**
 * Computes: for plant (A: n×n, B: n×m, C: p×n, D: p×m) and a variant's state-feedback spec, the
 *   gain K (m×n, with Ki and the reference gain when asked), the closed-loop poles eig(A − BK),
 *   the step response of the servo loop at `variant.step.times` with its metrics, and the loop
 *   −K(sI − A)⁻¹B broken at the first plant input at `variant.bode.frequencies` — the same
 *   fields, by the same routines, as `evaluateVariant`.
 * Requires: a validated plant and variant (as after `loadProjectValue`); linear plant model,
 *   no observer (else the full pipeline runs and `preview` is false).
 * Method: pole placement as `placePoles` (controllability staircase, then Miminis & Paige
 *   deflation for one input or Kautsky, Nichols & Van Dooren, "Robust pole assignment in linear
 *   state feedback", Int. J. Control 41, 1985, for several) or LQR via the Riccati equation (Laub, "A Schur method for solving algebraic
 *   Riccati equations", IEEE TAC 24, 1979); step response by the exact zero-order-hold
 *   discretisation of the closed loop, one matrix exponential per distinct step (Van Loan,
 *   "Computing integrals involving the matrix exponential", IEEE TAC 23, 1978) and then one
 *   matrix–vector product per sample; frequency response by Hessenberg reduction of A and one
 *   Hessenberg solve per frequency (Laub, "Efficient multivariable frequency response
 *   computations", IEEE TAC 26, 1981).
 * Cost: O(n³) for the design and the exponential, O(N·n²) for N step samples and O(F·n²) for F
 *   frequencies; no margins search, no structure or zero computation.
 * Accuracy: as evaluateVariant for the shared fields (identical arithmetic); the result is
 *   checked for NaN/Infinity before return.
 * Errors: none thrown — a failure is carried as `error: {kind, message, details}` (kinds as
 *   evaluateVariant: "invalid-argument", "uncontrollable", "no-convergence", ...).
 * Example: previewVariant({id:"p", model:{type:"state-space", A:[[0]], B:[[1]], C:[[1]],
 *   sampleTime:null}}, {id:"v", plant:"p", stateFeedback:{method:"poles", poles:[-2]}}).gain.K
 *   is [[2]]; residual check: eig(A − BK) = −2 exactly.
 */
export function previewVariant(plantSpec: PlantSpec, variant: VariantSpec, options: EvaluateOptions = {}): VariantPreview {
  if (!previewCovers(plantSpec, variant)) return { ...evaluateVariant(plantSpec, variant, options), preview: false };
  const result: VariantPreview = { id: variant.id, name: variant.name ?? variant.id, checks: [], warnings: [], preview: true };
  try {
    run(plantSpec, variant, options, result);
    assertFiniteResult(result);
  } catch (error) {
    const payload = toErrorPayload(error);
    return {
      id: variant.id,
      name: variant.name ?? variant.id,
      checks: [],
      warnings: result.warnings,
      error: { kind: payload.kind, message: payload.message, details: payload.details },
      preview: true,
    };
  }
  return result;
}

interface Feedback {
  K: Matrix;
  Ki?: Matrix;
  referenceGain?: Matrix;
  closedLoopPoles: Complex[];
  servoLoop: StateSpace;
  loopA: Matrix;
  loopB: Matrix;
  loopK: Matrix;
}

// Mirrors evaluateVariant's run() for a linear plant without observer; keep the two in step
// (the agreement test fails when they drift).
function run(plantSpec: PlantSpec, variant: VariantSpec, options: EvaluateOptions, result: VariantPreview): void {
  const vpath = `variants[${options.variantIndex ?? 0}]`;
  let model = buildPlantModel(plantSpec.model, `plants[${options.plantIndex ?? 0}].model`);
  if (variant.discretize) {
    const d = variant.discretize;
    const method = d.method === "bilinear" ? "tustin" : d.method;
    model = atPath(`${vpath}.discretize`, () => discretize(model, d.sampleTime, { method, prewarpRadPerSec: d.prewarpRadPerSec }));
    result.discrete = {
      A: rows(model.A), B: rows(model.B), C: rows(model.C), D: rows(model.D),
      ...(model.F.columns > 0 ? { F: rows(model.F), E: rows(model.E) } : {}),
      sampleTime: d.sampleTime,
      method,
    };
  }
  const T = model.sampleTime;

  const feedback = atPath(`${vpath}.stateFeedback`, () => designFeedback(model, variant, result));
  result.gain = { K: rows(feedback.K) };
  if (feedback.Ki) result.gain.Ki = rows(feedback.Ki);
  if (feedback.referenceGain) result.gain.referenceGain = rows(feedback.referenceGain);
  result.closedLoopPoles = complexList(feedback.closedLoopPoles);
  const stable = isStable(feedback.closedLoopPoles, T);
  result.checks.push({
    name: "closed-loop-stable",
    passed: stable,
    detail: stable
      ? `every state-feedback closed-loop pole lies ${T === null ? "in the open left half-plane" : "inside the unit circle"}`
      : "a state-feedback closed-loop pole is unstable",
  });

  const servoLoop = feedback.servoLoop;
  result.closedLoop = {
    A: rows(servoLoop.A), B: rows(servoLoop.B), C: rows(servoLoop.C), D: rows(servoLoop.D), F: rows(servoLoop.F), E: rows(servoLoop.E),
    sampleTime: servoLoop.sampleTime,
    names: {
      states: [...servoLoop.names.states],
      inputs: [...servoLoop.names.inputs],
      outputs: [...servoLoop.names.outputs],
      disturbances: [...servoLoop.names.disturbances],
    },
  };

  if (variant.bode) {
    const inputLoop = loopAtInput(feedback.loopA, feedback.loopB, feedback.loopK, 0, T);
    const fr = atPath(`${vpath}.bode`, () => frequencyResponse(inputLoop, variant.bode!.frequencies));
    const u = model.names.inputs[0] ?? "u1";
    result.bode = {
      loop: "plant-input",
      input: u,
      output: u,
      frequency: [...fr.frequencyRadPerSec],
      magnitudeDb: fr.magnitudeDb.map((k) => k[0]![0]!),
      phaseDeg: fr.phaseDeg.map((k) => k[0]![0]!),
    };
    if (fr.unbounded.length > 0) result.warnings.push(`Bode: the response is unbounded at ${fr.unbounded.length} grid frequencies (a pole on the ${T === null ? "imaginary axis" : "unit circle"}); those points are null`);
  }

  if (variant.step) {
    const system = feedback.servoLoop;
    const times = variant.step.times;
    if (T !== null) {
      for (const t of times) {
        const k = t / T;
        if (Math.abs(k - Math.round(k)) > 1e-9 * Math.max(1, k)) {
          throw new EngineError("invalid-argument", `${vpath}.step.times: ${t} s is not a whole number of sample periods (T = ${T} s) of the sampled loop`, {});
        }
      }
    }
    const loopPoles = systemPoles(system);
    const resp = atPath(`${vpath}.step`, () => uniformStep(system, times, loopPoles) ?? stepResponse(system, times, { input: 0 }));
    const p = model.C.rows;
    const m = model.B.columns;
    const y0 = resp.outputs[0]!;
    const loopStable = isStable(loopPoles, T);
    const dc = loopStable ? dcGain(system) : null;
    const finalValue = dc && dc.gain ? dc.gain[0]![0]! : undefined;
    const control = resp.outputs.slice(p, p + m);
    const metrics = responseMetrics(resp.time, y0, { reference: 1, finalValue, stable: loopStable, input: control[0] });
    result.step = {
      loop: "closed-loop",
      input: system.names.inputs[0] ?? "r1",
      time: resp.time,
      output: resp.outputs.slice(0, p),
      outputNames: [...model.names.outputs],
      control,
      riseTime: metrics.riseTimeSec,
      settlingTime: metrics.settlingTimeSec,
      overshootPct: metrics.overshootPct,
      peak: metrics.peak,
      peakTime: metrics.peakTimeSec,
      steadyStateValue: metrics.steadyStateValue,
      steadyStateError: metrics.steadyStateError,
      ...(metrics.peakInput !== undefined ? { peakInput: metrics.peakInput } : {}),
      status: metrics.status,
    };
    result.warnings.push(...resp.warnings.map((w) => `step: ${w}`));
  }
}

/**
 * Step on input 0 of `system` at uniformly spaced `times` (one step h, or one sample period of a
 * sampled loop): Φ, Γ of the zero-order hold once (Van Loan 1978, as the general simulator),
 * then x_{k+1} = Φ x_k + Γ and y_k = C x_k + D. Same arithmetic as `stepResponse` on such a grid
 * (which caches one Φ, Γ per distinct step), without the state and input histories it also
 * returns. Null when the grid is not uniform or the response overflows: the caller then runs
 * the general simulator, which also raises its specific errors.
 */
function uniformStep(system: StateSpace, times: readonly number[], poles: readonly Complex[]): { time: number[]; outputs: number[][]; warnings: string[] } | null {
  const N = times.length;
  const n = system.A.rows;
  const T = system.sampleTime;
  if (N < 2 || n === 0 || system.B.columns === 0 || times[0] !== 0) return null;
  const h = times[1]! - times[0]!;
  if (!(h > 0)) return null;
  // 1e−12: grids built as k·H/(N−1) differ from step to step in the last bits of t, not of h.
  for (let k = 1; k + 1 < N; k++) if (Math.abs(times[k + 1]! - times[k]! - h) > 1e-12 * h) return null;
  let Phi: Float64Array;
  const gamma = new Float64Array(n);
  const b = system.B.getColumnVector(0);
  if (T === null) {
    // With every input and disturbance column, as the general simulator does: the exponential's
    // scaling depends on the whole block, so this keeps the arithmetic (and the samples) identical.
    const { Phi: P, Gamma } = expmIntegral(system.A, system.F.columns > 0 ? joinColumns(system.B, system.F) : system.B, h);
    Phi = Float64Array.from(P.to1DArray());
    for (let i = 0; i < n; i++) gamma[i] = Gamma.get(i, 0);
  } else {
    if (Math.abs(h - T) > 1e-12 * T) return null;
    Phi = Float64Array.from(system.A.to1DArray());
    for (let i = 0; i < n; i++) gamma[i] = b.get(i, 0);
  }
  const p = system.C.rows;
  const C = Float64Array.from(system.C.to1DArray());
  const d = system.D.getColumn(0);
  const outputs = Array.from({ length: p }, () => new Array<number>(N).fill(0));
  let x = new Float64Array(n);
  let next = new Float64Array(n);
  for (let k = 0; k < N; k++) {
    for (let i = 0; i < p; i++) {
      let sum = 0;
      for (let c = 0; c < n; c++) sum += C[i * n + c]! * x[c]!;
      sum += d[i]!;
      if (!Number.isFinite(sum)) return null;
      outputs[i]![k] = sum;
    }
    if (k + 1 === N) break;
    for (let i = 0; i < n; i++) {
      let sum = 0;
      for (let c = 0; c < n; c++) sum += Phi[i * n + c]! * x[c]!;
      next[i] = sum + gamma[i]!;
      if (!Number.isFinite(next[i]!)) return null;
    }
    [x, next] = [next, x];
  }
  // The general simulator's growth remark, from the loop poles already computed.
  const unstable = poles.filter((q) => (T === null ? q.re > 1e-12 * Math.max(1, Math.hypot(q.re, q.im)) : Math.hypot(q.re, q.im) > 1 + 1e-12));
  const warnings = unstable.length > 0 ? [`the model has ${unstable.length} unstable pole(s) (${T === null ? "Re s > 0" : "|z| > 1"}); the response grows without bound`] : [];
  return { time: [...times], outputs, warnings };
}

function joinColumns(X: Matrix, Y: Matrix): Matrix {
  const out = new Matrix(X.rows, X.columns + Y.columns);
  out.setSubMatrix(X, 0, 0);
  out.setSubMatrix(Y, 0, X.columns);
  return out;
}

function designFeedback(model: StateSpace, variant: VariantSpec, result: VariantPreview): Feedback {
  const sf = variant.stateFeedback!;
  const T = model.sampleTime;
  if (variant.integralAction) {
    const ia = variant.integralAction;
    const integrated = ia.outputs.map((o) => (typeof o === "number" ? o : model.names.outputs.indexOf(o)));
    const design =
      sf.method === "lqr"
        ? designIntegralLqr(model, integrated, sf.Q, sf.R, ia.weights ?? integrated.map(() => 1))
        : designIntegralPoles(model, integrated, sf.poles.map(toComplex), (ia.poles ?? []).map(toComplex));
    result.design = { method: sf.method === "lqr" ? "LQR with integral action" : "pole placement with integral action", gainNorm: design.gainNorm };
    if (design.riccati) {
      result.riccati = { X: rows(design.riccati.X), residual: design.riccati.residual, conditionIndicator: design.riccati.conditionIndicator };
      pushResidualCheck(result, design.riccati.residual);
    }
    result.warnings.push(...design.warnings);
    return { K: design.Kx, Ki: design.Ki, closedLoopPoles: design.closedLoopPoles, servoLoop: design.servoLoop, loopA: design.augmented.A, loopB: design.augmented.B, loopK: design.K };
  }
  let K: Matrix;
  let closedLoopPoles: Complex[];
  if (sf.method === "lqr") {
    const r = lqr(model.A, model.B, sf.Q, sf.R, sf.N ?? null, T);
    K = r.K;
    closedLoopPoles = r.closedLoopPoles;
    result.riccati = { X: rows(r.X), residual: r.residual, conditionIndicator: r.conditionIndicator };
    result.design = { method: T === null ? "continuous LQR" : "discrete LQR", gainNorm: K.norm("frobenius") };
    pushResidualCheck(result, r.residual);
    result.warnings.push(...r.warnings);
  } else {
    const placed = placePoles(model.A, model.B, sf.poles.map(toComplex));
    K = placed.K;
    closedLoopPoles = placed.achievedPoles;
    result.design = {
      method: placed.method === "single-input" ? "pole placement (single input)" : "pole placement (robust, multi-input)",
      gainNorm: placed.gainNorm,
      eigenvectorCondition: placed.eigenvectorCondition,
      maxPoleError: placed.maxPoleError,
    };
    result.warnings.push(...placed.warnings);
  }
  let referenceGain: Matrix | undefined;
  if (variant.referenceFeedforward) {
    const ff = referenceFeedforward(model, K);
    referenceGain = ff.N;
    result.warnings.push(ff.warning);
  }
  return { K, referenceGain, closedLoopPoles, servoLoop: stateFeedbackClosedLoop(model, K, referenceGain), loopA: model.A, loopB: model.B, loopK: K };
}

function pushResidualCheck(result: VariantPreview, residual: number): void {
  result.checks.push({
    name: "riccati-residual",
    passed: residual <= RICCATI_RESIDUAL_LIMIT,
    detail: `relative Riccati residual ‖Res‖_F/‖X‖_F = ${residual.toExponential(2)} (limit ${RICCATI_RESIDUAL_LIMIT.toExponential(0)})`,
    value: residual,
    limit: RICCATI_RESIDUAL_LIMIT,
  });
}
