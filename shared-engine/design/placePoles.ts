/**
 * State-feedback pole placement u = −Kx for ẋ = Ax + Bu: orthogonal controllability staircase,
 * then the single-input deflation method or the robust multi-input method, then an
 * independent check of the achieved closed-loop poles.
 */
import { Matrix, SingularValueDecomposition, pseudoInverse } from "ml-matrix";
import { EngineError } from "../errors";
import type { Complex } from "../linalg/complex";
import { eigenvalues, eigenvectors } from "../linalg/eigen";
import { reflectColumns, reflectRows } from "../linalg/kernels";
import { asMatrix, fromFloat64, requireFinite, requireNonEmpty, requireSquareFinite, shapeOf, toFloat64, type MatrixInput } from "../linalg/validate";
import { firstOccurrence, formatPole, maxRelativePoleError, normalizePoleSet } from "./poleSpec";
import { placeSingleInputHessenberg, solveTrailingRows } from "./placeSingleInput";
import { complexConditionNumber, placeRobustKernel, type ComplexArray } from "./placeRobust";

export interface PlacementResult {
  /** m×n gain: u = −K x, closed loop A − B K. */
  K: Matrix;
  requestedPoles: Complex[];
  /** Eigenvalues of A − BK computed from that matrix (not from the construction). */
  achievedPoles: Complex[];
  /** max over matched pairs of |achieved − requested| / max(1, |requested|). */
  maxPoleError: number;
  /** ‖K‖_F. */
  gainNorm: number;
  /** ‖K‖₂ (largest singular value). */
  gainNorm2: number;
  /** κ₂(V) of the closed-loop eigenvector matrix with unit columns (1 for n = 1). */
  eigenvectorCondition: number;
  method: "single-input" | "robust-multi-input";
  /** Sweeps of the robust method. */
  iterations?: number;
  warnings: string[];
}

export interface PlacementOptions {
  /** Sweep limit of the robust multi-input method (default 300). */
  maxIterations?: number;
  /** Relative change of |det V| between sweeps that ends the robust method (default 1e-3). */
  tolerance?: number;
  /** Relative tolerance of rank decisions in the staircase (default 10·n·ε; scaled by ‖[A B]‖_F). */
  rankTolerance?: number;
}

/** Names used in messages, so the observer (dual) problem reports in its own terms. */
export interface PlacementRole {
  A: string;
  B: string;
  dual: boolean;
}

const CONTROLLER: PlacementRole = { A: "A", B: "B", dual: false };
/** Relative distance at which an uncontrollable mode counts as kept by a requested pole. */
const KEPT_MODE_TOLERANCE = 1e-6;

/**
 * Computes: K (m×n) with eig(A − BK) = `poles` for A: n×n, B: n×m, and diagnostics.
 *
 * Requires: A square, B with n rows, all finite; `poles` n finite values closed under
 * conjugation; no pole repeated more than rank(B) times; every uncontrollable mode of (A, B)
 * among the requested poles.
 *
 * Method: (1) orthogonal controllability staircase (Householder with column pivoting per block;
 * Paige, "Properties of numerical algorithms related to computing controllability", IEEE TAC
 * 26(1), 1981; Van Dooren, "The generalized eigenstructure problem in linear system theory",
 * IEEE TAC 26(1), 1981), which separates the uncontrollable part and turns B into [Z; 0] with
 * Z: r×m of full row rank r = rank(B). (2) r = 1: the single-input deflation method of Miminis
 * & Paige (1982) on the controller Hessenberg form (see placeSingleInputHessenberg); r > 1:
 * the robust method of Kautz, Nichols & Van Dooren (1985) with the conjugate-pair update of
 * Tits & Yang (1996) (see placeRobustKernel). (3) K = [Z⁺G, 0]·Qᵀ.
 *
 * Cost: staircase ≈ 4n³ + 2n²m flops; single input ≈ 6n³; robust ≈ 3n⁴ (allowed spaces) plus
 * ≈ 3n³ per sweep (at most `maxIterations`); check ≈ 14n³ (eigenvalues of A − BK).
 *
 * Accuracy: achievedPoles are the eigenvalues of A − BK computed from that matrix;
 * maxPoleError compares them with the request. A warning is added when it exceeds 1e-6 or
 * when κ₂(V) exceeds 1e8 (placed poles then move by ≈ κ₂(V)·ε·‖A − BK‖ per rounding).
 *
 * Errors: "empty", "shape-mismatch", "non-finite" (inputs); "invalid-argument" (pole count,
 * unpaired complex pole, pole repeated more than rank(B) times); "not-controllable" naming the
 * uncontrollable modes that the request would move; "no-convergence" (robust sweeps);
 * "singular" (eigenvector matrix singular).
 *
 * Example:
 *   const r = placePoles(new Matrix([[0, 1, 0], [0, 0, 1], [-1, -5, -6]]), new Matrix([[0], [0], [1]]),
 *     [{ re: -2, im: 4 }, { re: -2, im: -4 }, { re: -10, im: 0 }]);
 *   // r.K ≈ [[199, 55, 8]], and r.maxPoleError < 1e-12
 */
