/**
 * The QZ iteration proper (Moler & Stewart 1973, step 3) on a Hessenberg–triangular pencil held
 * in row-major arrays: deflation, zero chasing on T's diagonal, and double-shift sweeps.
 * Internal to linalg/ (qz.ts is the public surface).
 */
import { EngineError } from "../errors";
import {
  SAFE_MIN, ULP, type PencilWork, givens as givensShared, house3 as house3Shared, negateRow, refl as reflShared, rot as rotShared, rotCols as rotColsShared, rotRows as rotRowsShared, standardizeBlock2,
} from "./qzKernels";

// Module-level aliases of the shared scratch arrays and hot kernels: read through an import
// binding, every access in the inner loops cost a getter call under per-file CommonJS transpilation (tsx, vitest).
const rot = rotShared;
const givens = givensShared;
const house3 = house3Shared;
const rotRows = rotRowsShared;
const rotCols = rotColsShared;
const refl = reflShared;


/**
 * The QZ iteration on a Hessenberg–triangular pencil (Moler & Stewart 1973, step 3), with
 * deflation logic after LAPACK dhgeqz. Returns the number of double-shift sweeps used.
 */
export function iterate(w: PencilWork, maxIterations: number, anorm: number, bnorm: number): number {
  const { n, S, T } = w;
  // With any accumulator the whole Schur form is wanted: rows and columns outside the active
  // block are updated too. Z alone (no Q) gives the same S, T and Z, bit for bit.
  const wantSchur = w.QT !== null || w.ZT !== null;
  // A diagonal entry of T this small is treated as zero: a perturbation of ε·‖E‖_F, which is
  // within the backward error of the whole algorithm.
  const btol = Math.max(SAFE_MIN, ULP * bnorm);
  const atol = Math.max(SAFE_MIN, ULP * anorm);
  const ascale = 1 / Math.max(SAFE_MIN, anorm);
  const bscale = 1 / Math.max(SAFE_MIN, bnorm);
  let ilast = n - 1;
  let total = 0;
  let sinceDeflation = 0;

  // Negligible subdiagonal: relative to its diagonal neighbours (keeps small eigenvalues of
  // graded pencils accurate), falling back to ‖A‖ when both neighbours vanish.
  const negligible = (j: number): boolean => {
    const h = Math.abs(S[j * n + j - 1]);
    const local = Math.abs(S[j * n + j]) + Math.abs(S[(j - 1) * n + j - 1]);
    return h <= Math.max(SAFE_MIN, ULP * (local === 0 ? atol / ULP : local));
  };
  const finish1x1 = (j: number, colEnd: number): void => {
    if (T[j * n + j] < 0) negateRow(w, j, j, colEnd);
    sinceDeflation = 0;
  };

  while (ilast >= 0) {
    const colEnd = wantSchur ? n : ilast + 1;
    if (ilast === 0) {
      finish1x1(0, colEnd);
      break;
    }
    if (negligible(ilast)) {
      S[ilast * n + ilast - 1] = 0;
      finish1x1(ilast, colEnd);
      ilast--;
      continue;
    }
    if (Math.abs(T[ilast * n + ilast]) <= btol) {
      // Infinite eigenvalue at the bottom: a right rotation zeroes s_{l,l−1} (dhgeqz label 70).
      T[ilast * n + ilast] = 0;
      givens(S[ilast * n + ilast], S[ilast * n + ilast - 1]);
      rotCols(S, n, ilast, ilast - 1, rot[0], rot[1], 0, ilast + 1);
      rotCols(T, n, ilast, ilast - 1, rot[0], rot[1], 0, ilast);
      if (w.ZT) rotRows(w.ZT, n, ilast, ilast - 1, rot[0], rot[1], 0, n);
      S[ilast * n + ilast - 1] = 0;
      finish1x1(ilast, colEnd);
      ilast--;
      continue;
    }
    // Find the top of the active block, handling zeros on T's diagonal on the way.
    let ifirst = -1;
    let handledZero = false;
    for (let j = ilast - 1; j >= 0; j--) {
      const atTop = j === 0 || negligible(j);
      if (atTop && j > 0) S[j * n + j - 1] = 0;
      if (Math.abs(T[j * n + j]) <= btol) {
        T[j * n + j] = 0;
        if (atTop) pushZeroOutAtTop(w, j, ilast, colEnd, btol);
        else chaseZeroDown(w, j, ilast, colEnd);
        handledZero = true;
        break;
      }
      if (atTop) {
        ifirst = j;
        break;
      }
    }
    if (handledZero) continue;

    if (ifirst === ilast - 1) {
      // A 2×2 active block: complex pair (deflate both) or real pair (split, then deflate).
      const size = standardizeBlock2(w, ifirst, wantSchur ? 0 : ifirst, colEnd);
      if (size === 2) {
        ilast -= 2;
        sinceDeflation = 0;
      }
      continue;
    }
    total++;
    sinceDeflation++;
    if (total > maxIterations) {
      throw new EngineError(
        "no-convergence",
        `QZ iteration did not converge within ${maxIterations} sweeps (eigenvalue ${ilast + 1} of ${n} not deflated)`,
        { iterations: total - 1, maxIterations, unconvergedIndex: ilast, lastSubdiagonal: Math.abs(S[ilast * n + ilast - 1]) },
      );
    }
    doubleShiftSweep(w, ifirst, ilast, sinceDeflation % 10 === 0, wantSchur ? 0 : ifirst, colEnd, ascale, bscale);
  }
  return total;
}

