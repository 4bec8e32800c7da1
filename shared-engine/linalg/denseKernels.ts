/**
 * Row-major Float64Array kernels shared by expm, Van Loan, Sylvester and Lyapunov solvers.
 * Internal to linalg/: public routines take and return ml-matrix `Matrix`; these kernels work
 * on flat copies so inner loops never call Matrix.get/set.
 *
 * Why a register tile: a plain i-k-j triple loop in V8 runs near 1 GFlop/s because every
 * update reloads and stores out[i][j]; a 2-row × 4-column tile held in locals reaches about
 * 3.7–4.6 GFlop/s for n = 20…200 (Node 20; the lower figure once any ArrayBuffer in the
 * isolate has been detached, see arrayKernels.ts). Large products (from 48³ multiply-adds, each
 * operand at most 2^16 entries) are copied into plain number arrays and run through
 * arrayKernels' 3×3 tile, which reaches 4.3–5.0 GFlop/s including the copies at n = 50…200.
 */
import { Matrix } from "ml-matrix";
import { doubleArray, productIntoArray } from "./arrayKernels";
import { solveInPlaceArray } from "./arraySolve";

/** out (m×q) = a (m×p) · b (p×q), all row-major. `out` must not alias `a` or `b`. */
export function multiplyInto<T extends Float64Array>(a: Float64Array, b: Float64Array, m: number, p: number, q: number, out: T): T {
  if (worthArrays(m, p, q)) return productThroughArrays(a, b, null, m, p, q, out);
  return productKernel(a, b, null, m, p, q, out);
}

/**
 * out (m×q) = a (m×p) · b (p×q) + c (m×q), all row-major, each entry rounded as the product
 * followed by one addition (bit-identical to multiplyInto then `+= c`, without the extra pass).
 * `out` may alias `c` but not `a` or `b`.
 */
export function multiplyAddInto<T extends Float64Array>(a: Float64Array, b: Float64Array, c: Float64Array, m: number, p: number, q: number, out: T): T {
  if (worthArrays(m, p, q)) return productThroughArrays(a, b, c, m, p, q, out);
  return productKernel(a, b, c, m, p, q, out);
}

// From this many multiply-adds the copies into number[] pay for themselves (measured: equal
// at n = 32, +10% at 40, +25% at 64, +30% at 100…200 under `npm run bench`).
const ARRAY_PATH_FROM = 48 * 48 * 48;
// Largest operand copied (2^16 entries = 256²): the four copies are cached, so this caps the
// memory held at 2 MiB; larger products stay on the typed path.
const ARRAY_PATH_LARGEST = 1 << 16;

function worthArrays(m: number, p: number, q: number): boolean {
  return m * p * q >= ARRAY_PATH_FROM && m * p <= ARRAY_PATH_LARGEST && p * q <= ARRAY_PATH_LARGEST && m * q <= ARRAY_PATH_LARGEST;
}

let arrayA = doubleArray(0), arrayB = doubleArray(0), arrayC = doubleArray(0), arrayOut = doubleArray(0);

// The product (plus addend) through cached number[] copies and arrayKernels' 3×3 tile. Each
// entry is summed in the same order as productKernel, so the result is bit for bit the same.
function productThroughArrays<T extends Float64Array>(a: Float64Array, b: Float64Array, c: Float64Array | null, m: number, p: number, q: number, out: T): T {
  if (arrayA.length < m * p) arrayA = doubleArray(m * p);
  if (arrayB.length < p * q) arrayB = doubleArray(p * q);
  if (arrayOut.length < m * q) arrayOut = doubleArray(m * q);
  const ja = arrayA, jb = arrayB, jo = arrayOut;
  for (let i = 0; i < m * p; i++) ja[i] = a[i]!;
  for (let i = 0; i < p * q; i++) jb[i] = b[i]!;
  let jc: number[] | null = null;
  if (c !== null) {
    if (arrayC.length < m * q) arrayC = doubleArray(m * q);
    jc = arrayC;
    for (let i = 0; i < m * q; i++) jc[i] = c[i]!;
  }
  productIntoArray(ja, jb, jc, m, p, q, jo);
  for (let i = 0; i < m * q; i++) out[i] = jo[i]!;
  return out;
}

