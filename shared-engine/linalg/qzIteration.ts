/**
 * The QZ iteration proper (Moler & Stewart 1973, step 3) on a Hessenberg–triangular pencil held
 * in row-major arrays: deflation, zero chasing on T's diagonal, and the choice of sweeps (the
 * sweeps themselves are in qzSweep.ts). Internal to linalg/ (qz.ts is the public surface).
 */
import { EngineError } from "../errors";
import {
  SAFE_MIN, ULP, type PencilWork, givens as givensShared, negateRow, rot as rotShared, rotCols as rotColsShared, rotRows as rotRowsShared, standardizeBlock2,
} from "./qzKernels";
import { doubleShiftSweep } from "./qzSweep";

// Module-level aliases of the shared scratch arrays and hot kernels: read through an import
// binding, every access in the inner loops cost a getter call under per-file CommonJS transpilation (tsx, vitest).
const rot = rotShared;
const givens = givensShared;
const rotRows = rotRowsShared;
const rotCols = rotColsShared;


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
