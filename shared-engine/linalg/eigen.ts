/**
 * Eigenvalues and eigenvectors of a real square matrix: balance → Hessenberg → Francis QR,
 * and for eigenvectors back substitution on the Schur form followed by the back
 * transformation. The balanced pipeline is the one to use for eigenvalues of user models;
 * `realSchur` is for invariant subspaces of A itself.
 */
import { Matrix } from "ml-matrix";
import { EngineError } from "../errors";
import type { Complex } from "./complex";
import { balanceInPlace } from "./balance";
import { identityFloat64, reduceToHessenbergInPlace } from "./hessenberg";
import { defaultSchurIterationLimit, francisQRInPlace, outOfRangeExponent } from "./schur";
import { asMatrix, requireSquareFinite, toFloat64 } from "./validate";

const ULP = Number.EPSILON;
const SAFE_MIN = 2.2250738585072014e-308;
/** Rescale the partial eigenvector when an entry passes this, long before overflow. */
const RESCALE_THRESHOLD = 1e100;

interface Prepared {
  n: number;
  t: Float64Array;
  z: Float64Array | null;
  perm: Int32Array;
  scale: Float64Array;
  /** Eigenvalues of the (possibly scaled) problem: λ(A) = up·(wr + i·wi). */
  wr: Float64Array;
  wi: Float64Array;
  /** A power of two: 1, or 2^e when A was scaled by 2^−e (see `prepare`). */
  up: number;
}

function prepare(A: Matrix | number[][], wantVectors: boolean): Prepared {
  const M = asMatrix(A, "A");
  requireSquareFinite(M, "A");
  const n = M.rows;
  const t = toFloat64(M);
  // Very large or very small matrices (largest entry outside [2^−300, 2^300]): products of two
  // entries would overflow or underflow in balancing, shifts and reflectors, so work on 2^−e·A
  // (largest entry in [1, 2)). Exact for a power of two; eigenvectors are unchanged, the
  // eigenvalues are scaled back on output (LAPACK's drivers scale likewise).
  let big = 0;
  for (let i = 0; i < n * n; i++) big = Math.max(big, Math.abs(t[i]));
  const e = outOfRangeExponent(big);
  const up = 2 ** e;
  if (e !== 0) {
    const down = 2 ** -e;
    for (let i = 0; i < n * n; i++) t[i] *= down;
  }
  const perm = new Int32Array(n);
  const scale = new Float64Array(n);
  const { low, high } = balanceInPlace(t, n, true, true, perm, scale);
  const z = wantVectors ? identityFloat64(n) : null;
  reduceToHessenbergInPlace(t, n, low, high, z);
  const wr = new Float64Array(n);
  const wi = new Float64Array(n);
  // eigenvalues isolated by the permutation sit on the diagonal
  for (let i = 0; i < n; i++) {
    if (i < low || i > high) wr[i] = t[i * n + i];
  }
  francisQRInPlace(t, n, low, high, wantVectors, z, wr, wi, defaultSchurIterationLimit(n));
  for (let i = 0; i < n; i++) {
    if (!Number.isFinite(wr[i]) || !Number.isFinite(wi[i])) {
      throw new EngineError("non-finite", `eigenvalue ${i + 1} of A is not finite (overflow during the QR iteration)`, {
        argument: "A",
        index: i,
      });
    }
  }
  return { n, t, z, perm, scale, wr, wi, up };
}

/**
 * Computes: the n eigenvalues λ of A (n×n), as complex numbers in the order of the diagonal
 * of the (balanced) real Schur form; each conjugate pair adjacent, positive imaginary part
 * first. Real eigenvalues have im === 0 exactly.
 *
 * Requires: A square, non-empty, finite (Matrix or rows of numbers).
 *
 * Method: balancing (Parlett & Reinsch, Numer. Math. 13, 1969), Householder reduction of the
 * unisolated window to Hessenberg form (Golub & Van Loan 4th ed., Alg. 7.4.2), then Francis
 * implicit double-shift QR (Francis, Computer J. 4, 1961–62) with Ahues–Tisseur deflation,
 * updating only the active window since T is not needed (as LAPACK dhseqr with job 'E').
 *
 * Cost: about 10/3·n³ + 4·n³ flops; O(n²) memory; at most 30·max(10, n) QR sweeps.
 *
 * Accuracy: each computed eigenvalue is exact for a matrix A + E with ‖E‖ ≈ n·ε·‖A‖ (backward
 * stable); the forward error is that times the eigenvalue's condition number. Before return
 * every value is checked to be finite.
 *
 * Errors: "empty", "shape-mismatch", "non-finite", "invalid-argument" (bad input);
 * "no-convergence" when the sweep limit is reached (details.iterations).
 *
 * Example:
 *   eigenvalues([[0, 1], [-2, -3]]); // [{re:-1,im:0},{re:-2,im:0}] in some order
 *   // residual check: |det(A − λI)| = |λ² + 3λ + 2| < 1e-14 for each λ
 */