/**
 * T[j][j] = 0 with s_{j,j−1} = 0 (or j the first row): left rotations zero s_{j+1,j}, s_{j+2,j+1},
 * ... deflating an infinite eigenvalue at row j; stop as soon as the next diagonal entry of T
 * is not negligible (dhgeqz loop 40).
 */
function pushZeroOutAtTop(w: PencilWork, j: number, ilast: number, colEnd: number, btol: number): void {
  const { n, S, T } = w;
  for (let jch = j; jch < ilast; jch++) {
    givens(S[jch * n + jch], S[(jch + 1) * n + jch]);
    const c = rot[0], s = rot[1];
    S[jch * n + jch] = rot[2];
    S[(jch + 1) * n + jch] = 0;
    rotRows(S, n, jch, jch + 1, c, s, jch + 1, colEnd);
    rotRows(T, n, jch, jch + 1, c, s, jch + 1, colEnd);
    if (w.QT) rotRows(w.QT, n, jch, jch + 1, c, s, 0, n);
    if (Math.abs(T[(jch + 1) * n + jch + 1]) > btol) return;
    T[(jch + 1) * n + jch + 1] = 0;
  }
}

/**
 * T[j][j] = 0 inside the active block: chase the zero to T[ilast][ilast] by alternating left
 * rotations (zeroing the next diagonal entry of T) and right rotations (restoring S's
 * Hessenberg form) (Moler & Stewart 1973, §5; dhgeqz loop 50).
 */
function chaseZeroDown(w: PencilWork, j: number, ilast: number, colEnd: number): void {
  const { n, S, T } = w;
  for (let jch = j; jch < ilast; jch++) {
    givens(T[jch * n + jch + 1], T[(jch + 1) * n + jch + 1]);
    let c = rot[0], s = rot[1];
    T[jch * n + jch + 1] = rot[2];
    T[(jch + 1) * n + jch + 1] = 0;
    rotRows(T, n, jch, jch + 1, c, s, jch + 2, colEnd);
    rotRows(S, n, jch, jch + 1, c, s, jch - 1, colEnd);
    if (w.QT) rotRows(w.QT, n, jch, jch + 1, c, s, 0, n);
    givens(S[(jch + 1) * n + jch], S[(jch + 1) * n + jch - 1]);
    c = rot[0]; s = rot[1];
    S[(jch + 1) * n + jch] = rot[2];
    S[(jch + 1) * n + jch - 1] = 0;
    rotCols(S, n, jch, jch - 1, c, s, 0, jch + 1);
    rotCols(T, n, jch, jch - 1, c, s, 0, jch);
    if (w.ZT) rotRows(w.ZT, n, jch, jch - 1, c, s, 0, n);
  }
}

