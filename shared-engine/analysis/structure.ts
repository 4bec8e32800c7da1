/**
 * Controllability and observability by the orthogonal staircase form, naming the modes that
 * fail them. Also the small orthogonal-compression helpers that the zero and minimal
 * realization routines of this folder share (`leftCompression`, `subBlock`, `stackRows`).
 */
import { Matrix, SingularValueDecomposition } from "ml-matrix";
import { EngineError } from "../errors";
import { eigenvalues, type Complex } from "../linalg";
import { matrixOfRowMajor, reflectColumns, reflectRows, rowMajorOf } from "../linalg/kernels";
import type { StateSpace } from "../model";
import { boundaryDistance, stabilityTolerance } from "./stability";

/** Copy of rows r0..r1−1, columns c0..c1−1 (exclusive ends; empty ranges give empty matrices). */
export function subBlock(M: Matrix, r0: number, r1: number, c0: number, c1: number): Matrix {
  const out = new Matrix(Math.max(0, r1 - r0), Math.max(0, c1 - c0));
  for (let i = r0; i < r1; i++) for (let j = c0; j < c1; j++) out.set(i - r0, j - c0, M.get(i, j));
  return out;
}

/** [X; Y] (X and Y with the same number of columns; either may have no rows). */
export function stackRows(X: Matrix, Y: Matrix): Matrix {
  const cols = X.rows > 0 ? X.columns : Y.columns;
  const out = new Matrix(X.rows + Y.rows, cols);
  for (let i = 0; i < X.rows; i++) for (let j = 0; j < cols; j++) out.set(i, j, X.get(i, j));
  for (let i = 0; i < Y.rows; i++) for (let j = 0; j < cols; j++) out.set(X.rows + i, j, Y.get(i, j));
  return out;
}

/** Product that accepts empty inner or outer dimensions (ml-matrix handles most, this is explicit). */
export function product(X: Matrix, Y: Matrix): Matrix {
  if (X.rows === 0 || Y.columns === 0 || X.columns === 0) return Matrix.zeros(X.rows, Y.columns);
  return X.mmul(Y);
}

/**
 * Row compression of G: r×c. Returns the numerical rank ρ = #{σᵢ > tol} and a full r×r
 * orthogonal U whose first ρ columns span range(G), so Uᵀ·G = [Σ₁V₁ᵀ; ≈0] with the bottom
 * r − ρ rows of size ≤ tol. Method: SVD (Golub–Kahan–Reinsch, via ml-matrix); a tall G is
 * padded with zero columns to get the full U. Cost O(r²·max(r, c)).
 */
export function leftCompression(G: Matrix, tol: number): { rank: number; U: Matrix; singularValues: number[] } {
  const r = G.rows;
  const c = G.columns;
  if (r === 0) return { rank: 0, U: new Matrix(0, 0), singularValues: [] };
  if (c === 0) return { rank: 0, U: Matrix.eye(r), singularValues: [] };
  let work = G;
  if (r > c) {
    work = Matrix.zeros(r, r);
    work.setSubMatrix(G, 0, 0);
  }
  const svd = new SingularValueDecomposition(work, { autoTranspose: true });
  const singularValues = svd.diagonal.slice(0, Math.min(r, c));
  if (!singularValues.every(Number.isFinite)) {
    throw new EngineError("non-finite", "a singular value decomposition overflowed (model entries too large)", {});
  }
  const U = svd.leftSingularVectors;
  if (U.rows !== r || U.columns !== r) {
    throw new EngineError("internal", `row compression expected a ${r}×${r} orthogonal factor, got ${U.rows}×${U.columns}`, {});
  }
  let rank = 0;
  while (rank < singularValues.length && singularValues[rank]! > tol) rank++;
  return { rank, U, singularValues };
}

/** The orthogonal staircase (controllability) form of a pair (A, B). */
export interface ControllabilityStaircase {
  /** Dimension n_c of the controllable subspace (sum of blockSizes). */
  controllableDimension: number;
  /** Sizes of the staircase blocks (the controllability indices' conjugate partition). */
  blockSizes: number[];
  /** Zᵀ·A·Z: block upper Hessenberg on the first n_c states, exact zeros in rows n_c.. of columns 0..n_c−1. */
  A: Matrix;
  /** Zᵀ·B with exact zeros in rows n_c... */
  B: Matrix;
  /** Orthogonal n×n; x = Z·x̃, its first n_c columns are an orthonormal basis of the controllable subspace. */
  Z: Matrix;
  /** Rank threshold used at every step. */
  tolerance: number;
}

