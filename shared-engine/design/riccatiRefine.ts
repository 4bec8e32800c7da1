/**
 * Residuals, gains, Newton refinement and the final verification shared by the continuous and
 * discrete Riccati solvers. Everything works on row-major Float64Arrays.
 */
import { EngineError } from "../errors";
import { eigenvalues, fromFloat64, solveContinuousLyapunov, solveDiscreteLyapunov, toFloat64, type Complex } from "../linalg";
import { balanceInPlace, defaultSchurIterationLimit, francisQRInPlace, matrixOfRowMajor } from "../linalg/kernels";
import { reduceToHessenbergInPlace } from "../linalg/hessenberg";
import type { RiccatiData, RiccatiOptions, RiccatiSolution } from "./riccati";
import { asymmetryOf, cholesky, forwardSubstitute, frobeniusOf, multiply, solveInPlace, symmetrizeInPlace, transpose } from "./riccatiKernels";

export type RiccatiKind = "continuous" | "discrete";

/** Residual, gain and the normaliser for one candidate X. */
export interface RiccatiEvaluation {
  k: Float64Array; // m×n gain
  res: Float64Array; // n×n residual Res(X)
  residualNorm: number; // ‖Res‖_F
  /** ‖Res‖_F divided by the sum of the norms of the terms of the equation (a backward-error proxy). */
  normalisedResidual: number;
}

// WARNING: these thresholds decide which designs the app accepts. The normalised residual of
// a backward-stable solve is a modest multiple of n·ε; √ε is far above that and flags a
// solution that lost half its digits (ill-conditioned or near the stability boundary).
const ACCEPT_NORMALISED_RESIDUAL = Math.sqrt(Number.EPSILON);
const AUTO_REFINE_FACTOR = 100; // refine automatically above 100·n·ε
const ASYMMETRY_WARNING = 1e-8;
const MAX_NEWTON_STEPS = 20;

/** Solves the m×m symmetric positive definite S·K = T (T: m×n); falls back to LU. */
function solveGain(s: Float64Array, t: Float64Array, m: number, n: number, what: string): Float64Array {
  const l = cholesky(s, m, 0);
  const k = t.slice();
  if (l) {
    forwardSubstitute(l, m, k, n);
    // Back substitution with Lᵀ.
    for (let i = m - 1; i >= 0; i--) {
      const io = i * n;
      for (let p = i + 1; p < m; p++) {
        const f = l[p * m + i]!;
        if (f === 0) continue;
        for (let j = 0; j < n; j++) k[io + j] -= f * k[p * n + j]!;
      }
      const d = l[i * m + i]!;
      for (let j = 0; j < n; j++) k[io + j] /= d;
    }
    return k;
  }
  try {
    solveInPlace(s.slice(), k, m, n, what);
  } catch (error) {
    if (error instanceof EngineError && error.kind === "singular") {
      throw new EngineError("no-stabilizing-solution", `No stabilizing solution: ${what} is singular, so the optimal gain is undefined`, {
        reason: "singular-gain-matrix", ...error.details,
      });
    }
    throw error;
  }
  return k;
}

