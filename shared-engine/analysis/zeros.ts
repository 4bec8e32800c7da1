/**
 * Transmission zeros of a state-space model from its system pencil, by the orthogonal
 * reduction of Emami-Naeini & Van Dooren to a regular pencil and the QZ algorithm.
 */
import { Matrix } from "ml-matrix";
import { EngineError } from "../errors";
import { generalizedEigenvalues, type Complex } from "../linalg";
import type { StateSpace } from "../model";
import { minimalPart } from "./minimalRealization";
import { leftCompression, product, stackRows, subBlock } from "./structure";

export interface ChannelSelection {
  /** Input indices (0-based) to keep; default all. */
  inputs?: number[];
  /** Output indices (0-based) to keep; default all. */
  outputs?: number[];
}

export interface TransmissionZeros {
  /** Finite transmission zeros (conjugate pairs adjacent). */
  finite: Complex[];
  /** Number of infinite zeros counted with their orders (for SISO: the relative degree). */
  infiniteCount: number;
  /** Modes of the selected channel's realization that are uncontrollable or unobservable
   *  (input/output decoupling zeros); they are not transmission zeros and are not in `finite`. */
  decouplingZeros: Complex[];
  /** Rank threshold used in every compression. */
  tolerance: number;
}

interface Quadruple { A: Matrix; B: Matrix; C: Matrix; D: Matrix }

/**
 * Computes: the transmission zeros of G(s) = C(sI − A)⁻¹B + D restricted to the selected
 *   inputs and outputs (A: n×n, B: n×m, C: p×n, D: p×m): the finite s where the system matrix
 *   P(s) = [[A − sI, B], [C, D]] of a minimal realization loses rank below its normal rank,
 *   and the number of infinite zeros. Square and non-square systems, D = 0 or not.
 * Requires: a valid model; indices in range without repeats. A channel with no states, inputs
 *   or outputs has no finite zeros.
 * Method: (1) minimal realization of the channel by two staircases (Van Dooren 1981), the
 *   removed modes are reported as `decouplingZeros`; (2) A. Emami-Naeini & P. Van Dooren,
 *   "Computation of zeros of linear multivariable systems", Automatica 18(4):415–430, 1982:
 *   the procedure REDUCE repeatedly compresses the rows of D and the columns of the rows of C
 *   that D does not reach (orthogonal SVD compressions), deleting states that the zero dynamics
 *   force to zero, until D has full row rank; the same is applied to the dual (transposed)
 *   system; then a column compression [C D]W = [0 D̃] leaves a square regular pencil
 *   ([A B]W − s[I 0]W) on the first n_f columns, whose generalized eigenvalues (QZ, Moler &
 *   Stewart 1973) are the finite zeros. The infinite-zero count is Σ_k k·(σ_{k+1} − σ_k) over the
 *   ranks σ_k of D at the successive REDUCE steps (EVD 1982 §4). No polynomial is ever formed.
 * Cost: O((n + p)·(n + m)²) per REDUCE step, at most n steps, plus ≈ 30n_f³ for QZ.
 * Accuracy: all transformations orthogonal, so the zeros are exact for a pencil perturbed by
 *   O(tol) with tol = 10·max(n+p, n+m)·ε·‖[A B; C D]‖_F; zeros of multiplicity k lose up to a
 *   factor ε^(1/k). Result entries are checked finite.
 * Errors: "invalid-argument" (bad channel indices), "singular" (the reduced pencil is singular:
 *   the channel is degenerate), "no-convergence" from QZ, "internal" if the reduction did not
 *   end in a square pencil.
 * Example:
 *   transmissionZeros(createStateSpace({ A: [[-1, 0], [0, -2]], B: [[1], [1]], C: [[1, -2]] }))
 *   // G = 1/(s+1) − 2/(s+2) = −s/((s+1)(s+2)): finite [0], infiniteCount 1
 *   // check: σ_min([A − zI, B; C, D]) ≈ 0 at z = 0
 */