/** Default rank threshold for the staircase: 100·n·ε·max(‖A‖_F, ‖B‖_F). */
export function staircaseTolerance(A: Matrix, B: Matrix): number {
  const scale = Math.max(A.norm("frobenius"), B.rows * B.columns > 0 ? B.norm("frobenius") : 0);
  return 100 * Math.max(1, A.rows) * Number.EPSILON * scale;
}

/**
 * Computes: an orthogonal Z (n×n) with Zᵀ A Z = [[A_c, A_12], [0, A_u]], Zᵀ B = [[B_c], [0]],
 *   (A_c: n_c×n_c, B_c: n_c×m) controllable; the eigenvalues of A_u are the uncontrollable modes.
 *   A: n×n, B: n×m.
 * Requires: finite A, B with matching rows (checked by the model constructor); tol ≥ 0 finite.
 * Method: the staircase algorithm of P. Van Dooren, "The generalized eigenstructure problem in
 *   linear system theory", IEEE Trans. Automatic Control 26(1):111–129, 1981, and A. Varga,
 *   "Numerically stable algorithm for standard controllability form determination",
 *   Electronics Letters 17(2):74–75, 1981: step k compresses the rows of the current
 *   sub-diagonal block (B at step 1): its rank and leading left singular vectors come from a
 *   thin SVD, and the orthogonal factor is applied as a similarity to the trailing states as
 *   the product of the rank-many Householder reflectors that triangularise those singular
 *   vectors (their span is all that matters), and it stops when the block has rank 0
 *   (uncontrollable remainder) or all states are reached. Never forms [B AB A²B …] (C. C. Paige,
 *   "Properties of numerical algorithms related to computing controllability", IEEE TAC 26(1),
 *   1981: that matrix can be numerically rank deficient for a robustly controllable pair).
 * Cost: at most n steps; step k costs a thin SVD of an (n − n_k)×m_k block and 4·n·(n − n_k)
 *   flops per reflector for the similarity, n reflectors in all: O(n³) (about 8n³/3 flops for
 *   single input; the earlier full-factor form was O(n⁴)). Memory O(n²).
 * Accuracy: backward stable: the form is exact for (A + ΔA, B + ΔB) with ‖Δ‖ ≲ tol + O(nε‖A‖);
 *   entries discarded as zero are ≤ tol (default `staircaseTolerance`).
 * Errors: "invalid-argument" for a negative or non-finite tol; "non-finite" on overflow.
 * Example:
 *   const s = controllabilityStaircase(new Matrix([[1, 0], [0, 2]]), new Matrix([[1], [0]]));
 *   // s.controllableDimension === 1; ‖Z·s.A·Zᵀ − A‖_F < 1e-15
 */
