/**
 * Continuous-time algebraic Riccati equation by the Schur method on the Hamiltonian matrix,
 * with the extended-pencil QZ method as the route for an ill-conditioned R.
 */
import { EngineError } from "../errors";
import { selectLeftHalfPlane, type Complex, type MatrixInput } from "../linalg";
import { defaultSchurIterationLimit, realSchurRowMajor, reorderSchurInPlace } from "../linalg/kernels";
import {
  checkWeights, graphSolution, prepareRiccatiData, symplecticScaling, type RiccatiData, type RiccatiOptions, type RiccatiSolution,
} from "./riccati";
import { forwardSubstitute, frobeniusOf, multiply, powerOfTwoNear, transpose } from "./riccatiKernels";
import { imaginaryAxisVerdict } from "./riccatiAxis";
import { solveByExtendedPencil } from "./riccatiPencil";
import { finishRiccati } from "./riccatiRefine";

// Above this estimate of cond₂(R) (squared ratio of extreme Cholesky pivots) forming R⁻¹ in
// the Hamiltonian would lose more than half the digits of G = B R⁻¹ Bᵀ, so the extended
// pencil, which never inverts R, is used instead.
const R_CONDITION_LIMIT = 1e8;

/**
 * Computes: the stabilizing solution X (n×n, symmetric) of the continuous algebraic Riccati
 * equation
 *   AᵀX + XA − (XB + N)R⁻¹(BᵀX + Nᵀ) + Q = 0,
 * with A: n×n, B: n×m, Q: n×n, R: m×m, N: n×m (zero when omitted), the gain
 * K = R⁻¹(BᵀX + Nᵀ) (m×n) and the closed-loop poles eig(A − BK).
 *
 * Requires: Q, R symmetric; R positive definite; [Q N; Nᵀ R] positive semidefinite; (A, B)
 * stabilizable and the Hamiltonian free of eigenvalues on the imaginary axis (e.g. (Q − NR⁻¹Nᵀ, A)
 * detectable).
 *
 * Method: A. J. Laub, "A Schur method for solving algebraic Riccati equations", IEEE Trans.
 * Automatic Control AC-24(6), 1979: real Schur form of the Hamiltonian
 *   H = [Ã  −σG; −Q̃/σ  −Ãᵀ],  Ã = A − B R⁻¹Nᵀ, G = B R⁻¹Bᵀ, Q̃ = Q − N R⁻¹Nᵀ
 * (R⁻¹ through the Cholesky factor of R), reordered so the n left-half-plane eigenvalues lead;
 * X = σ·U21·U11⁻¹. The scalar σ (a power of two near (‖Q̃‖_F/‖G‖_F)^{1/2}) balances the
 * off-diagonal blocks (the norm scaling discussed by Kenney, Laub & Wette, "A stability-
 * enhancing scaling procedure for Schur–Riccati solvers", Systems & Control Letters 12, 1989),
 * then a symplectic diagonal scaling diag(S, S⁻¹) (P. Benner, "Symplectic balancing of
 * Hamiltonian matrices", SIAM J. Sci. Comput. 22(5), 2001, from memory) balances rows against
 * columns. Imaginary-axis test (riccatiAxis.ts): an eigenvalue with |Re λ| ≤ 10·√ε·‖H_b‖_F is
 * on the axis only if its distance is also below its own first-order error bound
 * 10·2n·ε·‖H_b‖_F·κ(λ) (κ from the eigenvectors of the Schur form); a simple eigenvalue that
 * is merely small beside ‖H‖ (a slow mode next to a fast one, states in units 1e4…1e8 apart) is
 * accepted. If an eigenvalue is not resolved in the balanced coordinates, the stable subspace
 * still gives a first X₀, and the Schur step is repeated once with sᵢ = 2^round(log₂√(σ/X₀ᵢᵢ)),
 * which makes the scaled solution's diagonal 1 (a per-state form, our own, of the advice to scale
 * towards ‖X‖ ≈ 1 that we recall from Kenney, Laub & Wette 1989, from memory); only if the
 * eigenvalue is still unresolved is it reported (measured on the 1e8/1e-4 fixture: κ of the slow
 * pair 1.4e5 after balancing, 1.0 after this rescaling, clearing the bound by 67×). The
 * extended-pencil route keeps the ‖H‖-relative test only. When
 * such a small eigenvalue was accepted ("graded" in `method`), X is Newton-refined by default,
 * since the Schur step fixes small eigenvalues and small entries of X only to ε·‖H‖ absolutely
 * (measured: 1.6e-7 relative error in X₂₂ and in the slow pole of the 1e8/1e-4 fixture, 9e-16
 * and 2e-14 after refinement).
 * When cond(R) > 1e8 the (2n+m)-order extended pencil is used instead, compressed to order 2n
 * and solved by QZ (W. F. Arnold III & A. J. Laub, "Generalized eigenproblem algorithms and
 * software for algebraic Riccati equations", Proc. IEEE 72(12), 1984; P. Van Dooren, "A
 * generalized eigenvalue approach for solving Riccati equations", SIAM J. Sci. Stat. Comput.
 * 2(2), 1981). Optional Newton refinement: D. L. Kleinman, "On an iterative technique for
 * Riccati equation computations", IEEE Trans. Automatic Control AC-13(1), 1968, in defect-
 * correction form (Aclᵀ E + E Acl = −Res(X), X ← X + E).
 *
 * Cost: about 25·(2n)³ = 200·n³ flops for the Schur form of H, plus reordering (≤ 8n³),
 * 4n³ for X and 10n³ for the closed-loop poles; each Newton step is one Lyapunov solve
 * (≈ 30n³). The axis test costs O(n) unless an eigenvalue is within 10·√ε·‖H_b‖_F of the axis
 * (then O(n²) per such eigenvalue, and at most one more Schur step). Memory O(n²). Iteration
 * limits: those of the Schur/QZ routines; at most 20 Newton steps.
 *
 * Accuracy: before returning, X is symmetrised, A − BK is checked to have every pole with
 * Re λ < 0, and the normalised residual ‖Res‖_F / (‖Q‖_F + 2‖A‖_F‖X‖_F + ‖XB+N‖_F‖K‖_F) must be
 * ≤ √ε (it is refined automatically when it exceeds 100·n·ε). `residual` reports ‖Res‖_F/‖X‖_F.
 * Measured against scipy fixtures (n ≤ 20): relative difference of X ≤ 1e-9; against the
 * 80-digit references of riccati_precise.json (badly scaled plants): every entry of X and K and
 * every closed-loop pole within 2e-14 relative.
 *
 * Errors: "empty", "shape-mismatch", "non-finite" (inputs); "invalid-argument" (Q or R not
 * symmetric, R not positive definite, [Q N; Nᵀ R] not positive semidefinite);
 * "no-stabilizing-solution" (details.reason: "eigenvalue-on-imaginary-axis" when an eigenvalue of
 * H has |Re λ| ≤ 1.5e-7·‖H_b‖_F and |Re λ| ≤ 20n·ε·‖H_b‖_F·κ(λ) in both scalings,
 * "wrong-stable-count", "singular-U11", "closed-loop-unstable", "residual-too-large"); "no-convergence" (Schur/QZ sweeps or Newton).
 *
 * Example:
 *   // Benner, Laub & Mehrmann (1995) continuous example 1: X = [[2, 1], [1, 2]]
 *   const s = solveContinuousRiccati([[0, 1], [0, 0]], [[0], [1]], [[1, 0], [0, 2]], [[1]]);
 *   // s.X ≈ [[2, 1], [1, 2]], s.K ≈ [[1, 2]], s.residual < 1e-14
 */
