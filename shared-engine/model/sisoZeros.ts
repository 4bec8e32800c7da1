/**
 * Zeros and high-frequency gain of one input–output channel of a state-space model, by
 * orthogonal deflation. Used to display a channel as a transfer function without forming the
 * characteristic polynomial of a companion (badly conditioned) matrix.
 */
import { Matrix } from "ml-matrix";
import { eigenvalues, type Complex } from "../linalg";

export interface SisoZerosAndGain {
  /** Finite zeros of c(sI − A)⁻¹b + d (pole–zero cancellations are kept, not removed). */
  zeros: Complex[];
  /** Leading coefficient k of the numerator: G(s) = k·∏(s − z)/∏(s − p). 0 for G ≡ 0. */
  gain: number;
  /** Relative degree n − zeros.length (0 when d ≠ 0); n + 1 stands for G ≡ 0. */
  relativeDegree: number;
}

/**
 * Computes: the finite zeros z and gain k of g(s) = c(sI − A)⁻¹b + d for A: n×n, b: n×1,
 *   c: 1×n, d scalar, so that g(s) = k·∏(s − z_i)/det(sI − A).
 * Requires: finite entries (the caller's model is validated).
 * Method: d ≠ 0: the zeros are the eigenvalues of A − b d⁻¹ c and k = d (determinant identity
 *   det([sI−A, −b; c, d]) = d·det(sI − A + b d⁻¹ c)). d = 0: the single-input single-output
 *   deflation of A. Emami-Naeini & P. Van Dooren, "Computation of zeros of linear multivariable
 *   systems", Automatica 18(4):415–430, 1982: a Householder reflector H maps c to γ·e_nᵀ; in
 *   the coordinates H·x the last state is the output. If the new b has a non-negligible last
 *   entry b₂ (c·b ≠ 0, relative degree 1) the zeros are eig(A₁₁ − b₁a₂₁/b₂) and the gain
 *   picks up γ·b₂; otherwise the output row becomes a₂₁, the order drops by one, the gain picks
 *   up γ, and the step repeats (each step raises the relative degree by one).
 * Cost: at most n deflation steps of O(n²) each, plus one eigenvalue problem: O(n³).
 * Accuracy: orthogonal steps only, so the reduced pencil is backward stable. Decisions use
 *   tolerances: b₂ is treated as zero when |b₂| ≤ 10·n·ε·‖b‖₂, and the output row as zero
 *   when ‖row‖₂ ≤ 10·n·ε·‖A‖_F (rounding level of the transformed A). A channel with a
 *   genuinely tiny first Markov parameter may therefore be reported with a higher relative
 *   degree: the decision is documented in `relativeDegree`.
 * Errors: "no-convergence" from the eigenvalue routine.
 * Example: A = [[0,1],[-2,-3]], b = [0;1], c = [3, 1], d = 0 → zeros [−3], gain 1
 *   (g = (s + 3)/(s² + 3s + 2)); check |g(1) − 4/6| ≤ 1e-15.
 */
export function sisoZerosAndGain(A: Matrix, b: number[], c: number[], d: number): SisoZerosAndGain {
  const n0 = A.rows;
  if (d !== 0) {
    if (n0 === 0) return { zeros: [], gain: d, relativeDegree: 0 };
    const M = A.clone();
    for (let i = 0; i < n0; i++) for (let j = 0; j < n0; j++) M.set(i, j, M.get(i, j) - (b[i]! * c[j]!) / d);
    return { zeros: eigenvalues(M), gain: d, relativeDegree: 0 };
  }
  const zero: SisoZerosAndGain = { zeros: [], gain: 0, relativeDegree: n0 + 1 };
  const rowTolerance = 10 * Math.max(n0, 1) * Number.EPSILON * A.norm("frobenius");
  let a = A.to2DArray();
  let bv = [...b];
  let cv = [...c];
  let gain = 1;
  let first = true;
  for (let n = n0; n > 0; n--) {
    const gamma = Math.hypot(...cv);
    if (gamma === 0 || (!first && gamma <= rowTolerance)) return zero;
    first = false;
    const bNorm = Math.hypot(...bv);
    if (bNorm === 0) return zero;
    // Householder vector v with (I − 2vvᵀ/vᵀv)·cᵀ = γ·e_n (Golub & Van Loan, Alg. 5.1.1).
    const v = [...cv];
    const last = cv[n - 1]!;
    v[n - 1] = last + (last >= 0 ? gamma : -gamma);
    const sign = last >= 0 ? -1 : 1; // H cᵀ = sign·γ·e_n
    const vtv = v.reduce((s, x) => s + x * x, 0);
    const reflect = (x: number[]): number[] => {
      const f = (2 * x.reduce((s, xi, i) => s + xi * v[i]!, 0)) / vtv;
      return x.map((xi, i) => xi - f * v[i]!);
    };
    // A' = H A H (H symmetric): reflect columns then rows.
    const cols = Array.from({ length: n }, (_, j) => reflect(a.map((row) => row[j]!)));
    const ha = Array.from({ length: n }, (_, i) => cols.map((col) => col[i]!));
    const aPrime = ha.map((row) => reflect(row));
    const bPrime = reflect(bv);
    const cScale = sign * gamma; // c' = cH = cScale·e_nᵀ
    const b2 = bPrime[n - 1]!;
    const A11 = aPrime.slice(0, n - 1).map((row) => row.slice(0, n - 1));
    const a21 = aPrime[n - 1]!.slice(0, n - 1);
    const b1 = bPrime.slice(0, n - 1);
    if (Math.abs(b2) > 10 * n * Number.EPSILON * bNorm) {
      // Relative degree reached: zeros of the square pencil [sI − A11, −b1; −a21, −b2].
      gain *= cScale * b2;
      let zeros: Complex[] = [];
      if (n > 1) {
        const M = new Matrix(A11);
        for (let i = 0; i < n - 1; i++) for (let j = 0; j < n - 1; j++) M.set(i, j, M.get(i, j) - (b1[i]! * a21[j]!) / b2);
        zeros = eigenvalues(M);
      }
      return { zeros, gain, relativeDegree: n0 - zeros.length };
    }
    // c·b ≈ 0: the new output is x₂' = a21·x₁ (+ a22·x₂ with x₂ ≡ 0 on the zero dynamics).
    gain *= cScale;
    a = A11;
    bv = b1;
    cv = a21;
  }
  return zero;
}
