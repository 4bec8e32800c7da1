/**
 * Matrix exponential e^A by scaling and squaring with Padé approximants.
 */
import { Matrix } from "ml-matrix";
import { EngineError } from "../errors";
import { doubleArray, productIntoArray } from "./arrayKernels";
import { solveInPlaceArray } from "./arraySolve";
import { matrixAdoptingRowMajor } from "./denseKernels";
import { planExpm, SLOT_A, SLOT_A2, SLOT_A4, SLOT_A6, SLOT_A8, THETA_13_BOUND, type ExpmPlan, type Triangle } from "./expmSelection";
import { asMatrix, requireFinite, requireSquare, type MatrixInput } from "./validate";

// Coefficients b_0..b_m of the [m/m] Padé numerator p_m(x) = Σ b_j x^j (Higham 2005, eq. (2.2)
// scaled to integers as in §2; the denominator is p_m(−x)).
const PADE_3 = [120, 60, 12, 1];
const PADE_5 = [30240, 15120, 3360, 420, 30, 1];
const PADE_7 = [17297280, 8648640, 1995840, 277200, 25200, 1512, 56, 1];
const PADE_9 = [17643225600, 8821612800, 2075673600, 302702400, 30270240, 2162160, 110880, 3960, 90, 1];
const PADE_13 = [
  64764752532480000, 32382376266240000, 7771770303897600, 1187353796428800, 129060195264000,
  10559470521600, 670442572800, 33522128640, 1323241920, 40840800, 960960, 16380, 182, 1,
];
const PADE_LOW: Readonly<Record<number, readonly number[]>> = { 3: PADE_3, 5: PADE_5, 7: PADE_7, 9: PADE_9 };

/**
 * Computes e^A = Σ_k A^k / k! for a real square A: n×n.
 *
 * Requires: A square, non-empty, finite.
 *
 * Method: scaling and squaring with [m/m] Padé approximants r_m, m ∈ {3, 5, 7, 9, 13}, by
 * A. H. Al-Mohy and N. J. Higham, "A new scaling and squaring algorithm for the matrix
 * exponential", SIAM J. Matrix Anal. Appl. 31(3):970–989, 2009, Algorithm 3.1: m and the
 * number of squarings s are chosen from d_k = ‖A^k‖₁^{1/k} (k = 4, 6, 8, 10), which can lie far
 * below ‖A‖₁ for non-normal A, with the correction ℓ(A, m) against overscaling (details and
 * the constants' numerical check in expmSelection.ts; ‖A⁸‖₁ and ‖A¹⁰‖₁ are estimated with the
 * Higham–Tisseur block estimator when not formed). On every fixture the (m, s) chosen equal
 * scipy.linalg.expm's. The approximants are evaluated as in N. J. Higham, "The scaling and
 * squaring method for the matrix exponential revisited", SIAM J. Matrix Anal. Appl.
 * 26(4):1179–1193, 2005, eqs. (2.3)–(2.4), reusing the powers A², A⁴, A⁶ (A⁸) formed for the
 * selection (their scaling 2^-2s, … after s is known, Algorithm 3.1 line 17, folded into the
 * coefficients). For triangular A the squaring phase recomputes the diagonal and first
 * off-diagonal exactly at every step (Al-Mohy & Higham 2009, Code Fragment 2.1), and the other
 * triangle of the result is exactly zero. Preprocessing (Higham 2005, §2, "trace reduction"):
 * A − μI with μ = tr(A)/n is used when it lowers ‖A‖₁, and the result is multiplied by e^μ;
 * e^A = e^μ e^{A−μI} exactly because μI commutes with A. Above ‖A‖₁ = 2^90 (after the shift) A is
 * pre-scaled by a power of two so that the powers formed for the selection cannot overflow.
 * Safeguard: when the LU of the Padé denominator reports a pivot below n·ε·‖q_m‖₁ (possible for
 * extremely non-normal A, ‖A‖₁ ≳ 1e15/n with small d_k), the 2005 scaling ‖2^-s A‖₁ ≤ 5.37 with
 * m = 13 is used instead.
 *
 * Cost: degree 13 takes 6 products, one LU solve with n right-hand sides (≈ (2·6 + 8/3)n³ flops
 * in all) and s squarings (2n³ each); the lower degrees take 3–5 products. ℓ(A, m) costs up to
 * 2m+1 vector–matrix products (usually 1–3: see expmSelection.ts). ‖A⁸‖₁, ‖A¹⁰‖₁ cost one
 * product each for n ≤ 40, else at most 5 block iterations of the estimator (O(n²) each), and
 * are skipped when bounds decide. The arithmetic runs on number[] (arrayKernels.ts: about 40%
 * faster than Float64Array under V8). Memory: 8 n×n number[] slots (kept between calls: for
 * n ≤ 128 strongly, at most 1 MiB; above through a WeakRef) plus the result.
 *
 * Accuracy: backward error ≤ unit roundoff in exact arithmetic (Al-Mohy & Higham 2009, §3);
 * the forward error is bounded by cond_exp(A)·ε. Measured relative Frobenius difference from
 * scipy.linalg.expm fixtures (stiff, non-normal up to ‖A‖₁ = 1e8, triangular, nilpotent): ≤ 1e-12
 * (the Al-Mohy–Higham example [[1, b], [0, −1]] is within 4ε of its closed form up to b = 1e17).
 * Before returning, the result is checked to be finite.
 *
 * Errors: "empty", "shape-mismatch" (non-square), "non-finite" (NaN/Infinity entries, or e^A
 * overflows the double range), "singular" (the Padé denominator q_m(A) is numerically singular
 * even after the safeguard; cannot happen in exact arithmetic, so it signals a corrupted
 * input), "invalid-argument" (not a matrix).
 *
 * Example:
 * ```ts
 * const E = expm([[0, -1], [1, 0]]);           // rotation by 1 rad
 * Math.abs(E.get(0, 0) - Math.cos(1)) < 1e-15;  // residual check against the closed form
 * ```
 */
