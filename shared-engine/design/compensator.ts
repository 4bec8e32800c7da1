/**
 * The observer-based compensator as one system: the observer (continuous, sampled predictor or
 * sampled current-estimate form), the state feedback, optional integrators of the tracking
 * error and optional reference feedforward; its closed loop with the plant, the separation
 * check, and the loop broken at the plant input with its margins.
 *
 * Controller states z = [x̄; xᵢ] (x̄ the predicted estimate). With innovation
 * e = y − Cx̄ − Du and current estimate x̂ = x̄ + M e (M = 0 except in the current form):
 *   u = −K x̂ − Ki xᵢ + N r
 *   x̄' (or x̄[k+1]) = A x̄ + B u + L_p e,   L_p = L (continuous, predictor), A·M (current)
 *   xᵢ' = r − y_s (continuous) or xᵢ[k+1] = xᵢ[k] + T(r[k] − y_s[k]) (sampled).
 */
import { Matrix, solve } from "ml-matrix";
import { EngineError } from "../errors";
import { asMatrix, eigenvalues, reciprocalCondition, requireFinite, shapeOf, type Complex, type MatrixInput } from "../linalg";
import { stateSpaceFromMatrices, type StateSpace } from "../model";
import { loopMargins } from "../analysis/margins";
import { loopAtInput } from "../analysis/loopAtInput";
import { blockMatrix, rowSelection } from "./feedforward";
import { poleSetMismatch } from "./poleSetMismatch";

export interface CompensatorSpec {
  model: StateSpace;
  /** m×n state-feedback gain. */
  K: MatrixInput;
  /** n×p observer (predictor) gain. In the current form it is only compared with A·M. */
  L: MatrixInput;
  /** m×r integrator gain (with `integratedOutputs`). */
  Ki?: MatrixInput;
  /** n×p current-estimate gain (required for observerForm "current"). */
  M?: MatrixInput;
  observerForm: "predictor" | "current";
  /** Plant output indices whose tracking error is integrated (empty: no integral action). */
  integratedOutputs?: number[];
  /** m×m reference feedforward N (ignored with integral action; default I). */
  referenceGain?: MatrixInput;
}

export interface MarginPair { gainMarginDb: number | null; phaseMarginDeg: number | null }

export interface AssembledCompensator {
  /** From [r; y] to u; states [x̄; xᵢ]. */
  controller: StateSpace;
  /** Plant + controller: inputs r, disturbances w (the plant's), outputs [y; u]; states [x; x̄; xᵢ]. */
  closedLoop: StateSpace;
  /** The same loop as `closedLoop` (reference to [plant outputs; control inputs]). */
  servoLoop: StateSpace;
  /** SISO: the loop broken at plant input 0 (others closed), u₀ = −L·v under negative feedback. */
  loopAtPlantInput: StateSpace;
  /** The state-feedback loop K_total(sI − A_aug)⁻¹B_aug broken at input 0 (others closed). */
  stateFeedbackLoop: StateSpace;
  closedLoopPoles: Complex[];
  /** eig(A_aug − B_aug[K Ki]) ∪ eig(A − L_p C). */
  expectedPoles: Complex[];
  separation: { passed: boolean; maxMismatch: number; tolerance: number };
  margins?: { observerLoop: MarginPair; stateFeedbackLoop: MarginPair };
  warnings: string[];
}

/** Relative eigenvalue mismatch allowed by the separation check (see `assembleCompensator`). */
const SEPARATION_TOLERANCE = 1e-6;
/** "Well below": the observer-based margin is less than this fraction of the state-feedback one… */
const MARGIN_LOSS_FRACTION = 0.7;
/** …and below the usual comfort levels of 45° and 6 dB (common practice), so ample margins never warn. */
const COMFORTABLE_PHASE_DEG = 45;
const COMFORTABLE_GAIN_DB = 6;

