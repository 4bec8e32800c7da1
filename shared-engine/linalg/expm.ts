/**
 * Matrix exponential e^A by scaling and squaring with Padé approximants.
 */
import { Matrix } from "ml-matrix";
import { EngineError } from "../errors";
import { matrixOfRowMajor, multiplyAddInto, multiplyInto, oneNormRowMajor, rowMajorOf, solveInPlace } from "./denseKernels";
import { asMatrix, requireSquareFinite, type MatrixInput } from "./validate";

// θ_m from Higham 2005, Table 2.3: the largest ‖A‖₁ for which the [m/m] Padé approximant
// has backward error ≤ 2^-53 (unit roundoff) in exact arithmetic. WARNING: changing these
// changes every discretisation result the app stores.
const THETA_3 = 1.495585217958292e-2;
const THETA_5 = 2.539398330063230e-1;
const THETA_7 = 9.504178996162932e-1;
const THETA_9 = 2.097847961257068e0;
const THETA_13 = 5.371920351148152e0;

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

/**
 * Computes e^A = Σ_k A^k / k! for a real square A: n×n.
 *
 * Requires: A square, non-empty, finite.
 *
 * Method: scaling and squaring with [m/m] Padé approximants, m ∈ {3, 5, 7, 9, 13}, chosen by
 * ‖A‖₁ against the θ_m constants of N. J. Higham, "The scaling and squaring method for the
 * matrix exponential revisited", SIAM J. Matrix Anal. Appl. 26(4):1179–1193, 2005
 * (Algorithm 2.3). Preprocessing (ibid. §2, "trace reduction"): A − μI with μ = tr(A)/n is used
 * when it lowers ‖A‖₁, and the result is multiplied by e^μ afterwards; e^{A} = e^μ e^{A−μI}
 * exactly because μI commutes with A.
 *
 * Cost: for ‖A‖₁ ≤ θ_13, at most 5 matrix products and one LU solve with n right-hand sides,
 * about (2·5 + 8/3)n³ flops; above θ_13, 6 products + the solve + s = ⌈log₂(‖A‖₁/θ_13)⌉
 * squarings (2n³ flops each). Memory: one workspace of 8 n×n doubles plus the result.
 *
 * Accuracy: backward error ≤ unit roundoff in exact arithmetic (Higham 2005, Thm 2.1); the
 * forward error is bounded by cond_exp(A)·ε. Measured relative Frobenius difference from the
 * scipy.linalg.expm fixtures (stiff and non-normal, ‖A‖ up to 1e3): ≤ 1e-12. Before returning
 * the result is checked to be finite.
 *
 * Errors: "empty", "shape-mismatch" (non-square), "non-finite" (NaN/Infinity entries, or e^A
 * overflows the double range), "singular" (the Padé denominator q_m(A) is numerically singular;
 * cannot happen for ‖A‖₁ ≤ θ_m in exact arithmetic, so it signals a corrupted input),
 * "invalid-argument" (not a matrix).
 *
 * Example:
 * ```ts
 * const E = expm([[0, -1], [1, 0]]);           // rotation by 1 rad
 * Math.abs(E.get(0, 0) - Math.cos(1)) < 1e-15;  // residual check against the closed form
 * ```
 */
export function expm(A: MatrixInput): Matrix {
  const a = asMatrix(A, "A");
  requireSquareFinite(a, "A");
  const n = a.rows;
  return matrixOfRowMajor(expmRowMajor(rowMajorOf(a), n, "A"), n, n);
}

let sharedWork = new Float64Array(0);

/**
 * e^A for a row-major n×n Float64Array (not modified); the kernel behind `expm` and the Van
 * Loan integrals. Inputs must already be validated (finite, square).
 */
