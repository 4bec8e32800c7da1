/**
 * Sylvester equation A X + X B = C by the Bartels–Stewart method, and the quasi-triangular
 * kernel it shares with the Lyapunov solvers (continuous: S Y + Y T = F; discrete/Stein:
 * S Y T − Y = F).
 */
import { Matrix } from "ml-matrix";
import { EngineError } from "../errors";
import { allFinite, multiply, transpose, matrixOfRowMajor, rowMajorOf } from "./denseKernels";
import { defaultSchurIterationLimit, realSchurRowMajor } from "./schur";
import { blockPairGap, blockSpectrumInto, clearlySeparated, pairSeparation, solveByCompletePivoting, spectralRadiusOfQuasiTriangular, throwSingular, type QuasiTriangularEquation, type SingularLabels } from "./sylvesterBlocks";
import { requireFinite, requireSquareFinite, shapeOf } from "./validate";

export type { QuasiTriangularEquation, SingularLabels } from "./sylvesterBlocks";

/** Starts of the diagonal blocks of an upper quasi-triangular n×n row-major matrix. */
function blockStarts(t: Float64Array, n: number): number[] {
  const starts: number[] = [];
  for (let i = 0; i < n; ) {
    starts.push(i);
    i += i + 1 < n && t[(i + 1) * n + i] !== 0 ? 2 : 1;
  }
  return starts;
}

// Per-block eigenvalue data of S and T (blockSpectrumInto: real parts, then |imaginary parts|);
// the kernel is synchronous and not re-entrant.
let spectrumS = new Float64Array(0);
let spectrumT = new Float64Array(0);

// Scratch for solveSmallBlock's Kronecker matrix (at most 4×4; the kernel is synchronous and
// not re-entrant, so a module-level buffer avoids an allocation per block).
const blockMatrixScratch = new Float64Array(16);

/**
 * Solves the p×q block equation (p, q ∈ {1, 2}, not both 1: the kernel does 1×1 pairs inline)
 * in place in `r` (row-major p×q):
 * sylvester: Sᵢᵢ Z + Z Tⱼⱼ = R; stein: Sᵢᵢ Z Tⱼⱼ − Z = R. Forms the pq×pq Kronecker matrix and
 * uses Gaussian elimination with complete pivoting (as LAPACK dlasy2 does for these blocks).
 * The caller has already tested the block pair's separation (`blockPairGap`); this returns
 * false only for a zero pivot in floating point (r is then not a solution).
 */
function solveSmallBlock(
  kind: QuasiTriangularEquation, s: Float64Array, n: number, i0: number, p: number,
  t: Float64Array, m: number, j0: number, q: number, r: Float64Array,
): boolean {
  const N = p * q;
  const M = blockMatrixScratch;
  for (let ri = 0; ri < p; ri++) {
    for (let ci = 0; ci < q; ci++) {
      const row = ri * q + ci;
      for (let rj = 0; rj < p; rj++) {
        for (let cj = 0; cj < q; cj++) {
          const col = rj * q + cj;
          const sv = s[(i0 + ri) * n + i0 + rj]!;
          const tv = t[(j0 + cj) * m + j0 + ci]!; // T[c', c]
          let v: number;
          if (kind === "sylvester") v = (ci === cj ? sv : 0) + (ri === rj ? tv : 0);
          else v = sv * tv - (row === col ? 1 : 0);
          M[row * N + col] = v;
        }
      }
    }
  }
  return solveByCompletePivoting(M, N, r, 0) > 0;
}

/**
 * Kernel: solves S Y + Y T = F ("sylvester") or S Y T − Y = F ("stein") for Y, in place in f
 * (row-major n×m), with S (n×n) and T (m×m) upper quasi-triangular (real Schur forms).
 * Column blocks of T are taken left to right, row blocks of S bottom to top (Bartels & Stewart
 * 1972, §2; Barraud 1977 for the Stein form). Throws "singular" when a block pair's eigenvalue
 * separation (`blockPairGap`: min |λ + μ|, or |λμ − 1| for "stein") is ≤ `threshold`, or its
 * small system has a zero pivot, naming the offending eigenvalues and the compared gap.
 */