export function eigenvalues(A: Matrix | number[][]): Complex[] {
  const { n, wr, wi, up } = prepare(A, false);
  const out: Complex[] = new Array(n);
  for (let i = 0; i < n; i++) out[i] = { re: up * wr[i], im: wi[i] === 0 ? 0 : up * wi[i] }; // never −0
  return out;
}

/**
 * Computes: eigenvalues λ_k and right eigenvectors v_k of A (n×n) with A v_k = λ_k v_k,
 * ‖v_k‖₂ = 1, and the entry of largest modulus of v_k real and positive (the first such entry
 * when several tie). values follow the same order as `eigenvalues`; the vector of the −im
 * member of a pair is the conjugate of the +im one. vectors[k] is an array of n Complex.
 *
 * Requires: A square, non-empty, finite. For defective eigenvalues the returned vectors of a
 * Jordan block are (nearly) parallel, as any computed basis must be.
 *
 * Method: balance, Hessenberg, Francis QR accumulating Z (B = Z T Zᵀ); then, as LAPACK
 * dtrevc, back substitution for each eigenvalue on (T − λI)x = 0 with x fixed to 1 at the
 * eigenvalue's diagonal position (for a 2×2 block, the exact eigenvector of the block), solving
 * the 1×1 and 2×2 diagonal blocks above with pivots perturbed to max(ε|λ|, safe minimum)
 * when nearly singular, and rescaling when entries grow past 1e100; finally v = P·D·Z·x
 * (undoing the balancing) normalised. Reference: Anderson et al., "LAPACK Users' Guide",
 * 3rd ed., SIAM 1999, §2.4.8 and routine dtrevc; Golub & Van Loan 4th ed. §7.6.4.
 *
 * Cost: about 25·n³ flops (Schur form with Z) + n³ (back substitution) + 2n³ (back
 * transformation); O(n²) memory; at most 30·max(10, n) QR sweeps.
 *
 * Accuracy: for well-conditioned eigenvalues ‖A v − λ v‖ ≈ n·ε·‖A‖; every entry is checked
 * finite before return.
 *
 * Errors: as `eigenvalues`; "non-finite" if a vector could not be represented.
 *
 * Example:
 *   const { values, vectors } = eigenvectors([[2, 0], [0, 3]]);
 *   // vectors[k] is ±e_k; ‖A·v − λ·v‖ < 1e-15 for each pair
 */
export function eigenvectors(A: Matrix | number[][]): { values: Complex[]; vectors: Complex[][] } {
  const { n, t, z, perm, scale, wr, wi, up } = prepare(A, true);
  const zz = z as Float64Array;
  const values: Complex[] = new Array(n);
  const vectors: Complex[][] = new Array(n);
  const xr = new Float64Array(n);
  const xi = new Float64Array(n);
  const yr = new Float64Array(n);
  const yi = new Float64Array(n);
  for (let k = 0; k < n; k++) {
    const pair = wi[k] > 0 && k + 1 < n;
    backSubstitute(t, n, k, pair, wr[k], wi[k], xr, xi);
    const top = pair ? k + 1 : k; // x is zero below `top`
    // y = Z·x (only columns 0..top of Z contribute)
    for (let i = 0; i < n; i++) {
      let sr = 0;
      let si = 0;
      const row = i * n;
      for (let j = 0; j <= top; j++) {
        sr += zz[row + j] * xr[j];
        si += zz[row + j] * xi[j];
      }
      yr[i] = sr;
      yi[i] = si;
    }
    // undo balancing: v[perm[i]] = scale[i]·y[i]
    const v: Complex[] = new Array(n);
    for (let i = 0; i < n; i++) v[perm[i]] = { re: scale[i] * yr[i], im: scale[i] * yi[i] };
    normalise(v, k);
    values[k] = { re: up * wr[k], im: wi[k] === 0 ? 0 : up * wi[k] };
    vectors[k] = v;
    if (pair) {
      values[k + 1] = { re: up * wr[k + 1], im: up * wi[k + 1] };
      vectors[k + 1] = v.map((c) => ({ re: c.re, im: c.im === 0 ? 0 : -c.im }));
      k++;
    }
  }
  return { values, vectors };
}