export function expm(A: MatrixInput): Matrix {
  const a = asMatrix(A, "A");
  requireSquare(a, "A");
  const n = a.rows;
  const slots = workspace(n);
  // The copy checks finiteness on the way; requireFinite then names the offending entry.
  if (!copyMatrixInto(a, slots[SLOT_A]!)) requireFinite(a, "A");
  return matrixAdoptingRowMajor(expmOfFirstSlot(slots, n, "A"), n, n);
}

/**
 * e^A for a row-major n×n Float64Array (not modified); the kernel behind `expm` and the Van
 * Loan integrals. Inputs must already be validated (finite, square). Returns a new array.
 */
export function expmRowMajor(input: Float64Array, n: number, name: string): Float64Array {
  const slots = workspace(n);
  const a = slots[SLOT_A]!;
  for (let i = 0; i < n * n; i++) a[i] = input[i]!;
  return expmOfFirstSlot(slots, n, name);
}

// Eight n×n slots for every temporary, as number[] of unboxed doubles (arrayKernels.ts explains
// why: about 40% faster products than Float64Array). Such arrays are slow to allocate (≈ 15 ns
// per entry, 5 ms for the slots at n = 200), so they are kept between calls (module level,
// grown on demand; expm is synchronous and calls nothing that re-enters it, and the result is
// always copied into a fresh Float64Array). Orders up to 128 are held strongly (at most 1 MiB);
// larger workspaces only through a WeakRef, so repeated calls reuse them while the garbage
// collector may still reclaim them between bursts.
const SLOTS = 8;
const LARGEST_CACHED_ORDER = 128;
let sharedSlots: number[][] = [];
let sharedCapacity = 0;
let largeSlots: WeakRef<number[][]> | null = null;

function workspace(n: number): number[][] {
  const nn = n * n;
  if (n > LARGEST_CACHED_ORDER) {
    const cached = largeSlots?.deref();
    if (cached !== undefined && cached[0]!.length >= nn) return cached;
    const fresh = freshSlots(nn);
    largeSlots = new WeakRef(fresh);
    return fresh;
  }
  if (sharedCapacity < nn) { sharedSlots = freshSlots(nn); sharedCapacity = nn; }
  return sharedSlots;
}

function freshSlots(nn: number): number[][] {
  const slots: number[][] = [];
  for (let k = 0; k < SLOTS; k++) slots.push(doubleArray(nn));
  return slots;
}

interface MatrixRows { data?: unknown }

