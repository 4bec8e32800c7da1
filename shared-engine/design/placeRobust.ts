/**
 * Robust multi-input pole assignment (closed-loop eigenvectors chosen to make the eigenvector
 * matrix well conditioned). Kernel only: `placePoles` brings (A, B) to the form used here
 * (input matrix [I_r; 0]) and checks the result.
 */
import { SingularValueDecomposition, Matrix } from "ml-matrix";
import { EngineError } from "../errors";
import type { Complex } from "../linalg/complex";
import { solveInPlace, transpose } from "../linalg/kernels";

/** Complex n×n (or n×k) matrix as two row-major arrays. */
export interface ComplexArray { re: Float64Array; im: Float64Array }

export interface RobustPlacementKernelResult {
  /** r×n row-major: the closed loop is A − [I_r; 0]·G. */
  G: Float64Array;
  /** Closed-loop eigenvectors, unit columns, in the order of `poles` (n×n row-major). */
  X: ComplexArray;
  /** Sweeps of the rank-one update iteration. */
  iterations: number;
}

/**
 * Computes: G (r×n) such that A − [I_r; 0]·G has the eigenvalues `poles` (A: n×n row-major,
 * 1 ≤ r ≤ n) and an eigenvector matrix X whose |det| (unit columns) is locally maximal, which
 * keeps κ₂(X) small.
 *
 * Requires: (A, [I_r; 0]) controllable; poles ordered with conjugate pairs adjacent (+im
 * first); no pole value more than r times; `first[i]` the index of the first equal pole.
 *
 * Method: Kautz, Nichols & Van Dooren, "Robust pole assignment in linear state feedback",
 * Int. J. Control 41(5), 1985, pp. 1129–1155, method 0: xⱼ ranges over Sⱼ = null(U₁ᵀ(A − λⱼI))
 * (here U₁ᵀ selects rows r..n−1; orthonormal basis Sⱼ from a complex Householder QR of the
 * conjugate transpose); each sweep replaces every xⱼ by the normalised projection onto Sⱼ of
 * the vector orthogonal to all other columns, which is the conjugated row j of X⁻¹. X⁻¹ is
 * refreshed by LU once per sweep and kept up to date by Sherman–Morrison rank-one updates
 * within the sweep. For a conjugate pair the −im column is set to the conjugate of the +im
 * one after each update, as in the complex-pair treatment of Tits & Yang, "Globally convergent
 * algorithms for robust pole assignment by state feedback", IEEE TAC 41(10), 1996. Finally
 * M = X_r Λ_r X_r⁻¹ in real form and G = rows 0..r−1 of (A − M).
 *
 * Cost: n complex QRs of n×(n−r) (≈ 8n⁴/3 flops in total) plus per sweep one complex LU
 * (≈ 8n³/3) and n rank-one updates (≈ 8n² each); O(n²·r + n²) memory.
 *
 * Accuracy: the sweep stops when |det X| changes by less than `tolerance` relative between
 * sweeps; the caller checks the achieved poles against A − BK.
 *
 * Errors: "no-convergence" after `maxIterations` sweeps (details: iterations, lastChange);
 * "singular" when the initial X or the final real-form X is numerically singular (a pole
 * repeated with too little freedom in B).
 *
 * Example: see `placePoles`; the closing check is max |λ(A − BK) − pole| / max(1,|pole|).
 */
