/**
 * Reordering of a generalized real Schur form: moves the eigenvalues chosen by a predicate to
 * the leading diagonal positions by swapping adjacent 1×1/2×2 blocks with orthogonal
 * transformations, so that the leading columns of Z (and Q) span the corresponding deflating
 * subspaces (used by Riccati solvers and stable/unstable splittings).
 */
import { Matrix } from "ml-matrix";
import { EngineError } from "../errors";
import type { GeneralizedEigenvalue, GeneralizedSchurForm } from "./qz";
import {
  SAFE_MIN, ULP, type PencilWork, eigenvaluesOfForm, frobeniusNorm, matrixFromRowMajor, negateRow, standardizeBlock2, transposeSquare,
} from "./qzKernels";
import { requireSquareFinite, toFloat64 } from "./validate";

/**
 * Computes: an updated generalized real Schur form (S', T', Q', Z') of the same pencil,
 *   A = Q'·S'·Z'ᵀ, E = Q'·T'·Z'ᵀ, with every eigenvalue for which `select` returns true in the
 *   leading `selectedCount` diagonal positions (their relative order kept). A complex pair is
 *   selected when `select` accepts either member.
 *
 * Requires: `form` as returned by `qz` (standardised blocks; it is not modified). `select` must
 * not put two eigenvalues that are equal (to rounding) on different sides: swapping blocks
 * with (nearly) equal spectra is ill-conditioned and is refused.
 *
 * Method: adjacent block swaps by the direct method of Kågström, "A direct method for
 * reordering eigenvalues in the generalized real Schur form of a regular matrix pair (A, B)",
 * in Linear Algebra for Large Scale and Real-Time Applications, Kluwer 1993, and Kågström &
 * Poromaa, "Computing eigenspaces with specified eigenvalues of a regular matrix pair (A, B)
 * and condition estimation: theory, algorithms and software", Numer. Algorithms 12, 1996:
 * solve the 2×2-block generalized Sylvester equation A11·R − L·A22 = −A12,
 * B11·R − L·B22 = −B12 (Kronecker form, Gaussian elimination with complete pivoting), take Q
 * and Z from QR factorizations of [L; I] and [R; I], and accept the swap only if it passes
 * their weak and strong stability tests. Swapped 2×2 blocks are re-standardised.
 *
 * Cost: at most n²/2 swaps, each O(n) flops on S, T, Q, Z: O(n³) worst case, 4n² doubles.
 *
 * Accuracy: each swap perturbs the pencil by at most 100·ε·‖(window of S, T)‖_F (the stability
 * tests); the tests check ‖A − Q'S'Z'ᵀ‖_F ≤ 100·n·ε·‖A‖_F and orthogonality as for `qz`, and that
 * the eigenvalue multiset is unchanged to rounding. A 1×1 block reported infinite keeps
 * beta = 0 exactly through the swaps (a noise-level beta ≤ 10·n·ε·‖E‖_F left by a swap is reset
 * to zero), so infinite eigenvalues cannot turn into huge finite ones of arbitrary sign.
 *
 * Errors: "shape-mismatch"/"non-finite"/"empty" for a malformed form; "invalid-argument" when
 * `select` is not a function, or when it gives a different answer for an eigenvalue after the
 * swaps (the eigenvalue lies within rounding of the selection boundary; details: `position`);
 * "singular" when a swap fails the stability test (eigenvalues of the two blocks too close;
 * details: `position`, `residual`, `tolerance`).
 *
 * Example:
 *   const form = qz(A, E);
 *   const r = reorderQz(form, (ev) => ev.value !== null && ev.value.re < 0);
 *   // r.Z columns 0..r.selectedCount−1 span the stable deflating subspace;
 *   // ‖A − r.Q·r.S·r.Zᵀ‖_F / ‖A‖_F ≈ 1e−15
 */