// Row-major copy of the Matrix m (n×n) into out, reading ml-matrix's row arrays directly;
// returns false if an entry is NaN or ±Infinity.
function copyMatrixInto(m: Matrix, out: number[]): boolean {
  const n = m.rows;
  const rows = (m as unknown as MatrixRows).data;
  let finite = true;
  if (Array.isArray(rows) && rows.length === n) {
    for (let i = 0; i < n; i++) {
      const row = rows[i] as unknown;
      if (!(row instanceof Float64Array) || row.length !== n) return copyMatrixByEntries(m, out);
      const io = i * n;
      for (let j = 0; j < n; j++) {
        const v = row[j]!;
        out[io + j] = v;
        if (v - v !== 0) finite = false;
      }
    }
    return finite;
  }
  return copyMatrixByEntries(m, out);
}

function copyMatrixByEntries(m: Matrix, out: number[]): boolean {
  const n = m.rows;
  let finite = true;
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < n; j++) {
      const v = m.get(i, j);
      out[i * n + j] = v;
      if (v - v !== 0) finite = false;
    }
  }
  return finite;
}

// e^A for A in slots[0] (overwritten, as are the other slots); returns a new n×n array.
function expmOfFirstSlot(slots: number[][], n: number, name: string): Float64Array {
  const plan = planExpm(slots, n, name);
  if (plan.zero) {
    // A = μI: e^A = e^μ I exactly (checkedResult applies e^μ).
    const identity = slots[SLOT_A2]!;
    for (let i = 0; i < n * n; i++) identity[i] = 0;
    for (let i = 0; i < n; i++) identity[i * n + i] = 1;
    return checkedResult(identity, n, name, plan, 0);
  }
  const { triangle, bands } = plan;
  // r_m(2^-s A) lands in slot 1 (A², no longer needed by then).
  let squarings = plan.squarings;
  let result = slots[SLOT_A2]!;
  try {
    if (plan.degree === 13) padeDegree13(slots, n, plan.padeSquarings, result, name);
    else padeLowDegree(slots, n, plan.degree, plan.highestPower, result, name);
  } catch (error) {
    // For extremely non-normal A (‖A‖₁ beyond about 1e15/n with small d_k) the chosen s can
    // leave q_m(2^-s A) with a pivot below n·ε·‖q_m‖₁, which the LU reports as singular. Fall
    // back to the 2005 scaling ‖2^-s A‖₁ ≤ θ_13 (Higham 2005, Algorithm 2.3), under which q_13 is
    // well conditioned; slot 0 still holds A (the evaluations do not modify it).
    if (!(error instanceof EngineError) || error.kind !== "singular") throw error;
    const s = Math.max(plan.padeSquarings, Math.ceil(Math.log2(plan.scaledNorm / THETA_13_BOUND)), 0);
    if (plan.degree === 13 && s === plan.padeSquarings) throw error;
    squarings = s + plan.preScaling;
    productIntoArray(slots[SLOT_A]!, slots[SLOT_A]!, null, n, n, n, slots[SLOT_A2]!);
    productIntoArray(slots[SLOT_A2]!, slots[SLOT_A2]!, null, n, n, n, slots[SLOT_A4]!);
    productIntoArray(slots[SLOT_A4]!, slots[SLOT_A2]!, null, n, n, n, slots[SLOT_A6]!);
    result = slots[SLOT_A2]!;
    padeDegree13(slots, n, s, result, name);
  }
  if (bands !== null && squarings > 0) exactTriangleBands(result, n, bands, triangle, squarings, false);
  // Squaring phase: X ← X² s times, alternating between two free slots.
  let spare = slots[SLOT_A4]!;
  for (let k = 1; k <= squarings; k++) {
    productIntoArray(result, result, null, n, n, n, spare);
    const t = result; result = spare; spare = t;
    if (bands !== null) exactTriangleBands(result, n, bands, triangle, squarings - k, true);
  }
  // e^T is exactly triangular with T; row interchanges in the LU of a lower-triangular q_m
  // leave rounding-level entries above the diagonal, so restore the zeros.
  if (triangle !== "none") clearOppositeTriangle(result, n, triangle);
  return checkedResult(result, n, name, plan, squarings);
}

function clearOppositeTriangle(x: number[], n: number, triangle: Triangle): void {
  for (let i = 0; i < n; i++) {
    if (triangle === "upper") for (let j = 0; j < i; j++) x[i * n + j] = 0;
    else for (let j = i + 1; j < n; j++) x[i * n + j] = 0;
  }
}

