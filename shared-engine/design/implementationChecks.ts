/**
 * The checks `controllerImplementation` runs on the controller it exports: the poles of the
 * exported controller closed with the sampled plant against the design's, stability of that
 * loop, and the difference equations run sample by sample against the design's sampled loop.
 */
import { Matrix, solve } from "ml-matrix";
import { EngineError } from "../errors";
import { cabs, eigenvalues, reciprocalCondition, type Complex } from "../linalg";
import { stateSpaceFromMatrices, type StateSpace } from "../model";
import { simulateLinear } from "../analysis/timeResponse";
import { blockMatrix, columnRange } from "./feedforward";
import { poleSetMismatch } from "./poleSetMismatch";
import type { SampledController } from "./controllerRealisation";

export interface ImplementationCheck { name: string; passed: boolean; detail: string; value: number; limit: number }

/** Discrete design: |Δz|/max(1, |z|) allowed between exported and designed poles (as the separation check). */
const DISCRETE_POLE_TOLERANCE = 1e-6;
/** Continuous design sampled at T: |Δz| allowed between the sampled loop's poles and e^{λT}. */
const SAMPLED_POLE_TOLERANCE = 0.05;
const STEP_TOLERANCE = 1e-9;

/** eig of [[A, 0], [−h·S C, I or 0]] − [B; −h·S D]·[K Ki]: the design's state-feedback loop. */
export function stateFeedbackPoles(model: StateSpace, K: Matrix, Ki: Matrix, S: Matrix, h: number): Complex[] {
  const { A, B, C, D } = model;
  const n = A.rows;
  const r = S.rows;
  const hold = model.sampleTime === null ? new Matrix(r, r) : Matrix.eye(r, r);
  const Aaug = blockMatrix([[A, new Matrix(n, r)], [S.mmul(C).mul(-h), hold]]);
  const Baug = blockMatrix([[B], [S.mmul(D).mul(-h)]]);
  return eigenvalues(Aaug.sub(Baug.mmul(blockMatrix([[K, Ki]]))));
}

/**
 * The "implementation-poles" check (the sampled loop's poles `actual` against the design's
 * `expected`, mapped by e^{λT} for a continuous design) and "implementation-stable"; also the
 * pole mismatch for the caller's warning.
 */
export function poleChecks(actual: Complex[], expected: Complex[], continuous: boolean): { checks: ImplementationCheck[]; mismatch: number } {
  const mismatch = poleSetMismatch(actual, expected);
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
  return { checks, mismatch };
}

/** Plant (sampled) closed with u = Cc xc + Dc [r; y]; outputs [y; u]; states [x; xc]. */
export function closeLoop(plant: StateSpace, c: SampledController, nr: number): { A: Matrix; model: StateSpace } {
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
export function designLoop(model: StateSpace, sf: { K: Matrix; Ki: Matrix; S: Matrix; Nref: Matrix }): StateSpace {
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
export function stepCheck(plant: StateSpace, c: SampledController, reference: StateSpace, steps: number, T: number): ImplementationCheck {
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

export function expComplex(z: Complex, T: number): Complex {
  const mag = Math.exp(z.re * T);
  return { re: mag * Math.cos(z.im * T), im: mag * Math.sin(z.im * T) };
}


function add(a: readonly number[], b: readonly number[]): number[] {
  return a.map((v, i) => v + b[i]!);
}

function mulVec(M: Matrix, v: readonly number[]): number[] {
  const out = new Array<number>(M.rows).fill(0);
  for (let i = 0; i < M.rows; i++) for (let j = 0; j < M.columns; j++) out[i] = out[i]! + M.get(i, j) * v[j]!;
  return out;
}