export function solveQuasiTriangularInPlace(
  kind: QuasiTriangularEquation, s: Float64Array, n: number, t: Float64Array, m: number,
  f: Float64Array, threshold: number, labels: SingularLabels,
): void {
  const rowBlocks = blockStarts(s, n);
  const colBlocks = blockStarts(t, m);
  const rhs = new Float64Array(4);
  const tmp = new Float64Array(4);
  if (spectrumS.length < 2 * n) spectrumS = new Float64Array(2 * n);
  if (spectrumT.length < 2 * m) spectrumT = new Float64Array(2 * m);
  const sRe = spectrumS.subarray(0, n), sIm = spectrumS.subarray(n, 2 * n);
  const tRe = spectrumT.subarray(0, m), tIm = spectrumT.subarray(m, 2 * m);
  blockSpectrumInto(s, n, sRe, sIm);
  blockSpectrumInto(t, m, tRe, tIm);
  const fastTest = threshold >= 1e-140;
  // Work on Yᵀ (row j of yt is column j of Y) so every inner loop below runs over contiguous
  // memory: the substitution is column-oriented.
  const yt = transpose(f, n, m);
  const w = new Float64Array(2 * n);
  for (let jb = 0; jb < colBlocks.length; jb++) {
    const j0 = colBlocks[jb]!;
    const q = (colBlocks[jb + 1] ?? m) - j0;
    // Step 1: move the already-solved columns to the right-hand side.
    // sylvester: F_j −= Y[:, :j0] T[:j0, j];  stein: F_j −= S (Y[:, :j0] T[:j0, j]).
    if (j0 > 0) {
      w.fill(0);
      for (let c = 0; c < q; c++) {
        const wo = c * n;
        for (let k = 0; k < j0; k++) {
          const tkc = t[k * m + j0 + c]!;
          if (tkc === 0) continue;
          const ko = k * n;
          for (let r = 0; r < n; r++) w[wo + r] += tkc * yt[ko + r]!;
        }
      }
      for (let c = 0; c < q; c++) {
        const wo = c * n;
        const yo = (j0 + c) * n;
        if (kind === "sylvester") {
          for (let r = 0; r < n; r++) yt[yo + r] -= w[wo + r]!;
        } else {
          for (let r = 0; r < n; r++) {
            // S is upper quasi-triangular: row r has nonzeros from column r−1 on.
            let v = 0;
            const so = r * n;
            for (let k = r > 0 ? r - 1 : 0; k < n; k++) v += s[so + k]! * w[wo + k]!;
            yt[yo + r] -= v;
          }
        }
      }
    }
    // Step 2: back substitution over the row blocks of S, bottom to top.
    for (let ib = rowBlocks.length - 1; ib >= 0; ib--) {
      const i0 = rowBlocks[ib]!;
      const p = (rowBlocks[ib + 1] ?? n) - i0;
      for (let a = 0; a < p; a++) {
        const so = (i0 + a) * n;
        for (let c = 0; c < q; c++) {
          const yo = (j0 + c) * n;
          let v = 0; // (S[i, below] Y[below, j])[a][c]
          for (let k = i0 + p; k < n; k++) v += s[so + k]! * yt[yo + k]!;
          rhs[a * q + c] = v;
        }
      }
      if (kind === "stein") {
        // the solved part enters multiplied by T_jj: (S[i, below] Y[below, j]) T_jj
        for (let k = 0; k < p * q; k++) tmp[k] = rhs[k]!;
        for (let a = 0; a < p; a++) for (let c = 0; c < q; c++) {
          let v = 0;
          for (let cc = 0; cc < q; cc++) v += tmp[a * q + cc]! * t[(j0 + cc) * m + j0 + c]!;
          rhs[a * q + c] = v;
        }
      }
      for (let a = 0; a < p; a++) for (let c = 0; c < q; c++) rhs[a * q + c] = yt[(j0 + c) * n + i0 + a]! - rhs[a * q + c]!;
      if (p === 1 && q === 1) {
        // two real eigenvalues (the common case): the pivot s_ii + t_jj (s_ii·t_jj − 1) is the
        // separation itself
        const sv = s[i0 * n + i0]!, tv = t[j0 * m + j0]!;
        const d = kind === "sylvester" ? sv + tv : sv * tv - 1;
        if (!(Math.abs(d) > threshold)) throwSingular(kind, s, n, i0, 1, t, m, j0, 1, threshold, labels);
        yt[j0 * n + i0] = rhs[0]! / d;
        continue;
      }
      // The singularity test compares the separation of the pair's eigenvalues (the number the
      // error reports), not a pivot of the block system: see the threshold in the callers.
      const si = sIm[i0]!, tj = tIm[j0]!;
      if (!(fastTest && si >= 0 && tj >= 0 && clearlySeparated(kind, sRe[i0]!, si, tRe[j0]!, tj, threshold))) {
        const gap = si >= 0 && tj >= 0 ? pairSeparation(kind, sRe[i0]!, si, tRe[j0]!, tj) : blockPairGap(kind, s, n, i0, p, t, m, j0, q);
        if (!(gap > threshold)) throwSingular(kind, s, n, i0, p, t, m, j0, q, threshold, labels);
      }
      if (!solveSmallBlock(kind, s, n, i0, p, t, m, j0, q, rhs)) throwSingular(kind, s, n, i0, p, t, m, j0, q, threshold, labels, true);
      for (let a = 0; a < p; a++) for (let c = 0; c < q; c++) yt[(j0 + c) * n + i0 + a] = rhs[a * q + c]!;
    }
  }
  for (let r = 0; r < n; r++) for (let c = 0; c < m; c++) f[r * m + c] = yt[c * n + r]!;
}