/** Unit 2-norm, then rotate the phase so the entry of largest modulus is real and positive. */
function normalise(v: Complex[], index: number): void {
  let big = 0;
  let at = 0;
  for (let i = 0; i < v.length; i++) {
    const m = Math.hypot(v[i].re, v[i].im);
    if (m > big) {
      big = m;
      at = i;
    }
  }
  if (!(big > 0) || !Number.isFinite(big)) {
    throw new EngineError("non-finite", `eigenvector ${index + 1} of A could not be represented (norm ${big})`, {
      argument: "A",
      index,
    });
  }
  let s = 0;
  for (const c of v) s += (c.re / big) ** 2 + (c.im / big) ** 2;
  const norm = big * Math.sqrt(s);
  // multiply by conj(v[at])/|v[at]| / norm
  const pr = v[at].re / big;
  const pi = -v[at].im / big;
  const ph = Math.hypot(pr, pi);
  const fr = pr / ph / norm;
  const fi = pi / ph / norm;
  for (let i = 0; i < v.length; i++) {
    const { re, im } = v[i];
    const r = re * fr - im * fi;
    const m = re * fi + im * fr;
    v[i] = { re: r === 0 ? 0 : r, im: m === 0 ? 0 : m }; // no −0 in results
  }
  v[at] = { re: v[at].re, im: 0 };
}

/**
 * Solves (T − λI)x = 0 on the quasi-triangular row-major T by back substitution (LAPACK
 * dtrevc, right eigenvectors). For a real eigenvalue at k, x[k] = 1; for a pair at (k, k+1)
 * with λ = wr + i·wi (wi > 0), x[k], x[k+1] is the eigenvector of the standardised 2×2 block.
 */
function backSubstitute(t: Float64Array, n: number, k: number, pair: boolean, wr: number, wi: number, xr: Float64Array, xi: Float64Array): void {
  xr.fill(0);
  xi.fill(0);
  const smin = Math.max(ULP * (Math.abs(wr) + Math.abs(wi)), SAFE_MIN / ULP);
  let top: number;
  if (!pair) {
    xr[k] = 1;
    top = k;
    for (let j = 0; j < k; j++) xr[j] = -t[j * n + k];
  } else {
    // block [a b; c a] with b·c < 0: eigenvector for a + i·wi (dtrevc)
    const b = t[k * n + k + 1];
    const c = t[(k + 1) * n + k];
    if (Math.abs(b) >= Math.abs(c)) {
      xr[k] = 1;
      xi[k + 1] = wi / b;
    } else {
      xr[k] = -wi / c;
      xi[k + 1] = 1;
    }
    top = k + 1;
    for (let j = 0; j < k; j++) {
      xr[j] = -xr[k] * t[j * n + k] - xr[k + 1] * t[j * n + k + 1];
      xi[j] = -xi[k] * t[j * n + k] - xi[k + 1] * t[j * n + k + 1];
    }
  }
  // Entries 0..j of (xr, xi) hold the right-hand side until solved.
  let j = k - 1;
  while (j >= 0) {
    const isBlock = j > 0 && t[j * n + j - 1] !== 0;
    if (!isBlock) {
      // (t_jj − λ) x_j = b_j
      let dr = t[j * n + j] - wr;
      const di = -wi;
      if (Math.abs(dr) + Math.abs(di) < smin) dr = smin;
      let q = complexDivide(xr[j], xi[j], dr, di);
      if (!Number.isFinite(q[0]) || !Number.isFinite(q[1])) {
        // the quotient overflowed: scale the whole partial solution so the right-hand side is 1
        scaleAll(xr, xi, top, 1 / (Math.abs(xr[j]) + Math.abs(xi[j])));
        q = complexDivide(xr[j], xi[j], dr, di);
      }
      xr[j] = q[0];
      xi[j] = q[1];
      rescaleIfLarge(xr, xi, j, top);
      const ar = xr[j];
      const ai = xi[j];
      for (let i = 0; i < j; i++) {
        const tij = t[i * n + j];
        xr[i] -= tij * ar;
        xi[i] -= tij * ai;
      }
      j--;
    } else {
      const p = j - 1;
      const saved = [xr[p], xi[p], xr[j], xi[j]];
      solveBlock2(t, n, p, wr, wi, smin, xr, xi);
      if (!Number.isFinite(xr[p] + xi[p] + xr[j] + xi[j])) {
        [xr[p], xi[p], xr[j], xi[j]] = saved;
        scaleAll(xr, xi, top, 1 / Math.max(Math.abs(saved[0]) + Math.abs(saved[1]), Math.abs(saved[2]) + Math.abs(saved[3])));
        solveBlock2(t, n, p, wr, wi, smin, xr, xi);
      }
      rescaleIfLarge(xr, xi, p, top);
      const ar = xr[p];
      const ai = xi[p];
      const br = xr[j];
      const bi = xi[j];
      for (let i = 0; i < p; i++) {
        const tip = t[i * n + p];
        const tij = t[i * n + j];
        xr[i] -= tip * ar + tij * br;
        xi[i] -= tip * ai + tij * bi;
      }
      j -= 2;
    }
  }
}

