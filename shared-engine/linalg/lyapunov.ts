/**
 * Continuous and discrete Lyapunov equations on one real Schur form of A, solved in balanced
 * coordinates (A_b = D⁻¹AD, X = D·X_b·D with D a power-of-two diagonal).
 */
import { Matrix } from "ml-matrix";
import { EngineError } from "../errors";
import { balanceInPlace } from "./balance";
import { allFinite, multiply, multiplyInto, transpose, matrixOfRowMajor } from "./denseKernels";
import { defaultSchurIterationLimit, finiteRowMajorOf, realSchurInto, realSchurRowMajor } from "./schur";
import { solveQuasiTriangularInPlace, type QuasiTriangularEquation } from "./sylvester";
import { spectralRadiusOfQuasiTriangular } from "./sylvesterBlocks";
import { multiplyUpperInto, solveSymmetricLyapunovTriangularInPlace } from "./sylvesterSymmetric";
import { requireSquare, shapeOf } from "./validate";

/** Checks A and Q and returns their row-major copies in workspaces (errors in the order A, then Q). */
function prepare(A: unknown, Q: unknown): { A: Matrix; Q: Matrix; n: number; a: Float64Array; q: Float64Array } {
  if (!(A instanceof Matrix)) throw new EngineError("invalid-argument", "A must be a Matrix", { argument: "A" });
  if (!(Q instanceof Matrix)) throw new EngineError("invalid-argument", "Q must be a Matrix", { argument: "Q" });
  requireSquare(A, "A");
  const n = A.rows;
  if (inputA.length < n * n) {
    inputA = new Float64Array(n * n);
    inputQ = new Float64Array(n * n);
  }
  const a = finiteRowMajorOf(A, "A", inputA);
  if (Q.rows !== n || Q.columns !== n) {
    throw new EngineError("shape-mismatch", `Q must have the same shape as A (A is ${shapeOf(A)}, Q is ${shapeOf(Q)})`, {
      arguments: ["A", "Q"],
    });
  }
  const q = finiteRowMajorOf(Q, "Q", inputQ);
  return { A, Q, n, a, q };
}

// Row-major copies of A and Q (workspaces: the solvers are synchronous and not re-entrant, and
// read them only before returning).
let inputA = new Float64Array(0);
let inputQ = new Float64Array(0);
let balancePerm = new Int32Array(0);
let balanceScale = new Float64Array(0);
let balanceA = new Float64Array(0);

/** Balanced coordinates are used only when they shrink ‖A‖_F at least this much (see below). */
const BALANCE_GAIN = 4;

/**
 * Balances the workspace copies in place: a ← A_b = D⁻¹AD with D = diag(d) the power-of-two
 * scaling of Parlett–Reinsch balancing without permutation (`balanceInPlace`, on a copy), and
 * q ← Q_b = D⁻¹QD⁻¹. Returns d, or null (a and q untouched, results bit-identical to the
 * unbalanced solver) when D = I or ‖A_b‖_F > ‖A‖_F / 4. Why the cut-off (measured, not from a
 * reference): the Schur method's error scales with ε‖A‖, so balancing gains about the factor
 * ‖A‖_F/‖A_b‖_F; for a nearly balanced A (a single factor 2 in D, ‖A‖_F/‖A_b‖_F = 1.05, the
 * "non-normal 8x8" fixture of lyapunov_symmetric.json) the changed rounding alone moved the
 * forward error from 2.3e-13 to 2.0e-12 on that ill-conditioned equation. Graded models
 * (states in different units) shrink by 1e2 and far more (lyapunov_graded.json: ≥ 2.4e2).
 *
 * Both equations are congruent to their balanced form with X = D·X_b·D:
 *   D⁻¹(AX + XAᵀ + Q)D⁻¹ = (D⁻¹AD)(D⁻¹XD⁻¹) + (D⁻¹XD⁻¹)(DAᵀD⁻¹) + D⁻¹QD⁻¹
 *                        = A_b X_b + X_b A_bᵀ + Q_b            ((D⁻¹AD)ᵀ = DAᵀD⁻¹),
 *   D⁻¹(AXAᵀ − X + Q)D⁻¹ = (D⁻¹AD)(D⁻¹XD⁻¹)(DAᵀD⁻¹) − D⁻¹XD⁻¹ + D⁻¹QD⁻¹
 *                        = A_b X_b A_bᵀ − X_b + Q_b,
 * so X_b solves the same kind of equation and the eigenvalues (hence the singularity test) are
 * unchanged. Powers of two scale without rounding (barring underflow), and Q_b[i][j] is formed
 * as Q[i][j]·(1/d_min(i,j))·(1/d_max(i,j)), so an exactly symmetric Q gives an exactly symmetric Q_b.
 */