function requireMatrix(value: unknown, name: string): Matrix {
  if (!(value instanceof Matrix)) throw new EngineError("invalid-argument", `${name} must be a Matrix`, { argument: name });
  return value;
}

/**
 * Computes X: n×m solving A X + X B = C for A: n×n, B: m×m, C: n×m.
 *
 * Requires: A, B square, finite, non-empty; C finite n×m; λᵢ(A) + μⱼ(B) ≠ 0 for all i, j (the
 * equation is then uniquely solvable).
 *
 * Method: R. H. Bartels & G. W. Stewart, "Solution of the matrix equation AX + XB = C"
 * (Algorithm 432), Comm. ACM 15(9):820–826, 1972: real Schur forms A = U S Uᵀ, B = V T Vᵀ
 * (Francis QR, `realSchur`), then S Y + Y T = UᵀCV by block back substitution over the 1×1/2×2
 * diagonal blocks (each small block system solved by complete pivoting), and X = U Y Vᵀ.
 *
 * Cost: two Schur decompositions (≈ 25n³ + 25m³ flops), the transformations
 * (≈ 2nm(n+m)·2 flops) and the triangular solve (≈ nm(n+m) flops). Memory O(n² + m² + nm).
 * No iteration beyond realSchur's (capped at 30·max(10, size) sweeps).
 *
 * Accuracy: the relative residual ‖AX + XB − C‖_F / ((‖A‖_F + ‖B‖_F)‖X‖_F + ‖C‖_F) is a small
 * multiple of (n+m)·ε (Higham, "Accuracy and Stability of Numerical Algorithms", 2nd ed., §16.2);
 * the forward error is bounded by about that residual divided by sep(A, −B) ≤ min|λᵢ + μⱼ|, so
 * when the separation is small relative to ‖A‖_F + ‖B‖_F, X loses log₁₀((‖A‖_F+‖B‖_F)/sep)
 * digits. The orthogonal reduction keeps only this normwise accuracy: on a graded A = D·A0·D⁻¹
 * the small entries of X can be wrong even when A0's equation is well conditioned (as in
 * scipy's solve_sylvester; test/fixtures/linalg/lyapunov_graded.json). Tests: relative residual
 * ≤ 1e-12 on well-conditioned problems, ≤ 100·max(n, m)·ε on the graded fixtures. Output
 * checked finite.
 *
 * Errors: "singular" when for some pair of diagonal blocks of the Schur forms the separation
 * min |λᵢ(A) + μⱼ(B)| over their eigenvalues is ≤ τ = 10·max(n, m)·ε·(ρ(A) + ρ(B)), ρ the
 * spectral radius; message and details (eigenvalueFirst, eigenvalueSecond, gap, threshold)
 * report exactly the gap and τ that were compared. Why this τ (our derivation, not taken from
 * a reference): the computed Schur forms are exact for A + E, B + F with ‖E‖ ≲ p(n)·ε·‖A‖
 * (normwise backward stability of Francis QR), so the computed λᵢ + μⱼ is uncertain by at
 * least ε·(ρ(A) + ρ(B)) even for normal A, B, and ρ is the smallest ‖W⁻¹AW‖₂ over similarities
 * W (an infimum when A is defective), i.e. the uncertainty in the best-scaled coordinates; a
 * gap below a small multiple of it cannot be told from 0, whatever the units of A and B. The
 * previous scale ε·(‖A‖_F + ‖B‖_F) (also that of LAPACK dtrsyl's perturbation threshold, from
 * memory, with the max-norm) is not invariant under diagonal similarity: a graded A = D·A0·D⁻¹
 * has ‖A‖_F ≫ ρ(A). The pivots of the small block systems are not compared either: a 2×2 block
 * [a b; c a] with |b| ≫ |c| has Kronecker pivots near (λ + μ)·|c/b| for a well-separated pair;
 * they only have to be nonzero ("singular", "numerically singular ... zero pivot", otherwise).
 * Gaps above τ are solved (the residual stays of order ε; X may be large); the API returns no
 * separation estimate. "shape-mismatch", "empty", "non-finite", "invalid-argument" for bad
 * inputs; "no-convergence" from realSchur; "non-finite" if X overflows.
 *
 * Example: A = [[1, 0], [0, 2]], B = [[3]], C = [[4], [10]] gives X = [[1], [2]];
 * check ‖A X + X B − C‖_F < 1e-15.
 */