export function solveContinuousRiccati(
  A: MatrixInput, B: MatrixInput, Q: MatrixInput, R: MatrixInput, N?: MatrixInput | null, options: RiccatiOptions = {},
): RiccatiSolution {
  const data = prepareRiccatiData(A, B, Q, R, N);
  const { rFactor, rConditionEstimate } = checkWeights(data, true);
  let fallbackReason: string | null = null;
  if (rFactor && rConditionEstimate <= R_CONDITION_LIMIT) {
    try {
      const { x, rcond, graded } = hamiltonianSchur(data, rFactor);
      // Eigenvalues near the axis relative to ‖H‖ (accepted by their condition) are only accurate
      // to ε‖H‖ in absolute terms, and so are the small entries of X: Newton's method, whose
      // residual is formed from the data, restores them (unless refinement was turned off).
      const refine = graded && options.refine === undefined ? true : options.refine;
      const method = graded ? "Schur method on the Hamiltonian (Laub 1979), graded" : "Schur method on the Hamiltonian (Laub 1979)";
      return finishRiccati(data, "continuous", x, rcond, method, { ...options, refine });
    } catch (error) {
      // A rejected eigenvalue swap (close eigenvalues near the axis) or a sweep limit in the
      // Hamiltonian's Schur form is retried on the pencil, whose QZ reordering is independent.
      if (!(error instanceof EngineError) || error.kind !== "no-convergence") throw error;
      fallbackReason = error.message;
    }
  }
  const { x, rcond } = solveByExtendedPencil(data, "continuous");
  const solution = finishRiccati(data, "continuous", x, rcond, "QZ on the extended pencil (Arnold & Laub 1984)", options);
  if (fallbackReason) solution.warnings.push(`The Hamiltonian Schur method failed (${fallbackReason}); solved on the extended pencil instead`);
  return solution;
}

