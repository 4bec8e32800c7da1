/**
 * Reference feedforward for state feedback u = −Kx + N r: N makes the closed-loop DC gain from
 * r to y the identity for the nominal model. Also the small block and steady-state helpers the
 * servo and compensator routines share.
 */
import { Matrix, solve } from "ml-matrix";
import { EngineError } from "../errors";
import { asMatrix, reciprocalCondition, requireFinite, shapeOf, type MatrixInput } from "../linalg";
import type { StateSpace } from "../model";

/** The caveat that goes with every feedforward gain. */
export const FEEDFORWARD_WARNING =
  "reference feedforward is exact only for the nominal model; a model error or a constant disturbance leaves a steady-state error: prefer integral action";

/** Below this σ_min/σ_max the closed-loop DC gain counts as singular (zero at the origin). */
const SINGULAR_DC_GAIN = 1e-12;

export interface ReferenceFeedforward {
  /** m×m feedforward gain: u = −Kx + N r. */
  N: Matrix;
  /** The caveat (nominal model only). */
  warning: string;
  /** p×m closed-loop DC gain G_cl before feedforward ((C − DK)(BK − A)⁻¹B + D, or the sampled analogue). */
  closedLoopDcGain: Matrix;
  /** ‖G_cl·N − I‖_F: how well N inverts the DC gain. */
  residual: number;
}

/**
 * Computes: N = G_cl⁻¹ with G_cl the DC gain of the state-feedback loop x' = (A − BK)x + Bv,
 *   y = (C − DK)x + Dv: continuous G_cl = (C − DK)(BK − A)⁻¹B + D, sampled
 *   G_cl = (C − DK)(I − A + BK)⁻¹B + D (for D = 0 these are C(BK − A)⁻¹B and
 *   C(I − A + BK)⁻¹B). K: m×n; N: m×m. Returned with the nominal-model caveat.
 * Requires: p = m (square DC gain); A − BK without a pole at s = 0 (z = 1); G_cl nonsingular,
 *   i.e. no plant transmission zero at s = 0 (z = 1).
 * Method: direct solve with LU (the classical reference-gain construction, e.g. G. F. Franklin,
 *   J. D. Powell & A. Emami-Naeini, "Feedback Control of Dynamic Systems", §7.6, from memory).
 * Cost: O(n³ + n²m + m³).
 * Accuracy: rcond(G_cl) > 1e-12 checked before inverting; `residual` = ‖G_cl N − I‖_F is
 *   returned (about m·ε/rcond(G_cl)).
 * Errors: "shape-mismatch" (K not m×n, p ≠ m), "non-finite" (K), "singular" (closed-loop
 *   pole at the origin, or G_cl singular: a zero at s = 0 (z = 1)).
 * Example:
 *   // ẋ = −x + u, y = 2x, K = 3: G_cl = 2/4, so N = 2 (hand-worked)
 *   const f = referenceFeedforward(createStateSpace({ A: [[-1]], B: [[1]], C: [[2]] }), new Matrix([[3]]));
 *   // f.N.get(0, 0) === 2, f.residual < 1e-15
 */
export function referenceFeedforward(model: StateSpace, K: MatrixInput): ReferenceFeedforward {
  const n = model.A.rows;
  const m = model.B.columns;
  const p = model.C.rows;
  const Km = asMatrix(K, "K");
  if (Km.rows !== m || Km.columns !== n) {
    throw new EngineError("shape-mismatch", `K must be ${m}×${n}, one row per input and one column per state (B is ${shapeOf(model.B)}, K is ${shapeOf(Km)})`, { argument: "K" });
  }
  requireFinite(Km, "K");
  if (p !== m) {
    throw new EngineError("shape-mismatch", `reference feedforward needs as many outputs as inputs so that the closed-loop DC gain can be inverted (the plant has ${p} outputs and ${m} inputs)`, { outputs: p, inputs: m });
  }
  if (m === 0) {
    throw new EngineError("empty", "reference feedforward needs at least one input and one output (the plant has none)", {});
  }
  const Acl = model.A.clone().sub(model.B.mmul(Km));
  const Ccl = model.C.clone().sub(model.D.mmul(Km));
  const dc = steadyStateGain(Acl, model.B, Ccl, model.D, model.sampleTime, "the state-feedback loop A − BK");
  const rcond = reciprocalCondition(dc.gain);
  const where = model.sampleTime === null ? "s = 0" : "z = 1";
  if (!(rcond > SINGULAR_DC_GAIN)) {
    throw new EngineError("singular", `the closed-loop DC gain from the inputs to the outputs is singular (σ_min/σ_max = ${rcond.toExponential(2)}): the plant has a zero at ${where}, so no constant feedforward gain can set the outputs; use integral action or another output`, { reciprocalCondition: rcond });
  }
  const N = solve(dc.gain, Matrix.eye(m, m));
  const residual = dc.gain.mmul(N).sub(Matrix.eye(m, m)).norm("frobenius");
  return { N, warning: FEEDFORWARD_WARNING, closedLoopDcGain: dc.gain, residual };
}

