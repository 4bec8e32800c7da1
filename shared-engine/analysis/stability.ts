/**
 * Stability of a state-space model from its poles: asymptotic stability, marginal stability
 * (bounded but not decaying) and the poles that violate it.
 */
import { Matrix } from "ml-matrix";
import { cabs, numericalRank, type Complex } from "../linalg";
import type { StateSpace } from "../model";
import { poles } from "./poles";

export interface StabilityReport {
  /** "continuous" (s-plane, boundary Re s = 0) or "discrete" (z-plane, boundary |z| = 1). */
  timeDomain: "continuous" | "discrete";
  /** Every pole strictly inside the stable region by more than `tolerance`. */
  stable: boolean;
  /** Not stable, no pole outside, and every pole on the boundary semisimple (bounded responses). */
  marginal: boolean;
  /** Poles beyond the boundary by more than `tolerance`. */
  unstablePoles: Complex[];
  /** Poles within `tolerance` of the boundary. */
  boundaryPoles: Complex[];
  /** Boundary poles whose geometric multiplicity is below their algebraic one (responses grow like t^k). */
  defectiveBoundaryPoles: Complex[];
  /** Continuous: max Re λ; null for sampled models or n = 0. */
  spectralAbscissa: number | null;
  /** Sampled: max |λ|; null for continuous models or n = 0. */
  spectralRadius: number | null;
  /** Width of the boundary band: 100·n·ε·max(1, ‖A‖_F). */
  tolerance: number;
}

/** The band half-width used for "on the boundary": 100·n·ε·max(1, ‖A‖_F). */
export function stabilityTolerance(A: Matrix): number {
  return 100 * Math.max(1, A.rows) * Number.EPSILON * Math.max(1, A.norm("frobenius"));
}

/** Signed distance of λ past the stability boundary: Re λ (continuous) or |λ| − 1 (sampled). */
export function boundaryDistance(lambda: Complex, discrete: boolean): number {
  return discrete ? cabs(lambda) - 1 : lambda.re;
}

/**
 * Computes: whether x' = Ax (or x[k+1] = A x[k]) is asymptotically stable (every pole with
 *   Re λ < −tol, resp. |λ| < 1 − tol), marginally stable, which poles are unstable or on the
 *   boundary, and the spectral abscissa max Re λ (continuous) or spectral radius max |λ|
 *   (sampled). A: n×n.
 * Requires: a valid model. n = 0 (static gain) is stable with null abscissa/radius.
 * Method: poles by Francis QR (`poles`). Boundary poles are grouped (|λᵢ − λⱼ| ≤ √tol·max(1,|λ|));
 *   a group of k poles is semisimple when rank(A − λI) = n − k (real λ) or the 2n×2n real form
 *   [[A − σI, ωI], [−ωI, A − σI]] has rank 2(n − k) (λ = σ + iω), by SVD (Golub & Van Loan,
 *   "Matrix Computations", 4th ed., §5.4.1) with tolerance √tol·max(1, ‖A‖_F) because computed
 *   defective eigenvalues scatter by O(√ε) (Wilkinson, "The Algebraic Eigenvalue Problem", 1965).
 * Cost: ≈ 10n³ for the poles, plus one SVD of size n (or 2n) per distinct boundary pole.
 * Accuracy: the classification is that of A + ΔA with ‖ΔA‖ ≈ n·ε·‖A‖; poles closer to the
 *   boundary than `tolerance` are reported as boundary poles, never as stable.
 * Errors: "no-convergence" from the QR iteration.
 * Example:
 *   stability(createStateSpace({ A: [[0, 1], [-1, 0]], B: [[0], [1]], C: [[1, 0]] }));
 *   // { stable: false, marginal: true, boundaryPoles: ±i, unstablePoles: [] }
 */
export function stability(model: StateSpace): StabilityReport {
  const discrete = model.sampleTime !== null;
  const n = model.A.rows;
  const tolerance = stabilityTolerance(model.A);
  const timeDomain = discrete ? "discrete" : "continuous";
  if (n === 0) {
    return { timeDomain, stable: true, marginal: false, unstablePoles: [], boundaryPoles: [], defectiveBoundaryPoles: [], spectralAbscissa: null, spectralRadius: null, tolerance };
  }
  const lambdas = poles(model);
  const unstablePoles = lambdas.filter((l) => boundaryDistance(l, discrete) > tolerance);
  const boundaryPoles = lambdas.filter((l) => Math.abs(boundaryDistance(l, discrete)) <= tolerance);
  const defectiveBoundaryPoles = defectivePoles(model.A, boundaryPoles, tolerance);
  const stable = unstablePoles.length === 0 && boundaryPoles.length === 0;
  return {
    timeDomain,
    stable,
    marginal: !stable && unstablePoles.length === 0 && defectiveBoundaryPoles.length === 0,
    unstablePoles,
    boundaryPoles,
    defectiveBoundaryPoles,
    spectralAbscissa: discrete ? null : Math.max(...lambdas.map((l) => l.re)),
    spectralRadius: discrete ? Math.max(...lambdas.map(cabs)) : null,
    tolerance,
  };
}

/** Boundary poles (one representative per group, +im member of pairs) that are not semisimple. */
function defectivePoles(A: Matrix, boundary: Complex[], tolerance: number): Complex[] {
  const n = A.rows;
  const out: Complex[] = [];
  const used = new Array<boolean>(boundary.length).fill(false);
  const cluster = Math.sqrt(tolerance);
  for (let i = 0; i < boundary.length; i++) {
    const l = boundary[i]!;
    if (used[i] || l.im < 0) continue;
    let k = 0;
    boundary.forEach((o, j) => {
      if (Math.hypot(o.re - l.re, o.im - l.im) <= cluster * Math.max(1, cabs(l))) {
        used[j] = true;
        k++;
      }
    });
    if (k === 1) continue; // a simple eigenvalue is always semisimple
    const rankTol = cluster * Math.max(1, A.norm("frobenius"));
    let rank: number;
    let expected: number;
    if (l.im === 0) {
      const M = A.clone();
      for (let d = 0; d < n; d++) M.set(d, d, M.get(d, d) - l.re);
      rank = numericalRank(M, rankTol).rank;
      expected = n - k;
    } else {
      const M = new Matrix(2 * n, 2 * n);
      for (let r = 0; r < n; r++) {
        for (let c = 0; c < n; c++) {
          const v = A.get(r, c) - (r === c ? l.re : 0);
          M.set(r, c, v);
          M.set(n + r, n + c, v);
        }
        M.set(r, n + r, l.im);
        M.set(n + r, r, -l.im);
      }
      rank = numericalRank(M, rankTol).rank;
      expected = 2 * (n - k);
    }
    if (rank > expected) out.push(l);
  }
  return out;
}
