/**
 * Transfer functions: entry, validation, realization as state space, and conversion of one
 * channel of a model back to a transfer function for display.
 */
import { Matrix } from "ml-matrix";
import { EngineError } from "../errors";
import { cdiv, eigenvalues, type Complex } from "../linalg";
import { balanceStateSpace } from "./balanceStateSpace";
import { evaluatePolynomial, polynomialFromRoots, trimLeadingZeros } from "./polynomial";
import { sisoZerosAndGain } from "./sisoZeros";
import { checkSampleTime, describeSampleTime, dimensions, stateSpaceFromMatrices, type StateSpace } from "./stateSpace";

/**
 * G(s) = num(s)/den(s) (or G(z) when sampled), coefficients highest power first. A MIMO
 * transfer matrix is TransferFunction[][] with one row per output and one column per input.
 */
export interface TransferFunction {
  num: number[];
  den: number[];
  sampleTime: number | null;
}

/**
 * Computes: a validated copy of num/den (leading zeros of num removed; den kept as given).
 * Requires: non-empty finite coefficient lists; den[0] ≠ 0; deg num ≤ deg den (proper).
 * Method: checks only. Cost: O(len). Accuracy: exact.
 * Errors: "empty" (no coefficients), "non-finite" (NaN/Infinity, naming the coefficient),
 *   "invalid-argument" (zero leading denominator coefficient; improper; bad sample time).
 * Example: createTransferFunction([1], [1, 2]).den → [1, 2]; evaluate at s = 0 gives 0.5.
 */
export function createTransferFunction(num: number[], den: number[], sampleTime: number | null = null, name = "transfer function"): TransferFunction {
  const n = checkCoefficients(num, `${name} numerator`);
  const d = checkCoefficients(den, `${name} denominator`);
  if (d[0] === 0) {
    throw new EngineError("invalid-argument", `${name} denominator leading coefficient is zero; write the denominator without leading zeros (it is [${d.join(", ")}])`, {
      argument: "den",
    });
  }
  const trimmed = trimLeadingZeros(n);
  const numDegree = trimmed.length - 1;
  const denDegree = d.length - 1;
  if (numDegree > denDegree && !(trimmed.length === 1 && trimmed[0] === 0)) {
    throw new EngineError("invalid-argument", `improper transfer function (numerator degree ${numDegree} > denominator degree ${denDegree})${name === "transfer function" ? "" : ` in ${name}`}`, {
      numeratorDegree: numDegree,
      denominatorDegree: denDegree,
    });
  }
  return { num: trimmed, den: [...d], sampleTime: checkSampleTime(sampleTime) };
}

/** Checks an object claimed to be a TransferFunction; returns a validated copy. */
export function validateTransferFunction(tf: TransferFunction, name = "transfer function"): TransferFunction {
  if (tf === null || typeof tf !== "object") {
    throw new EngineError("invalid-argument", `${name} must be an object with num, den and sampleTime`, {});
  }
  return createTransferFunction(tf.num, tf.den, tf.sampleTime ?? null, name);
}

/** G at a complex point (s or z): num(s)/den(s) by Horner's rule; ±Infinity parts at a pole. */
export function evaluateTransferFunction(tf: TransferFunction, s: Complex): Complex {
  return cdiv(evaluatePolynomial(tf.num, s), evaluatePolynomial(tf.den, s));
}