export function controllabilityStaircase(A: Matrix, B: Matrix, tol?: number): ControllabilityStaircase {
  const n = A.rows;
  const m = B.columns;
  const tolerance = tol ?? staircaseTolerance(A, B);
  checkTolerance(tolerance, "tol");
  const a = rowMajorOf(A);
  const b = rowMajorOf(B);
  const z = new Float64Array(n * n);
  for (let i = 0; i < n; i++) z[i * n + i] = 1;
  const v = new Float64Array(n);
  const blockSizes: number[] = [];
  let offset = 0;
  let prevStart = -1;
  let prevSize = 0;
  while (offset < n) {
    // Step k: the block to compress sits in rows offset..n−1 of B (k = 1) or of A's previous
    // block columns prevStart..prevStart+prevSize−1.
    const [src, width, c0, c1] = prevStart < 0 ? [b, m, 0, m] : [a, n, prevStart, prevStart + prevSize];
    const r = n - offset;
    const G = new Matrix(r, c1 - c0);
    for (let i = 0; i < r; i++) for (let j = c0; j < c1; j++) G.set(i, j - c0, src[(offset + i) * width + j]!);
    const { rank, basis } = leadingLeftSingularVectors(G, tolerance);
    if (rank === 0) break;
    // Orthogonal U = H₁⋯H_rank whose first `rank` columns span those of `basis` (Householder QR
    // of the basis); applied reflector by reflector as a similarity on the trailing states.
    for (let j = 0; j < rank; j++) {
      const top = offset + j;
      let norm = 0;
      for (let i = j; i < r; i++) norm = Math.hypot(norm, basis[i * rank + j]!);
      const alpha = basis[j * rank + j]!;
      const beta = alpha >= 0 ? -norm : norm;
      v.fill(0, 0, n);
      v[top] = alpha - beta;
      for (let i = j + 1; i < r; i++) v[offset + i] = basis[i * rank + j]!;
      let vv = 0;
      for (let i = top; i < n; i++) vv += v[i]! * v[i]!;
      if (!(vv > 0)) continue; // the column is already ∓‖·‖e_top: H = I
      const f = 2 / vv;
      // the basis's remaining columns get the same reflector (rows j..r−1 of the basis = top..n−1)
      for (let c = j + 1; c < rank; c++) {
        let s = 0;
        for (let i = j; i < r; i++) s += v[offset + i]! * basis[i * rank + c]!;
        s *= f;
        for (let i = j; i < r; i++) basis[i * rank + c] -= s * v[offset + i]!;
      }
      reflectRows(a, n, n, v, top, f);
      reflectRows(b, n, m, v, top, f);
      reflectColumns(a, n, v, top, f);
      reflectColumns(z, n, v, top, f);
    }
    // The compressed rows below the rank are rounding noise (≤ tol): make them exact zeros.
    for (let i = offset + rank; i < n; i++) for (let j = c0; j < c1; j++) src[i * width + j] = 0;
    prevStart = offset;
    prevSize = rank;
    offset += rank;
    blockSizes.push(rank);
  }
  for (let i = offset; i < n; i++) {
    for (let j = 0; j < m; j++) b[i * m + j] = 0;
    for (let j = 0; j < offset; j++) a[i * n + j] = 0;
  }
  return {
    controllableDimension: offset,
    blockSizes,
    A: matrixOfRowMajor(a, n, n),
    B: matrixOfRowMajor(b, n, m),
    Z: matrixOfRowMajor(z, n, n),
    tolerance,
  };
}

/**
 * The numerical rank ρ = #{σᵢ > tol} of G: r×c and its ρ leading left singular vectors as a
 * row-major r×ρ array, from a thin SVD (Golub–Kahan–Reinsch, via ml-matrix): O(r·c·min(r, c)),
 * unlike `leftCompression`, which needs the full r×r factor.
 */
function leadingLeftSingularVectors(G: Matrix, tol: number): { rank: number; basis: Float64Array } {
  const r = G.rows;
  const c = G.columns;
  if (r === 0 || c === 0) return { rank: 0, basis: new Float64Array(0) };
  const svd = new SingularValueDecomposition(G, { autoTranspose: true, computeRightSingularVectors: false });
  const singularValues = svd.diagonal;
  if (!singularValues.every(Number.isFinite)) {
    throw new EngineError("non-finite", "a singular value decomposition overflowed (model entries too large)", {});
  }
  let rank = 0;
  while (rank < Math.min(r, c) && singularValues[rank]! > tol) rank++;
  const U = svd.leftSingularVectors;
  if (U.rows !== r || U.columns < rank) {
    throw new EngineError("internal", `row compression expected ${r} rows and at least ${rank} left singular vectors, got ${U.rows}×${U.columns}`, {});
  }
  const basis = new Float64Array(r * rank);
  for (let i = 0; i < r; i++) for (let j = 0; j < rank; j++) basis[i * rank + j] = U.get(i, j);
  return { rank, basis };
}

export function checkTolerance(value: number, name: string): void {
  if (typeof value !== "number" || !Number.isFinite(value) || value < 0) {
    throw new EngineError("invalid-argument", `${name} must be a finite non-negative number (it is ${String(value)})`, { argument: name });
  }
}