export function placePoles(A: MatrixInput, B: MatrixInput, poles: Complex[], options: PlacementOptions = {}): PlacementResult {
  return placePolesAs(A, B, poles, options, CONTROLLER);
}

/** placePoles with the argument names of `role` in every message (used by the observer routines). */
export function placePolesAs(AInput: MatrixInput, BInput: MatrixInput, poles: Complex[], options: PlacementOptions, role: PlacementRole): PlacementResult {
  const A = asMatrix(AInput, role.A);
  const B = asMatrix(BInput, role.B);
  requireSquareFinite(A, role.A);
  requireNonEmpty(B, role.B);
  requireFinite(B, role.B);
  const n = A.rows;
  const m = B.columns;
  if (B.rows !== n) {
    const [what, dim] = role.dual ? ["columns", B.rows] : ["rows", B.rows];
    throw new EngineError("shape-mismatch", `${role.B} must have as many ${what} as ${role.A} has ${role.dual ? "columns" : "rows"} (${role.A} is ${shapeOf(A)}, ${role.B} has ${dim} ${what})`, {
      arguments: [role.A, role.B],
    });
  }
  const maxIterations = options.maxIterations ?? 300;
  const tolerance = options.tolerance ?? 1e-3;
  if (!(Number.isInteger(maxIterations) && maxIterations >= 1)) {
    throw new EngineError("invalid-argument", `options.maxIterations must be a positive integer (it is ${maxIterations})`, { argument: "maxIterations" });
  }
  if (!(tolerance > 0 && tolerance < 1)) {
    throw new EngineError("invalid-argument", `options.tolerance must be in (0, 1) (it is ${tolerance})`, { argument: "tolerance" });
  }
  let { ordered } = normalizePoleSet(poles, n, "poles");
  const requested: Complex[] = poles.map((p) => ({ re: p.re, im: p.im }));
  const warnings: string[] = [];

  // (1) Staircase: Qᵀ A Q = [[A_c, ·], [0, A_u]], Qᵀ B = [Z; 0].
  const a = toFloat64(A);
  const b = toFloat64(B);
  const normAB = Math.hypot(A.norm("frobenius"), B.norm("frobenius"));
  const stair = controllabilityStaircase(a, b, n, m, (options.rankTolerance ?? 10 * Math.max(n, m) * Number.EPSILON) * normAB);
  const { nc, r, q } = stair;

  if (nc < n) {
    const au = new Matrix(n - nc, n - nc);
    for (let i = nc; i < n; i++) for (let j = nc; j < n; j++) au.set(i - nc, j - nc, a[i * n + j]!);
    const modes = eigenvalues(au);
    const remaining = [...ordered];
    const moved: Complex[] = [];
    for (const mu of modes) {
      let best = -1, bestDist = Infinity;
      remaining.forEach((p, i) => { const d = Math.hypot(p.re - mu.re, p.im - mu.im); if (d < bestDist) { bestDist = d; best = i; } });
      if (best >= 0 && bestDist <= KEPT_MODE_TOLERANCE * Math.max(1, Math.hypot(mu.re, mu.im))) remaining.splice(best, 1);
      else moved.push(mu);
    }
    const list = modes.map(formatPole).join(", ");
    if (moved.length > 0) {
      const what = role.dual ? `not observable through ${role.B}` : `not controllable from ${role.B}`;
      throw new EngineError(
        role.dual ? "not-observable" : "not-controllable",
        `the mode(s) at ${moved.map(formatPole).join(", ")} are ${what}, so no gain can move them; ` +
          `request them among the poles to keep them (uncontrollable modes: ${list})`,
        { uncontrollableModes: modes, notRequested: moved },
      );
    }
    warnings.push(`the mode(s) at ${list} are ${role.dual ? "unobservable" : "uncontrollable"} and stay where they are, as requested`);
    ordered = normalizePoleSet(remaining, nc, "poles").ordered;
  }

  const norm = normalizePoleSet(ordered, nc, "poles");
  if (nc > 0 && norm.maxMultiplicity > r) {
    throw new EngineError(
      "invalid-argument",
      `pole ${formatPole(norm.mostRepeated)} is requested ${norm.maxMultiplicity} times but rank(${role.B}) is ${r}: ` +
        `a closed-loop eigenvalue can have at most rank(${role.B}) independent eigenvectors (its geometric multiplicity), ` +
        `and this method assigns a diagonalizable closed loop; spread the poles slightly or add ${role.dual ? "outputs" : "inputs"}`,
      { pole: norm.mostRepeated, multiplicity: norm.maxMultiplicity, rank: r },
    );
  }

  // (2) Place on the controllable part with the virtual input [I_r; 0].
  const ac = new Float64Array(nc * nc);
  for (let i = 0; i < nc; i++) for (let j = 0; j < nc; j++) ac[i * nc + j] = a[i * n + j]!;
  let G: Float64Array = new Float64Array(0);
  let V: ComplexArray | null = null;
  let iterations: number | undefined;
  if (nc > 0 && r === 1) {
    G = placeSingleInputHessenberg(ac, nc, ordered);
    V = { re: new Float64Array(nc * nc), im: new Float64Array(nc * nc) };
    const xr = new Float64Array(nc), xi = new Float64Array(nc);
    ordered.forEach((p, j) => {
      solveTrailingRows(ac, nc, 0, nc, p, xr, xi);
      let s = 0;
      for (let i = 0; i < nc; i++) s += xr[i]! * xr[i]! + xi[i]! * xi[i]!;
      s = Math.sqrt(s);
      for (let i = 0; i < nc; i++) { V!.re[i * nc + j] = xr[i]! / s; V!.im[i * nc + j] = xi[i]! / s; }
    });
  } else if (nc > 0) {
    const res = placeRobustKernel(ac, nc, r, ordered, firstOccurrence(ordered), maxIterations, tolerance);
    G = res.G;
    V = res.X;
    iterations = res.iterations;
  }

  // (3) K = [Z⁺G, 0] Qᵀ.
  const kHat = new Matrix(m, n);
  if (nc > 0) {
    const Z = new Matrix(r, m);
    for (let i = 0; i < r; i++) for (let j = 0; j < m; j++) Z.set(i, j, b[i * m + j]!);
    const kc = pseudoInverse(Z).mmul(fromFloat64(G, r, nc));
    for (let i = 0; i < m; i++) for (let j = 0; j < nc; j++) kHat.set(i, j, kc.get(i, j));
  }
  const K = kHat.mmul(fromFloat64(q, n, n).transpose());
  requireFinite(K, role.dual ? "the observer gain" : "the feedback gain K");

  // Independent check on the closed loop itself.
  const closed = A.clone().sub(B.mmul(K));
  const achievedPoles = eigenvalues(closed);
  const maxPoleError = maxRelativePoleError(requested, achievedPoles);
  let eigenvectorCondition = 1;
  if (n > 1) {
    if (nc === n && V) {
      eigenvectorCondition = complexConditionNumber(V, n);
    } else {
      const ev = eigenvectors(closed);
      const full: ComplexArray = { re: new Float64Array(n * n), im: new Float64Array(n * n) };
      ev.vectors.forEach((v, j) => v.forEach((z, i) => { full.re[i * n + j] = z.re; full.im[i * n + j] = z.im; }));
      eigenvectorCondition = complexConditionNumber(full, n);
    }
  }
  if (maxPoleError > 1e-6) {
    warnings.push(`the achieved poles differ from the requested ones by up to ${maxPoleError.toExponential(2)} (relative): the placement problem is ill-conditioned`);
  }
  if (!(eigenvectorCondition <= 1e8)) {
    warnings.push(`the closed-loop eigenvectors are nearly dependent (κ₂(V) = ${eigenvectorCondition.toExponential(2)}): the placed poles are very sensitive to perturbations`);
  }
  const singular = new SingularValueDecomposition(K, { autoTranspose: true, computeLeftSingularVectors: false, computeRightSingularVectors: false });
  return {
    K,
    requestedPoles: requested,
    achievedPoles,
    maxPoleError,
    gainNorm: K.norm("frobenius"),
    gainNorm2: Math.max(0, ...singular.diagonal),
    eigenvectorCondition,
    method: r > 1 ? "robust-multi-input" : "single-input",
    ...(iterations === undefined ? {} : { iterations }),
    warnings,
  };
}