export function placeRobustKernel(
  a: Float64Array,
  n: number,
  r: number,
  poles: Complex[],
  first: number[],
  maxIterations: number,
  tolerance: number,
): RobustPlacementKernelResult {
  // Step A (KNV §3): orthonormal bases of the allowed eigenvector spaces.
  const bases = new Map<number, ComplexArray>();
  poles.forEach((p, j) => {
    if (first[j] === j && p.im >= 0) bases.set(j, allowedSpace(a, n, r, p));
  });
  const basisOf = (j: number): { S: ComplexArray; conj: boolean } => {
    const f = first[j]!;
    const p = poles[f]!;
    if (p.im >= 0) return { S: bases.get(f)!, conj: false };
    // −im member of a pair: basis is the conjugate of its partner's (index j − 1 by ordering)
    return { S: bases.get(first[f - 1]!)!, conj: true };
  };

  // Step B: a well-spread starting X (greedy: each column the basis vector most orthogonal to
  // the columns chosen so far; the pair volume decides for conjugate pairs).
  const X: ComplexArray = { re: new Float64Array(n * n), im: new Float64Array(n * n) };
  const chosen: ComplexArray[] = []; // orthonormal basis of span of chosen columns, as vectors
  for (let j = 0; j < n; j++) {
    const p = poles[j]!;
    if (p.im < 0) continue;
    const { S } = basisOf(j);
    let best = -1, bestScore = -1;
    // Candidates: the basis vectors, and for a pair also (s_t + i·s_{t+1})/√2, since a basis
    // vector that is real up to a phase would make x and x̄ parallel.
    const candidates: ComplexArray[] = [];
    for (let t = 0; t < r; t++) {
      const v = column(S, n, r, t, false);
      candidates.push(v);
      if (p.im > 0 && r > 1) {
        const w = column(S, n, r, (t + 1) % r, false);
        const mix: ComplexArray = { re: new Float64Array(n), im: new Float64Array(n) };
        for (let i = 0; i < n; i++) { mix.re[i] = (v.re[i]! - w.im[i]!) / Math.SQRT2; mix.im[i] = (v.im[i]! + w.re[i]!) / Math.SQRT2; }
        candidates.push(mix);
      }
    }
    for (let t = 0; t < candidates.length; t++) {
      const v = candidates[t]!;
      const r1 = residual(v, chosen, n);
      let score = norm(r1, n);
      if (p.im > 0 && score > 0) {
        const q1 = scaled(r1, 1 / score, n);
        score *= norm(residual(conjugate(v, n), [...chosen, q1], n), n);
      }
      if (score > bestScore) { bestScore = score; best = t; }
    }
    const v = candidates[best]!;
    setColumn(X, n, j, v);
    addToBasis(chosen, v, n);
    if (p.im > 0) {
      const vc = conjugate(v, n);
      setColumn(X, n, j + 1, vc);
      addToBasis(chosen, vc, n);
    }
  }

  // Step C: KNV method 0 sweeps with rank-one updates of X⁻¹.
  let previous = Number.NEGATIVE_INFINITY;
  let iterations = 0;
  let lastChange = Infinity;
  let converged = false;
  while (iterations < maxIterations) {
    iterations++;
    const { inv, logAbsDet } = complexInverse(X, n);
    if (iterations > 1) {
      lastChange = Math.abs(Math.expm1(logAbsDet - previous));
      if (lastChange <= tolerance) { converged = true; break; }
    }
    previous = logAbsDet;
    for (let j = 0; j < n; j++) {
      const p = poles[j]!;
      if (p.im < 0) continue;
      const { S } = basisOf(j);
      // y ⟂ every other column: conj of row j of X⁻¹.
      const y: ComplexArray = { re: new Float64Array(n), im: new Float64Array(n) };
      for (let k = 0; k < n; k++) { y.re[k] = inv.re[j * n + k]!; y.im[k] = -inv.im[j * n + k]!; }
      const x = projectOnto(S, n, r, y);
      const size = norm(x, n);
      if (!(size > 0)) continue;
      for (let k = 0; k < n; k++) { x.re[k] /= size; x.im[k] /= size; if (p.im === 0) x.im[k] = 0; }
      if (!replaceColumn(X, inv, n, j, x)) break; // lost accuracy: refresh at the next sweep
      if (p.im > 0 && !replaceColumn(X, inv, n, j + 1, conjugate(x, n))) break;
    }
  }
  if (!converged) {
    throw new EngineError(
      "no-convergence",
      `robust pole placement did not settle in ${maxIterations} sweeps (last relative change of |det X| ${lastChange.toExponential(2)}, tolerance ${tolerance})`,
      { iterations, lastChange, tolerance },
    );
  }

  // Step D: real-form X_r Λ_r, M = X_r Λ_r X_r⁻¹ by solving X_rᵀ Mᵀ = (X_r Λ_r)ᵀ.
  const xr = new Float64Array(n * n);
  const xl = new Float64Array(n * n);
  for (let j = 0; j < n; j++) {
    const p = poles[j]!;
    if (p.im < 0) continue;
    for (let i = 0; i < n; i++) {
      const u = X.re[i * n + j]!;
      if (p.im === 0) {
        xr[i * n + j] = u;
        xl[i * n + j] = p.re * u;
      } else {
        const v = X.im[i * n + j]!;
        xr[i * n + j] = u;
        xr[i * n + j + 1] = v;
        xl[i * n + j] = p.re * u - p.im * v;
        xl[i * n + j + 1] = p.im * u + p.re * v;
      }
    }
  }
  const mt = transpose(xl, n, n);
  solveInPlace(transpose(xr, n, n), mt, n, n, "the real closed-loop eigenvector matrix");
  const G = new Float64Array(r * n);
  for (let i = 0; i < r; i++) for (let k = 0; k < n; k++) G[i * n + k] = a[i * n + k]! - mt[k * n + i]!;
  return { G, X, iterations };
}