/**
 * One implicit double-shift QZ sweep on the active block [f, l] (size ≥ 3): Golub & Van Loan,
 * Matrix Computations, 4th ed., Algorithm 7.7.2, after Moler & Stewart (1973). Shifts are the
 * eigenvalues of the trailing 2×2 pencil; every 10th sweep without deflation uses an
 * exceptional shift instead. The bulge steps run in pairs (sweepPair), the last one alone when
 * their number is odd (sweepStep).
 */
function doubleShiftSweep(
  w: PencilWork, f: number, l: number, exceptional: boolean, rowStart: number, colEnd: number, ascale: number, bscale: number,
): void {
  const { n, S, T, QT, ZT } = w;
  // The shift polynomial is formed for the pencil scaled to unit norms (as dhgeqz does), so
  // that A·T⁻¹ cannot overflow for pencils like (1e150·A0, 1e-150·E0).
  // Trailing 2×2 of A·T⁻¹ restricted to rows/columns l−1, l: its trace and determinant.
  let n11: number, n12: number, n21: number, n22: number;
  if (exceptional) {
    // Ad hoc shift pair μ ± iω from the size of the last subdiagonals (breaks cycles).
    const omega = Math.abs((S[l * n + l - 1] * ascale) / (T[(l - 1) * n + l - 1] * bscale))
      + Math.abs((S[(l - 1) * n + l - 2] * ascale) / (T[(l - 2) * n + l - 2] * bscale));
    const mu = (S[l * n + l] * ascale) / (T[l * n + l] * bscale) + 0.75 * omega;
    n11 = mu; n22 = mu; n12 = omega; n21 = -omega;
  } else {
    const b1 = T[(l - 1) * n + l - 1] * bscale, b12 = T[(l - 1) * n + l] * bscale, b2 = T[l * n + l] * bscale;
    n11 = S[(l - 1) * n + l - 1] * ascale / b1;
    n21 = S[l * n + l - 1] * ascale / b1;
    n12 = (S[(l - 1) * n + l] * ascale - n11 * b12) / b2;
    n22 = (S[l * n + l] * ascale - n21 * b12) / b2;
  }
  // First column of (M − σ₁I)(M − σ₂I) e₁, M = A·T⁻¹ (upper Hessenberg), written to avoid
  // cancellation: (h11 − n11)(h11 − n22) − n12·n21 + h12·h21.
  const t11 = T[f * n + f] * bscale, t12 = T[f * n + f + 1] * bscale, t22 = T[(f + 1) * n + f + 1] * bscale;
  const h11 = S[f * n + f] * ascale / t11;
  const h21 = S[(f + 1) * n + f] * ascale / t11;
  const h12 = (S[f * n + f + 1] * ascale - h11 * t12) / t22;
  const h22 = (S[(f + 1) * n + f + 1] * ascale - h21 * t12) / t22;
  const h32 = S[(f + 2) * n + f + 1] * ascale / t22;
  const x = (h11 - n11) * (h11 - n22) - n12 * n21 + h12 * h21;
  const y = h21 * (h11 + h22 - n11 - n22);
  const z = h21 * h32;

  // Steps in pairs (k, k+1), fused where both act on the same data (sweepPair); an odd last
  // step runs alone.
  let k = f;
  for (; k + 1 <= l - 2; k += 2) {
    sweepPair(w, k, k > f, x, y, z, l, rowStart, colEnd);
  }
  if (k <= l - 2) sweepStep(w, k, k > f, x, y, z, l, rowStart, colEnd);
  // Final 2-vector step on rows l−1, l and columns l−1, l: a left rotation (c, s) zeroing
  // s_{l,l−2}, then a right rotation (c2, s2) zeroing the fill t_{l,l−1}. S and T share each
  // loop, and so do Qᵀ and Zᵀ (the right rotation is computed from T's two entries first).
  givens(S[(l - 1) * n + l - 2], S[l * n + l - 2]);
  const c = rot[0], s = rot[1];
  S[(l - 1) * n + l - 2] = rot[2];
  S[l * n + l - 2] = 0;
  rotRowsOfBoth(S, T, n, l - 1, c, s, l - 1, colEnd);
  givens(T[l * n + l], T[l * n + l - 1]);
  const c2 = rot[0], s2 = rot[1];
  rotColsOfBoth(S, T, n, l, c2, s2, rowStart, l);
  {
    // Row l of S takes the right rotation too (T's row l is set below).
    const o = l * n + l, x = S[o], y = S[o - 1];
    S[o] = c2 * x + s2 * y;
    S[o - 1] = c2 * y - s2 * x;
  }
  T[l * n + l] = rot[2];
  T[l * n + l - 1] = 0;
  if (QT && ZT) {
    const a = (l - 1) * n, b = a + n;
    for (let k = 0; k < n; k++) {
      const x = QT[a + k], y = QT[b + k];
      QT[a + k] = c * x + s * y;
      QT[b + k] = c * y - s * x;
      const u = ZT[b + k], v = ZT[a + k];
      ZT[b + k] = c2 * u + s2 * v;
      ZT[a + k] = c2 * v - s2 * u;
    }
  } else if (ZT) {
    rotRows(ZT, n, l, l - 1, c2, s2, 0, n);
  }
}

