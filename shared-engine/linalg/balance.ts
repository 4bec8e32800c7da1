/**
 * Balancing of a square matrix before an eigenvalue computation: a permutation that isolates
 * eigenvalues already visible on the diagonal, then a diagonal scaling by powers of two that
 * makes row and column norms comparable. Both are exact similarity transformations (powers of
 * two introduce no rounding), so eigenvalues are unchanged while their computed accuracy
 * usually improves on badly scaled matrices.
 */
import { Matrix } from "ml-matrix";
import { EngineError } from "../errors";
import { fromFloat64, requireSquareFinite, toFloat64 } from "./validate";

/**
 * B = D⁻¹ Pᵀ A P D, i.e. B[i][j] = A[perm[i]][perm[j]] · scale[j] / scale[i].
 * P is the permutation matrix with P[perm[j]][j] = 1 and D = diag(scale). B is upper triangular
 * outside rows/columns low..high (0-based, inclusive): B[i][j] = 0 whenever i > j and
 * (j < low or i > high). Eigenvalues B[i][i] for i < low or i > high are isolated; only the
 * window low..high needs an iterative eigenvalue method. scale[i] = 1 outside the window.
 */
export interface Balanced {
  B: Matrix;
  scale: Float64Array;
  perm: Int32Array;
  low: number;
  high: number;
}

const RADIX = 2;
const CONVERGENCE_FACTOR = 0.95; // LAPACK dgebal: rescale only when c + r drops below 95 % of before
const SAFE_MIN = 2.2250738585072014e-308;
const SFMIN1 = SAFE_MIN / Number.EPSILON;
const SFMAX1 = 1 / SFMIN1;
const SFMIN2 = SFMIN1 * RADIX;
const SFMAX2 = 1 / SFMIN2;
/** Scaling sweeps allowed. Each effective sweep changes some exponent, and exponents are bounded,
 * so real inputs stop after a handful; the cap only guards against a defect. */
const MAX_SCALING_SWEEPS = 1000;

/**
 * Kernel: balances the row-major n×n array `a` in place. Fills `perm` (length n) and `scale`
 * (length n) as documented on `Balanced` and returns the window [low, high].
 */