/**
 * κ₂ of a complex n×n matrix, as σ_max/σ_min of its real 2n×2n embedding [[Re, −Im], [Im, Re]]
 * (the same singular values, each twice). Returns Infinity for a singular matrix (callers turn
 * that into a warning); uses a one-sided Jacobi-free SVD from ml-matrix (Golub–Reinsch).
 */
export function complexConditionNumber(x: ComplexArray, n: number): number {
  const e = new Matrix(2 * n, 2 * n);
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < n; j++) {
      const re = x.re[i * n + j]!, im = x.im[i * n + j]!;
      e.set(i, j, re); e.set(i + n, j + n, re);
      e.set(i, j + n, -im); e.set(i + n, j, im);
    }
  }
  const s = new SingularValueDecomposition(e, { computeLeftSingularVectors: false, computeRightSingularVectors: false }).diagonal;
  const smax = Math.max(...s);
  const smin = Math.min(...s);
  return smin > 0 ? smax / smin : Infinity;
}

/** Orthonormal basis (n×r) of null(rows r..n−1 of (A − λI)) by Householder QR of its conjugate transpose. */
function allowedSpace(a: Float64Array, n: number, r: number, lambda: Complex): ComplexArray {
  const p = n - r;
  const S: ComplexArray = { re: new Float64Array(n * r), im: new Float64Array(n * r) };
  if (p === 0) {
    for (let i = 0; i < n; i++) S.re[i * r + i] = 1;
    return S;
  }
  // W = Nᴴ, n×p: W[i][k] = conj(N[k][i]) with N = rows r.. of (A − λI).
  const wr = new Float64Array(n * p);
  const wi = new Float64Array(n * p);
  for (let k = 0; k < p; k++) {
    for (let i = 0; i < n; i++) wr[i * p + k] = a[(r + k) * n + i]!;
    wr[(r + k) * p + k] -= lambda.re;
    wi[(r + k) * p + k] = lambda.im; // conj of −iλ_im
  }
  const vr: Float64Array[] = [];
  const vi: Float64Array[] = [];
  for (let k = 0; k < p; k++) {
    let sc = 0;
    for (let i = k; i < n; i++) sc = Math.max(sc, Math.abs(wr[i * p + k]!), Math.abs(wi[i * p + k]!));
    const ur = new Float64Array(n), ui = new Float64Array(n);
    vr.push(ur); vi.push(ui);
    if (sc === 0) continue; // column already zero: identity reflector (ur = 0)
    let ss = 0;
    for (let i = k; i < n; i++) {
      ur[i] = wr[i * p + k]! / sc; ui[i] = wi[i * p + k]! / sc;
      ss += ur[i]! * ur[i]! + ui[i]! * ui[i]!;
    }
    const nrm = Math.sqrt(ss);
    const ar = ur[k]!, ai = ui[k]!;
    const aa = Math.hypot(ar, ai);
    const phr = aa > 0 ? ar / aa : 1, phi = aa > 0 ? ai / aa : 0;
    ur[k] = ar + phr * nrm; ui[k] = ai + phi * nrm; // v = x + e^{i arg α}‖x‖e₁ (no cancellation)
    let vv = 0;
    for (let i = k; i < n; i++) vv += ur[i]! * ur[i]! + ui[i]! * ui[i]!;
    const f = Math.sqrt(2 / vv); // scale so that H = I − v vᴴ
    for (let i = k; i < n; i++) { ur[i] *= f; ui[i] *= f; }
    for (let c = k + 1; c < p; c++) reflect(ur, ui, k, n, wr, wi, p, c);
  }
  // S = Q[:, p..n−1] = H₀ H₁ ⋯ H_{p−1} e_j.
  const yr = new Float64Array(n), yi = new Float64Array(n);
  for (let t = 0; t < r; t++) {
    yr.fill(0); yi.fill(0);
    yr[p + t] = 1;
    for (let k = p - 1; k >= 0; k--) reflect(vr[k]!, vi[k]!, k, n, yr, yi, 1, 0);
    for (let i = 0; i < n; i++) { S.re[i * r + t] = yr[i]!; S.im[i * r + t] = yi[i]!; }
  }
  return S;
}