export function reorderQz(
  form: GeneralizedSchurForm,
  select: (ev: GeneralizedEigenvalue) => boolean,
): GeneralizedSchurForm & { selectedCount: number } {
  if (typeof select !== "function") {
    throw new EngineError("invalid-argument", "select must be a function from an eigenvalue to a boolean", { argument: "select" });
  }
  const n = checkForm(form);
  const w: PencilWork = {
    n,
    S: toFloat64(form.S),
    T: toFloat64(form.T),
    QT: transposeSquare(toFloat64(form.Q), n),
    ZT: transposeSquare(toFloat64(form.Z), n),
  };
  const bnorm = frobeniusNorm(w.T);
  const before = eigenvaluesOfForm(w.S, w.T, n, bnorm);
  const blockSize = (i: number): 1 | 2 => (i + 1 < n && w.S[(i + 1) * n + i] !== 0 ? 2 : 1);
  const flags = new Uint8Array(n);
  for (let i = 0; i < n; i += blockSize(i)) {
    const chosen = blockSize(i) === 2 ? select(before[i]!) || select(before[i + 1]!) : select(before[i]!);
    flags[i] = chosen ? 1 : 0;
    if (blockSize(i) === 2) flags[i + 1] = flags[i]!;
  }

  let ks = 0; // positions [0, ks) hold selected blocks in their final place
  let i = 0;
  while (i < n) {
    const size = blockSize(i);
    if (!flags[i]) {
      i += size;
      continue;
    }
    let pos = i;
    let sz = size;
    while (pos > ks) {
      const above = pos - 2 >= ks && w.S[(pos - 1) * n + pos - 2] !== 0 ? 2 : 1;
      const start = pos - above;
      swapAdjacentBlocks(w, start, above, sz, n * ULP * bnorm);
      for (let k = start; k < start + sz; k++) flags[k] = 1;
      for (let k = start + sz; k < start + sz + above; k++) flags[k] = 0;
      pos = start;
      sz = blockSize(pos); // a 2×2 block may have split into two real 1×1 blocks
    }
    ks += blockSize(ks);
    i = ks; // rescan: a split block leaves its second half just below
  }

  const eigenvalues = eigenvaluesOfForm(w.S, w.T, n, bnorm);
  // The check that the selected eigenvalues lead: the predicate agrees with the placement.
  for (let j = 0; j < n; j += blockSize(j)) {
    const chosen = blockSize(j) === 2 ? select(eigenvalues[j]!) || select(eigenvalues[j + 1]!) : select(eigenvalues[j]!);
    if (chosen !== j < ks) {
      throw new EngineError(
        "invalid-argument",
        `select changed its answer for the eigenvalue at position ${j + 1} during reordering: it lies within rounding error of the selection boundary, so the selection is ill-posed`,
        { argument: "select", position: j, selectedCount: ks },
      );
    }
  }
  return {
    S: matrixFromRowMajor(w.S, n, false),
    T: matrixFromRowMajor(w.T, n, false),
    Q: matrixFromRowMajor(w.QT!, n, true),
    Z: matrixFromRowMajor(w.ZT!, n, true),
    eigenvalues,
    iterations: form.iterations,
    selectedCount: ks,
  };
}

function checkForm(form: GeneralizedSchurForm): number {
  if (form === null || typeof form !== "object") {
    throw new EngineError("invalid-argument", "form must be a generalized Schur form returned by qz", { argument: "form" });
  }
  const names = ["S", "T", "Q", "Z"] as const;
  for (const name of names) {
    if (!(form[name] instanceof Matrix)) {
      throw new EngineError("invalid-argument", `form.${name} must be a Matrix`, { argument: `form.${name}` });
    }
    requireSquareFinite(form[name], `form.${name}`);
  }
  const n = form.S.rows;
  for (const name of names) {
    if (form[name].rows !== n) {
      throw new EngineError("shape-mismatch", `form.${name} must be ${n}×${n} like form.S (it is ${form[name].rows}×${form[name].columns})`, {
        argument: `form.${name}`,
      });
    }
  }
  return n;
}

/**
 * Swaps the p×p block at rows/columns j.. with the q×q block below it (Kågström 1993).
 * Throws "singular" when the swap would not be backward stable.
 */