/**
 * Computes: a state-space model (A n×n, B n×m, C p×n, D p×m, no disturbances) whose transfer
 *   matrix equals the given SISO transfer function or p×m transfer matrix.
 * Requires: every entry valid (see createTransferFunction), all with the same sample time;
 *   a matrix is a non-empty array of equally long non-empty rows.
 * Method: controllable companion (controller canonical) form per input column. For column j,
 *   entries whose monic denominators are identical share one companion block:
 *   A = [−a₁ … −aₙ; I 0], B = e₁ (column j), C row i = the strictly proper numerator
 *   coefficients (b_k − b₀a_k), D_ij = b₀ (T. Kailath, "Linear Systems", Prentice-Hall 1980,
 *   §2.1, from memory). Entries with different denominators get separate blocks, so a
 *   transfer matrix is realized with n = Σ over columns of the distinct denominator degrees:
 *   NOT minimal in general (use a minimal-realization routine from the analysis layer to
 *   reduce it). Finally the state coordinates are balanced (Parlett–Reinsch diagonal
 *   scaling, see balanceStateSpace) unless options.balance is false; companion matrices
 *   otherwise carry coefficients of widely different size.
 * Cost: O(n²) memory and time for the blocks, plus the balancing sweeps.
 * Accuracy: the unbalanced realization copies (normalized) coefficients exactly; balancing
 *   is exact (powers of two). Output entries are checked finite (normalizing by a tiny den[0]
 *   can overflow: "non-finite").
 * Errors: those of createTransferFunction; "shape-mismatch" for ragged matrices;
 *   "invalid-argument" for mixed sample times; "non-finite" if normalization overflows.
 * Example: realizeTransferFunction({ num: [1], den: [1, 3, 2], sampleTime: null }, { balance: false })
 *   → A = [[−3, −2], [1, 0]], B = [[1], [0]], C = [[0, 1]], D = [[0]];
 *   check C(sI−A)⁻¹B at s = 0 equals 0.5.
 */
export function realizeTransferFunction(tf: TransferFunction | TransferFunction[][], options: { balance?: boolean } = {}): StateSpace {
  const matrix = Array.isArray(tf) ? tf : [[tf]];
  if (matrix.length === 0 || !Array.isArray(matrix[0]) || matrix[0].length === 0) {
    throw new EngineError("empty", "transfer matrix is empty; it needs at least one row and one column", {});
  }
  const p = matrix.length;
  const m = matrix[0].length;
  const entries: TransferFunction[][] = matrix.map((row, i) => {
    if (!Array.isArray(row) || row.length !== m) {
      throw new EngineError("shape-mismatch", `transfer matrix row ${i + 1} has ${Array.isArray(row) ? row.length : 0} entries but row 1 has ${m}`, { row: i });
    }
    return row.map((entry, j) => validateTransferFunction(entry, p === 1 && m === 1 ? "transfer function" : `transfer matrix entry (${i + 1}, ${j + 1})`));
  });
  const sampleTime = entries[0]![0]!.sampleTime;
  entries.forEach((row, i) =>
    row.forEach((entry, j) => {
      if (entry.sampleTime !== sampleTime) {
        throw new EngineError("invalid-argument", `transfer matrix entry (${i + 1}, ${j + 1}) is ${describeSampleTime(entry.sampleTime)} but entry (1, 1) is ${describeSampleTime(sampleTime)}; all entries need the same sample time`, {});
      }
    }),
  );

  interface Block { den: number[]; column: number; rows: Map<number, number[]> }
  const blocks: Block[] = [];
  const D = Matrix.zeros(p, m);
  for (let j = 0; j < m; j++) {
    const columnBlocks: Block[] = [];
    for (let i = 0; i < p; i++) {
      const { num, den } = entries[i]![j]!;
      const lead = den[0]!;
      const a = den.map((x) => x / lead); // monic denominator
      const order = a.length - 1;
      const b = [...new Array<number>(order + 1 - num.length).fill(0), ...num.map((x) => x / lead)];
      D.set(i, j, b[0]!);
      const strictlyProper = a.slice(1).map((ak, k) => b[k + 1]! - b[0]! * ak);
      if (order === 0 || strictlyProper.every((x) => x === 0)) continue; // static entry
      let block = columnBlocks.find((bl) => bl.den.length === a.length && bl.den.every((x, k) => x === a[k]));
      if (!block) {
        block = { den: a, column: j, rows: new Map() };
        columnBlocks.push(block);
      }
      block.rows.set(i, strictlyProper);
    }
    blocks.push(...columnBlocks);
  }
  const n = blocks.reduce((s, bl) => s + bl.den.length - 1, 0);
  const A = Matrix.zeros(n, n);
  const B = Matrix.zeros(n, m);
  const C = Matrix.zeros(p, n);
  let offset = 0;
  for (const block of blocks) {
    const order = block.den.length - 1;
    for (let k = 0; k < order; k++) {
      A.set(offset, offset + k, -block.den[k + 1]!);
      if (k > 0) A.set(offset + k, offset + k - 1, 1);
    }
    B.set(offset, block.column, 1);
    for (const [i, coefficients] of block.rows) coefficients.forEach((x, k) => C.set(i, offset + k, x));
    offset += order;
  }
  for (const [M, name] of [[A, "A"], [C, "C"], [D, "D"]] as const) {
    for (let i = 0; i < M.rows; i++) {
      for (let j = 0; j < M.columns; j++) {
        if (!Number.isFinite(M.get(i, j))) {
          throw new EngineError("non-finite", `realization overflowed: ${name}[${i}][${j}] is ${M.get(i, j)} after dividing by the denominator's leading coefficient`, { argument: name });
        }
      }
    }
  }
  const model = stateSpaceFromMatrices({ A, B, C, D, sampleTime });
  return options.balance === false ? model : balanceStateSpace(model).model;
}