interface HamiltonianResult { x: Float64Array; rcond: number; graded: boolean }

/**
 * Laub's Schur method on the scaled Hamiltonian. `solutionScale` (second pass only) is a first
 * solution X₀ whose diagonal sets the symplectic scaling instead of balancing (see below).
 */
function hamiltonianSchur(data: RiccatiData, rFactor: Float64Array, solutionScale: Float64Array | null = null): HamiltonianResult {
  const { n, m, a, b, q, nCross } = data;
  // B̂ = B L⁻ᵀ and N̂ = N L⁻ᵀ from R = L Lᵀ, so G = B̂B̂ᵀ and NR⁻¹Nᵀ = N̂N̂ᵀ stay symmetric.
  const bHatT = transpose(b, n, m);
  forwardSubstitute(rFactor, m, bHatT, n);
  const bHat = transpose(bHatT, m, n);
  const g = multiply(bHat, bHatT, n, m, n);
  const aTilde = a.slice();
  const qTilde = q.slice();
  if (data.hasCross) {
    const nHatT = transpose(nCross, n, m);
    forwardSubstitute(rFactor, m, nHatT, n);
    const nHat = transpose(nHatT, m, n);
    const bn = multiply(bHat, nHatT, n, m, n);
    const nn = multiply(nHat, nHatT, n, m, n);
    for (let i = 0; i < n * n; i++) { aTilde[i] -= bn[i]!; qTilde[i] -= nn[i]!; }
  }
  const normG = frobeniusOf(g);
  const normQ = frobeniusOf(qTilde);
  const sigma = normG > 0 && normQ > 0 ? powerOfTwoNear(Math.sqrt(normQ / normG)) : 1;
  // Hamiltonian (Laub 1979, eq. (6)), scaled: X = σ·X̂ where X̂ solves the equation with σG, Q̃/σ.
  const w = 2 * n;
  const h = new Float64Array(w * w);
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < n; j++) {
      h[i * w + j] = aTilde[i * n + j]!;
      h[i * w + n + j] = -sigma * g[i * n + j]!;
      h[(n + i) * w + j] = -qTilde[i * n + j]! / sigma;
      h[(n + i) * w + n + j] = -aTilde[j * n + i]!;
    }
  }
  // Symplectic balancing: H_b = D⁻¹HD with D = diag(S, S⁻¹) stays Hamiltonian (Benner 2001).
  const mag = new Float64Array(w * w);
  for (let i = 0; i < w * w; i++) mag[i] = Math.abs(h[i]!);
  const d = symplecticScaling(mag, w, n);
  if (solutionScale) {
    // Second pass: sᵢ = 2^round(log₂ √(σ/X₀ᵢᵢ)) makes the scaled solution X_b = S·X·S/σ have a
    // unit diagonal (see the doc comment of solveContinuousRiccati).
    for (let i = 0; i < n; i++) {
      const xii = solutionScale[i * n + i]!;
      if (xii > 0 && Number.isFinite(xii)) { d[i] = powerOfTwoNear(Math.sqrt(sigma / xii)); d[n + i] = 1 / d[i]!; }
    }
  }
  for (let i = 0; i < w; i++) for (let j = 0; j < w; j++) h[i * w + j] *= d[j]! / d[i]!;
  if (!h.every(Number.isFinite)) {
    throw new EngineError("non-finite", "The scaled Hamiltonian has non-finite entries (A, B, Q or R too large)", { argument: "A" });
  }
  // Row-major Schur kernels: the same steps and checks as realSchur / reorderSchur without
  // their Matrix round trips (a measurable share of the cost at n ≤ 20).
  const form = realSchurRowMajor(h, w, defaultSchurIterationLimit(w));
  const verdict = imaginaryAxisVerdict(form.t, w, frobeniusOf(h));
  if (verdict.onAxis) {
    const axisError = (lambda: Complex, tolerance: number) => new EngineError(
      "no-stabilizing-solution",
      `No stabilizing solution: the Hamiltonian has an eigenvalue ${lambda.re.toExponential(3)}${lambda.im >= 0 ? "+" : "−"}${Math.abs(lambda.im).toExponential(3)}i on the imaginary axis (a mode is not stabilizable or not detectable)`,
      { reason: "eigenvalue-on-imaginary-axis", eigenvalue: lambda, tolerance },
    );
    if (solutionScale) throw axisError(verdict.onAxis, verdict.tolerance);
    // An unresolved eigenvalue may be an artefact of a poor scaling of a graded problem: take the
    // stable subspace anyway and, when it yields an X₀, repeat once with the scaling X₀ suggests.
    // Any failure on the way is reported as the axis eigenvalue first seen.
    let x0: Float64Array;
    try {
      x0 = stableSubspaceSolution(form, w, n, sigma, d).x;
    } catch (error) {
      if (error instanceof EngineError) throw axisError(verdict.onAxis, verdict.tolerance);
      throw error;
    }
    if (!x0.every(Number.isFinite)) throw axisError(verdict.onAxis, verdict.tolerance);
    return hamiltonianSchur(data, rFactor, x0);
  }
  return { ...stableSubspaceSolution(form, w, n, sigma, d), graded: verdict.graded };
}

/** Reorders the Schur form so the n stable eigenvalues lead and forms X = σ·S⁻¹·(U21·U11⁻¹)·S⁻¹. */
function stableSubspaceSolution(form: { t: Float64Array; q: Float64Array }, w: number, n: number, sigma: number, d: Float64Array): { x: Float64Array; rcond: number } {
  const ordered = reorderSchurInPlace(form.t, form.q, w, selectLeftHalfPlane);
  if (ordered.selectedCount !== n) {
    throw new EngineError("no-stabilizing-solution", `No stabilizing solution: the Hamiltonian has ${ordered.selectedCount} stable eigenvalues, not ${n}`, {
      reason: "wrong-stable-count", stableCount: ordered.selectedCount, expected: n,
    });
  }
  const { x, rcond } = graphSolution(form.q, n);
  // Undo both scalings: X = σ·S⁻¹·X_b·S⁻¹.
  for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) x[i * n + j] *= sigma / (d[i]! * d[j]!);
  return { x, rcond };
}