export function transmissionZeros(model: StateSpace, channel: ChannelSelection = {}): TransmissionZeros {
  const inputs = checkIndices(channel.inputs, model.B.columns, "channel.inputs", "inputs");
  const outputs = checkIndices(channel.outputs, model.C.rows, "channel.outputs", "outputs");
  const n = model.A.rows;
  const B = pickColumns(model.B, inputs);
  const C = pickRows(model.C, outputs);
  const D = pickColumns(pickRows(model.D, outputs), inputs);
  const m = B.columns;
  const p = C.rows;
  const norm = Math.hypot(model.A.norm("frobenius"), frob(B), frob(C), frob(D));
  const tolerance = 10 * Math.max(n + p, n + m, 1) * Number.EPSILON * norm;
  if (n === 0 || m === 0 || p === 0) return { finite: [], infiniteCount: 0, decouplingZeros: [], tolerance };
  const minimal = minimalPart(model.A, B, C);
  const decouplingZeros = [...minimal.removedUncontrollable, ...minimal.removedUnobservable];
  const first = reduce({ A: minimal.A, B: minimal.B, C: minimal.C, D }, tolerance);
  const ranks = first.ranks;
  let infiniteCount = 0;
  for (let k = 1; k < ranks.length; k++) infiniteCount += k * (ranks[k]! - ranks[k - 1]!);
  const dual = reduce({ A: first.sys.A.transpose(), B: first.sys.C.transpose(), C: first.sys.B.transpose(), D: first.sys.D.transpose() }, tolerance);
  const Af = dual.sys.A.transpose();
  const Bf = dual.sys.C.transpose();
  const Cf = dual.sys.B.transpose();
  const Df = dual.sys.D.transpose();
  const nf = Af.rows;
  if (nf === 0) return { finite: [], infiniteCount, decouplingZeros, tolerance };
  const mf = Bf.columns;
  // Column compression [Cf Df]·W = [0, D̃]: W's trailing columns span the row space of [Cf Df].
  const CD = new Matrix(Cf.rows, nf + mf);
  if (Cf.rows > 0) {
    CD.setSubMatrix(Cf, 0, 0);
    if (mf > 0) CD.setSubMatrix(Df, 0, nf);
  }
  const { rank, U } = leftCompression(CD.transpose(), tolerance);
  const kept = nf + mf - rank;
  if (kept !== nf) {
    throw new EngineError("internal", `the zero reduction ended with a ${nf}×${kept} pencil instead of a square one`, { nf, kept, rank });
  }
  const W = subBlock(U, 0, nf + mf, rank, nf + mf); // null space of [Cf Df]
  const AB = new Matrix(nf, nf + mf);
  AB.setSubMatrix(Af, 0, 0);
  if (mf > 0) AB.setSubMatrix(Bf, 0, nf);
  const pencilA = AB.mmul(W);
  const pencilE = subBlock(W, 0, nf, 0, nf);
  let values;
  try {
    values = generalizedEigenvalues(pencilA, pencilE);
  } catch (error) {
    if (error instanceof EngineError && error.kind === "singular") {
      throw new EngineError("singular", "the system pencil of the selected channel is degenerate (rank-deficient for every s); its zeros are not isolated", { ...error.details });
    }
    throw error;
  }
  const finite: Complex[] = [];
  for (const v of values) {
    if (v.value === null) continue;
    if (!Number.isFinite(v.value.re) || !Number.isFinite(v.value.im)) {
      throw new EngineError("non-finite", "a computed transmission zero is not finite", {});
    }
    finite.push(v.value);
  }
  return { finite, infiniteCount, decouplingZeros, tolerance };
}

/**
 * REDUCE (Emami-Naeini & Van Dooren 1982, §4): returns a system with the same finite zeros and
 * D of full row rank, and the rank of D at each step.
 */