/** Rotation (c, s) of rows r, r+1 of S and of T on columns [c0, c1), in one loop. */
function rotRowsOfBoth(S: Float64Array, T: Float64Array, n: number, r: number, c: number, s: number, c0: number, c1: number): void {
  const a = r * n, b = a + n;
  for (let k = c0; k < c1; k++) {
    const x = S[a + k], y = S[b + k];
    S[a + k] = c * x + s * y;
    S[b + k] = c * y - s * x;
    const u = T[a + k], v = T[b + k];
    T[a + k] = c * u + s * v;
    T[b + k] = c * v - s * u;
  }
}

/** Rotation (c, s) of columns (j, j−1) of S and of T on rows [r0, r1), in one loop. */
function rotColsOfBoth(S: Float64Array, T: Float64Array, n: number, j: number, c: number, s: number, r0: number, r1: number): void {
  for (let k = r0, o = r0 * n + j; k < r1; k++, o += n) {
    const x = S[o], y = S[o - 1];
    S[o] = c * x + s * y;
    S[o - 1] = c * y - s * x;
    const u = T[o], v = T[o - 1];
    T[o] = c * u + s * v;
    T[o - 1] = c * v - s * u;
  }
}

/**
 * Step k of the sweep on its own (Golub & Van Loan Alg. 7.7.2, one bulge position): the left
 * reflector on rows k..k+2 (from the shift vector (x, y, z) at the first step, from column k−1
 * of S otherwise), then the right reflector H and rotation G that restore T's triangularity.
 */
function sweepStep(w: PencilWork, k: number, inner: boolean, x: number, y: number, z: number, l: number, rowStart: number, colEnd: number): void {
  const { n, S, T, QT, ZT } = w;
  if (inner) {
    x = S[k * n + k - 1]; y = S[(k + 1) * n + k - 1]; z = S[(k + 2) * n + k - 1];
  }
  // Left reflector on rows k..k+2 annihilating (y, z).
  house3(x, y, z);
  const tau = refl[0], v1 = refl[1], v2 = refl[2];
  if (tau !== 0) reflectRowsOfBoth(S, T, n, k, v1, v2, tau, k, colEnd);
  if (inner) {
    S[k * n + k - 1] = refl[4];
    S[(k + 1) * n + k - 1] = 0;
    S[(k + 2) * n + k - 1] = 0;
  }
  // Right reflector H on columns k..k+2 annihilating t_{k+2,k}, t_{k+2,k+1}, then a rotation G
  // on columns k, k+1 annihilating t_{k+1,k}; both are applied in one pass as W = H·G.
  const rEnd = Math.min(k + 4, l + 1);
  const o1 = (k + 1) * n, o2 = (k + 2) * n;
  house3(T[o2 + k + 2], T[o2 + k], T[o2 + k + 1]);
  const tz = refl[0], u0 = refl[1], u1 = refl[2], beta = refl[4];
  {
    const x0 = T[o1 + k], x1 = T[o1 + k + 1], x2 = T[o1 + k + 2];
    const wv = tz * (u0 * x0 + u1 * x1 + x2);
    givens(x1 - wv * u1, x0 - wv * u0);
  }
  const c = rot[0], s = rot[1];
  applyRightPairToBoth(S, T, n, k, tz, u0, u1, c, s, rowStart, k + 2);
  applyRightPair(S, n, k, tz, u0, u1, c, s, k + 2, rEnd);
  if (QT && ZT) accumulateStep(QT, ZT, n, k, tau, v1, v2, tz, u0, u1, c, s);
  else if (ZT) accumulateRightStep(ZT, n, k, tz, u0, u1, c, s);
  if (tz !== 0) T[o2 + k + 2] = beta;
  T[o2 + k] = 0;
  T[o2 + k + 1] = 0;
  T[o1 + k] = 0;
}

