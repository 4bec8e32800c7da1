/**
 * Continuous and discrete Lyapunov equations on one real Schur form of A.
 */
import { Matrix } from "ml-matrix";
import { EngineError } from "../errors";
import { allFinite, frobeniusRowMajor, multiply, transpose, matrixOfRowMajor, rowMajorOf } from "./denseKernels";
import { defaultSchurIterationLimit, realSchurRowMajor } from "./schur";
import { solveQuasiTriangularInPlace, type QuasiTriangularEquation } from "./sylvester";
import { requireFinite, requireSquareFinite, shapeOf } from "./validate";

function prepare(A: unknown, Q: unknown): { A: Matrix; Q: Matrix; n: number } {
  if (!(A instanceof Matrix)) throw new EngineError("invalid-argument", "A must be a Matrix", { argument: "A" });
  if (!(Q instanceof Matrix)) throw new EngineError("invalid-argument", "Q must be a Matrix", { argument: "Q" });
  requireSquareFinite(A, "A");
  const n = A.rows;
  if (Q.rows !== n || Q.columns !== n) {
    throw new EngineError("shape-mismatch", `Q must have the same shape as A (A is ${shapeOf(A)}, Q is ${shapeOf(Q)})`, {
      arguments: ["A", "Q"],
    });
  }
  requireFinite(Q, "Q");
  return { A, Q, n };
}

/**
 * Shared body. With A = U S Uᵀ and Y = UᵀXU the equation becomes S Y + Y Sᵀ = F or
 * S Y Sᵀ − Y = F with F = −UᵀQU. Sᵀ is lower quasi-triangular; with the reversal permutation P,
 * P Sᵀ P is upper quasi-triangular and Z = Y P solves S Z + Z (P Sᵀ P) = F P (resp. the Stein
 * form), so both reuse the Bartels–Stewart kernel with a single Schur decomposition.
 */
function solveLyapunovKind(kind: QuasiTriangularEquation, a: Float64Array, Q: Matrix, n: number, threshold: number, equation: string): Matrix {
  // Row-major Schur kernel: same checks as realSchur, without the Matrix round trips.
  const { t: s, q: u } = realSchurRowMajor(a, n, defaultSchurIterationLimit(n));
  const q = rowMajorOf(Q);
  const f = multiply(multiply(transpose(u, n, n), q, n, n, n), u, n, n, n);
  // F P (columns reversed), negated: the kernel solves "= F", our equations have "+ Q = 0".
  const fp = new Float64Array(n * n);
  for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) fp[i * n + j] = -f[i * n + (n - 1 - j)]!;
  // T' = P Sᵀ P: T'[i][j] = S[n−1−j][n−1−i]
  const tp = new Float64Array(n * n);
  for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) tp[i * n + j] = s[(n - 1 - j) * n + (n - 1 - i)]!;
  solveQuasiTriangularInPlace(kind, s, n, tp, n, fp, threshold, { equation, first: "A", second: "A" });
  const y = new Float64Array(n * n); // Y = Z P
  for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) y[i * n + j] = fp[i * n + (n - 1 - j)]!;
  const x = multiply(multiply(u, y, n, n, n), transpose(u, n, n), n, n, n);
  // Symmetric Q has a symmetric solution; remove the O(ε) skew part rounding leaves.
  let symmetric = true;
  for (let i = 0; i < n && symmetric; i++) for (let j = i + 1; j < n; j++) if (q[i * n + j] !== q[j * n + i]) { symmetric = false; break; }
  if (symmetric) {
    for (let i = 0; i < n; i++) for (let j = i + 1; j < n; j++) {
      const avg = 0.5 * (x[i * n + j]! + x[j * n + i]!);
      x[i * n + j] = avg;
      x[j * n + i] = avg;
    }
  }
  if (!allFinite(x)) throw new EngineError("non-finite", `the solution X of ${equation} overflows (the equation is nearly singular)`, {});
  return matrixOfRowMajor(x, n, n);
}