function balanceEquation(a: Float64Array, q: Float64Array, n: number): Float64Array | null {
  if (balancePerm.length < n) {
    balancePerm = new Int32Array(n);
    balanceScale = new Float64Array(n);
  }
  const nn = n * n;
  // Cheap exit first: for any diagonal D, ‖D⁻¹AD‖_F² = Σ aᵢᵢ² + Σ_{i<j} (aᵢⱼ²·rᵢⱼ² + aⱼᵢ²/rᵢⱼ²)
  // (rᵢⱼ = dⱼ/dᵢ) ≥ Σ aᵢᵢ² + 2·Σ_{i<j} |aᵢⱼ·aⱼᵢ| =: floor² (x² + y² ≥ 2|xy|). If ‖A‖_F² ≤ 16·floor²
  // no scaling can gain the factor 4 and balancing is skipped (e.g. a dense random A).
  let normA = 0, floorSq = 0;
  for (let i = 0; i < n; i++) {
    const aii = a[i * n + i]!;
    normA += aii * aii;
    floorSq += aii * aii;
    for (let j = i + 1; j < n; j++) {
      const x = a[i * n + j]!, y = a[j * n + i]!;
      normA += x * x + y * y;
      floorSq += 2 * Math.abs(x * y);
    }
  }
  if (normA <= BALANCE_GAIN * BALANCE_GAIN * floorSq) return null;
  if (balanceA.length < nn) balanceA = new Float64Array(nn);
  const ab = balanceA, d = balanceScale;
  for (let k = 0; k < nn; k++) ab[k] = a[k]!;
  balanceInPlace(ab, n, false, true, balancePerm, d);
  let identity = true;
  for (let i = 0; i < n; i++) if (d[i] !== 1) { identity = false; break; }
  if (identity) return null;
  let normAb = 0;
  for (let k = 0; k < nn; k++) normAb += ab[k]! * ab[k]!;
  // squared norms (an overflow to Infinity in normA only favours balancing, which is then right)
  if (!(normAb * (BALANCE_GAIN * BALANCE_GAIN) <= normA)) return null;
  for (let k = 0; k < nn; k++) a[k] = ab[k]!;
  for (let i = 0; i < n; i++) {
    const di = 1 / d[i]!;
    for (let j = 0; j < n; j++) {
      const dj = 1 / d[j]!;
      q[i * n + j] = i <= j ? q[i * n + j]! * di * dj : q[i * n + j]! * dj * di;
    }
  }
  return d;
}

/**
 * X = D·X_b·D in place on row-major x (n×n), entry [i][j] scaled as x·d_min(i,j)·d_max(i,j)
 * (exact for powers of two barring over/underflow; keeps a symmetric X_b exactly symmetric).
 */
function unbalanceSolution(x: Float64Array, d: Float64Array, n: number): void {
  for (let i = 0; i < n; i++) {
    const di = d[i]!;
    for (let j = 0; j < n; j++) {
      const dj = d[j]!;
      x[i * n + j] = i <= j ? x[i * n + j]! * di * dj : x[i * n + j]! * dj * di;
    }
  }
}