/**
 * Steps k and k+1 of the sweep (k + 1 ≤ l − 2), with the operations of `sweepStep` fused where
 * the two steps act on the same data: the far columns (≥ k+4) of rows k..k+3 of S and T take
 * both left reflectors in one pass, the rows above the bulge (< k) both right transformations
 * (columns k..k+3) in one pass, and Qᵀ, Zᵀ rows k..k+3 both steps in one pass. Four entries are
 * loaded and stored where two unfused passes would move six (the fusion of the bulge chase in
 * schur.ts). Near the bulge (columns k..k+3, rows k..k+4) the steps run one after the other,
 * since each needs the previous one's result. A left reflector with τ = 0 is applied as the
 * identity (x − 0·w = x), so every entry sees the same values as with `sweepStep` twice.
 */
function sweepPair(w: PencilWork, k: number, inner: boolean, x: number, y: number, z: number, l: number, rowStart: number, colEnd: number): void {
  const { n, S, T, QT, ZT } = w;
  const r0 = k * n, r1 = r0 + n, r2 = r1 + n, r3 = r2 + n;
  // Step k, left reflector P1 = I − ta·(1, a1, a2)(1, a1, a2)ᵀ on rows k..k+2.
  if (inner) {
    x = S[r0 + k - 1]; y = S[r1 + k - 1]; z = S[r2 + k - 1];
  }
  house3(x, y, z);
  const ta = refl[0], a1 = refl[1], a2 = refl[2];
  if (inner) {
    S[r0 + k - 1] = refl[4];
    S[r1 + k - 1] = 0;
    S[r2 + k - 1] = 0;
  }
  const ta1 = ta * a1, ta2 = ta * a2;
  // P1 on the near columns k..k+3 (k+3 ≤ l < colEnd).
  for (let j = k; j <= k + 3; j++) {
    const ws = S[r0 + j] + a1 * S[r1 + j] + a2 * S[r2 + j];
    S[r0 + j] -= ta * ws;
    S[r1 + j] -= ta1 * ws;
    S[r2 + j] -= ta2 * ws;
    const wt = T[r0 + j] + a1 * T[r1 + j] + a2 * T[r2 + j];
    T[r0 + j] -= ta * wt;
    T[r1 + j] -= ta1 * wt;
    T[r2 + j] -= ta2 * wt;
  }
  // Step k, right transformation W1 = H1·G1 on columns k..k+2 (from T's rows k+1, k+2).
  house3(T[r2 + k + 2], T[r2 + k], T[r2 + k + 1]);
  const tz = refl[0], u0 = refl[1], u1 = refl[2], betaT = refl[4];
  {
    const x0 = T[r1 + k], x1 = T[r1 + k + 1], x2 = T[r1 + k + 2];
    const wv = tz * (u0 * x0 + u1 * x1 + x2);
    givens(x1 - wv * u1, x0 - wv * u0);
  }
  const c = rot[0], s = rot[1];
  // Rows k, k+1 of S and T, rows k+2, k+3 of S (rows above k follow in the fused pass).
  applyRightPairToBoth(S, T, n, k, tz, u0, u1, c, s, k, k + 2);
  applyRightPair(S, n, k, tz, u0, u1, c, s, k + 2, k + 4);
  if (tz !== 0) T[r2 + k + 2] = betaT;
  T[r2 + k] = 0;
  T[r2 + k + 1] = 0;
  T[r1 + k] = 0;
  // Step k+1, left reflector P2 = I − tb·(1, b1, b2)(1, b1, b2)ᵀ on rows k+1..k+3, from column k.
  house3(S[r1 + k], S[r2 + k], S[r3 + k]);
  const tb = refl[0], b1 = refl[1], b2 = refl[2];
  S[r1 + k] = refl[4];
  S[r2 + k] = 0;
  S[r3 + k] = 0;
  const tb1 = tb * b1, tb2 = tb * b2;
  for (let j = k + 1; j <= k + 3; j++) {
    const ws = S[r1 + j] + b1 * S[r2 + j] + b2 * S[r3 + j];
    S[r1 + j] -= tb * ws;
    S[r2 + j] -= tb1 * ws;
    S[r3 + j] -= tb2 * ws;
    const wt = T[r1 + j] + b1 * T[r2 + j] + b2 * T[r3 + j];
    T[r1 + j] -= tb * wt;
    T[r2 + j] -= tb1 * wt;
    T[r3 + j] -= tb2 * wt;
  }
  // Far columns k+4..colEnd−1: P1 on rows k..k+2, then P2 on rows k+1..k+3, in one pass.
  for (let j = k + 4; j < colEnd; j++) {
    let x0 = S[r0 + j], x1 = S[r1 + j], x2 = S[r2 + j];
    const x3 = S[r3 + j];
    const ws = x0 + a1 * x1 + a2 * x2;
    x0 -= ta * ws;
    x1 -= ta1 * ws;
    x2 -= ta2 * ws;
    const vs = x1 + b1 * x2 + b2 * x3;
    S[r0 + j] = x0;
    S[r1 + j] = x1 - tb * vs;
    S[r2 + j] = x2 - tb1 * vs;
    S[r3 + j] = x3 - tb2 * vs;
    let y0 = T[r0 + j], y1 = T[r1 + j], y2 = T[r2 + j];
    const y3 = T[r3 + j];
    const wt = y0 + a1 * y1 + a2 * y2;
    y0 -= ta * wt;
    y1 -= ta1 * wt;
    y2 -= ta2 * wt;
    const vt = y1 + b1 * y2 + b2 * y3;
    T[r0 + j] = y0;
    T[r1 + j] = y1 - tb * vt;
    T[r2 + j] = y2 - tb1 * vt;
    T[r3 + j] = y3 - tb2 * vt;
  }
  // Step k+1, right transformation W2 = H2·G2 on columns k+1..k+3 (from T's rows k+2, k+3).
  house3(T[r3 + k + 3], T[r3 + k + 1], T[r3 + k + 2]);
  const tz2 = refl[0], w0 = refl[1], w1 = refl[2], betaT2 = refl[4];
  {
    const x0 = T[r2 + k + 1], x1 = T[r2 + k + 2], x2 = T[r2 + k + 3];
    const wv = tz2 * (w0 * x0 + w1 * x1 + x2);
    givens(x1 - wv * w1, x0 - wv * w0);
  }
  const c2 = rot[0], s2 = rot[1];
  applyRightPairToBoth(S, T, n, k + 1, tz2, w0, w1, c2, s2, k, k + 3);
  applyRightPair(S, n, k + 1, tz2, w0, w1, c2, s2, k + 3, Math.min(k + 5, l + 1));
  if (tz2 !== 0) T[r3 + k + 3] = betaT2;
  T[r3 + k + 1] = 0;
  T[r3 + k + 2] = 0;
  T[r2 + k + 1] = 0;
  // Rows rowStart..k−1 of S and T: W1 on columns k..k+2, then W2 on columns k+1..k+3.
  for (let r = rowStart, o = rowStart * n + k; r < k; r++, o += n) {
    let x0 = S[o], x1 = S[o + 1], x2 = S[o + 2];
    const x3 = S[o + 3];
    let wv = tz * (u0 * x0 + u1 * x1 + x2);
    let y0 = x0 - wv * u0, y1 = x1 - wv * u1;
    x0 = c * y0 - s * y1;
    x1 = c * y1 + s * y0;
    x2 -= wv;
    wv = tz2 * (w0 * x1 + w1 * x2 + x3);
    y0 = x1 - wv * w0; y1 = x2 - wv * w1;
    S[o] = x0;
    S[o + 1] = c2 * y0 - s2 * y1;
    S[o + 2] = c2 * y1 + s2 * y0;
    S[o + 3] = x3 - wv;
    let p0 = T[o], p1 = T[o + 1], p2 = T[o + 2];
    const p3 = T[o + 3];
    wv = tz * (u0 * p0 + u1 * p1 + p2);
    y0 = p0 - wv * u0; y1 = p1 - wv * u1;
    p0 = c * y0 - s * y1;
    p1 = c * y1 + s * y0;
    p2 -= wv;
    wv = tz2 * (w0 * p1 + w1 * p2 + p3);
    y0 = p1 - wv * w0; y1 = p2 - wv * w1;
    T[o] = p0;
    T[o + 1] = c2 * y0 - s2 * y1;
    T[o + 2] = c2 * y1 + s2 * y0;
    T[o + 3] = p3 - wv;
  }
  // Accumulators: Qᵀ rows k..k+3 ← P2·P1·Qᵀ; Zᵀ rows k..k+3 ← W2ᵀ·W1ᵀ·Zᵀ.
  if (QT) {
    for (let j = 0; j < n; j++) {
      let q0 = QT[r0 + j], q1 = QT[r1 + j], q2 = QT[r2 + j];
      const q3 = QT[r3 + j];
      const wq = q0 + a1 * q1 + a2 * q2;
      q0 -= ta * wq;
      q1 -= ta1 * wq;
      q2 -= ta2 * wq;
      const vq = q1 + b1 * q2 + b2 * q3;
      QT[r0 + j] = q0;
      QT[r1 + j] = q1 - tb * vq;
      QT[r2 + j] = q2 - tb1 * vq;
      QT[r3 + j] = q3 - tb2 * vq;
    }
  }
  if (ZT) {
    for (let j = 0; j < n; j++) {
      let x0 = ZT[r0 + j], x1 = ZT[r1 + j], x2 = ZT[r2 + j];
      const x3 = ZT[r3 + j];
      let wv = tz * (u0 * x0 + u1 * x1 + x2);
      let y0 = x0 - wv * u0, y1 = x1 - wv * u1;
      x0 = c * y0 - s * y1;
      x1 = c * y1 + s * y0;
      x2 -= wv;
      wv = tz2 * (w0 * x1 + w1 * x2 + x3);
      y0 = x1 - wv * w0; y1 = x2 - wv * w1;
      ZT[r0 + j] = x0;
      ZT[r1 + j] = c2 * y0 - s2 * y1;
      ZT[r2 + j] = c2 * y1 + s2 * y0;
      ZT[r3 + j] = x3 - wv;
    }
  }
}