/** Evaluates K(X) and Res(X) for the continuous or discrete equation (see the solvers' docs). */
export function evaluateRiccati(data: RiccatiData, kind: RiccatiKind, x: Float64Array): RiccatiEvaluation {
  const { n, m, a, b, q, r, nCross } = data;
  const at = transpose(a, n, n);
  const xb = multiply(x, b, n, n, m);
  let t: Float64Array; // n×m: XB + N (continuous) or AᵀXB + N (discrete)
  let s: Float64Array; // m×m: R (continuous) or R + BᵀXB (discrete)
  const res = new Float64Array(n * n);
  let termNorm: number;
  const normA = frobeniusOf(a);
  const normX = frobeniusOf(x);
  if (kind === "continuous") {
    t = xb;
    for (let i = 0; i < n * m; i++) t[i] += nCross[i]!;
    s = r.slice();
    const xa = multiply(x, a, n, n, n);
    // AᵀX + XA = (XA)ᵀ + XA for symmetric X; computed from XA alone keeps Res exactly symmetric.
    for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) res[i * n + j] = xa[i * n + j]! + xa[j * n + i]! + q[i * n + j]!;
    termNorm = frobeniusOf(q) + 2 * normA * normX;
  } else {
    t = multiply(at, xb, n, n, m);
    for (let i = 0; i < n * m; i++) t[i] += nCross[i]!;
    const bt = transpose(b, n, m);
    s = multiply(bt, xb, m, n, m);
    for (let i = 0; i < m * m; i++) s[i] += r[i]!;
    symmetrizeInPlace(s, m);
    const atxa = multiply(at, multiply(x, a, n, n, n), n, n, n);
    for (let i = 0; i < n * n; i++) res[i] = atxa[i]! - x[i]! + q[i]!;
    termNorm = frobeniusOf(q) + normX * (normA * normA + 1);
  }
  const k = solveGain(s, transpose(t, n, m), m, n, kind === "continuous" ? "R" : "R + BᵀXB");
  const tk = multiply(t, k, n, m, n);
  for (let i = 0; i < n * n; i++) res[i] -= tk[i]!;
  symmetrizeInPlace(res, n);
  termNorm += frobeniusOf(t) * frobeniusOf(k);
  const residualNorm = frobeniusOf(res);
  return { k, res, residualNorm, normalisedResidual: termNorm > 0 ? residualNorm / termNorm : residualNorm };
}

/** A − B·K (n×n). */
function closedLoop(data: RiccatiData, k: Float64Array): Float64Array {
  const { n, m, a, b } = data;
  const bk = multiply(b, k, n, m, n);
  const out = a.slice();
  for (let i = 0; i < n * n; i++) out[i] -= bk[i]!;
  return out;
}

/**
 * One Newton correction: E solves Aclᵀ E + E Acl + Res = 0 (Kleinman 1968) or
 * Aclᵀ E Acl − E + Res = 0 (Hewer 1971), the Fréchet derivative of the Riccati operator at X
 * applied to E equated to −Res(X); returns X + E.
 * The Lyapunov equation is solved in balanced coordinates: with Acl_b = D⁻¹·Acl·D (D the
 * power-of-two diagonal of Parlett–Reinsch balancing without permutation, so exact),
 * E_b = D·E·D solves the same equation with Acl_b and D·Res·D. This changes nothing for a
 * balanced Acl (D = I), and when the states' units differ by orders of magnitude (there ‖Acl‖
 * is far above its eigenvalues) it keeps the correction accurate entry by entry: the Lyapunov
 * solvers are backward stable only normwise.
 */
function newtonStep(data: RiccatiData, kind: RiccatiKind, x: Float64Array, ev: RiccatiEvaluation): Float64Array {
  const { n } = data;
  const acl = closedLoop(data, ev.k);
  const d = balancingScale(acl, n);
  const rhsB = ev.res.slice();
  if (d) {
    for (let i = 0; i < n; i++) {
      for (let j = 0; j < n; j++) {
        acl[i * n + j] *= d[j]! / d[i]!;
        rhsB[i * n + j] *= d[i]! * d[j]!;
      }
    }
  }
  const aclT = fromFloat64(transpose(acl, n, n), n, n);
  const rhs = fromFloat64(rhsB, n, n);
  const e = toFloat64(kind === "continuous" ? solveContinuousLyapunov(aclT, rhs) : solveDiscreteLyapunov(aclT, rhs));
  const next = x.slice();
  if (d) for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) next[i * n + j] += e[i * n + j]! / (d[i]! * d[j]!);
  else for (let i = 0; i < n * n; i++) next[i] += e[i]!;
  symmetrizeInPlace(next, n);
  return next;
}

