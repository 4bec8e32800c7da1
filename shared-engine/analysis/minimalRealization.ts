/**
 * Minimal realization: removes the uncontrollable, then the unobservable part of a model by
 * two orthogonal staircase reductions (a Kalman decomposition restricted to what is kept).
 */
import { Matrix } from "ml-matrix";
import { eigenvalues, type Complex } from "../linalg";
import { stateSpaceFromMatrices, type StateSpace } from "../model";
import { checkTolerance, controllabilityStaircase, product, subBlock } from "./structure";

/** Result of reducing a triple (A, B, C) with an orthonormal basis T: A_r = TᵀAT, B_r = TᵀB, C_r = CT. */
export interface MinimalPart {
  A: Matrix;
  B: Matrix;
  C: Matrix;
  /** n×r, orthonormal columns: the kept coordinates are x_r = Tᵀx (x ≈ T·x_r on the kept part). */
  basis: Matrix;
  removedUncontrollable: Complex[];
  removedUnobservable: Complex[];
  tolerance: { controllability: number; observability: number };
}

/**
 * Computes: the minimal part of (A: n×n, B: n×m, C: p×n): first the controllable part of
 *   (A, B), then the observable part of what remains, with the modes removed at each stage.
 * Requires: finite matrices of matching sizes; tol ≥ 0 (default: `staircaseTolerance` per step).
 * Method, Cost, Accuracy: see `minimalRealization`. Errors: "invalid-argument" (bad tol).
 * Example: minimalPart(new Matrix([[-1, 0], [0, -2]]), new Matrix([[1], [0]]), new Matrix([[1, 1]])).A is [[−1]].
 */
export function minimalPart(A: Matrix, B: Matrix, C: Matrix, tol?: number): MinimalPart {
  const n = A.rows;
  // Stage 1 (controllability staircase on (A, B)): keep the first n_c staircase coordinates.
  const s1 = controllabilityStaircase(A, B, tol);
  const nc = s1.controllableDimension;
  const removedUncontrollable = nc < n ? eigenvalues(subBlock(s1.A, nc, n, nc, n)) : [];
  const V1 = subBlock(s1.Z, 0, n, 0, nc);
  const A1 = subBlock(s1.A, 0, nc, 0, nc);
  const B1 = subBlock(s1.B, 0, nc, 0, B.columns);
  const C1 = product(C, V1);
  // Stage 2 (dual staircase on (A1ᵀ, C1ᵀ)): keep the observable coordinates of the controllable part.
  const s2 = controllabilityStaircase(A1.transpose(), C1.transpose(), tol);
  const no = s2.controllableDimension;
  const removedUnobservable = no < nc ? eigenvalues(subBlock(s2.A, no, nc, no, nc)) : [];
  const W2 = subBlock(s2.Z, 0, nc, 0, no);
  const basis = product(V1, W2);
  return {
    A: subBlock(s2.A, 0, no, 0, no).transpose(),
    B: product(W2.transpose(), B1),
    C: subBlock(s2.B, 0, no, 0, C.rows).transpose(),
    basis,
    removedUncontrollable,
    removedUnobservable,
    tolerance: { controllability: s1.tolerance, observability: s2.tolerance },
  };
}

export interface MinimalRealizationResult {
  /** The reduced model (order r ≤ n); input, output and disturbance names and units kept. */
  model: StateSpace;
  /** Modes removed as uncontrollable from [B F] (inputs and disturbances). */
  removedUncontrollable: Complex[];
  /** Modes removed as unobservable at y (among the controllable ones). */
  removedUnobservable: Complex[];
  /** n − r. */
  removedStateCount: number;
  /** True when the kept states are original states (names kept); else states are named xr1, xr2, … */
  stateNamesKept: boolean;
  /** n×r orthonormal basis T of the kept coordinates: x_r = Tᵀx. */
  basis: Matrix;
  tolerance: { controllability: number; observability: number };
}