function rescaleIfLarge(xr: Float64Array, xi: Float64Array, from: number, top: number): void {
  let big = 0;
  for (let i = from; i <= Math.min(from + 1, top); i++) big = Math.max(big, Math.abs(xr[i]) + Math.abs(xi[i]));
  if (big <= RESCALE_THRESHOLD) return;
  scaleAll(xr, xi, top, 1 / big);
}

function scaleAll(xr: Float64Array, xi: Float64Array, top: number, f: number): void {
  for (let i = 0; i <= top; i++) {
    xr[i] *= f;
    xi[i] *= f;
  }
}

function complexDivide(ar: number, ai: number, br: number, bi: number): [number, number] {
  if (Math.abs(br) >= Math.abs(bi)) {
    const r = bi / br;
    const d = br + bi * r;
    return [(ar + ai * r) / d, (ai - ar * r) / d];
  }
  const r = br / bi;
  const d = br * r + bi;
  return [(ar * r + ai) / d, (ai * r - ar) / d];
}

/** Solves the 2×2 complex system (T[p..p+1][p..p+1] − λI) x = b in place, partial pivoting, perturbed pivots. */
function solveBlock2(t: Float64Array, n: number, p: number, wr: number, wi: number, smin: number, xr: Float64Array, xi: Float64Array): void {
  // m = [[m00, m01], [m10, m11]] complex (only the diagonal has an imaginary part, −wi)
  let m00r = t[p * n + p] - wr;
  let m00i = -wi;
  let m01r = t[p * n + p + 1];
  let m01i = 0;
  let m10r = t[(p + 1) * n + p];
  let m10i = 0;
  let m11r = t[(p + 1) * n + p + 1] - wr;
  let m11i = -wi;
  let b0r = xr[p];
  let b0i = xi[p];
  let b1r = xr[p + 1];
  let b1i = xi[p + 1];
  const swap = Math.abs(m10r) + Math.abs(m10i) > Math.abs(m00r) + Math.abs(m00i);
  if (swap) {
    [m00r, m00i, m10r, m10i] = [m10r, m10i, m00r, m00i];
    [m01r, m01i, m11r, m11i] = [m11r, m11i, m01r, m01i];
    [b0r, b0i, b1r, b1i] = [b1r, b1i, b0r, b0i];
  }
  if (Math.abs(m00r) + Math.abs(m00i) < smin) {
    m00r = smin;
    m00i = 0;
  }
  const [lr, li] = complexDivide(m10r, m10i, m00r, m00i);
  let u11r = m11r - (lr * m01r - li * m01i);
  const u11i = m11i - (lr * m01i + li * m01r);
  if (Math.abs(u11r) + Math.abs(u11i) < smin) u11r = smin;
  const c1r = b1r - (lr * b0r - li * b0i);
  const c1i = b1i - (lr * b0i + li * b0r);
  const [x1r, x1i] = complexDivide(c1r, c1i, u11r, u11i);
  const [x0r, x0i] = complexDivide(b0r - (m01r * x1r - m01i * x1i), b0i - (m01r * x1i + m01i * x1r), m00r, m00i);
  xr[p] = x0r;
  xi[p] = x0i;
  xr[p + 1] = x1r;
  xi[p + 1] = x1i;
}