/** Balancing scale d of `a` (Acl_b[i][j] = a[i][j]·d[j]/d[i]), or null when it is all ones or balancing fails. */
function balancingScale(a: Float64Array, n: number): Float64Array | null {
  if (!a.every(Number.isFinite)) return null;
  const scale = new Float64Array(n);
  try {
    balanceInPlace(a.slice(), n, false, true, new Int32Array(n), scale);
  } catch (error) {
    if (error instanceof EngineError) return null;
    throw error;
  }
  return scale.every((v) => v === 1) ? null : scale;
}

/**
 * Eigenvalues of the row-major n×n `acl` (destroyed), by the same balance → Hessenberg →
 * eigenvalue-only Francis QR pipeline (same sweep cap) as `eigenvalues`, without its Matrix
 * round trip. Non-finite input or output goes through `eigenvalues` for its typed error.
 */
function closedLoopEigenvalues(acl: Float64Array, n: number): Complex[] {
  if (!acl.every(Number.isFinite)) return eigenvalues(fromFloat64(acl, n, n));
  const perm = new Int32Array(n);
  const scale = new Float64Array(n);
  const { low, high } = balanceInPlace(acl, n, true, true, perm, scale);
  reduceToHessenbergInPlace(acl, n, low, high, null);
  const wr = new Float64Array(n);
  const wi = new Float64Array(n);
  for (let i = 0; i < n; i++) if (i < low || i > high) wr[i] = acl[i * n + i]!;
  francisQRInPlace(acl, n, low, high, false, null, wr, wi, defaultSchurIterationLimit(n));
  const out: Complex[] = new Array<Complex>(n);
  for (let i = 0; i < n; i++) {
    if (!Number.isFinite(wr[i]!) || !Number.isFinite(wi[i]!)) {
      throw new EngineError("non-finite", `eigenvalue ${i + 1} of A − BK is not finite (overflow during the QR iteration)`, { argument: "A − BK", index: i });
    }
    out[i] = { re: wr[i]!, im: wi[i] === 0 ? 0 : wi[i]! };
  }
  return out;
}

function isStable(kind: RiccatiKind, poles: Complex[]): boolean {
  return kind === "continuous" ? poles.every((p) => p.re < 0) : poles.every((p) => Math.hypot(p.re, p.im) < 1);
}

/**
 * Symmetrises X, refines it by Newton's method (each Lyapunov equation solved in the balanced
 * coordinates of A − BK, see `newtonStep`) when asked (or automatically when the residual
 * is above 100·n·ε), and verifies: K finite, A − BK stable, normalised residual ≤ √ε. Newton
 * stops when a step fails to halve the residual, or once the normalised residual is at n·ε.
 */