/**
 * Computes: the steady-state (DC) gain of x' = Ax + Bu, y = Cx + Du (sampleTime null):
 *   G = C(−A)⁻¹B + D; sampled: G = C(I − A)⁻¹B + D. Also rcond of the matrix solved with.
 * Requires: −A (or I − A) nonsingular: no pole at s = 0 (z = 1).
 * Method: LU solve (ml-matrix) after an SVD reciprocal-condition check.
 * Cost: O(n³ + n²(m + p)). Accuracy: about ε/rcond relative.
 * Errors: "singular" when rcond ≤ n·ε (a pole at the origin), naming `what`.
 * Example: steadyStateGain(new Matrix([[-2]]), new Matrix([[1]]), new Matrix([[4]]), new Matrix([[0]]), null, "loop").gain ≈ [[2]]
 */
export function steadyStateGain(
  A: Matrix, B: Matrix, C: Matrix, D: Matrix, sampleTime: number | null, what: string,
): { gain: Matrix; reciprocalCondition: number } {
  const n = A.rows;
  if (n === 0) return { gain: D.clone(), reciprocalCondition: 1 };
  const M = sampleTime === null ? A.clone().mul(-1) : Matrix.eye(n, n).sub(A);
  const rcond = reciprocalCondition(M);
  if (!(rcond > n * Number.EPSILON)) {
    throw new EngineError("singular", `${what} has a pole at ${sampleTime === null ? "s = 0" : "z = 1"} (σ_min/σ_max of ${sampleTime === null ? "A" : "I − A"} is ${rcond.toExponential(2)}), so its DC gain is infinite`, { reciprocalCondition: rcond });
  }
  if (B.columns === 0) return { gain: new Matrix(C.rows, 0), reciprocalCondition: rcond };
  const X = solve(M, B);
  return { gain: C.mmul(X).add(D), reciprocalCondition: rcond };
}

/**
 * Computes: the matrix assembled from a grid of blocks (each block row shares its row count,
 *   each block column its column count; zero-sized blocks allowed). Requires consistent block
 *   sizes. Method: copy. Cost: linear in the entries. Accuracy: exact.
 * Errors: "internal" for inconsistent block sizes (a caller bug).
 * Example: blockMatrix([[Matrix.eye(1, 1), new Matrix(1, 2)]]) is 1×3.
 */
export function blockMatrix(blocks: Matrix[][]): Matrix {
  const heights = blocks.map((row) => row[0]!.rows);
  const widths = blocks[0]!.map((b) => b.columns);
  const out = new Matrix(heights.reduce((a, b) => a + b, 0), widths.reduce((a, b) => a + b, 0));
  let r0 = 0;
  blocks.forEach((row, i) => {
    let c0 = 0;
    row.forEach((block, j) => {
      if (block.rows !== heights[i] || block.columns !== widths[j]) {
        throw new EngineError("internal", `block (${i}, ${j}) is ${shapeOf(block)}, expected ${heights[i]}×${widths[j]}`, {});
      }
      if (block.rows > 0 && block.columns > 0) out.setSubMatrix(block, r0, c0);
      c0 += widths[j]!;
    });
    r0 += heights[i]!;
  });
  return out;
}

/**
 * Computes: the M.rows×count copy of columns start … start + count − 1 of M (count may be 0).
 * Requires: 0 ≤ start, start + count ≤ M.columns (caller's duty; internal helper).
 * Method: copy. Cost: O(rows·count). Accuracy: exact. Errors: none.
 * Example: columnRange(new Matrix([[1, 2, 3]]), 1, 2) is [[2, 3]].
 */
export function columnRange(M: Matrix, start: number, count: number): Matrix {
  const out = new Matrix(M.rows, count);
  for (let i = 0; i < M.rows; i++) for (let j = 0; j < count; j++) out.set(i, j, M.get(i, start + j));
  return out;
}

/**
 * Computes: the indices.length×M.columns copy of the rows `indices` of M; unlike ml-matrix's
 *   subMatrixRow it accepts M with zero columns (a plant without disturbances has E: p×0).
 * Requires: valid row indices (caller's duty; internal helper). Method: copy.
 * Cost: O(indices.length·columns). Accuracy: exact. Errors: none.
 * Example: rowSelection(new Matrix(3, 0), [0, 2]) is 2×0.
 */
export function rowSelection(M: Matrix, indices: readonly number[]): Matrix {
  const out = new Matrix(indices.length, M.columns);
  indices.forEach((i, k) => {
    for (let j = 0; j < M.columns; j++) out.set(k, j, M.get(i, j));
  });
  return out;
}
