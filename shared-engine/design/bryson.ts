/**
 * Bryson's rule: diagonal LQR weights from the largest acceptable state and input excursions.
 */
import { Matrix } from "ml-matrix";
import { EngineError } from "../errors";

function checkLimits(values: number[], name: string, allowInfinite: boolean): void {
  if (!Array.isArray(values) || values.length === 0) {
    throw new EngineError("empty", `${name} is empty; give one limit per ${name === "maxState" ? "state" : "input"}`, { argument: name });
  }
  values.forEach((v, i) => {
    const ok = typeof v === "number" && v > 0 && (Number.isFinite(v) || (allowInfinite && v === Infinity));
    if (!ok) {
      throw new EngineError(
        typeof v === "number" && Number.isNaN(v) ? "non-finite" : "invalid-argument",
        `${name}[${i}] must be a positive ${allowInfinite ? "number (or Infinity for an unweighted state)" : "finite number"} (it is ${String(v)})`,
        { argument: name, index: i },
      );
    }
  });
}

/**
 * Computes: Q = diag(1/x₁², …, 1/xₙ²) (n×n) and R = diag(1/u₁², …, 1/u_m²) (m×m) from the
 * largest acceptable magnitudes xᵢ = maxState[i] and uⱼ = maxInput[j], so that every state and
 * input contributes about 1 to the cost when it reaches its limit.
 *
 * Requires: n ≥ 1 and m ≥ 1 limits, each positive; maxState[i] = Infinity leaves state i
 * unweighted (Qii = 0); input limits must be finite (R must be positive definite).
 *
 * Method: Bryson's rule (A. E. Bryson & Y.-C. Ho, "Applied Optimal Control", Hemisphere 1975,
 * §5.4); a starting point for iterative tuning, not an optimum.
 *
 * Cost: O(n² + m²) to fill the matrices. Accuracy: exact up to one rounding per entry.
 *
 * Errors: "empty" (no limits), "invalid-argument" (zero, negative, infinite input limit),
 * "non-finite" (NaN).
 *
 * Example:
 *   const { Q, R } = brysonWeights([0.1, 2], [5]);
 *   // Q = diag(100, 0.25), R = [[0.04]]; check: Q.get(0, 0) * 0.1 ** 2 === 1
 */
export function brysonWeights(maxState: number[], maxInput: number[]): { Q: Matrix; R: Matrix } {
  checkLimits(maxState, "maxState", true);
  checkLimits(maxInput, "maxInput", false);
  const Q = Matrix.zeros(maxState.length, maxState.length);
  maxState.forEach((x, i) => Q.set(i, i, x === Infinity ? 0 : 1 / (x * x)));
  const R = Matrix.zeros(maxInput.length, maxInput.length);
  maxInput.forEach((u, j) => {
    const w = 1 / (u * u);
    if (!Number.isFinite(w) || w === 0) {
      throw new EngineError("invalid-argument", `maxInput[${j}] = ${u} is out of range: 1/maxInput² ${w === 0 ? "underflows to 0" : "overflows"}`, { argument: "maxInput", index: j });
    }
    R.set(j, j, w);
  });
  maxState.forEach((x, i) => {
    if (!Number.isFinite(Q.get(i, i))) {
      throw new EngineError("invalid-argument", `maxState[${i}] = ${x} is too small: 1/maxState² overflows`, { argument: "maxState", index: i });
    }
  });
  return { Q, R };
}