/** Column c of the row-major (·×stride) complex array y ← (I − v vᴴ) y on rows k..n−1. */
function reflect(ur: Float64Array, ui: Float64Array, k: number, n: number, yr: Float64Array, yi: Float64Array, stride: number, c: number): void {
  let sr = 0, si = 0; // vᴴ y
  for (let i = k; i < n; i++) {
    const a = yr[i * stride + c]!, b = yi[i * stride + c]!;
    sr += ur[i]! * a + ui[i]! * b;
    si += ur[i]! * b - ui[i]! * a;
  }
  if (sr === 0 && si === 0) return;
  for (let i = k; i < n; i++) {
    yr[i * stride + c] -= ur[i]! * sr - ui[i]! * si;
    yi[i * stride + c] -= ur[i]! * si + ui[i]! * sr;
  }
}

function column(S: ComplexArray, n: number, r: number, t: number, conj: boolean): ComplexArray {
  const v: ComplexArray = { re: new Float64Array(n), im: new Float64Array(n) };
  for (let i = 0; i < n; i++) { v.re[i] = S.re[i * r + t]!; v.im[i] = conj ? -S.im[i * r + t]! : S.im[i * r + t]!; }
  return v;
}

function setColumn(X: ComplexArray, n: number, j: number, v: ComplexArray): void {
  for (let i = 0; i < n; i++) { X.re[i * n + j] = v.re[i]!; X.im[i * n + j] = v.im[i]!; }
}

function conjugate(v: ComplexArray, n: number): ComplexArray {
  const out: ComplexArray = { re: Float64Array.from(v.re), im: new Float64Array(n) };
  for (let i = 0; i < n; i++) out.im[i] = -v.im[i]!;
  return out;
}

function scaled(v: ComplexArray, s: number, n: number): ComplexArray {
  const out: ComplexArray = { re: new Float64Array(n), im: new Float64Array(n) };
  for (let i = 0; i < n; i++) { out.re[i] = v.re[i]! * s; out.im[i] = v.im[i]! * s; }
  return out;
}

function norm(v: ComplexArray, n: number): number {
  let s = 0;
  for (let i = 0; i < n; i++) s += v.re[i]! * v.re[i]! + v.im[i]! * v.im[i]!;
  return Math.sqrt(s);
}

/** v minus its projection on the orthonormal vectors in `basis` (twice, for orthogonality). */
function residual(v: ComplexArray, basis: ComplexArray[], n: number): ComplexArray {
  const out: ComplexArray = { re: Float64Array.from(v.re), im: Float64Array.from(v.im) };
  for (let pass = 0; pass < 2; pass++) {
    for (const q of basis) {
      let sr = 0, si = 0; // qᴴ out
      for (let i = 0; i < n; i++) {
        sr += q.re[i]! * out.re[i]! + q.im[i]! * out.im[i]!;
        si += q.re[i]! * out.im[i]! - q.im[i]! * out.re[i]!;
      }
      for (let i = 0; i < n; i++) {
        out.re[i] -= q.re[i]! * sr - q.im[i]! * si;
        out.im[i] -= q.re[i]! * si + q.im[i]! * sr;
      }
    }
  }
  return out;
}

function addToBasis(basis: ComplexArray[], v: ComplexArray, n: number): void {
  const rv = residual(v, basis, n);
  const s = norm(rv, n);
  if (s > 1e-14) basis.push(scaled(rv, 1 / s, n));
}

/** S Sᴴ y (n-vector) for the orthonormal basis S (n×r). */
function projectOnto(S: ComplexArray, n: number, r: number, y: ComplexArray): ComplexArray {
  const zr = new Float64Array(r), zi = new Float64Array(r);
  for (let i = 0; i < n; i++) {
    for (let t = 0; t < r; t++) {
      const a = S.re[i * r + t]!, b = S.im[i * r + t]!;
      zr[t] += a * y.re[i]! + b * y.im[i]!;
      zi[t] += a * y.im[i]! - b * y.re[i]!;
    }
  }
  const x: ComplexArray = { re: new Float64Array(n), im: new Float64Array(n) };
  for (let i = 0; i < n; i++) {
    let sr = 0, si = 0;
    for (let t = 0; t < r; t++) {
      const a = S.re[i * r + t]!, b = S.im[i * r + t]!;
      sr += a * zr[t]! - b * zi[t]!;
      si += a * zi[t]! + b * zr[t]!;
    }
    x.re[i] = sr; x.im[i] = si;
  }
  return x;
}