export function expmRowMajor(input: Float64Array, n: number, name: string): Float64Array {
  const nn = n * n;
  // One workspace for every temporary (eight n×n slots): at n ≤ 20 a dozen separate typed-array
  // allocations cost about as much as the arithmetic.
  // The workspace is kept between calls (module level, grown on demand): expmRowMajor is
  // synchronous and calls nothing that re-enters it, and the result is copied out below.
  // Only small orders are cached (n ≤ 64: at most 256 KiB held); larger ones allocate.
  let work: Float64Array;
  if (n <= 64) {
    if (sharedWork.length < 8 * nn) sharedWork = new Float64Array(8 * nn);
    work = sharedWork;
    work.fill(0, 0, 8 * nn); // the Padé sums rely on zero-initialised slots
  } else {
    work = new Float64Array(8 * nn);
  }
  const a = work.subarray(0, nn);
  a.set(input.subarray(0, nn));
  // Preprocessing: trace reduction (Higham 2005, §2), kept only if it lowers the 1-norm.
  let mu = 0;
  for (let i = 0; i < n; i++) mu += a[i * n + i]!;
  mu /= n;
  let norm = oneNormRowMajor(a, n, n);
  if (mu !== 0) {
    const shiftedNorm = oneNormShifted(a, n, mu);
    if (shiftedNorm < norm) {
      for (let i = 0; i < n; i++) a[i * n + i] -= mu;
      norm = shiftedNorm;
    } else {
      mu = 0;
    }
  }
  if (!Number.isFinite(norm)) {
    throw new EngineError("non-finite", `‖${name}‖₁ overflows the double range; e^${name} cannot be formed`, { argument: name });
  }

  let result: Float64Array;
  let squarings = 0;
  if (norm <= THETA_3) result = padeLowDegree(work, n, PADE_3, name);
  else if (norm <= THETA_5) result = padeLowDegree(work, n, PADE_5, name);
  else if (norm <= THETA_7) result = padeLowDegree(work, n, PADE_7, name);
  else if (norm <= THETA_9) result = padeLowDegree(work, n, PADE_9, name);
  else {
    // Scaling: A / 2^s with s = ⌈log₂(‖A‖₁/θ_13)⌉ (Higham 2005, Algorithm 2.3, line 9).
    squarings = Math.max(0, Math.ceil(Math.log2(norm / THETA_13)));
    const factor = Math.pow(2, -squarings); // power of two: the scaling itself is exact
    for (let i = 0; i < nn; i++) a[i] *= factor;
    result = padeDegree13(work, n, name);
    // Squaring phase: r ← r² s times, ping-ponging between the result slot and a free slot.
    // padeDegree13 leaves r in slot 1; slot 2 (A⁴) is free once the Padé solve is done.
    let spare: Float64Array = slot(work, nn, 2);
    for (let k = 0; k < squarings; k++) {
      multiplyInto(result, result, n, n, n, spare);
      const t = result;
      result = spare;
      spare = t;
    }
  }
  // e^μ scaling and the finiteness check in one pass; the copy detaches the result from `work`.
  const out = new Float64Array(nn);
  const scale = mu !== 0 ? Math.exp(mu) : 1;
  let finite = true;
  for (let i = 0; i < nn; i++) {
    const x = result[i]! * scale;
    out[i] = x;
    if (x - x !== 0) finite = false; // NaN or ±Infinity
  }
  if (!finite) {
    throw new EngineError("non-finite", `e^${name} overflows the double range (‖${name}‖₁ = ${oneNormRowMajor(input, n, n).toExponential(3)})`, {
      argument: name, squarings, traceShift: mu,
    });
  }
  return out;
}

/** 1-norm of A − μI for a row-major n×n `a`, without forming the shifted matrix. */
function oneNormShifted(a: Float64Array, n: number, mu: number): number {
  let best = 0;
  for (let j = 0; j < n; j++) {
    let sum = 0;
    for (let i = 0; i < n; i++) sum += Math.abs(i === j ? a[i * n + j]! - mu : a[i * n + j]!);
    if (sum > best || Number.isNaN(sum)) best = sum;
  }
  return best;
}

// Workspace layout (slots of n² entries in `work`): 0 = A (scaled), 1.. = powers and sums.
function slot(work: Float64Array, nn: number, k: number): Float64Array {
  return work.subarray(k * nn, (k + 1) * nn);
}