function swapAdjacentBlocks(w: PencilWork, j: number, p: number, q: number, infiniteTol: number): void {
  const { n, S, T } = w;
  // An infinite eigenvalue (1×1 block with beta ≈ 0) stays infinite under exact swaps; rounding
  // leaves beta at noise level, possibly above the reporting threshold, so it is reset below.
  const firstInfinite = p === 1 && Math.abs(T[j * n + j]) <= infiniteTol;
  const secondInfinite = q === 1 && Math.abs(T[(j + p) * n + j + p]) <= infiniteTol;
  const m = p + q;
  const a = new Float64Array(m * m), b = new Float64Array(m * m);
  for (let r = 0; r < m; r++) {
    for (let c = 0; c < m; c++) {
      a[r * m + c] = S[(j + r) * n + j + c];
      b[r * m + c] = T[(j + r) * n + j + c];
    }
  }
  const normA = frobeniusNorm(a), normB = frobeniusNorm(b);
  // Stability tolerance of the swap: Kågström & Poromaa use 10–20·ε·‖window‖; 100 leaves
  // room for the unscaled Kronecker solve while still bounding the perturbation locally.
  const tolA = Math.max(100 * ULP * normA, SAFE_MIN), tolB = Math.max(100 * ULP * normB, SAFE_MIN);

  const { R, L } = solveBlockSylvester(a, b, p, q);
  const Qs = completeOrthogonal(stackWithIdentity(L, p, q), m, q);
  const Zs = completeOrthogonal(stackWithIdentity(R, p, q), m, q);

  // Stability tests on the small window (weak: the new (2,1) blocks are small; strong: the
  // window is reproduced with those blocks zeroed).
  const an = similarity(Qs, a, Zs, m), bn = similarity(Qs, b, Zs, m);
  const weak = Math.max(lowerBlockNorm(an, m, q) / tolA, lowerBlockNorm(bn, m, q) / tolB);
  zeroLowerBlock(an, m, q);
  zeroLowerBlock(bn, m, q);
  const strong = Math.max(reconstructionError(Qs, an, Zs, a, m) / tolA, reconstructionError(Qs, bn, Zs, b, m) / tolB);
  if (!(weak <= 1 && strong <= 1)) {
    throw new EngineError(
      "singular",
      `cannot swap the diagonal blocks at positions ${j + 1} and ${j + p + 1} stably: their eigenvalues are too close (the swap would perturb the pencil by ${Math.max(weak, strong).toExponential(2)} times the tolerance)`,
      { position: j, sizes: [p, q], residual: Math.max(weak * tolA, strong * tolA), tolerance: tolA },
    );
  }

  // Apply to the whole form: rows j..j+m−1 from the left by Qsᵀ, columns from the right by Zs.
  leftMultiplyRows(S, n, j, m, Qs, j, n);
  leftMultiplyRows(T, n, j, m, Qs, j, n);
  leftMultiplyRows(w.QT!, n, j, m, Qs, 0, n);
  rightMultiplyCols(S, n, j, m, Zs, j + m);
  rightMultiplyCols(T, n, j, m, Zs, j + m);
  leftMultiplyRows(w.ZT!, n, j, m, Zs, 0, n);
  for (let r = q; r < m; r++) for (let c = 0; c < q; c++) {
    S[(j + r) * n + j + c] = 0;
    T[(j + r) * n + j + c] = 0;
  }
  // Resetting beta ≤ 10·n·ε·‖E‖_F to zero is a perturbation of E within the backward error of qz;
  // the window-relative tolerance would be too strict for graded pencils.
  if (secondInfinite && Math.abs(T[j * n + j]) <= 10 * infiniteTol) T[j * n + j] = 0;
  if (firstInfinite && Math.abs(T[(j + q) * n + j + q]) <= 10 * infiniteTol) T[(j + q) * n + j + q] = 0;
  // Re-standardise: 2×2 blocks get T diagonal and positive; 1×1 blocks get T[j][j] ≥ 0.
  for (const [start, size] of [[j, q], [j + q, p]] as const) {
    if (size === 2) {
      standardizeBlock2(w, start, 0, n);
    } else if (T[start * n + start] < 0) {
      negateRow(w, start, start, n);
    }
  }
}