/**
 * Column j of X becomes x, and inv = X⁻¹ is updated by Sherman–Morrison:
 * X' = X + u eⱼᵀ, X'⁻¹ = X⁻¹ − (X⁻¹u)(eⱼᵀX⁻¹)/(1 + eⱼᵀX⁻¹u). Returns false (leaving X and inv
 * unchanged) when the denominator is too small for the update to be accurate.
 */
function replaceColumn(X: ComplexArray, inv: ComplexArray, n: number, j: number, x: ComplexArray): boolean {
  const ur = new Float64Array(n), ui = new Float64Array(n);
  for (let i = 0; i < n; i++) { ur[i] = x.re[i]! - X.re[i * n + j]!; ui[i] = x.im[i]! - X.im[i * n + j]!; }
  const wr = new Float64Array(n), wi = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    let sr = 0, si = 0;
    for (let k = 0; k < n; k++) {
      const a = inv.re[i * n + k]!, b = inv.im[i * n + k]!;
      sr += a * ur[k]! - b * ui[k]!;
      si += a * ui[k]! + b * ur[k]!;
    }
    wr[i] = sr; wi[i] = si;
  }
  const dr = 1 + wr[j]!, di = wi[j]!;
  const d2 = dr * dr + di * di;
  if (!(d2 > 1e-16)) return false;
  const rowR = inv.re.slice(j * n, j * n + n), rowI = inv.im.slice(j * n, j * n + n);
  for (let i = 0; i < n; i++) {
    // f = w_i / d
    const fr = (wr[i]! * dr + wi[i]! * di) / d2, fi = (wi[i]! * dr - wr[i]! * di) / d2;
    if (fr === 0 && fi === 0) continue;
    for (let k = 0; k < n; k++) {
      inv.re[i * n + k] -= fr * rowR[k]! - fi * rowI[k]!;
      inv.im[i * n + k] -= fr * rowI[k]! + fi * rowR[k]!;
    }
  }
  setColumn(X, n, j, x);
  return true;
}

/** X⁻¹ and log|det X| by Gauss–Jordan elimination with partial pivoting (complex). */
function complexInverse(X: ComplexArray, n: number): { inv: ComplexArray; logAbsDet: number } {
  const ar = Float64Array.from(X.re), ai = Float64Array.from(X.im);
  const br = new Float64Array(n * n), bi = new Float64Array(n * n);
  for (let i = 0; i < n; i++) br[i * n + i] = 1;
  let logAbsDet = 0;
  for (let k = 0; k < n; k++) {
    let p = k, best = -1;
    for (let i = k; i < n; i++) {
      const m = Math.hypot(ar[i * n + k]!, ai[i * n + k]!);
      if (m > best) { best = m; p = i; }
    }
    if (!(best > n * Number.EPSILON)) {
      throw new EngineError("singular", `the closed-loop eigenvector matrix is numerically singular at step ${k + 1} of ${n} (pivot ${best.toExponential(2)})`, {
        step: k, pivot: best,
      });
    }
    if (p !== k) for (const m of [ar, ai, br, bi]) for (let j = 0; j < n; j++) { const t = m[k * n + j]!; m[k * n + j] = m[p * n + j]!; m[p * n + j] = t; }
    logAbsDet += Math.log(best);
    const pr = ar[k * n + k]!, pi = ai[k * n + k]!;
    const pd = pr * pr + pi * pi;
    const qr = pr / pd, qi = -pi / pd; // 1/pivot
    for (const [mr, mi] of [[ar, ai], [br, bi]] as const) {
      for (let j = 0; j < n; j++) {
        const a = mr[k * n + j]!, b = mi[k * n + j]!;
        mr[k * n + j] = a * qr - b * qi;
        mi[k * n + j] = a * qi + b * qr;
      }
    }
    for (let i = 0; i < n; i++) {
      if (i === k) continue;
      const fr = ar[i * n + k]!, fi = ai[i * n + k]!;
      if (fr === 0 && fi === 0) continue;
      for (const [mr, mi] of [[ar, ai], [br, bi]] as const) {
        for (let j = 0; j < n; j++) {
          const a = mr[k * n + j]!, b = mi[k * n + j]!;
          mr[i * n + j] -= fr * a - fi * b;
          mi[i * n + j] -= fr * b + fi * a;
        }
      }
    }
  }
  return { inv: { re: br, im: bi }, logAbsDet };
}