/**
 * Computes: the compensator of the module comment as a StateSpace from [r; y] to u, its
 *   closed loop with the plant (states [x; x̄; xᵢ], inputs r, disturbances w, outputs [y; u]),
 *   the loop at plant input 0 L_in = K_total·G (negative feedback convention, the other
 *   inputs' loops closed), and its margins beside those of the state-feedback loop
 *   K_aug(sI − A_aug)⁻¹B_aug, with a warning when either observer-based margin (|PM|, the
 *   angle between L(jω_gc) and −1; |GM| in dB) is below 70% of the state-feedback one and
 *   below 45° (6 dB). r has one entry per integrated output with integral action,
 *   else m entries entering through N (default I).
 * Requires: K m×n, L n×p, Ki m×r with r = integratedOutputs.length, M n×p for the current form
 *   (sampled plants only), N m×m; I − K·M·D and I − D·D_c nonsingular (well-posed loops; true
 *   whenever D = 0).
 * Method: direct construction. Separation principle (closed-loop poles = regulator poles ∪
 *   observer poles: D. G. Luenberger, "Observers for multivariable systems", IEEE TAC 11(2),
 *   1966); margin comparison after J. C. Doyle, "Guaranteed margins for LQG regulators", IEEE
 *   TAC 23(4), 1978: observer-based loops have no guaranteed margins. Margins: `loopMargins`.
 * Cost: O((2n + r)³) for the eigenvalues, plus two `loopMargins` evaluations (≈ 400–1000
 *   frequency points at O((2n + r)²) each).
 * Accuracy: closed-loop poles matched greedily to the expected set; mismatch measured as
 *   |Δλ|/max(1, |λ|), tolerance 1e-6 (eigenvalues of non-normal closed loops are only
 *   accurate to about κ·ε·‖A_cl‖; repeated poles to ε^{1/k}).
 * Errors: "shape-mismatch" (gain sizes), "non-finite", "invalid-argument" (current form on a
 *   continuous plant, unknown form, bad output indices), "singular" (algebraic loop not well
 *   posed). Margin failures become warnings.
 * Example:
 *   // ẋ = u, y = x, K = 2, L = 3: controller y → u is −6/(s + 5), loop 6/(s(s + 5))
 *   const c = assembleCompensator({ model: createStateSpace({ A: [[0]], B: [[1]], C: [[1]] }),
 *     K: [[2]], L: [[3]], observerForm: "predictor" }); // c.separation.maxMismatch < 1e-12
 */