// The 2×4 register-tiled product behind multiplyInto / multiplyAddInto (c = null: no addend).
function productKernel<T extends Float64Array>(a: Float64Array, b: Float64Array, c: Float64Array | null, m: number, p: number, q: number, out: T): T {
  const q4 = q - (q % 4);
  const m2 = m - (m % 2);
  for (let i = 0; i < m2; i += 2) {
    const i0 = i * p;
    const i1 = i0 + p;
    const o0 = i * q;
    const o1 = o0 + q;
    for (let j = 0; j < q4; j += 4) {
      let c00 = 0, c01 = 0, c02 = 0, c03 = 0, c10 = 0, c11 = 0, c12 = 0, c13 = 0;
      for (let k = 0, kb = j; k < p; k++, kb += q) {
        const a0 = a[i0 + k]!;
        const a1 = a[i1 + k]!;
        const b0 = b[kb]!, b1 = b[kb + 1]!, b2 = b[kb + 2]!, b3 = b[kb + 3]!;
        c00 += a0 * b0; c01 += a0 * b1; c02 += a0 * b2; c03 += a0 * b3;
        c10 += a1 * b0; c11 += a1 * b1; c12 += a1 * b2; c13 += a1 * b3;
      }
      if (c !== null) {
        c00 += c[o0 + j]!; c01 += c[o0 + j + 1]!; c02 += c[o0 + j + 2]!; c03 += c[o0 + j + 3]!;
        c10 += c[o1 + j]!; c11 += c[o1 + j + 1]!; c12 += c[o1 + j + 2]!; c13 += c[o1 + j + 3]!;
      }
      out[o0 + j] = c00; out[o0 + j + 1] = c01; out[o0 + j + 2] = c02; out[o0 + j + 3] = c03;
      out[o1 + j] = c10; out[o1 + j + 1] = c11; out[o1 + j + 2] = c12; out[o1 + j + 3] = c13;
    }
    for (let j = q4; j < q; j++) {
      let c0 = 0, c1 = 0;
      for (let k = 0, kb = j; k < p; k++, kb += q) {
        const bk = b[kb]!;
        c0 += a[i0 + k]! * bk;
        c1 += a[i1 + k]! * bk;
      }
      if (c !== null) { c0 += c[o0 + j]!; c1 += c[o1 + j]!; }
      out[o0 + j] = c0;
      out[o1 + j] = c1;
    }
  }
  for (let i = m2; i < m; i++) {
    const io = i * p;
    for (let j = 0; j < q; j++) {
      let acc = 0;
      for (let k = 0, kb = j; k < p; k++, kb += q) acc += a[io + k]! * b[kb]!;
      out[i * q + j] = c !== null ? acc + c[i * q + j]! : acc;
    }
  }
  return out;
}

/** a (m×p) · b (p×q) into a new array. */
export function multiply(a: Float64Array, b: Float64Array, m: number, p: number, q: number): Float64Array<ArrayBuffer> {
  const out = new Float64Array(m * q);
  multiplyInto(a, b, m, p, q, out);
  return out;
}

/** Transpose of a row-major m×n array (a new n×m array). */
export function transpose(a: Float64Array, m: number, n: number): Float64Array<ArrayBuffer> {
  const out = new Float64Array(m * n);
  for (let i = 0; i < m; i++) for (let j = 0; j < n; j++) out[j * m + i] = a[i * n + j]!;
  return out;
}

/** Row-major 1-norm (maximum absolute column sum) of an m×n array. */
export function oneNormRowMajor(a: Float64Array, m: number, n: number): number {
  const sums = new Float64Array(n);
  for (let i = 0; i < m; i++) {
    const io = i * n;
    for (let j = 0; j < n; j++) sums[j] += Math.abs(a[io + j]!);
  }
  let best = 0;
  for (let j = 0; j < n; j++) if (sums[j]! > best || Number.isNaN(sums[j]!)) best = sums[j]!;
  return best;
}

/**
 * Solves M X = R in place (R becomes X) for square M (n×n, destroyed: holds its LU factors)
 * and R (n×q), by LU with partial pivoting (Golub & Van Loan, "Matrix Computations", 4th ed.,
 * Alg. 3.4.1 for the pivoting, §3.2.9 for the blocked right-looking form; unblocked up to
 * n = 32). The arithmetic is arraySolve's `solveInPlaceArray`: M and R are copied into cached
 * number[] arrays and back (O(n² + nq), against 2/3·n³ + 2n²q flops). Throws "singular" naming
 * `what` when a pivot is ≤ n·ε·‖M‖₁.
 */
export function solveInPlace(mat: Float64Array, rhs: Float64Array, n: number, q: number, what: string): void {
  const nn = n * n, nq = n * q;
  if (solveMat.length < nn) solveMat = doubleArray(nn);
  if (solveRhs.length < nq) solveRhs = doubleArray(nq);
  const m = solveMat, r = solveRhs;
  for (let i = 0; i < nn; i++) m[i] = mat[i]!;
  for (let i = 0; i < nq; i++) r[i] = rhs[i]!;
  try {
    solveInPlaceArray(m, r, n, q, what, UNBLOCKED_SOLVE);
  } finally {
    // Both come back as the solver left them, also when a pivot failed (M: its LU factors).
    for (let i = 0; i < nn; i++) mat[i] = m[i]!;
    for (let i = 0; i < nq; i++) rhs[i] = r[i]!;
  }
}