// [m/m] Padé for m ≤ 9 (Higham 2005, eq. (2.3)): U = A Σ_odd b_j A^{j−1}, V = Σ_even b_j A^j,
// r_m = (V − U)^{-1} (V + U), using the even powers A², A⁴, … (slots 3.., at most A⁸ in slot 6).
function padeLowDegree(work: Float64Array, n: number, b: number[], name: string): Float64Array {
  const m = b.length - 1;
  const nn = n * n;
  const a = slot(work, nn, 0);
  const uInner = slot(work, nn, 1);
  const v = slot(work, nn, 2);
  const powers: Float64Array[] = []; // powers[k] = A^{2k}, k ≥ 1
  const a2 = multiplyInto(a, a, n, n, n, slot(work, nn, 3));
  powers[1] = a2;
  for (let k = 2; 2 * k < m; k++) powers[k] = multiplyInto(powers[k - 1]!, a2, n, n, n, slot(work, nn, 2 + k));
  for (let i = 0; i < n; i++) { uInner[i * n + i] = b[1]!; v[i * n + i] = b[0]!; }
  for (let k = 1; 2 * k <= m; k++) {
    const p = powers[k]!;
    const bOdd = b[2 * k + 1]!;
    const bEven = b[2 * k]!;
    for (let i = 0; i < nn; i++) { uInner[i] += bOdd * p[i]!; v[i] += bEven * p[i]!; }
  }
  const u = multiplyInto(a, uInner, n, n, n, slot(work, nn, 7));
  return padeSolve(u, v, n, name);
}

// [13/13] Padé (Higham 2005, eq. (2.4)): six products A², A⁴, A⁶, two with A⁶, one with A.
function padeDegree13(work: Float64Array, n: number, name: string): Float64Array {
  const b = PADE_13;
  const nn = n * n;
  const a = slot(work, nn, 0);
  const a2 = multiplyInto(a, a, n, n, n, slot(work, nn, 1));
  const a4 = multiplyInto(a2, a2, n, n, n, slot(work, nn, 2));
  const a6 = multiplyInto(a4, a2, n, n, n, slot(work, nn, 3));
  const w1 = slot(work, nn, 4); // b13 A⁶ + b11 A⁴ + b9 A²
  const z1 = slot(work, nn, 5); // b12 A⁶ + b10 A⁴ + b8 A²
  const w2 = slot(work, nn, 6); // b7 A⁶ + b5 A⁴ + b3 A² + b1 I
  const z2 = slot(work, nn, 7); // b6 A⁶ + b4 A⁴ + b2 A² + b0 I
  // coefficients in locals: the loop below is the only O(n²)-per-entry pass outside products
  const b2 = b[2]!, b3 = b[3]!, b4 = b[4]!, b5 = b[5]!, b6 = b[6]!, b7 = b[7]!;
  const b8 = b[8]!, b9 = b[9]!, b10 = b[10]!, b11 = b[11]!, b12 = b[12]!, b13 = b[13]!;
  for (let i = 0; i < nn; i++) {
    const x2 = a2[i]!, x4 = a4[i]!, x6 = a6[i]!;
    w1[i] = b13 * x6 + b11 * x4 + b9 * x2;
    z1[i] = b12 * x6 + b10 * x4 + b8 * x2;
    w2[i] = b7 * x6 + b5 * x4 + b3 * x2;
    z2[i] = b6 * x6 + b4 * x4 + b2 * x2;
  }
  for (let i = 0; i < n; i++) { w2[i * n + i] += b[1]!; z2[i * n + i] += b[0]!; }
  const w = multiplyAddInto(a6, w1, w2, n, n, n, w2); // A⁶ w1 + w2
  const u = multiplyInto(a, w, n, n, n, a2); // a2 no longer needed: reuse its storage (slot 1)
  const v = multiplyAddInto(a6, z1, z2, n, n, n, z2); // A⁶ z1 + z2
  return padeSolve(u, v, n, name);
}

// r = (V − U)^{-1}(V + U) by LU with partial pivoting; overwrites u and v.
function padeSolve(u: Float64Array, v: Float64Array, n: number, name: string): Float64Array {
  for (let i = 0; i < u.length; i++) {
    const p = v[i]! + u[i]!;
    const q = v[i]! - u[i]!;
    u[i] = p; // u now holds the right-hand side V + U
    v[i] = q; // v now holds the denominator V − U
  }
  solveInPlace(v, u, n, n, `the Padé denominator q_m(${name})`);
  return u;
}