export interface StructureReport {
  controllable: boolean;
  observable: boolean;
  /** Every uncontrollable mode is stable (Re λ < −tol, or |λ| < 1 − tol when sampled). */
  stabilizable: boolean;
  /** Every unobservable mode is stable. */
  detectable: boolean;
  /** Eigenvalues of the uncontrollable part (from input u), n − controllableDimension of them. */
  uncontrollableModes: Complex[];
  /** Eigenvalues of the unobservable part (at output y), n − observableDimension of them. */
  unobservableModes: Complex[];
  /** The uncontrollable modes that are not stable (why the pair is not stabilizable). */
  unstableUncontrollableModes: Complex[];
  /** The unobservable modes that are not stable (why the pair is not detectable). */
  unstableUnobservableModes: Complex[];
  controllableDimension: number;
  observableDimension: number;
  /** Rank thresholds of the two staircases and the stability band used for the modes. */
  tolerance: { controllability: number; observability: number; stability: number };
}

/**
 * Computes: controllability of (A, B) and observability of (A, C) of `model` (inputs u and
 *   outputs y; disturbance channels F, E are not used), the dimensions of the controllable and
 *   observable subspaces, the uncontrollable and unobservable modes (eigenvalues), and
 *   stabilizability/detectability. A: n×n, B: n×m, C: p×n.
 * Requires: a valid model. tol (optional) overrides both staircase rank thresholds.
 * Method: two orthogonal staircase reductions (`controllabilityStaircase` on (A, B) and on
 *   (Aᵀ, Cᵀ) by duality), Van Dooren 1981 / Varga 1981; the modes are the eigenvalues of the
 *   trailing uncontrollable (unobservable) block, by Francis QR. Equivalent to the PBH test
 *   rank[A − λI, B] = n at every eigenvalue λ (Hautus 1969), without a per-eigenvalue rank
 *   decision on nearby eigenvalues.
 * Cost: two staircases (O(n³) each) plus eigenvalues of the
 *   removed blocks.
 * Accuracy: backward stable; rank decisions at tol = 100·n·ε·max(‖A‖_F, ‖B‖_F) (resp. ‖C‖_F).
 *   A mode is "stable" when Re λ < −δ (|λ| < 1 − δ), δ = 100·n·ε·max(1, ‖A‖_F).
 * Errors: "invalid-argument" (bad tol), "no-convergence" from the eigenvalue iteration.
 * Example:
 *   structure(createStateSpace({ A: [[-1, 0], [0, 2]], B: [[1], [0]], C: [[1, 1]] }));
 *   // controllable false, uncontrollableModes [2], stabilizable false, observable true
 */
export function structure(model: StateSpace, tol?: number): StructureReport {
  const { A, B, C } = model;
  const n = A.rows;
  if (tol !== undefined) checkTolerance(tol, "tol");
  const discrete = model.sampleTime !== null;
  const stabilityBand = stabilityTolerance(A);
  const controllableStair = controllabilityStaircase(A, B, tol);
  const observableStair = controllabilityStaircase(A.transpose(), C.transpose(), tol);
  const nc = controllableStair.controllableDimension;
  const no = observableStair.controllableDimension;
  const uncontrollableModes = nc < n ? eigenvalues(subBlock(controllableStair.A, nc, n, nc, n)) : [];
  const unobservableModes = no < n ? eigenvalues(subBlock(observableStair.A, no, n, no, n)) : [];
  const notStable = (l: Complex): boolean => boundaryDistance(l, discrete) >= -stabilityBand;
  const unstableUncontrollableModes = uncontrollableModes.filter(notStable);
  const unstableUnobservableModes = unobservableModes.filter(notStable);
  return {
    controllable: nc === n,
    observable: no === n,
    stabilizable: unstableUncontrollableModes.length === 0,
    detectable: unstableUnobservableModes.length === 0,
    uncontrollableModes,
    unobservableModes,
    unstableUncontrollableModes,
    unstableUnobservableModes,
    controllableDimension: nc,
    observableDimension: no,
    tolerance: { controllability: controllableStair.tolerance, observability: observableStair.tolerance, stability: stabilityBand },
  };
}