// Copies the n×n result into a new Float64Array, multiplied by e^μ, checking every entry is
// finite in the same pass.
function checkedResult(x: number[], n: number, name: string, plan: ExpmPlan, squarings: number): Float64Array {
  const mu = plan.traceShift;
  const scale = mu !== 0 ? Math.exp(mu) : 1;
  const out = new Float64Array(n * n);
  let finite = true;
  for (let i = 0; i < n * n; i++) {
    const v = x[i]! * scale;
    out[i] = v;
    if (v - v !== 0) finite = false; // NaN or ±Infinity
  }
  if (!finite) {
    throw new EngineError("non-finite", `e^${name} overflows the double range (‖${name}‖₁ = ${plan.inputNorm.toExponential(3)})`, {
      argument: name, squarings, traceShift: mu,
    });
  }
  return out;
}

// [m/m] Padé for m ≤ 9 (Higham 2005, eq. (2.3)): U = A Σ_odd b_j A^{j−1}, V = Σ_even b_j A^j,
// r_m = (V − U)^{-1} (V + U), with the even powers A², …, A^{m−1} from the selection (those it
// did not need are formed here). The result is written to `out`, which may be
// slot 1 (A² is consumed before the solve).
function padeLowDegree(slots: number[][], n: number, m: number, highest: number, out: number[], name: string): void {
  const b = PADE_LOW[m]!;
  const nn = n * n;
  // Powers the selection did not need to form (it decides from bounds where it can).
  if (m >= 5 && highest < 4) productIntoArray(slots[SLOT_A2]!, slots[SLOT_A2]!, null, n, n, n, slots[SLOT_A4]!);
  if (m >= 7 && highest < 6) productIntoArray(slots[SLOT_A4]!, slots[SLOT_A2]!, null, n, n, n, slots[SLOT_A6]!);
  if (m === 9 && highest < 8) productIntoArray(slots[SLOT_A4]!, slots[SLOT_A4]!, null, n, n, n, slots[SLOT_A8]!);
  const uInner = slots[5]!, v = slots[6]!;
  const powerSlots = [SLOT_A2, SLOT_A4, SLOT_A6, SLOT_A8];
  // k-th pass adds b_{2k+1} A^{2k} to uInner and b_{2k} A^{2k} to v (the first pass assigns).
  for (let k = 1; 2 * k <= m; k++) {
    const p = slots[powerSlots[k - 1]!]!;
    const bOdd = b[2 * k + 1]!, bEven = b[2 * k]!;
    if (k === 1) {
      for (let i = 0; i < nn; i++) { const x = p[i]!; uInner[i] = bOdd * x; v[i] = bEven * x; }
    } else {
      for (let i = 0; i < nn; i++) { const x = p[i]!; uInner[i] += bOdd * x; v[i] += bEven * x; }
    }
  }
  for (let i = 0; i < n; i++) { uInner[i * n + i] += b[1]!; v[i * n + i] += b[0]!; }
  const u = productIntoArray(slots[SLOT_A]!, uInner, null, n, n, n, slots[7]!);
  padeSolve(u, 1, v, n, out, name);
}