/** Kronecker solve of A11·R − L·A22 = −A12, B11·R − L·B22 = −B12 (R, L: p×q, row-major). */
function solveBlockSylvester(a: Float64Array, b: Float64Array, p: number, q: number): { R: Float64Array; L: Float64Array } {
  const m = p + q, pq = p * q, N = 2 * pq;
  const K = new Float64Array(N * N), rhs = new Float64Array(N);
  const rIdx = (r: number, c: number): number => r * q + c;
  const lIdx = (r: number, c: number): number => pq + r * q + c;
  for (const [M, off] of [[a, 0], [b, pq]] as const) {
    for (let i = 0; i < p; i++) {
      for (let k = 0; k < q; k++) {
        const row = off + i * q + k;
        for (let t = 0; t < p; t++) K[row * N + rIdx(t, k)] += M[i * m + t]; // (M11·R)[i][k]
        for (let t = 0; t < q; t++) K[row * N + lIdx(i, t)] -= M[(p + t) * m + p + k]; // −(L·M22)[i][k]
        rhs[row] = -M[i * m + p + k];
      }
    }
  }
  const x = solveCompletePivoting(K, rhs, N);
  return { R: x.slice(0, pq), L: x.slice(pq) };
}

/** Gaussian elimination with complete pivoting; tiny pivots are perturbed as in LAPACK dgetc2. */
function solveCompletePivoting(K: Float64Array, rhs: Float64Array, N: number): Float64Array {
  const colPerm = Array.from({ length: N }, (_, i) => i);
  let maxAbs = 0;
  for (let k = 0; k < K.length; k++) maxAbs = Math.max(maxAbs, Math.abs(K[k]));
  const smin = Math.max(ULP * maxAbs, SAFE_MIN);
  for (let k = 0; k < N; k++) {
    let pr = k, pc = k, best = -1;
    for (let r = k; r < N; r++) for (let c = k; c < N; c++) {
      const v = Math.abs(K[r * N + c]);
      if (v > best) { best = v; pr = r; pc = c; }
    }
    if (pr !== k) {
      for (let c = 0; c < N; c++) { const t = K[k * N + c]; K[k * N + c] = K[pr * N + c]; K[pr * N + c] = t; }
      const t = rhs[k]; rhs[k] = rhs[pr]; rhs[pr] = t;
    }
    if (pc !== k) {
      for (let r = 0; r < N; r++) { const t = K[r * N + k]; K[r * N + k] = K[r * N + pc]; K[r * N + pc] = t; }
      const t = colPerm[k]!; colPerm[k] = colPerm[pc]!; colPerm[pc] = t;
    }
    if (Math.abs(K[k * N + k]) < smin) K[k * N + k] = smin;
    const piv = K[k * N + k];
    for (let r = k + 1; r < N; r++) {
      const f = K[r * N + k] / piv;
      if (f === 0) continue;
      for (let c = k; c < N; c++) K[r * N + c] -= f * K[k * N + c];
      rhs[r] -= f * rhs[k];
    }
  }
  const y = new Float64Array(N);
  for (let k = N - 1; k >= 0; k--) {
    let s = rhs[k];
    for (let c = k + 1; c < N; c++) s -= K[k * N + c] * y[c];
    y[k] = s / K[k * N + k];
  }
  const x = new Float64Array(N);
  for (let k = 0; k < N; k++) x[colPerm[k]!] = y[k];
  return x;
}

/** The m×q matrix [X; I_q] for X: p×q (row-major). */
function stackWithIdentity(X: Float64Array, p: number, q: number): Float64Array {
  const m = p + q, out = new Float64Array(m * q);
  out.set(X.subarray(0, p * q), 0);
  for (let k = 0; k < q; k++) out[(p + k) * q + k] = 1;
  return out;
}