/**
 * Row vectors x (columns k..k+2 of rows [r0, r1) of M) ← x·H·G with H = I − τ·u·uᵀ,
 * u = (u0, u1, 1), and G the rotation (c, s) on columns (k+1, k).
 */
function applyRightPair(M: Float64Array, n: number, k: number, tau: number, u0: number, u1: number, c: number, s: number, r0: number, r1: number): void {
  for (let r = r0, o = r0 * n + k; r < r1; r++, o += n) {
    const x0 = M[o], x1 = M[o + 1], x2 = M[o + 2];
    const wv = tau * (u0 * x0 + u1 * x1 + x2);
    const y0 = x0 - wv * u0, y1 = x1 - wv * u1;
    M[o] = c * y0 - s * y1;
    M[o + 1] = c * y1 + s * y0;
    M[o + 2] = x2 - wv;
  }
}

/** `applyRightPair` on rows [r0, r1) of S and of T in one loop (halves the loop overhead). */
function applyRightPairToBoth(
  S: Float64Array, T: Float64Array, n: number, k: number, tau: number, u0: number, u1: number, c: number, s: number, r0: number, r1: number,
): void {
  for (let r = r0, o = r0 * n + k; r < r1; r++, o += n) {
    let x0 = S[o], x1 = S[o + 1], x2 = S[o + 2];
    let wv = tau * (u0 * x0 + u1 * x1 + x2);
    let y0 = x0 - wv * u0, y1 = x1 - wv * u1;
    S[o] = c * y0 - s * y1;
    S[o + 1] = c * y1 + s * y0;
    S[o + 2] = x2 - wv;
    x0 = T[o]; x1 = T[o + 1]; x2 = T[o + 2];
    wv = tau * (u0 * x0 + u1 * x1 + x2);
    y0 = x0 - wv * u0; y1 = x1 - wv * u1;
    T[o] = c * y0 - s * y1;
    T[o + 1] = c * y1 + s * y0;
    T[o + 2] = x2 - wv;
  }
}