export function assembleCompensator(spec: CompensatorSpec): AssembledCompensator {
  const { model } = spec;
  const n = model.A.rows;
  const m = model.B.columns;
  const p = model.C.rows;
  const T = model.sampleTime;
  const warnings: string[] = [];
  const K = gain(spec.K, "K", m, n, "one row per input, one column per state");
  const L = gain(spec.L, "L", n, p, "one row per state, one column per output");
  const outputs = spec.integratedOutputs ?? [];
  checkIndices(outputs, p);
  const r = outputs.length;
  if (spec.Ki === undefined && r > 0) throw new EngineError("invalid-argument", `Ki is required when integratedOutputs lists ${r} outputs`, { argument: "Ki" });
  const Ki = spec.Ki === undefined ? new Matrix(m, 0) : gain(spec.Ki, "Ki", m, r, "one row per input, one column per integrated output");
  if (spec.observerForm !== "predictor" && spec.observerForm !== "current") {
    throw new EngineError("invalid-argument", `observerForm must be "predictor" or "current" (it is ${JSON.stringify(spec.observerForm)})`, { argument: "observerForm" });
  }
  let M = new Matrix(n, p);
  let Lp = L;
  if (spec.observerForm === "current") {
    if (T === null) throw new EngineError("invalid-argument", `observerForm "current" applies to sampled plants; this plant is continuous`, { argument: "observerForm" });
    if (spec.M === undefined) throw new EngineError("invalid-argument", `observerForm "current" needs the current-estimate gain M (${n}×${p})`, { argument: "M" });
    M = gain(spec.M, "M", n, p, "one row per state, one column per output");
    Lp = model.A.mmul(M);
    const mismatch = Lp.clone().sub(L).norm("frobenius");
    if (mismatch > 1e-8 * Math.max(1, L.norm("frobenius"))) {
      warnings.push(`the current-estimate observer uses the predictor gain A·M, which differs from the given L by ${mismatch.toExponential(2)} (expected with correlated noise); the separation check uses A·M`);
    }
  }
  const nRef = r > 0 ? r : m;
  let N = Matrix.eye(m, m);
  if (spec.referenceGain !== undefined) {
    const Ng = gain(spec.referenceGain, "referenceGain", m, m, "one row and column per input");
    if (r > 0) warnings.push("referenceGain is ignored: with integral action the references enter through the integrators");
    else N = Ng;
  }
  const Nref = r > 0 ? new Matrix(m, r) : N;

  // ---- Controller: u = Cu z + Dur r + Duy y --------------------------------------------------
  const { A, B, C, D } = model;
  const KMD = K.mmul(M).mmul(D);
  const W = invertWellPosed(Matrix.eye(m, m).sub(KMD), "I − K·M·D (the current-estimate controller's algebraic loop)");
  const IMC = Matrix.eye(n, n).sub(M.mmul(C));
  const Cu = W.mmul(blockMatrix([[K.mmul(IMC).mul(-1), Ki.clone().mul(-1)]]));
  const Dur = W.mmul(Nref);
  const Duy = W.mmul(K).mmul(M).mul(-1);
  const BLD = B.clone().sub(Lp.mmul(D));
  const h = T ?? 1;
  const S = selectRows(outputs, p);
  const Az = blockMatrix([[A.clone().sub(Lp.mmul(C)), new Matrix(n, r)], [new Matrix(r, n), T === null ? new Matrix(r, r) : Matrix.eye(r, r)]])
    .add(blockMatrix([[BLD], [new Matrix(r, m)]]).mmul(Cu));
  const Bzr = blockMatrix([[BLD.mmul(Dur)], [Matrix.eye(r, nRef).mul(h)]]);
  const Bzy = blockMatrix([[Lp.clone().add(BLD.mmul(Duy))], [S.clone().mul(-h)]]);
  const refNames = r > 0 ? outputs.map((o) => `r_${model.names.outputs[o]}`) : model.names.inputs.map((u) => `r_${u}`);
  const ctrlStates = [...model.names.states.map((s) => `est_${s}`), ...outputs.map((o) => `int_${model.names.outputs[o]}`)];
  const controller = stateSpaceFromMatrices({
    A: Az, B: blockMatrix([[Bzr, Bzy]]), C: Cu, D: blockMatrix([[Dur, Duy]]), sampleTime: T,
    names: { states: ctrlStates, inputs: [...refNames, ...model.names.outputs], outputs: [...model.names.inputs], disturbances: [] },
  });

  // ---- Closed loop and the loop at plant input 0 -----------------------------------------------
  const parts = { Az, Bzr, Bzy, Cu, Dur, Duy };
  const closed = interconnect(model, parts, null);
  const closedLoop = stateSpaceFromMatrices({
    A: closed.A, B: closed.Br, C: closed.C, D: closed.Dr, F: closed.F, E: closed.E, sampleTime: T,
    names: {
      states: [...model.names.states, ...ctrlStates],
      inputs: refNames,
      outputs: [...model.names.outputs, ...model.names.inputs],
      disturbances: model.names.disturbances,
    },
  });
  const closedLoopPoles = eigenvalues(closed.A);
  const opened = m > 0 ? interconnect(model, parts, 0) : null;
  const loopAtPlantInput = opened
    ? stateSpaceFromMatrices({ A: opened.A, B: opened.Bv, C: rowSelection(opened.C, [p]).mul(-1), D: rowSelection(opened.Dv, [p]).mul(-1), sampleTime: T })
    : stateSpaceFromMatrices({ A: [], B: [], C: [], D: [[0]], sampleTime: T });

  // ---- Separation check ----------------------------------------------------------------------
  const Aaug = blockMatrix([[A, new Matrix(n, r)], [S.mmul(C).mul(-h), T === null ? new Matrix(r, r) : Matrix.eye(r, r)]]);
  const Baug = blockMatrix([[B], [S.mmul(D).mul(-h)]]);
  const Kaug = blockMatrix([[K, Ki]]);
  const expectedPoles = [...eigenvalues(Aaug.clone().sub(Baug.mmul(Kaug))), ...(n > 0 ? eigenvalues(A.clone().sub(Lp.mmul(C))) : [])];
  const maxMismatch = poleSetMismatch(closedLoopPoles, expectedPoles);
  const separation = { passed: maxMismatch <= SEPARATION_TOLERANCE, maxMismatch, tolerance: SEPARATION_TOLERANCE };
  if (!separation.passed) warnings.push(`the closed-loop poles differ from the feedback and observer poles by ${maxMismatch.toExponential(2)} (tolerance ${SEPARATION_TOLERANCE.toExponential(0)}): the closed loop is ill-conditioned`);
  const stateFeedbackLoop = loopAtInputZero(Aaug, Baug, Kaug, T);

  // ---- Margins (Doyle 1978) ------------------------------------------------------------------
  let margins: AssembledCompensator["margins"];
  if (m > 0) {
    try {
      const obs = loopMargins(loopAtPlantInput);
      const sf = loopMargins(stateFeedbackLoop);
      margins = {
        observerLoop: { gainMarginDb: obs.gainMarginDb, phaseMarginDeg: obs.phaseMarginDeg },
        stateFeedbackLoop: { gainMarginDb: sf.gainMarginDb, phaseMarginDeg: sf.phaseMarginDeg },
      };
      warnings.push(...marginWarnings(margins, m));
    } catch (error) {
      if (!(error instanceof EngineError)) throw error;
      warnings.push(`margins at the plant input could not be compared: ${error.message}`);
    }
  }
  return { controller, closedLoop, servoLoop: closedLoop, loopAtPlantInput, stateFeedbackLoop, closedLoopPoles, expectedPoles, separation, ...(margins ? { margins } : {}), warnings };
}