// Up to this order the unblocked LU is used (kept from the earlier Float64Array solver, so its
// results are unchanged; measured there: 2–3× faster than the blocked form at n = 10…20).
const UNBLOCKED_SOLVE = 32;
let solveMat = doubleArray(0), solveRhs = doubleArray(0);

/** ‖x‖_F of a flat array, with the scaled sum of squares of the reference BLAS dnrm2. */
export function frobeniusRowMajor(a: Float64Array): number {
  let scale = 0, ssq = 1;
  for (let i = 0; i < a.length; i++) {
    const v = Math.abs(a[i]!);
    if (v === 0) continue;
    if (scale < v) { ssq = 1 + ssq * (scale / v) * (scale / v); scale = v; } else ssq += (v / scale) * (v / scale);
  }
  return scale * Math.sqrt(ssq);
}

/** True when every entry is finite. */
export function allFinite(a: Float64Array): boolean {
  for (let i = 0; i < a.length; i++) if (!Number.isFinite(a[i]!)) return false;
  return true;
}

interface MatrixRows { data?: unknown; rows: number; columns: number }

/**
 * Row-major copy of a Matrix (rows × columns). Reads ml-matrix's row arrays directly when they
 * are present (one bulk copy per row); element-wise `get` costs a call per entry, which
 * dominated the conversions at n ≤ 20. Falls back to `get` for any other storage.
 */
export function rowMajorOf(m: Matrix): Float64Array {
  return copyRowMajorInto(m, new Float64Array(m.rows * m.columns));
}

/** Writes the entries of m (rows × columns) row-major into out[0 .. rows·columns); returns out. */
export function copyRowMajorInto(m: Matrix, out: Float64Array): Float64Array {
  const rows = m.rows, cols = m.columns;
  const data = (m as unknown as MatrixRows).data;
  if (Array.isArray(data) && data.length === rows) {
    for (let i = 0; i < rows; i++) {
      const row = data[i] as unknown;
      if (!(row instanceof Float64Array) || row.length !== cols) return rowMajorBySlowPath(m, out);
      out.set(row, i * cols);
    }
    return out;
  }
  return rowMajorBySlowPath(m, out);
}

function rowMajorBySlowPath(m: Matrix, out: Float64Array): Float64Array {
  const cols = m.columns;
  for (let i = 0; i < m.rows; i++) for (let j = 0; j < cols; j++) out[i * cols + j] = m.get(i, j);
  return out;
}

/**
 * Matrix (rows × cols) whose rows are views into `data` itself (no copy): for results the
 * caller has just allocated and hands over, saving the copy `matrixOfRowMajor` makes. The
 * caller must not keep or reuse `data`. Falls back to a copy if ml-matrix ever stores its
 * rows differently.
 */
export function matrixAdoptingRowMajor(data: Float64Array, rows: number, cols: number): Matrix {
  const m = new Matrix(0, cols) as unknown as MatrixRows;
  if (!Array.isArray(m.data)) return matrixOfRowMajor(data, rows, cols);
  const rowViews = new Array<Float64Array>(rows);
  for (let i = 0; i < rows; i++) rowViews[i] = data.subarray(i * cols, i * cols + cols);
  m.data = rowViews;
  m.rows = rows;
  return m as unknown as Matrix;
}

/**
 * Matrix (rows × cols) holding a copy of the row-major `data`. The rows are views into one
 * fresh buffer (one allocation instead of one per row, as qzKernels.matrixFromRowMajor does);
 * falls back to element-wise `set` if ml-matrix ever stores its rows differently.
 */
export function matrixOfRowMajor(data: Float64Array, rows: number, cols: number): Matrix {
  const own = data.slice(0, rows * cols);
  const m = new Matrix(0, cols) as unknown as MatrixRows;
  if (!Array.isArray(m.data)) {
    const copy = new Matrix(rows, cols);
    for (let i = 0; i < rows; i++) for (let j = 0; j < cols; j++) copy.set(i, j, own[i * cols + j]!);
    return copy;
  }
  const rowViews = new Array<Float64Array>(rows);
  for (let i = 0; i < rows; i++) rowViews[i] = own.subarray(i * cols, i * cols + cols);
  m.data = rowViews;
  m.rows = rows;
  return m as unknown as Matrix;
}