export function balanceInPlace(
  a: Float64Array,
  n: number,
  permute: boolean,
  doScale: boolean,
  perm: Int32Array,
  scale: Float64Array,
): { low: number; high: number } {
  for (let i = 0; i < n; i++) {
    perm[i] = i;
    scale[i] = 1;
  }
  let low = 0;
  let high = n - 1;
  const swap = (i: number, j: number, colRowsTo: number, rowColsFrom: number): void => {
    if (i === j) return;
    for (let r = 0; r <= colRowsTo; r++) {
      const t = a[r * n + i];
      a[r * n + i] = a[r * n + j];
      a[r * n + j] = t;
    }
    for (let c = rowColsFrom; c < n; c++) {
      const t = a[i * n + c];
      a[i * n + c] = a[j * n + c];
      a[j * n + c] = t;
    }
    const p = perm[i];
    perm[i] = perm[j];
    perm[j] = p;
  };

  if (permute) {
    // Rows whose off-diagonal part within columns low..high is zero isolate an eigenvalue:
    // move them to the bottom (Parlett & Reinsch 1969, §2; LAPACK dgebal).
    let found = true;
    while (found && high > low) {
      found = false;
      for (let i = high; i >= low; i--) {
        let isolated = true;
        for (let j = low; j <= high; j++) {
          if (j !== i && a[i * n + j] !== 0) {
            isolated = false;
            break;
          }
        }
        if (isolated) {
          // swapping rows/columns i and high: columns over rows 0..high, rows over columns low..n-1
          swap(i, high, high, low);
          high--;
          found = true;
          break;
        }
      }
    }
    // Columns whose off-diagonal part within rows low..high is zero: move them to the top.
    found = true;
    while (found && high > low) {
      found = false;
      for (let j = low; j <= high; j++) {
        let isolated = true;
        for (let i = low; i <= high; i++) {
          if (i !== j && a[i * n + j] !== 0) {
            isolated = false;
            break;
          }
        }
        if (isolated) {
          swap(j, low, high, low);
          low++;
          found = true;
          break;
        }
      }
    }
  }
  if (!doScale || high <= low) return { low, high };

  // Iterative scaling by powers of the radix (Parlett & Reinsch 1969; James, Langou & Lowery,
  // "On matrix balancing and eigenvector computation", arXiv:1401.5766, 2014: 2-norms of the
  // off-diagonal parts of row and column, as LAPACK 3.5+ dgebal).
  let sweeps = 0;
  let noconv = true;
  while (noconv) {
    if (sweeps >= MAX_SCALING_SWEEPS) {
      throw new EngineError("no-convergence", `Balancing did not converge within ${MAX_SCALING_SWEEPS} sweeps`, {
        iterations: sweeps,
      });
    }
    sweeps++;
    noconv = false;
    for (let i = low; i <= high; i++) {
      let c = 0;
      let r = 0;
      let ca = 0;
      let ra = 0;
      let cmax = 0;
      let rmax = 0;
      for (let j = low; j <= high; j++) {
        if (j === i) continue;
        const x = Math.abs(a[j * n + i]);
        const y = Math.abs(a[i * n + j]);
        if (x > cmax) cmax = x;
        if (y > rmax) rmax = y;
      }
      if (cmax === 0 || rmax === 0) continue;
      for (let j = low; j <= high; j++) {
        if (j === i) continue;
        const x = a[j * n + i] / cmax;
        const y = a[i * n + j] / rmax;
        c += x * x;
        r += y * y;
      }
      c = cmax * Math.sqrt(c);
      r = rmax * Math.sqrt(r);
      for (let j = 0; j <= high; j++) ca = Math.max(ca, Math.abs(a[j * n + i]));
      for (let j = low; j < n; j++) ra = Math.max(ra, Math.abs(a[i * n + j]));
      let g = r / RADIX;
      let f = 1;
      const s = c + r;
      while (c < g && Math.max(f, c, ca) < SFMAX2 && Math.min(r, g, ra) > SFMIN2) {
        f *= RADIX;
        c *= RADIX;
        ca *= RADIX;
        r /= RADIX;
        g /= RADIX;
        ra /= RADIX;
      }
      g = c / RADIX;
      while (g >= r && Math.max(r, ra) < SFMAX2 && Math.min(f, c, g, ca) > SFMIN2) {
        f /= RADIX;
        c /= RADIX;
        g /= RADIX;
        ca /= RADIX;
        r *= RADIX;
        ra *= RADIX;
      }
      if (c + r >= CONVERGENCE_FACTOR * s) continue;
      if (f < 1 && scale[i] < 1 && f * scale[i] <= SFMIN1) continue;
      if (f > 1 && scale[i] > 1 && scale[i] >= SFMAX1 / f) continue;
      scale[i] *= f;
      noconv = true;
      const gInv = 1 / f;
      for (let j = low; j < n; j++) a[i * n + j] *= gInv;
      for (let j = 0; j <= high; j++) a[j * n + i] *= f;
    }
  }
  return { low, high };
}

/**
 * Computes: B = D⁻¹ Pᵀ A P D (all n×n) with P a permutation isolating eigenvalues and D =
 * diag(scale) a diagonal of powers of two making the off-diagonal row and column 2-norms of
 * the window low..high comparable. See `Balanced` for the exact index conventions.
 *
 * Requires: A square, non-empty, finite. options.permute / options.scale default to true.
 *
 * Method: B. N. Parlett & C. Reinsch, "Balancing a matrix for calculation of eigenvalues and
 * eigenvectors", Numer. Math. 13 (1969) 293–304, in the form of LAPACK dgebal (2-norms, stop
 * when a rescaling reduces c + r by less than 5 %, guards against over/underflow of the scale).
 *
 * Cost: O(n²) per sweep, a few sweeps in practice; at most 1000 sweeps. O(n²) memory.
 *
 * Accuracy: exact: permutation and power-of-two scaling introduce no rounding, so
 * B[i][j] = A[perm[i]][perm[j]]·scale[j]/scale[i] holds to the last bit (barring underflow).
 *
 * Errors: "empty", "shape-mismatch", "non-finite" (bad input); "no-convergence" if the
 * scaling loop reached its sweep limit.
 *
 * Example:
 *   const { B, scale, perm } = balance(new Matrix([[1, 1e6], [1e-6, 1]]));
 *   // B ≈ [[1, ~1], [~1, 1]], and B[i][j] === A[perm[i]][perm[j]] * scale[j] / scale[i]
 */
export function balance(A: Matrix, options: { permute?: boolean; scale?: boolean } = {}): Balanced {
  requireSquareFinite(A, "A");
  const n = A.rows;
  const a = toFloat64(A);
  const perm = new Int32Array(n);
  const scale = new Float64Array(n);
  const { low, high } = balanceInPlace(a, n, options.permute ?? true, options.scale ?? true, perm, scale);
  return { B: fromFloat64(a, n, n), scale, perm, low, high };
}