/**
 * Computes: the transfer function g(s) = C_i(sI − A)⁻¹B_j + D_ij of one channel (input j,
 *   output i, 0-based) as num/den with den = ∏(s − λ_k) over all n eigenvalues of A (monic)
 *   and num = k·∏(s − z) over the channel's finite zeros. Pole–zero cancellations
 *   (uncontrollable or unobservable modes of the channel) are NOT removed, so deg den = n.
 * Requires: a valid model; 0 ≤ input < m, 0 ≤ output < p.
 * Method: poles from the eigenvalue routine (balancing + Francis double-shift QR); zeros and
 *   gain by orthogonal deflation (Emami-Naeini & Van Dooren 1982, see sisoZerosAndGain);
 *   both polynomials are then expanded from their roots. The characteristic polynomial is
 *   never formed from a companion matrix and no curve is fitted to samples of g.
 * Cost: two O(n³) eigenvalue problems plus O(n³) for the deflation.
 * Accuracy: poles and zeros are backward stable; the expanded coefficients are as accurate
 *   as polynomial coefficients from accurate roots can be (fine for display at moderate n;
 *   a high-degree polynomial is intrinsically sensitive). Measured against the scipy ss2tf
 *   fixtures (n ≤ 6): coefficient errors ≤ 7e-15 relative to the largest coefficient. The result is checked finite.
 * Errors: "invalid-argument" (channel index out of range), "no-convergence" (eigenvalues).
 * Example: A = [[0,1],[-2,-3]], B = [[0],[1]], C = [[3,1]] → num [1, 3], den [1, 3, 2];
 *   check g(0) = 1.5 against −C A⁻¹ B + D.
 */
export function stateSpaceToTransferFunction(model: StateSpace, input = 0, output = 0): TransferFunction {
  const { n, m, p } = dimensions(model);
  requireChannel(input, m, "input");
  requireChannel(output, p, "output");
  const b = model.B.getColumn(input);
  const c = model.C.getRow(output);
  const d = model.D.get(output, input);
  const den = n === 0 ? [1] : polynomialFromRoots(eigenvalues(model.A));
  const { zeros, gain } = sisoZerosAndGain(model.A, b, c, d);
  const num = gain === 0 ? [0] : polynomialFromRoots(zeros).map((x) => x * gain);
  if (![...num, ...den].every(Number.isFinite)) {
    throw new EngineError("non-finite", `transfer function of channel input ${input} → output ${output} overflowed while expanding its polynomials`, {});
  }
  return { num, den, sampleTime: model.sampleTime };
}

function checkCoefficients(values: unknown, name: string): number[] {
  if (!Array.isArray(values)) {
    throw new EngineError("invalid-argument", `${name} must be a list of coefficients (highest power first)`, { argument: name });
  }
  if (values.length === 0) {
    throw new EngineError("empty", `${name} has no coefficients`, { argument: name });
  }
  values.forEach((v, k) => {
    if (typeof v !== "number") throw new EngineError("invalid-argument", `${name} coefficient ${k} is not a number`, { argument: name, index: k });
    if (!Number.isFinite(v)) throw new EngineError("non-finite", `${name} coefficient ${k} is ${v}; coefficients must be finite`, { argument: name, index: k });
  });
  return values as number[];
}

function requireChannel(index: number, count: number, what: "input" | "output"): void {
  if (!Number.isInteger(index) || index < 0 || index >= count) {
    throw new EngineError("invalid-argument", `${what} index ${index} is out of range (the model has ${count} ${what}s, indices 0..${count - 1})`, {
      argument: what,
      index,
      count,
    });
  }
}