export interface Staircase {
  /** Dimension of the controllable subspace. */
  nc: number;
  /** rank(B): size of the first staircase block. */
  r: number;
  /** Orthogonal Q (row-major n×n) with a ← Qᵀ a Q and b ← Qᵀ b. */
  q: Float64Array;
}

/**
 * Kernel: reduces (a, b) in place (row-major n×n and n×m) to the controllability staircase
 * Qᵀ A Q = [[A_c, A_12], [0, A_u]], Qᵀ B = [[Z], [0]], with A_c block upper Hessenberg, each
 * subdiagonal block of full row rank (so (A_c, [I_r; 0]) is controllable), entries below the
 * rank decisions set to exact zeros. Rank is decided by Householder QR with column pivoting:
 * a block column whose remaining norm is ≤ `tol` counts as zero (Paige 1981; Van Dooren 1981).
 * For rank(B) = 1 every block is 1×1 and A_c is the controller Hessenberg form with b = ‖b‖e₁.
 * Cost ≈ 4n³ + 2n²m flops.
 */
export function controllabilityStaircase(a: Float64Array, b: Float64Array, n: number, m: number, tol: number): Staircase {
  const q = new Float64Array(n * n);
  for (let i = 0; i < n; i++) q[i * n + i] = 1;
  const v = new Float64Array(n);
  let s = 0; // first row of the block being compressed
  let cols: number[] = Array.from({ length: m }, (_, j) => j);
  let inB = true; // the block is in b (first step) or in columns `cols` of a
  let r = -1;
  while (s < n) {
    const get = (i: number, c: number) => (inB ? b[i * m + c]! : a[i * n + c]!);
    const remaining = [...cols];
    let rank = 0;
    while (remaining.length > 0 && s + rank < n) {
      const top = s + rank;
      let best = -1, bestNorm = -1;
      remaining.forEach((c, idx) => {
        let t = 0;
        for (let i = top; i < n; i++) t = Math.hypot(t, get(i, c));
        if (t > bestNorm) { bestNorm = t; best = idx; }
      });
      if (!(bestNorm > tol)) break;
      const c = remaining.splice(best, 1)[0]!;
      // Householder reflector P = I − 2vvᵀ/vᵀv mapping column c (rows top..n−1) to ∓‖·‖e_top.
      const alpha = get(top, c);
      const beta = alpha >= 0 ? -bestNorm : bestNorm;
      v.fill(0);
      v[top] = alpha - beta;
      for (let i = top + 1; i < n; i++) v[i] = get(i, c);
      let vv = 0;
      for (let i = top; i < n; i++) vv += v[i]! * v[i]!;
      if (vv > 0) {
        const f = 2 / vv;
        reflectRows(a, n, n, v, top, f);
        reflectRows(b, n, m, v, top, f);
        reflectColumns(a, n, v, top, f);
        reflectColumns(q, n, v, top, f);
      }
      rank++;
    }
    // exact zeros below the rank decision (they are ≤ tol)
    for (let i = s + rank; i < n; i++) for (const c of cols) { if (inB) b[i * m + c] = 0; else a[i * n + c] = 0; }
    if (r < 0) r = rank;
    if (rank === 0) return { nc: s, r, q };
    cols = Array.from({ length: rank }, (_, j) => s + j);
    s += rank;
    inB = false;
  }
  return { nc: n, r, q };
}