interface ControllerParts { Az: Matrix; Bzr: Matrix; Bzy: Matrix; Cu: Matrix; Dur: Matrix; Duy: Matrix }

/**
 * Plant + controller with plant input u_p = P·u_c + e_j·v (P = I − e_j e_jᵀ when input j is
 * opened, I otherwise). States [x; z]; outputs [y; u_c]; inputs r, v, w.
 */
function interconnect(model: StateSpace, c: ControllerParts, openInput: number | null) {
  const { A, B, C, D, F, E } = model;
  const m = B.columns;
  const p = C.rows;
  const P = Matrix.eye(m, m);
  const ej = new Matrix(m, 1);
  if (openInput !== null) {
    P.set(openInput, openInput, 0);
    ej.set(openInput, 0, 1);
  }
  const DP = D.mmul(P);
  // (I − D P Duy) y = C x + D P Cu z + D P Dur r + D e_j v + E w
  const V = invertWellPosed(Matrix.eye(p, p).sub(DP.mmul(c.Duy)), "I − D·D_c (the plant–controller algebraic loop)");
  const Yx = V.mmul(C);
  const Yz = V.mmul(DP).mmul(c.Cu);
  const Yr = V.mmul(DP).mmul(c.Dur);
  const Yv = V.mmul(D).mmul(ej);
  const Yw = V.mmul(E);
  const Ux = c.Duy.mmul(Yx);
  const Uz = c.Cu.clone().add(c.Duy.mmul(Yz));
  const Ur = c.Dur.clone().add(c.Duy.mmul(Yr));
  const Uv = c.Duy.mmul(Yv);
  const Uw = c.Duy.mmul(Yw);
  const BP = B.mmul(P);
  const Acl = blockMatrix([
    [A.clone().add(BP.mmul(Ux)), BP.mmul(Uz)],
    [c.Bzy.mmul(Yx), c.Az.clone().add(c.Bzy.mmul(Yz))],
  ]);
  const Br = blockMatrix([[BP.mmul(Ur)], [c.Bzr.clone().add(c.Bzy.mmul(Yr))]]);
  const Bv = blockMatrix([[B.mmul(ej).add(BP.mmul(Uv))], [c.Bzy.mmul(Yv)]]);
  const Fcl = blockMatrix([[F.clone().add(BP.mmul(Uw))], [c.Bzy.mmul(Yw)]]);
  return {
    A: Acl,
    Br,
    Bv,
    F: Fcl,
    C: blockMatrix([[Yx, Yz], [Ux, Uz]]),
    Dr: blockMatrix([[Yr], [Ur]]),
    Dv: blockMatrix([[Yv], [Uv]]),
    E: blockMatrix([[Yw], [Uw]]),
  };
}