/**
 * Shared body. With A = U S Uᵀ and Y = UᵀXU the equation becomes S Y + Y Sᵀ = F or
 * S Y Sᵀ − Y = F with F = −UᵀQU. Sᵀ is lower quasi-triangular; with the reversal permutation P,
 * P Sᵀ P is upper quasi-triangular and Z = Y P solves S Z + Z (P Sᵀ P) = F P (resp. the Stein
 * form), so both reuse the Bartels–Stewart kernel with a single Schur decomposition.
 */
function solveLyapunovKind(kind: QuasiTriangularEquation, a: Float64Array, q: Float64Array, n: number, equation: string, d: Float64Array | null): Matrix {
  // Row-major Schur kernel: same checks as realSchur, without the Matrix round trips.
  const { t: s, q: u } = realSchurRowMajor(a, n, defaultSchurIterationLimit(n));
  const threshold = separationThreshold(kind, s, n);
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
  if (d !== null) unbalanceSolution(x, d, n);
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
 * 1972, with B = Aᵀ sharing A's real Schur form A = U S Uᵀ (one Francis QR run, `realSchur`).
 * First A is balanced without permutation (B. N. Parlett & C. Reinsch, "Balancing a matrix for
 * calculation of eigenvalues and eigenvectors", Numer. Math. 13, 1969; `balanceInPlace`): with
 * D its power-of-two diagonal, A_b X_b + X_b A_bᵀ + Q_b = 0 is solved for A_b = D⁻¹AD,
 * Q_b = D⁻¹QD⁻¹, and X = D·X_b·D (`balanceEquation` has the algebra; exact in binary). This
 * is done only when it shrinks ‖A‖_F at least 4-fold (a measured cut-off, see
 * `balanceEquation`); otherwise, and when D = I, the result is bit-identical to the plain method.
 * For exactly symmetric Q the transformed equation S Y + Y Sᵀ = −UᵀQU has a symmetric
 * solution, and only the blocks on and above the diagonal are solved, the others being their
 * transposes (`solveSymmetricLyapunovTriangularInPlace`; the same block back substitution,
 * restricted to one triangle); UᵀQU and X = U Y Uᵀ are formed as upper triangles. Otherwise Sᵀ
 * is made upper quasi-triangular by the reversal permutation so the general kernel applies.
 *
 * Cost: balancing O(n²) per sweep (a few sweeps); one Schur decomposition (≈ 25n³ flops), then for symmetric Q 2 full and 2 half n×n
 * products (6n³) and the one-triangle solve (≈ n³); for general Q 4 products (8n³) and the
 * full solve (≈ 2n³). Memory O(n²).
 *
 * Accuracy: relative residual ‖AX + XAᵀ + Q‖_F / (2‖A‖_F‖X‖_F + ‖Q‖_F) of order n·ε; forward error
 * ≲ residual·‖A‖_F / sep(A, −Aᵀ), with sep ≤ min|λᵢ + λⱼ| (for Hurwitz A: 2·min|Re λ|).
 * Balancing makes the bound hold with the balanced A_b's separation, so a graded A (states in
 * different units: A = D A₀ D⁻¹ with A₀ well scaled) costs no accuracy: on the graded fixtures
 * (grading 1e4…1e12, lyapunovGraded.test.ts) the forward error is ≤ 7e-15 where the unbalanced
 * Schur method (and scipy's solver) lose up to all digits. Tests require relative residual
 * ≤ 1e-12 on well-conditioned problems, ≤ 100·n·ε on graded ones, and the graded forward error
 * within κ₂ of the balanced equation times 100·n·ε and 10× scipy's. Output checked finite.
 *
 * Errors: "singular" when some |λᵢ + λⱼ| ≤ 20·n·ε·ρ(A) (ρ the spectral radius; e.g. an
 * eigenvalue at 0, a pair ±iω, or λ and −λ), naming both eigenvalues and the compared gap
 * |λᵢ + λⱼ| and threshold in message and details. The gap, not a pivot of the small block
 * systems, is compared: for a graded A (states in different units, ‖A‖_F ≫ ρ(A)) a 2×2 block
 * [a b; c a] with |b| ≫ |c| gives pivots near (λ + μ)·|c/b| however far λ + μ is from 0.
 * Why ε·ρ(A) (a derivation, see `solveSylvester`): it is the eigenvalue uncertainty of the
 * Schur form in the best-scaled coordinates, and unlike ε·‖A‖_F it does not change with the
 * units of the states (ρ(DAD⁻¹) = ρ(A)). Nearly singular equations above it are solved; the
 * API has no place for their separation, so callers judge X by its size or residual.
 * "shape-mismatch", "empty", "non-finite" (also when X overflows), "invalid-argument";
 * "no-convergence" from realSchur.
 *
 * Example: A = [[−1]], Q = [[2]] gives X = [[1]]; check |A X + X Aᵀ + Q| < 1e-15.
 */
export function solveContinuousLyapunov(A: Matrix, Q: Matrix): Matrix {
  const { n, a, q } = prepare(A, Q);
  const d = balanceEquation(a, q, n);
  if (isSymmetric(q, n)) return solveSymmetricContinuous(a, q, n, d);
  return solveLyapunovKind("sylvester", a, q, n, "A X + X Aᵀ + Q = 0", d);
}

/**
 * The singularity threshold of both Lyapunov solvers, from the Schur form S of A (n×n):
 * continuous 20·n·ε·ρ(A) (= 10·n·ε·(ρ(A) + ρ(Aᵀ)), as `solveSylvester`), discrete
 * 20·n·ε·(1 + ρ(A)²), with ρ the spectral radius. See the Errors paragraphs for the reasoning.
 */
function separationThreshold(kind: QuasiTriangularEquation, s: Float64Array, n: number): number {
  const rho = spectralRadiusOfQuasiTriangular(s, n);
  return 20 * n * Number.EPSILON * (kind === "sylvester" ? rho : 1 + rho * rho);
}

function isSymmetric(q: Float64Array, n: number): boolean {
  for (let i = 0; i < n; i++) for (let j = i + 1; j < n; j++) if (q[i * n + j] !== q[j * n + i]) return false;
  return true;
}

// Workspaces of solveSymmetricContinuous (synchronous, not re-entrant; results are copied out).
let lyapS = new Float64Array(0);
let lyapUt = new Float64Array(0);
let lyapU = new Float64Array(0);
let lyapW = new Float64Array(0);
let lyapY = new Float64Array(0);
let lyapX = new Float64Array(0);

/**
 * Continuous equation with exactly symmetric Q: A = U S Uᵀ, then S Y + Y Sᵀ = C with
 * C = UᵀQU, solved for one triangle of the symmetric Y (`solveSymmetricLyapunovTriangularInPlace`),
 * and X = −U Y Uᵀ, formed as its upper triangle and mirrored (exactly symmetric).
 */
function solveSymmetricContinuous(a: Float64Array, q: Float64Array, n: number, d: Float64Array | null): Matrix {
  const nn = n * n;
  if (lyapS.length < nn) {
    lyapS = new Float64Array(nn);
    lyapUt = new Float64Array(nn);
    lyapU = new Float64Array(nn);
    lyapW = new Float64Array(nn);
    lyapY = new Float64Array(nn);
    lyapX = new Float64Array(nn);
  }
  const s = lyapS, ut = lyapUt, u = lyapU, w = lyapW, y = lyapY;
  realSchurInto(a, n, defaultSchurIterationLimit(n), s, ut); // s = S, ut = Uᵀ
  const threshold = separationThreshold("sylvester", s, n);
  for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) u[j * n + i] = ut[i * n + j];
  multiplyInto(q, u, n, n, n, w); // Q U
  multiplyUpperInto(ut, w, n, y); // C = Uᵀ Q U: the kernel reads its upper triangle only
  solveSymmetricLyapunovTriangularInPlace(s, n, y, threshold, { equation: "A X + X Aᵀ + Q = 0", first: "A", second: "A" });
  multiplyInto(y, ut, n, n, n, w); // Y Uᵀ
  const x = lyapX;
  multiplyUpperInto(u, w, n, x); // U Y Uᵀ = −X, upper triangle
  for (let i = 0; i < n; i++) {
    for (let j = i; j < n; j++) {
      const value = -x[i * n + j];
      x[i * n + j] = value;
      x[j * n + i] = value;
    }
  }
  if (d !== null) unbalanceSolution(x, d, n);
  if (!allFinite(x.subarray(0, nn))) throw new EngineError("non-finite", "the solution X of A X + X Aᵀ + Q = 0 overflows (the equation is nearly singular)", {});
  return matrixOfRowMajor(x, n, n); // copies: the workspace is never handed out
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
 * Before that A is balanced without permutation (Parlett & Reinsch 1969, as in
 * `solveContinuousLyapunov`): A_b X_b A_bᵀ − X_b + Q_b = 0 with A_b = D⁻¹AD, Q_b = D⁻¹QD⁻¹ is
 * solved and X = D·X_b·D returned (exact powers of two; only when ‖A_b‖_F ≤ ‖A‖_F / 4, else
 * the plain method, bit-identical).
 *
 * Cost: balancing O(n²) per sweep (a few sweeps), one Schur decomposition (≈ 25n³), 4 n×n products (8n³) and the quasi-triangular solve
 * (≈ 3n³: the extra S·W product per column block). Memory O(n²).
 *
 * Accuracy: relative residual ‖AXAᵀ − X + Q‖_F / ((‖A‖_F² + 1)‖X‖_F + ‖Q‖_F) of order n·ε;
 * forward error ≲ residual / sep_d, sep_d ≤ min|1 − λᵢλⱼ|, for the balanced A_b. Without the
 * balancing, graded A (1e8–1e12) gave forward errors 4e-4 to 1 at tiny residuals; with it the
 * graded fixtures reach ≤ 7e-15 (scipy: 1e-15…4e-12). Tests require ≤ 1e-12 relative residual
 * on well-conditioned problems, and on the graded ones a forward error within 10× scipy's
 * (floor 1e-12) and within κ₂ of the balanced equation times 100·n·ε. Output checked finite.
 *
 * Errors: "singular" when some |1 − λᵢλⱼ| ≤ 20·n·ε·(1 + ρ(A)²) (e.g. an eigenvalue on the unit
 * circle, or λ = 2 with μ = 1/2), naming both eigenvalues and the compared gap |λᵢλⱼ − 1| and
 * threshold. Scale: a perturbation of λ and μ by ε·ρ(A) each (the Schur form's eigenvalue
 * uncertainty in the best-scaled coordinates, see `solveContinuousLyapunov`) moves λμ by about
 * 2ε·ρ(A)², and forming 1 − λμ rounds at ε·(1 + |λμ|); the former scale ‖A‖_F² refused graded
 * equations outright (‖A‖_F = 1e7 makes it exceed 1). "shape-mismatch", "empty", "non-finite"
 * (also when X overflows), "invalid-argument"; "no-convergence" from realSchur.
 *
 * Example: A = [[0.5]], Q = [[3]] gives X = [[4]]; check |A X Aᵀ − X + Q| < 1e-15.
 */
export function solveDiscreteLyapunov(A: Matrix, Q: Matrix): Matrix {
  const { n, a, q } = prepare(A, Q);
  const d = balanceEquation(a, q, n);
  return solveLyapunovKind("stein", a, q, n, "A X Aᵀ − X + Q = 0", d);
}
