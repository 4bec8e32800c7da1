/**
 * One implicit double-shift QZ sweep (Moler & Stewart 1973, step 3; Golub & Van Loan, Matrix
 * Computations, 4th ed., Algorithm 7.7.2) on the active block of a Hessenberg–triangular pencil
 * held in row-major arrays, with the accumulators Qᵀ and Zᵀ. Internal to linalg/ (called by
 * qzIteration.ts; qz.ts is the public surface).
 *
 * Step k (k = f..l−2): a 3-row Householder reflector P from the left (from the shift vector at
 * the first step, from column k−1 of S otherwise), then the right transformation W = H·G that
 * restores T's triangularity: a 3-column reflector H zeroing t_{k+2,k}, t_{k+2,k+1} and a
 * rotation G on columns k, k+1 zeroing t_{k+1,k}. The last step (k = l−1) is a rotation from
 * the left and one from the right.
 *
 * H is applied by its explicit 3×3 entries, each computed with full relative accuracy
 * (`reflectorEntries` in qzKernels.ts), never as x − τ·v·(vᵀx). On a graded pencil (D·A0·D,
 * D·E0·D) the right reflector is often close to a permutation (t_{k+2,k} ≫ t_{k+2,k+2}); the
 * reflector form then computes small entries as differences of large terms and leaves errors of
 * ε·(large entry) in them. Measured on "graded n=8" of qz.json against the 60-digit references
 * of eigen_precise.json: one sweep in the reflector form moved the exact eigenvalues of the pencil
 * by 1.2e-9 relative, in the explicit form by 4e-14 (the final eigenvalues: 3.7e-14; scipy/LAPACK
 * dggev 1.4e-13). The left reflectors (from the bulge column of S) stay in reflector form: in
 * these measurements making them explicit changed nothing. The errors of the Hessenberg–
 * triangular reduction (6e-15) and of reading eigenvalues off the 2×2 blocks (4e-16) were
 * measured to be negligible beside it.
 *
 * (LAPACK dhgeqz, from memory, replaces W by one reflector whose first column spans the null
 * vector of T's rows k+1, k+2, carrying t_{k+2,k+1} into the next step. Tried here in reflector
 * form, it made graded pencils about three times less accurate; W = H·G is kept.)
 */
import { chasePairs } from "./qzSweepPairs";
import { sweepTail } from "./qzSweepTail";
import { sweepTailPair } from "./qzSweepTailPair";
import { type PencilWork, house3 as house3Shared, refl as reflShared } from "./qzKernels";

// Module-level aliases: read through an import binding, every access in the inner loops cost a
// getter call under per-file CommonJS transpilation (tsx, vitest).
const house3 = house3Shared;
const refl = reflShared;

/**
 * The left reflector of the next step, formed ahead of time: [τ, v1, v2] with v = (1, v1, v2)
 * (its β is already stored in S).
 */
const pending = new Float64Array(3);

/**
 * One implicit double-shift QZ sweep on the active block [f, l] (size ≥ 3). Shifts are the
 * eigenvalues of the trailing 2×2 pencil; `exceptional` replaces them by an ad hoc pair (every
 * 10th sweep without deflation). Rows of S and T are updated on columns [·, colEnd), columns
 * on rows [rowStart, ·); Qᵀ and Zᵀ (when present) on all n columns.
 *
 * Organisation (the arithmetic of each transformation is that of the plain algorithm):
 * - the 3-row steps run two at a time (`chasePairs`, qzSweepPairs.ts); the last one or two of
 *   them run together with the closing 2-row step (`sweepTail`, qzSweepTail.ts, or
 *   `sweepTailPair`, qzSweepTailPair.ts), so that no step runs on its own;
 * - within such a group, the near block where its steps act from both sides one after the
 *   other is held in locals (straight-line code instead of loops of 2–4 iterations), with the
 *   square roots of the reflectors and rotations written out (no calls, no scratch arrays on
 *   that dependency chain);
 * - everything else takes the whole group in one pass: the far columns of its rows and its
 *   rows of Qᵀ the left reflectors (and rotation) one after the other, the rows above the bulge
 *   and its rows of Zᵀ the right transformations multiplied into one 3×3 or 4×4 matrix (an
 *   entry then costs 3–4 independent products instead of a chain of two or three dependent
 *   transformations);
 * - the next group's near block is computed between the current group's long loops
 *   (software pipelining), so that its square roots and divisions overlap with them.
 */
export function doubleShiftSweep(
  w: PencilWork, f: number, l: number, exceptional: boolean, rowStart: number, colEnd: number, ascale: number, bscale: number,
): void {
  const { n, S, T } = w;
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
  house3((h11 - n11) * (h11 - n22) - n12 * n21 + h12 * h21, h21 * (h11 + h22 - n11 - n22), h21 * h32);
  pending[0] = refl[0]; pending[1] = refl[1]; pending[2] = refl[2];
  // The 3-row steps k = f..l−2 (l − f − 1 of them): in pairs, the last one or two together
  // with the closing 2-row step.
  const last = (l - f) % 2 === 1 ? l - 3 : l - 2;
  if (f < last) chasePairs(w, f, last, rowStart, colEnd, pending);
  if (last === l - 3) sweepTailPair(w, last, rowStart, colEnd, pending);
  else sweepTail(w, last, rowStart, colEnd, pending);
}