/** Orthogonal m×m U whose first q columns span the columns of X (m×q), by Householder QR. */
function completeOrthogonal(X: Float64Array, m: number, q: number): Float64Array {
  const x = Float64Array.from(X);
  const U = new Float64Array(m * m);
  for (let i = 0; i < m; i++) U[i * m + i] = 1;
  const v = new Float64Array(m);
  for (let k = 0; k < q; k++) {
    let norm = 0;
    for (let i = k; i < m; i++) norm = Math.hypot(norm, x[i * q + k]);
    if (norm === 0) continue;
    const alpha = x[k * q + k];
    const beta = alpha >= 0 ? -norm : norm;
    v.fill(0);
    v[k] = 1;
    for (let i = k + 1; i < m; i++) v[i] = x[i * q + k] / (alpha - beta);
    const tau = (beta - alpha) / beta;
    // x ← H·x (remaining columns), U ← U·H.
    for (let c = k; c < q; c++) {
      let s = 0;
      for (let i = k; i < m; i++) s += v[i] * x[i * q + c];
      for (let i = k; i < m; i++) x[i * q + c] -= tau * v[i] * s;
    }
    for (let r = 0; r < m; r++) {
      let s = 0;
      for (let i = k; i < m; i++) s += U[r * m + i] * v[i];
      for (let i = k; i < m; i++) U[r * m + i] -= tau * s * v[i];
    }
  }
  return U;
}

/** Uᵀ·M·V for m×m row-major matrices. */
function similarity(U: Float64Array, M: Float64Array, V: Float64Array, m: number): Float64Array {
  const tmp = new Float64Array(m * m), out = new Float64Array(m * m);
  for (let i = 0; i < m; i++) for (let j = 0; j < m; j++) {
    let s = 0;
    for (let k = 0; k < m; k++) s += U[k * m + i] * M[k * m + j];
    tmp[i * m + j] = s;
  }
  for (let i = 0; i < m; i++) for (let j = 0; j < m; j++) {
    let s = 0;
    for (let k = 0; k < m; k++) s += tmp[i * m + k] * V[k * m + j];
    out[i * m + j] = s;
  }
  return out;
}

/** ‖U·M·Vᵀ − M0‖_F for m×m row-major matrices. */
function reconstructionError(U: Float64Array, M: Float64Array, V: Float64Array, M0: Float64Array, m: number): number {
  const tmp = new Float64Array(m * m), diff = new Float64Array(m * m);
  for (let i = 0; i < m; i++) for (let j = 0; j < m; j++) {
    let s = 0;
    for (let k = 0; k < m; k++) s += U[i * m + k] * M[k * m + j];
    tmp[i * m + j] = s;
  }
  for (let i = 0; i < m; i++) for (let j = 0; j < m; j++) {
    let s = 0;
    for (let k = 0; k < m; k++) s += tmp[i * m + k] * V[j * m + k];
    diff[i * m + j] = s - M0[i * m + j];
  }
  return frobeniusNorm(diff);
}

function lowerBlockNorm(M: Float64Array, m: number, q: number): number {
  let s = 0;
  for (let r = q; r < m; r++) for (let c = 0; c < q; c++) s = Math.hypot(s, M[r * m + c]);
  return s;
}

function zeroLowerBlock(M: Float64Array, m: number, q: number): void {
  for (let r = q; r < m; r++) for (let c = 0; c < q; c++) M[r * m + c] = 0;
}

/** Rows j..j+m−1 of M (columns [c0, c1)) ← Uᵀ·(those rows), U: m×m. */
function leftMultiplyRows(M: Float64Array, n: number, j: number, m: number, U: Float64Array, c0: number, c1: number): void {
  const buf = new Float64Array(m);
  for (let c = c0; c < c1; c++) {
    for (let r = 0; r < m; r++) {
      let s = 0;
      for (let k = 0; k < m; k++) s += U[k * m + r] * M[(j + k) * n + c];
      buf[r] = s;
    }
    for (let r = 0; r < m; r++) M[(j + r) * n + c] = buf[r];
  }
}

/** Columns j..j+m−1 of M (rows [0, r1)) ← (those columns)·V, V: m×m. */
function rightMultiplyCols(M: Float64Array, n: number, j: number, m: number, V: Float64Array, r1: number): void {
  const buf = new Float64Array(m);
  for (let r = 0; r < r1; r++) {
    const o = r * n + j;
    for (let c = 0; c < m; c++) {
      let s = 0;
      for (let k = 0; k < m; k++) s += M[o + k] * V[k * m + c];
      buf[c] = s;
    }
    for (let c = 0; c < m; c++) M[o + c] = buf[c];
  }
}