/**
 * Computes: a minimal realization (A_r, B_r, C_r, D, F_r, E) of `model` (A: n×n, B: n×m,
 *   C: p×n, F: n×q) with the same transfer functions from u and from w to y, where
 *   A_r = TᵀAT, B_r = TᵀB, F_r = TᵀF, C_r = CT for an n×r orthonormal T; plus the removed modes.
 *   Controllability is judged from [B F] so the disturbance response is kept too.
 * Requires: a valid model; tol ≥ 0 finite (default 100·n·ε·max(‖A‖_F, ‖[B F]‖_F), and with
 *   ‖C‖_F for the dual step).
 * Method: two orthogonal staircase reductions (P. Van Dooren, "The generalized eigenstructure
 *   problem in linear system theory", IEEE TAC 26(1), 1981; A. Varga, "Minimal realization
 *   procedures based on balancing and related techniques", 1991, uses the same first stage):
 *   keep the controllable part, then the observable part of it. When T's columns are (to
 *   1e-10) a subset of the coordinate axes, the original entries A[S,S], B[S,:], C[:,S] and the
 *   state names are used instead.
 * Cost: two staircases, O(n³) typically (O(n⁴) single-input worst case); memory O(n²).
 * Accuracy: backward stable; the reduced model's transfer function matches the original to
 *   O(tol·‖G‖) relative where discarded entries were below tol. Outputs are finite (checked by
 *   the model constructor).
 * Errors: "invalid-argument" (bad tol); "no-convergence" from the eigenvalue iteration.
 * Example:
 *   const r = minimalRealization(createStateSpace({ A: [[-1, 0], [0, -2]], B: [[1], [0]], C: [[1, 1]] }));
 *   // r.model has A = [[−1]], r.removedUncontrollable = [−2], states ["x1"]; G(s) unchanged
 */
export function minimalRealization(model: StateSpace, tol?: number): MinimalRealizationResult {
  if (tol !== undefined) checkTolerance(tol, "tol");
  const n = model.A.rows;
  const m = model.B.columns;
  const BF = new Matrix(n, m + model.F.columns);
  if (n > 0) {
    if (m > 0) BF.setSubMatrix(model.B, 0, 0);
    if (model.F.columns > 0) BF.setSubMatrix(model.F, 0, m);
  }
  const part = minimalPart(model.A, BF, model.C, tol);
  const r = part.A.rows;
  const common = {
    removedUncontrollable: part.removedUncontrollable,
    removedUnobservable: part.removedUnobservable,
    removedStateCount: n - r,
    tolerance: part.tolerance,
  };
  if (r === n) {
    return { ...common, model, stateNamesKept: true, basis: Matrix.eye(n) };
  }
  const axes = coordinateAxes(part.basis);
  const keep = { D: model.D, E: model.E, sampleTime: model.sampleTime };
  if (axes) {
    const pick = (M: Matrix, rows: number[] | null, cols: number[] | null): Matrix => {
      const rr = rows ?? Array.from({ length: M.rows }, (_, i) => i);
      const cc = cols ?? Array.from({ length: M.columns }, (_, j) => j);
      const out = new Matrix(rr.length, cc.length);
      rr.forEach((i, a) => cc.forEach((j, b) => out.set(a, b, M.get(i, j))));
      return out;
    };
    const names = { ...model.names, states: axes.map((i) => model.names.states[i]!) };
    const units = { ...model.units, states: axes.map((i) => model.units.states[i]!) };
    const basis = new Matrix(n, r);
    axes.forEach((i, k) => basis.set(i, k, 1));
    const reduced = stateSpaceFromMatrices({
      A: pick(model.A, axes, axes), B: pick(model.B, axes, null), C: pick(model.C, null, axes),
      F: pick(model.F, axes, null), ...keep, names, units,
    });
    return { ...common, model: reduced, stateNamesKept: true, basis };
  }
  const Tt = part.basis.transpose();
  const states = Array.from({ length: r }, (_, i) => `xr${i + 1}`);
  const reduced = stateSpaceFromMatrices({
    A: part.A,
    B: subBlock(part.B, 0, r, 0, m),
    C: part.C,
    F: product(Tt, model.F),
    ...keep,
    names: { ...model.names, states },
    units: { ...model.units, states: states.map(() => "") },
  });
  return { ...common, model: reduced, stateNamesKept: false, basis: part.basis };
}

/** Indices S (increasing) when the columns of T span exactly {e_i : i ∈ S} (row norms 0 or 1 to 1e-10). */
function coordinateAxes(T: Matrix): number[] | null {
  const S: number[] = [];
  for (let i = 0; i < T.rows; i++) {
    let s = 0;
    for (let j = 0; j < T.columns; j++) s += T.get(i, j) ** 2;
    if (Math.abs(s - 1) <= 1e-10) S.push(i);
    else if (s > 1e-10) return null;
  }
  return S.length === T.columns ? S : null;
}