// [13/13] Padé (Higham 2005, eq. (2.4)) at 2^-s A from the unscaled A, A², A⁴, A⁶ in slots
// 0–3 (Al-Mohy & Higham 2009, Algorithm 3.1 line 17). The powers of two are folded into
// coefficients instead of scaling the slots: b_j·2^-k is exact, so every entry is rounded
// exactly as with scaled powers. w₁, z₁ carry the 2^-6s of the A⁶ they multiply, and U the
// 2^-s of A. Beyond s = 40 the folded factors (down to 2^-12s) could underflow, so A⁶ is
// scaled in place instead. A itself is never modified. Three products: A⁶ w₁ + w₂, A·w,
// A⁶ z₁ + z₂.
function padeDegree13(slots: number[][], n: number, s: number, target: number[], name: string): void {
  const b = PADE_13;
  const nn = n * n;
  const a = slots[SLOT_A]!, a2 = slots[SLOT_A2]!, a4 = slots[SLOT_A4]!, a6 = slots[SLOT_A6]!;
  const w1 = slots[4]!; // b13 A⁶ + b11 A⁴ + b9 A²
  const z1 = slots[5]!; // b12 A⁶ + b10 A⁴ + b8 A²
  const w2 = slots[6]!; // b7 A⁶ + b5 A⁴ + b3 A² + b1 I
  const z2 = slots[7]!; // b6 A⁶ + b4 A⁴ + b2 A² + b0 I
  const f1 = Math.pow(2, -s), f2 = f1 * f1, f4 = f2 * f2, f6 = f4 * f2;
  let g6 = f6; // factor still to apply to A⁶ (its entries here, and in w₁, z₁)
  if (s > 40) {
    for (let i = 0; i < nn; i++) a6[i] *= f6;
    g6 = 1;
  }
  // A⁶ entries need g6 here; w₁ and z₁ need one more g6 for the A⁶ that multiplies them.
  const b2 = b[2]! * f2, b3 = b[3]! * f2, b4 = b[4]! * f4, b5 = b[5]! * f4, b6 = b[6]! * g6, b7 = b[7]! * g6;
  const b8 = b[8]! * f2 * g6, b9 = b[9]! * f2 * g6, b10 = b[10]! * f4 * g6, b11 = b[11]! * f4 * g6;
  const b12 = b[12]! * g6 * g6, b13 = b[13]! * g6 * g6;
  for (let i = 0; i < nn; i++) {
    const x2 = a2[i]!, x4 = a4[i]!, x6 = a6[i]!;
    w1[i] = b13 * x6 + b11 * x4 + b9 * x2;
    z1[i] = b12 * x6 + b10 * x4 + b8 * x2;
    w2[i] = b7 * x6 + b5 * x4 + b3 * x2;
    z2[i] = b6 * x6 + b4 * x4 + b2 * x2;
  }
  for (let i = 0; i < n; i++) { w2[i * n + i] += b[1]!; z2[i * n + i] += b[0]!; }
  const w = productIntoArray(a6, w1, w2, n, n, n, w2); // A⁶ w1 + w2
  const u = productIntoArray(a, w, null, n, n, n, a2); // A² is no longer needed: its slot takes U
  const v = productIntoArray(a6, z1, z2, n, n, n, z2); // A⁶ z1 + z2
  padeSolve(u, f1, v, n, target, name);
}

// r = (V − U)^{-1}(V + U) with U = uScale·u (uScale a power of two) by LU with partial
// pivoting: `target` receives V + U and then the solution (it may be u's own storage); v is
// overwritten by V − U.
function padeSolve(u: number[], uScale: number, v: number[], n: number, target: number[], name: string): void {
  for (let i = 0; i < n * n; i++) {
    const x = uScale * u[i]!, y = v[i]!;
    target[i] = y + x;
    v[i] = y - x;
  }
  solveInPlaceArray(v, target, n, n, `the Padé denominator q_m(${name})`);
}

// Al-Mohy & Higham 2009, Code Fragment 2.1: in X ≈ e^{2^-i T} (T triangular) replace the
// diagonal by exp(2^-i t_jj) and the first off-diagonal by the exact (1,2) entry of the
// exponential of 2^-i [[t_jj, t_j,j+1], [0, t_j+1,j+1]] (fragment and formula recalled from
// memory; the triangular fixtures of generate_expm_selection.py check the result against scipy,
// which implements the same fragment). The lower-triangular case is the transpose. The
// off-diagonal is only replaced after a squaring (i < s), as in the fragment (`offDiagonal`).
function exactTriangleBands(x: number[], n: number, saved: Float64Array, triangle: Triangle, i: number, offDiagonal: boolean): void {
  const scale = Math.pow(2, -i);
  for (let j = 0; j < n; j++) x[j * n + j] = Math.exp(scale * saved[j]!);
  if (!offDiagonal) return;
  for (let j = 0; j + 1 < n; j++) {
    const value = twoByTwoExpOffDiagonal(scale * saved[j]!, scale * saved[j + 1]!, scale * saved[n + j]!);
    if (triangle === "upper") x[j * n + j + 1] = value;
    else x[(j + 1) * n + j] = value;
  }
}

// (1,2) entry of exp([[a, c], [0, b]]) = c (e^b − e^a)/(b − a). For |b − a| ≤ 2 it is
// evaluated as c·e^{(a+b)/2}·sinh(h)/h with h = (b − a)/2, free of cancellation; otherwise the
// difference quotient has no cancellation to fear (e^{−|b−a|} < 0.14) and cannot overflow
// spuriously the way e^{(a+b)/2}·sinh(h) can.
function twoByTwoExpOffDiagonal(a: number, b: number, c: number): number {
  const h = (b - a) / 2;
  if (Math.abs(h) <= 1) return c * Math.exp((a + b) / 2) * (h === 0 ? 1 : Math.sinh(h) / h);
  return (c * (Math.exp(b) - Math.exp(a))) / (b - a);
}