function reduce(start: Quadruple, tol: number): { sys: Quadruple; ranks: number[] } {
  let { A, B, C, D } = start;
  const ranks: number[] = [];
  for (let guard = 0; guard <= start.A.rows + start.C.rows + 1; guard++) {
    const p = C.rows;
    const n = A.rows;
    if (p === 0) return { sys: { A, B, C, D }, ranks };
    // Step 1: row compression of D, Uᵀ D = [0; D̄] with D̄ (σ×m) of full row rank.
    const { rank: sigma, U } = leftCompression(D, tol);
    ranks.push(sigma);
    if (sigma === p) return { sys: { A, B, C, D }, ranks };
    const mu = p - sigma;
    const Ut = reorderColumns(U, sigma).transpose(); // null directions of Dᵀ first
    const Cr = product(Ut, C);
    const Dr = product(Ut, D);
    const C1 = subBlock(Cr, 0, mu, 0, n);
    const C2 = subBlock(Cr, mu, p, 0, n);
    const Dbar = subBlock(Dr, mu, p, 0, D.columns);
    if (n === 0) return { sys: { A, B, C: C2, D: Dbar }, ranks };
    // Step 2: column compression of C1, C1·V = [0, C̃] with C̃ (μ×ρ) of full column rank.
    const { rank: rho, U: Vfull } = leftCompression(C1.transpose(), tol);
    if (rho === 0) return { sys: { A, B, C: C2, D: Dbar }, ranks: [...ranks.slice(0, -1), sigma] };
    const V = reorderColumns(Vfull, rho);
    const At = V.transpose().mmul(A).mmul(V);
    const Bt = product(V.transpose(), B);
    const C2t = product(C2, V);
    const k = n - rho;
    // The ρ states in range(C1ᵀ) vanish on the zero dynamics: their equations become outputs.
    A = subBlock(At, 0, k, 0, k);
    B = subBlock(Bt, 0, k, 0, Bt.columns);
    C = stackRows(subBlock(At, k, n, 0, k), subBlock(C2t, 0, sigma, 0, k));
    D = stackRows(subBlock(Bt, k, n, 0, Bt.columns), Dbar);
  }
  throw new EngineError("internal", "the zero reduction did not terminate", { ranks });
}

/** Columns [rank..end, 0..rank−1] of U: the complement first, the range last. */
function reorderColumns(U: Matrix, rank: number): Matrix {
  const n = U.columns;
  const out = new Matrix(U.rows, n);
  for (let j = 0; j < n; j++) {
    const src = j < n - rank ? rank + j : j - (n - rank);
    for (let i = 0; i < U.rows; i++) out.set(i, j, U.get(i, src));
  }
  return out;
}

function frob(M: Matrix): number {
  return M.rows * M.columns === 0 ? 0 : M.norm("frobenius");
}

function checkIndices(given: number[] | undefined, count: number, name: string, what: string): number[] {
  if (given === undefined) return Array.from({ length: count }, (_, i) => i);
  if (!Array.isArray(given)) throw new EngineError("invalid-argument", `${name} must be a list of ${what} indices`, { argument: name });
  const seen = new Set<number>();
  for (const i of given) {
    if (!Number.isInteger(i) || i < 0 || i >= count) {
      throw new EngineError("invalid-argument", `${name} contains ${String(i)}; ${what} indices must be integers from 0 to ${count - 1}`, { argument: name, value: i, count });
    }
    if (seen.has(i)) throw new EngineError("invalid-argument", `${name} lists index ${i} twice`, { argument: name, value: i });
    seen.add(i);
  }
  return [...given];
}

function pickColumns(M: Matrix, cols: number[]): Matrix {
  const out = new Matrix(M.rows, cols.length);
  for (let i = 0; i < M.rows; i++) cols.forEach((j, k) => out.set(i, k, M.get(i, j)));
  return out;
}

function pickRows(M: Matrix, rows: number[]): Matrix {
  const out = new Matrix(rows.length, M.columns);
  rows.forEach((i, k) => { for (let j = 0; j < M.columns; j++) out.set(k, j, M.get(i, j)); });
  return out;
}