/** K_aug(sI − A + B_{≠0}K_{≠0})⁻¹B₀: the state-feedback loop broken at input 0. */
function loopAtInputZero(A: Matrix, B: Matrix, K: Matrix, T: number | null): StateSpace {
  if (B.columns === 0) return stateSpaceFromMatrices({ A: [], B: [], C: [], D: [[0]], sampleTime: T });
  return loopAtInput(A, B, K, 0, T);
}

function marginWarnings(margins: NonNullable<AssembledCompensator["margins"]>, m: number): string[] {
  const out: string[] = [];
  const where = m > 1 ? " (at input 1, the other loops closed)" : "";
  const { observerLoop: o, stateFeedbackLoop: s } = margins;
  // Compare angular distances of L(jω_gc) from −1, |PM|: for open-loop unstable plants the
  // signed margin of a robust loop can be negative (e.g. −62° for Doyle's example), and the
  // LQR guarantee (Safonov & Athans 1977) is on this distance.
  const pmObs = o.phaseMarginDeg === null ? Infinity : Math.abs(o.phaseMarginDeg);
  const pmSf = s.phaseMarginDeg === null ? Infinity : Math.abs(s.phaseMarginDeg);
  if (pmObs < COMFORTABLE_PHASE_DEG && pmObs < MARGIN_LOSS_FRACTION * pmSf) {
    out.push(`the observer-based loop keeps only ${pmObs.toFixed(0)}° of phase margin${where}; the state-feedback loop had ${Number.isFinite(pmSf) ? `${pmSf.toFixed(0)}°` : "no gain crossover (unlimited phase margin)"}. Observer-based loops have no guaranteed margins (Doyle 1978): consider a slower observer or loop-transfer recovery`);
  }
  const gmObs = o.gainMarginDb === null ? Infinity : Math.abs(o.gainMarginDb);
  const gmSf = s.gainMarginDb === null ? Infinity : Math.abs(s.gainMarginDb);
  if (gmObs < COMFORTABLE_GAIN_DB && gmObs < MARGIN_LOSS_FRACTION * gmSf) {
    out.push(`the observer-based loop keeps only ${gmObs.toFixed(1)} dB of gain margin${where}; the state-feedback loop had ${Number.isFinite(gmSf) ? `${gmSf.toFixed(1)} dB` : "an unlimited gain margin"} (Doyle 1978)`);
  }
  return out;
}

function invertWellPosed(M: Matrix, what: string): Matrix {
  const k = M.rows;
  if (k === 0) return new Matrix(0, 0);
  const rc = reciprocalCondition(M);
  if (!(rc > 1e-12)) throw new EngineError("singular", `${what} is singular (σ_min/σ_max = ${rc.toExponential(2)}): the loop is not well posed`, { reciprocalCondition: rc });
  return solve(M, Matrix.eye(k, k));
}

function gain(value: MatrixInput, name: string, rows: number, cols: number, meaning: string): Matrix {
  const raw = asMatrix(value, name);
  // asMatrix turns [] into 0×0; accept it for a gain with no entries.
  const G = raw.rows === 0 && rows * cols === 0 ? new Matrix(rows, cols) : raw;
  if (G.rows !== rows || G.columns !== cols) {
    throw new EngineError("shape-mismatch", `${name} must be ${rows}×${cols}, ${meaning} (it is ${shapeOf(G)})`, { argument: name });
  }
  requireFinite(G, name);
  return G.clone();
}

function checkIndices(outputs: number[], p: number): void {
  if (!Array.isArray(outputs)) throw new EngineError("invalid-argument", "integratedOutputs must be a list of output indices", { argument: "integratedOutputs" });
  const seen = new Set<number>();
  outputs.forEach((o, i) => {
    if (!Number.isInteger(o) || o < 0 || o >= p || seen.has(o)) {
      throw new EngineError("invalid-argument", `integratedOutputs[${i}] is ${String(o)}; it must be a distinct output index from 0 to ${p - 1}`, { argument: "integratedOutputs", index: i });
    }
    seen.add(o);
  });
}

function selectRows(outputs: number[], p: number): Matrix {
  const S = new Matrix(outputs.length, p);
  outputs.forEach((o, i) => S.set(i, o, 1));
  return S;
}
