/**
 * How strongly the states of a model are coupled: participation factors of each state in each
 * mode, dominant states per mode, and the relative size of A's off-diagonal part.
 */
import { Matrix, solve } from "ml-matrix";
import type { Complex } from "../linalg";
import type { StateSpace } from "../model";
import { modalForm } from "./modalForm";

/** A state is "dominant" in a mode when its participation is at least this fraction of the largest. */
export const DOMINANT_FRACTION = 0.5;

export interface ModeParticipation {
  /** Real eigenvalue, or the member with positive imaginary part (its conjugate has the same factors). */
  eigenvalue: Complex;
  /** One factor per state (in `states` order), non-negative, summing to 1. */
  participation: number[];
  /** Names of the states with participation ≥ DOMINANT_FRACTION × the largest, largest first. */
  dominantStates: string[];
}

export interface CouplingReport {
  states: string[];
  modes: ModeParticipation[];
  /** ‖A − diag(A)‖_F / ‖A‖_F in the original coordinates (0 when A is diagonal or zero). */
  offDiagonalRatio: number;
  /** κ₂ of the modal basis; large values make the participation factors unreliable. */
  eigenvectorCondition: number;
  warning: string | null;
}

/**
 * Computes: for each mode i (eigenvalue λᵢ with right eigenvector vᵢ and left eigenvector wᵢ,
 *   wᵢ vᵢ = 1) the participation factors p_ki = |v_ki·w_ik| / Σ_k |v_ki·w_ik| of the states
 *   k = 1..n, the dominant states, and ‖A − diag(A)‖_F/‖A‖_F. A: n×n.
 * Requires: A diagonalizable, n ≥ 1.
 * Method: I. J. Pérez-Arriaga, G. C. Verghese & F. C. Schweppe, "Selective modal analysis with
 *   applications to electric power systems, Part I", IEEE Trans. Power Apparatus and Systems
 *   101(9):3117–3125, 1982. Right eigenvectors from the real modal basis T (`modalForm`):
 *   v = T_{:,c} + i·T_{:,c+1} for a pair; left eigenvectors from the rows of T⁻¹:
 *   w = (T⁻¹_{c,:} − i·T⁻¹_{c+1,:})/2, since [v, v̄] = [Re v, Im v]·[[1, 1], [i, −i]].
 * Cost: `modalForm` (≈ 45n³) plus T⁻¹ by LU (≈ 3n³).
 * Accuracy: factors inherit κ(T)·n·ε relative error; every row sums to 1 to rounding.
 * Errors: as `modalForm` ("empty", "singular" for defective A).
 * Example:
 *   couplingReport(createStateSpace({ A: [[-1, 0], [0, -2]], B: [[1], [1]], C: [[1, 1]] }))
 *   // each mode has participation [1, 0] or [0, 1]; offDiagonalRatio 0
 */
export function couplingReport(model: StateSpace): CouplingReport {
  const { A } = model;
  const n = A.rows;
  const modal = modalForm(model);
  const T = modal.T;
  const Tinv = solve(T, Matrix.eye(n));
  const states = [...model.names.states];
  const modes: ModeParticipation[] = modal.blocks.map((block) => {
    const c = block.start;
    const raw = new Array<number>(n);
    for (let k = 0; k < n; k++) {
      if (block.size === 1) raw[k] = Math.abs(T.get(k, c) * Tinv.get(c, k));
      else {
        // v_k·w_k with v_k = a + ib, w_k = (x − iy)/2
        const a = T.get(k, c), b = T.get(k, c + 1), x = Tinv.get(c, k), y = Tinv.get(c + 1, k);
        raw[k] = Math.hypot(a * x + b * y, b * x - a * y) / 2;
      }
    }
    const total = raw.reduce((s, v) => s + v, 0);
    const participation = raw.map((v) => (total > 0 ? v / total : 0));
    const largest = Math.max(...participation);
    const dominantStates = participation
      .map((p, k) => ({ p, k }))
      .filter((e) => e.p >= DOMINANT_FRACTION * largest && e.p > 0)
      .sort((a, b) => b.p - a.p)
      .map((e) => states[e.k]!);
    return { eigenvalue: block.eigenvalue, participation, dominantStates };
  });
  let off = 0;
  for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) if (i !== j) off += A.get(i, j) ** 2;
  const normA = A.norm("frobenius");
  return {
    states,
    modes,
    offDiagonalRatio: normA === 0 ? 0 : Math.sqrt(off) / normA,
    eigenvectorCondition: modal.condition,
    warning: modal.warning,
  };
}