export function finishRiccati(
  data: RiccatiData, kind: RiccatiKind, xIn: Float64Array, rcond: number, method: string, options: RiccatiOptions,
): RiccatiSolution {
  const { n, m } = data;
  const warnings: string[] = [];
  const asym = asymmetryOf(xIn, n);
  let x: Float64Array = xIn.slice();
  symmetrizeInPlace(x, n);
  if (!x.every(Number.isFinite)) {
    throw new EngineError("no-stabilizing-solution", "No stabilizing solution: X has non-finite entries (U11 is singular to working precision)", {
      reason: "non-finite-X", conditionIndicator: rcond,
    });
  }
  if (asym > ASYMMETRY_WARNING) warnings.push(`X from the subspace was not symmetric (relative asymmetry ${asym.toExponential(2)}); symmetrised`);
  if (rcond < Math.sqrt(Number.EPSILON)) warnings.push(`U11 is ill-conditioned (reciprocal condition ${rcond.toExponential(2)}); X may be inaccurate`);

  let ev = evaluateRiccati(data, kind, x);
  const wantRefine = options.refine === true
    || (options.refine === undefined && (ev.normalisedResidual > AUTO_REFINE_FACTOR * n * Number.EPSILON || asym > ASYMMETRY_WARNING));
  let refined = false;
  if (wantRefine) {
    let steps = 0;
    for (;;) {
      if (steps >= MAX_NEWTON_STEPS) {
        if (ev.normalisedResidual > ACCEPT_NORMALISED_RESIDUAL) {
          throw new EngineError("no-convergence", `Newton refinement of the ${kind} Riccati solution did not converge in ${steps} steps`, {
            iterations: steps, lastResidual: ev.normalisedResidual,
          });
        }
        warnings.push(`Newton refinement stopped at its limit of ${MAX_NEWTON_STEPS} steps`);
        break;
      }
      let candidate: Float64Array;
      try {
        candidate = newtonStep(data, kind, x, ev);
      } catch (error) {
        // A singular Lyapunov operator means A − BK has eigenvalues λ, μ with λ + μ = 0
        // (or λμ = 1): X is not stabilizing, which the final check reports.
        if (error instanceof EngineError && steps === 0 && options.refine !== true) break;
        if (error instanceof EngineError) { warnings.push(`Newton refinement stopped: ${error.message}`); break; }
        throw error;
      }
      steps++;
      if (!candidate.every(Number.isFinite)) break;
      const next = evaluateRiccati(data, kind, candidate);
      // Stop at stagnation: Newton converges quadratically, so a step that does not at least
      // halve the residual means the rounding-error level has been reached.
      if (!(next.residualNorm < ev.residualNorm)) break;
      const gain = ev.residualNorm / Math.max(next.residualNorm, Number.MIN_VALUE);
      x = candidate;
      ev = next;
      refined = true;
      // A normalised residual at n·ε is the rounding level of evaluating Res(X) itself: a further
      // step could not halve it, so it would be computed only to be discarded (one Lyapunov
      // solve saved).
      if (gain < 2 || ev.residualNorm === 0 || ev.normalisedResidual <= n * Number.EPSILON) break;
    }
  }

  const kMatrix = matrixOfRowMajor(ev.k, m, n);
  const closedLoopPoles = closedLoopEigenvalues(closedLoop(data, ev.k), n);
  if (!isStable(kind, closedLoopPoles)) {
    const worst = kind === "continuous"
      ? Math.max(...closedLoopPoles.map((p) => p.re))
      : Math.max(...closedLoopPoles.map((p) => Math.hypot(p.re, p.im)));
    throw new EngineError(
      "no-stabilizing-solution",
      kind === "continuous"
        ? `No stabilizing solution: A − BK has a pole with real part ${worst.toExponential(3)} ≥ 0 ((A, B) may not be stabilizable or (Q, A) not detectable)`
        : `No stabilizing solution: A − BK has a pole of modulus ${worst.toPrecision(6)} ≥ 1 ((A, B) may not be stabilizable or (Q, A) not detectable)`,
      { reason: "closed-loop-unstable", worstPole: worst, conditionIndicator: rcond },
    );
  }
  if (ev.normalisedResidual > ACCEPT_NORMALISED_RESIDUAL) {
    throw new EngineError(
      "no-stabilizing-solution",
      `The ${kind} Riccati solution is inaccurate: normalised residual ${ev.normalisedResidual.toExponential(3)} exceeds √ε (the problem is too ill-conditioned)`,
      { reason: "residual-too-large", normalisedResidual: ev.normalisedResidual, tolerance: ACCEPT_NORMALISED_RESIDUAL, conditionIndicator: rcond, refined, warnings },
    );
  }
  const normX = frobeniusOf(x);
  return {
    X: matrixOfRowMajor(x, n, n),
    K: kMatrix,
    closedLoopPoles,
    residual: normX > 0 ? ev.residualNorm / normX : ev.residualNorm,
    conditionIndicator: rcond,
    refined,
    method: refined ? `${method} + Newton refinement` : method,
    warnings,
  };
}