/**
 * Computes X: n×n solving A X + X Aᵀ + Q = 0 for A: n×n, Q: n×n.
 *
 * Requires: A square, finite; Q finite, n×n; λᵢ(A) + λⱼ(A) ≠ 0 for all i, j (true when A is
 * Hurwitz). Q need not be symmetric; when it is (exactly), X is returned exactly symmetric.
 *
 * Method: Bartels & Stewart, "Solution of the matrix equation AX + XB = C", Comm. ACM 15(9),
 * 1972, with B = Aᵀ sharing A's real Schur form (one Francis QR run, `realSchur`); Sᵀ is made
 * upper quasi-triangular by the reversal permutation so the same block back substitution
 * applies.
 *
 * Cost: one Schur decomposition (≈ 25n³ flops), 4 n×n products (8n³) and the quasi-triangular
 * solve (≈ 2n³). Memory O(n²).
 *
 * Accuracy: relative residual ‖AX + XAᵀ + Q‖_F / (2‖A‖_F‖X‖_F + ‖Q‖_F) of order n·ε; forward error
 * ≲ residual·‖A‖_F / sep(A, −Aᵀ), with sep ≤ min|λᵢ + λⱼ| (for Hurwitz A: 2·min|Re λ|).
 * Tests require relative residual ≤ 1e-12 on well-conditioned problems. Output checked finite.
 *
 * Errors: "singular" when some λᵢ + λⱼ ≈ 0 (block pivot ≤ 20·n·ε·‖A‖_F; e.g. an eigenvalue
 * at 0 or a pair ±iω), naming both eigenvalues in details; "shape-mismatch", "empty",
 * "non-finite", "invalid-argument"; "no-convergence" from realSchur.
 *
 * Example: A = [[−1]], Q = [[2]] gives X = [[1]]; check |A X + X Aᵀ + Q| < 1e-15.
 */
export function solveContinuousLyapunov(A: Matrix, Q: Matrix): Matrix {
  const p = prepare(A, Q);
  const a = rowMajorOf(p.A);
  const threshold = 20 * p.n * Number.EPSILON * frobeniusRowMajor(a);
  return solveLyapunovKind("sylvester", a, p.Q, p.n, threshold, "A X + X Aᵀ + Q = 0");
}

/**
 * Computes X: n×n solving A X Aᵀ − X + Q = 0 (the Stein equation) for A: n×n, Q: n×n.
 *
 * Requires: A square, finite; Q finite n×n; λᵢ(A)·λⱼ(A) ≠ 1 for all i, j (true when A is Schur
 * stable, all |λ| < 1). Symmetric Q gives an exactly symmetric X.
 *
 * Method: Schur method of A. Y. Barraud, "A numerical algorithm to solve AᵀXA − X = Q", IEEE
 * Trans. Automatic Control 22(5):883–885, 1977 (the discrete analogue of Bartels–Stewart; also
 * G. Kitagawa, "An algorithm for solving the matrix equation X = FXFᵀ + S", Int. J. Control
 * 25(5), 1977): with A = U S Uᵀ, solve S Y Sᵀ − Y = −UᵀQU by block back substitution, each 1×1,
 * 1×2, 2×1 or 2×2 block system (Sᵢᵢ ⊗ Sⱼⱼ − I) solved by complete pivoting; X = U Y Uᵀ.
 *
 * Cost: one Schur decomposition (≈ 25n³), 4 n×n products (8n³) and the quasi-triangular solve
 * (≈ 3n³: the extra S·W product per column block). Memory O(n²).
 *
 * Accuracy: relative residual ‖AXAᵀ − X + Q‖_F / ((‖A‖_F² + 1)‖X‖_F + ‖Q‖_F) of order n·ε;
 * forward error ≲ residual / sep_d, sep_d ≤ min|1 − λᵢλⱼ|. Tests require ≤ 1e-12 relative
 * residual on well-conditioned problems. Output checked finite.
 *
 * Errors: "singular" when some λᵢλⱼ ≈ 1 (block pivot ≤ 20·n·ε·(1 + ‖A‖_F²); e.g. an eigenvalue
 * on the unit circle), naming both eigenvalues; "shape-mismatch", "empty", "non-finite",
 * "invalid-argument"; "no-convergence" from realSchur.
 *
 * Example: A = [[0.5]], Q = [[3]] gives X = [[4]]; check |A X Aᵀ − X + Q| < 1e-15.
 */
export function solveDiscreteLyapunov(A: Matrix, Q: Matrix): Matrix {
  const p = prepare(A, Q);
  const a = rowMajorOf(p.A);
  const normA = frobeniusRowMajor(a);
  const threshold = 20 * p.n * Number.EPSILON * (1 + normA * normA);
  return solveLyapunovKind("stein", a, p.Q, p.n, threshold, "A X Aᵀ − X + Q = 0");
}