export function solveSylvester(A: Matrix, B: Matrix, C: Matrix): Matrix {
  requireMatrix(A, "A");
  requireMatrix(B, "B");
  requireMatrix(C, "C");
  requireSquareFinite(A, "A");
  requireSquareFinite(B, "B");
  const n = A.rows;
  const m = B.rows;
  if (C.rows !== n || C.columns !== m) {
    throw new EngineError(
      "shape-mismatch",
      `C must be ${n}×${m} (rows of A × columns of B; A is ${shapeOf(A)}, B is ${shapeOf(B)}, C is ${shapeOf(C)})`,
      { arguments: ["A", "B", "C"] },
    );
  }
  requireFinite(C, "C");
  // Row-major Schur kernel: the same checks as realSchur, without the Matrix round trips.
  const a = rowMajorOf(A);
  const b = rowMajorOf(B);
  const { t: s, q: u } = realSchurRowMajor(a, n, defaultSchurIterationLimit(n));
  const { t, q: v } = realSchurRowMajor(b, m, defaultSchurIterationLimit(m));
  // F = Uᵀ C V
  const f = multiply(multiply(transpose(u, n, n), rowMajorOf(C), n, n, m), v, n, m, m);
  const threshold = 10 * Math.max(n, m) * Number.EPSILON * (spectralRadiusOfQuasiTriangular(s, n) + spectralRadiusOfQuasiTriangular(t, m));
  solveQuasiTriangularInPlace("sylvester", s, n, t, m, f, threshold, { equation: "A X + X B = C", first: "A", second: "B" });
  const x = multiply(multiply(u, f, n, n, m), transpose(v, m, m), n, m, m);
  if (!allFinite(x)) {
    throw new EngineError("non-finite", "the solution X of A X + X B = C overflows (the equation is nearly singular)", {});
  }
  return matrixOfRowMajor(x, n, m);
}