/** Left reflector (1, v1, v2) on rows k..k+2 of S and T, columns [c0, c1), in one loop. */
function reflectRowsOfBoth(S: Float64Array, T: Float64Array, n: number, k: number, v1: number, v2: number, tau: number, c0: number, c1: number): void {
  const a0 = k * n, a1 = a0 + n, a2 = a1 + n;
  const t1 = tau * v1, t2 = tau * v2;
  for (let j = c0; j < c1; j++) {
    const ws = S[a0 + j] + v1 * S[a1 + j] + v2 * S[a2 + j];
    S[a0 + j] -= tau * ws;
    S[a1 + j] -= t1 * ws;
    S[a2 + j] -= t2 * ws;
    const wt = T[a0 + j] + v1 * T[a1 + j] + v2 * T[a2 + j];
    T[a0 + j] -= tau * wt;
    T[a1 + j] -= t1 * wt;
    T[a2 + j] -= t2 * wt;
  }
}

/**
 * One sweep step's updates of the accumulators in one loop: Qᵀ rows k..k+2 ← (left reflector)·Qᵀ
 * and Zᵀ rows k..k+2 ← (H·G)ᵀ·Zᵀ, the latter being the columns k..k+2 of Z times H·G.
 */
function accumulateStep(
  QT: Float64Array, ZT: Float64Array, n: number, k: number, tau: number, v1: number, v2: number,
  tz: number, u0: number, u1: number, c: number, s: number,
): void {
  const o0 = k * n, o1 = o0 + n, o2 = o1 + n;
  const t1 = tau * v1, t2 = tau * v2;
  for (let j = 0; j < n; j++) {
    const q0 = QT[o0 + j], q1 = QT[o1 + j], q2 = QT[o2 + j];
    const wq = q0 + v1 * q1 + v2 * q2;
    QT[o0 + j] = q0 - tau * wq;
    QT[o1 + j] = q1 - t1 * wq;
    QT[o2 + j] = q2 - t2 * wq;
    const x0 = ZT[o0 + j], x1 = ZT[o1 + j], x2 = ZT[o2 + j];
    const wv = tz * (u0 * x0 + u1 * x1 + x2);
    const y0 = x0 - wv * u0, y1 = x1 - wv * u1;
    ZT[o0 + j] = c * y0 - s * y1;
    ZT[o1 + j] = c * y1 + s * y0;
    ZT[o2 + j] = x2 - wv;
  }
}

/** The Zᵀ half of `accumulateStep` alone (same operations, same order): Q is not wanted. */
function accumulateRightStep(ZT: Float64Array, n: number, k: number, tz: number, u0: number, u1: number, c: number, s: number): void {
  const o0 = k * n, o1 = o0 + n, o2 = o1 + n;
  for (let j = 0; j < n; j++) {
    const x0 = ZT[o0 + j], x1 = ZT[o1 + j], x2 = ZT[o2 + j];
    const wv = tz * (u0 * x0 + u1 * x1 + x2);
    const y0 = x0 - wv * u0, y1 = x1 - wv * u1;
    ZT[o0 + j] = c * y0 - s * y1;
    ZT[o1 + j] = c * y1 + s * y0;
    ZT[o2 + j] = x2 - wv;
  }
}
