/**
 * Reordering of a real Schur form A = Q T Qᵀ so that chosen eigenvalues lead the diagonal of T:
 * then the first k columns of Q span the invariant subspace of those eigenvalues (the basis of
 * Riccati solvers and modal decompositions). Adjacent 1×1/2×2 blocks are exchanged by the
 * direct swapping method of Bai & Demmel, with their stability tests.
 */
import { EngineError } from "../errors";
import type { Complex } from "./complex";
import { eigenvaluesOfQuasiTriangular, standardizeBlockAt, type RealSchurForm } from "./schur";
import { fromFloat64, requireSameShape, requireSquareFinite, requireFinite, toFloat64 } from "./validate";

const ULP = Number.EPSILON;
const SMALL_NUM = 2.2250738585072014e-308 / ULP; // dlamch('S')/dlamch('P') as in LAPACK dlaexc

/** Selects eigenvalues with negative real part (continuous-time stable). */
export const selectLeftHalfPlane = (lambda: Complex): boolean => lambda.re < 0;
/** Selects eigenvalues of modulus below one (discrete-time stable). */
export const selectInsideUnitCircle = (lambda: Complex): boolean => Math.hypot(lambda.re, lambda.im) < 1;

interface Block {
  size: number;
  selected: boolean;
}

/**
 * Computes: an orthogonal U with T' = Uᵀ T U still upper quasi-triangular (standardised 2×2
 * blocks) and Q' = Q U, so A = Q' T' Q'ᵀ, where the leading selectedCount diagonal entries of
 * T' carry exactly the eigenvalues λ with select(λ) true. A conjugate pair is selected when
 * select holds for its member with positive imaginary part; it stays together (counts 2).
 * Relative order within the selected and within the unselected eigenvalues is kept.
 *
 * Requires: form.T n×n upper quasi-triangular (zero below the first subdiagonal, no two
 * consecutive nonzero subdiagonal entries), form.Q n×n, both finite. Inputs are not modified.
 *
 * Method: Z. Bai & J. W. Demmel, "On swapping diagonal blocks in real Schur form", Linear
 * Algebra Appl. 186 (1993) 73–95: each adjacent swap solves the small Sylvester equation
 * T11·X − X·T22 = T12 by Gaussian elimination with complete pivoting, takes the QR
 * factorisation of [−X; I], applies it, and is rejected unless both the weak test (new
 * subdiagonal block ≤ thresh) and the strong test (‖D − U D̃ Uᵀ‖ ≤ thresh) pass, with
 * thresh = max(10·ε·max|D|, safe minimum/ε) as in LAPACK dlaexc. 1×1/1×1 swaps use one Givens
 * rotation (exact exchange of the diagonal entries). Blocks are moved forward by adjacent
 * swaps as in LAPACK dtrexc/dtrsen.
 *
 * Cost: O(n) flops per swap on T and Q (at most 4 rows and columns), O(k·(n−k)) swaps for k
 * selected eigenvalues, hence O(n³) worst case; O(n²) memory.
 *
 * Accuracy: backward stable; ‖A − Q'T'Q'ᵀ‖ and ‖Q'ᵀQ' − I‖ grow by O(ε) per swap relative to
 * the input form. Before returning, the eigenvalues of T' are re-evaluated with `select`:
 * the leading selectedCount must satisfy it and the others must not.
 *
 * Errors: "empty", "shape-mismatch", "non-finite" (bad T or Q); "invalid-argument" (T not
 * quasi-triangular); "no-convergence" with details.reason "swap-rejected" when a swap fails
 * the stability tests (eigenvalues too close to be separated reliably; details hold the
 * position, the residuals and the threshold), or with details.reason "selection-changed"
 * when rounding moved an eigenvalue across the selection boundary.
 *
 * Example:
 *   const form = realSchur(new Matrix([[1, 2], [0, -3]]));
 *   const r = reorderSchur(form, selectLeftHalfPlane); // r.selectedCount === 1, T'[0][0] = −3
 *   // ‖A − Q'·T'·Q'ᵀ‖_F / ‖A‖_F < 1e-15
 */
export function reorderSchur(
  form: RealSchurForm,
  select: (lambda: Complex) => boolean,
): RealSchurForm & { selectedCount: number } {
  requireSquareFinite(form.T, "T");
  requireSameShape(form.T, "T", form.Q, "Q");
  requireFinite(form.Q, "Q");
  const n = form.T.rows;
  const t = toFloat64(form.T);
  const q = toFloat64(form.Q);
  const { eigenvalues, selectedCount } = reorderSchurInPlace(t, q, n, select);
  return {
    T: fromFloat64(t, n, n),
    Q: fromFloat64(q, n, n),
    eigenvalues,
    iterations: form.iterations,
    selectedCount,
  };
}

/**
 * Kernel behind `reorderSchur` for callers holding row-major copies: reorders the validated,
 * finite n×n quasi-triangular `t` and orthogonal `q` in place (same steps, checks and errors
 * as `reorderSchur`, without the Matrix round trips) and returns the eigenvalues of the
 * reordered T with the number of selected ones.
 */
export function reorderSchurInPlace(
  t: Float64Array,
  q: Float64Array,
  n: number,
  select: (lambda: Complex) => boolean,
): { eigenvalues: Complex[]; selectedCount: number } {
  const blocks = readBlocks(t, n);
  // standardise 2×2 blocks (a no-op for blocks produced by realSchur); split real pairs
  let pos = 0;
  const standardBlocks: number[] = [];
  for (const size of blocks) {
    if (size === 2 && !standardizeBlockAt(t, n, pos, q)) {
      t[(pos + 1) * n + pos] = 0;
      standardBlocks.push(1, 1);
    } else {
      standardBlocks.push(size);
    }
    pos += size;
  }
  const list: Block[] = [];
  pos = 0;
  for (const size of standardBlocks) {
    list.push({ size, selected: select(blockEigenvalue(t, n, pos, size)) });
    pos += size;
  }

  // Move each selected block forward past the unselected ones before it.
  let leading = 0; // blocks 0..leading-1 are selected and in place
  let leadingStart = 0; // row where block `leading` starts
  for (;;) {
    while (leading < list.length && list[leading]!.selected) leadingStart += list[leading++]!.size;
    let s = leading;
    let start = leadingStart;
    while (s < list.length && !list[s]!.selected) start += list[s++]!.size;
    if (s >= list.length) break;
    // bubble block s down to index `leading`
    let cur = s;
    let curStart = start;
    while (cur > leading) {
      const prev = list[cur - 1]!;
      const moved = list[cur]!;
      const j1 = curStart - prev.size;
      swapAdjacentBlocks(t, q, n, j1, prev.size, moved.size);
      const movedPieces = piecesAfterSwap(t, n, j1, moved.size);
      const prevPieces = piecesAfterSwap(t, n, j1 + moved.size, prev.size);
      const replacement: Block[] = [
        ...movedPieces.map((size) => ({ size, selected: true })),
        ...prevPieces.map((size) => ({ size, selected: false })),
      ];
      list.splice(cur - 1, 2, ...replacement);
      cur -= 1;
      curStart = j1;
      // if the moved pair split into two real eigenvalues, keep moving the first; the second is found next round
    }
  }

  for (let i = 2; i < n; i++) for (let j = 0; j < i - 1; j++) t[i * n + j] = 0;
  const eigenvalues = eigenvaluesOfQuasiTriangular(t, n);
  let selectedCount = 0;
  for (const b of list) {
    if (!b.selected) break;
    selectedCount += b.size;
  }
  // re-check the selection on the reordered eigenvalues
  for (let i = 0; i < n; i++) {
    const lambda = eigenvalues[i]!;
    if (lambda.im < 0) continue; // judged by its +im partner
    const wanted = i < selectedCount;
    if (select(lambda) !== wanted) {
      throw new EngineError(
        "no-convergence",
        `Reordering the Schur form moved eigenvalue ${lambda.re}${lambda.im ? ` + ${lambda.im}i` : ""} across the selection boundary; ` +
          `it is too close to the boundary to be classified reliably`,
        { reason: "selection-changed", index: i, eigenvalue: lambda, selectedCount },
      );
    }
  }
  for (let i = 0; i < n * n; i++) {
    if (!Number.isFinite(t[i]) || !Number.isFinite(q[i])) {
      throw new EngineError("internal", "Schur reordering produced a non-finite entry", { index: i });
    }
  }
  return { eigenvalues, selectedCount };
}

/** Block sizes along the diagonal of quasi-triangular T; throws if T is not quasi-triangular. */
function readBlocks(t: Float64Array, n: number): number[] {
  for (let i = 2; i < n; i++) {
    for (let j = 0; j < i - 1; j++) {
      if (t[i * n + j] !== 0) {
        throw new EngineError("invalid-argument", `T must be upper quasi-triangular, but T[${i}][${j}] = ${t[i * n + j]} is below the subdiagonal`, {
          argument: "T",
          row: i,
          col: j,
        });
      }
    }
  }
  const sizes: number[] = [];
  for (let i = 0; i < n; ) {
    if (i + 1 < n && t[(i + 1) * n + i] !== 0) {
      if (i + 2 < n && t[(i + 2) * n + i + 1] !== 0) {
        throw new EngineError("invalid-argument", `T must be upper quasi-triangular, but T[${i + 1}][${i}] and T[${i + 2}][${i + 1}] are both nonzero`, {
          argument: "T",
          row: i + 1,
        });
      }
      sizes.push(2);
      i += 2;
    } else {
      sizes.push(1);
      i += 1;
    }
  }
  return sizes;
}

function blockEigenvalue(t: Float64Array, n: number, p: number, size: number): Complex {
  if (size === 1) return { re: t[p * n + p], im: 0 };
  const im = Math.sqrt(Math.abs(t[p * n + p + 1])) * Math.sqrt(Math.abs(t[(p + 1) * n + p]));
  return { re: t[p * n + p], im };
}

/** Sizes of the pieces a block became after a swap: a 2×2 that turned out real splits in two. */
function piecesAfterSwap(t: Float64Array, n: number, p: number, size: number): number[] {
  if (size === 1) return [1];
  return t[(p + 1) * n + p] !== 0 ? [2] : [1, 1];
}

/**
 * Exchanges the adjacent diagonal blocks T11 (n1×n1 at j1) and T22 (n2×n2 at j1+n1) of the
 * row-major quasi-triangular t, updating q's columns, and re-standardises the 2×2 blocks that
 * result (LAPACK dlaexc). Throws "no-convergence" (reason "swap-rejected") on a failed test.
 */
function swapAdjacentBlocks(t: Float64Array, q: Float64Array, n: number, j1: number, n1: number, n2: number): void {
  if (n1 === 1 && n2 === 1) {
    // Givens rotation that exchanges the two diagonal entries exactly (LAPACK dlaexc, case 1×1).
    const j2 = j1 + 1;
    const t11 = t[j1 * n + j1];
    const t22 = t[j2 * n + j2];
    const f = t[j1 * n + j2];
    const g = t22 - t11;
    if (g === 0) return; // equal eigenvalues: exchanging them changes nothing
    const r = Math.hypot(f, g);
    const cs = f / r;
    const sn = g / r;
    rotateRows(t, n, j1, j2, j2 + 1, n - 1, cs, sn);
    rotateCols(t, n, j1, j2, 0, j1 - 1, cs, sn);
    t[j1 * n + j1] = t22;
    t[j2 * n + j2] = t11;
    t[j2 * n + j1] = 0;
    rotateCols(q, n, j1, j2, 0, n - 1, cs, sn);
    return;
  }
  const nd = n1 + n2;
  const d = new Float64Array(nd * nd);
  let dnorm = 0;
  for (let i = 0; i < nd; i++) {
    for (let j = 0; j < nd; j++) {
      const x = t[(j1 + i) * n + j1 + j];
      d[i * nd + j] = x;
      dnorm = Math.max(dnorm, Math.abs(x));
    }
  }
  const thresh = Math.max(10 * ULP * dnorm, SMALL_NUM);
  const x = solveSmallSylvester(d, nd, n1, n2);
  // Householder QR of M = [−X; I] (nd×n2); U = H_0·H_1 accumulated explicitly (nd ≤ 4)
  const m = new Float64Array(nd * n2);
  for (let i = 0; i < n1; i++) for (let j = 0; j < n2; j++) m[i * n2 + j] = -x[i + j * n1];
  for (let j = 0; j < n2; j++) m[(n1 + j) * n2 + j] = 1;
  const u = new Float64Array(nd * nd);
  for (let i = 0; i < nd; i++) u[i * nd + i] = 1;
  const v = new Float64Array(nd);
  for (let c = 0; c < n2; c++) {
    let norm = 0;
    for (let i = c; i < nd; i++) norm = Math.hypot(norm, m[i * n2 + c]);
    const alpha = m[c * n2 + c];
    if (norm === 0) continue;
    const beta = alpha >= 0 ? -norm : norm;
    v.fill(0);
    v[c] = alpha - beta;
    for (let i = c + 1; i < nd; i++) v[i] = m[i * n2 + c];
    let vv = 0;
    for (let i = c; i < nd; i++) vv += v[i] * v[i];
    const tau = 2 / vv;
    for (let j = c; j < n2; j++) {
      let s = 0;
      for (let i = c; i < nd; i++) s += v[i] * m[i * n2 + j];
      s *= tau;
      for (let i = c; i < nd; i++) m[i * n2 + j] -= s * v[i];
    }
    for (let i = 0; i < nd; i++) {
      let s = 0;
      for (let k = c; k < nd; k++) s += u[i * nd + k] * v[k];
      s *= tau;
      for (let k = c; k < nd; k++) u[i * nd + k] -= s * v[k];
    }
  }
  // provisional swap on the copy: D' = Uᵀ D U, then the weak and strong tests (Bai & Demmel §3)
  const dNew = conjugate(d, u, nd);
  let weak = 0;
  for (let i = n2; i < nd; i++) for (let j = 0; j < n2; j++) weak = Math.max(weak, Math.abs(dNew[i * nd + j]));
  for (let i = n2; i < nd; i++) for (let j = 0; j < n2; j++) dNew[i * nd + j] = 0;
  // strong: ‖D − U·D̃·Uᵀ‖_max
  const back = new Float64Array(nd * nd);
  for (let i = 0; i < nd; i++) {
    for (let j = 0; j < nd; j++) {
      let s = 0;
      for (let k = 0; k < nd; k++) {
        const uik = u[i * nd + k];
        if (uik === 0) continue;
        for (let l = 0; l < nd; l++) s += uik * dNew[k * nd + l] * u[j * nd + l];
      }
      back[i * nd + j] = s;
    }
  }
  let strong = 0;
  for (let i = 0; i < nd * nd; i++) strong = Math.max(strong, Math.abs(d[i] - back[i]));
  if (!(weak <= thresh) || !(strong <= thresh)) {
    throw new EngineError(
      "no-convergence",
      `Reordering the Schur form: exchanging the ${n1}×${n1} block at row ${j1 + 1} with the ${n2}×${n2} block after it was rejected ` +
        `as too ill-conditioned (residual ${Math.max(weak, strong).toExponential(2)} > threshold ${thresh.toExponential(2)}); the eigenvalues are too close to separate`,
      { reason: "swap-rejected", row: j1, sizes: [n1, n2], weakResidual: weak, strongResidual: strong, threshold: thresh },
    );
  }
  // apply U: rows j1..j1+nd−1 from the left (columns j1..n−1), columns from the right (rows 0..j1+nd−1)
  const tmp = new Float64Array(nd);
  for (let c = j1; c < n; c++) {
    for (let i = 0; i < nd; i++) {
      let s = 0;
      for (let k = 0; k < nd; k++) s += u[k * nd + i] * t[(j1 + k) * n + c];
      tmp[i] = s;
    }
    for (let i = 0; i < nd; i++) t[(j1 + i) * n + c] = tmp[i];
  }
  applyRight(t, n, j1, nd, u, 0, j1 + nd - 1, tmp);
  for (let i = 0; i < nd; i++) for (let j = 0; j < nd; j++) t[(j1 + i) * n + j1 + j] = dNew[i * nd + j];
  applyRight(q, n, j1, nd, u, 0, n - 1, tmp);
  // a 2×2 block that is now the leading one: rotation from standardisation must reach q too
  if (n2 === 2) standardizeBlockAt(t, n, j1, q);
  if (n1 === 2) standardizeBlockAt(t, n, j1 + n2, q);
}

/** m[rows r0..r1][j1..j1+nd−1] ← that · U. */
function applyRight(m: Float64Array, n: number, j1: number, nd: number, u: Float64Array, r0: number, r1: number, tmp: Float64Array): void {
  for (let r = r0; r <= r1; r++) {
    const row = r * n + j1;
    for (let j = 0; j < nd; j++) {
      let s = 0;
      for (let k = 0; k < nd; k++) s += m[row + k] * u[k * nd + j];
      tmp[j] = s;
    }
    for (let j = 0; j < nd; j++) m[row + j] = tmp[j];
  }
}

/** Uᵀ·D·U for small nd×nd row-major arrays. */
function conjugate(d: Float64Array, u: Float64Array, nd: number): Float64Array {
  const du = new Float64Array(nd * nd);
  for (let i = 0; i < nd; i++) for (let j = 0; j < nd; j++) {
    let s = 0;
    for (let k = 0; k < nd; k++) s += d[i * nd + k] * u[k * nd + j];
    du[i * nd + j] = s;
  }
  const out = new Float64Array(nd * nd);
  for (let i = 0; i < nd; i++) for (let j = 0; j < nd; j++) {
    let s = 0;
    for (let k = 0; k < nd; k++) s += u[k * nd + i] * du[k * nd + j];
    out[i * nd + j] = s;
  }
  return out;
}

/**
 * Solves T11·X − X·T22 = T12 (T11 n1×n1 and T22 n2×n2 the diagonal blocks of the nd×nd d,
 * T12 its upper-right block) through the Kronecker form (I⊗T11 − T22ᵀ⊗I)·vec(X) = vec(T12)
 * by Gaussian elimination with complete pivoting, pivots below smin replaced by smin
 * (LAPACK dlasy2's perturbation). Returns vec(X) column-major (X[i][j] at i + j·n1).
 */
function solveSmallSylvester(d: Float64Array, nd: number, n1: number, n2: number): Float64Array {
  const sz = n1 * n2;
  const k = new Float64Array(sz * sz);
  const rhs = new Float64Array(sz);
  let big = 0;
  for (let i = 0; i < nd * nd; i++) big = Math.max(big, Math.abs(d[i]));
  const smin = Math.max(ULP * big, SMALL_NUM);
  for (let j = 0; j < n2; j++) {
    for (let i = 0; i < n1; i++) {
      const row = i + j * n1;
      rhs[row] = d[i * nd + n1 + j];
      for (let kk = 0; kk < n1; kk++) k[row * sz + kk + j * n1] += d[i * nd + kk];
      for (let kk = 0; kk < n2; kk++) k[row * sz + i + kk * n1] -= d[(n1 + kk) * nd + n1 + j];
    }
  }
  const colPerm = new Int32Array(sz);
  for (let i = 0; i < sz; i++) colPerm[i] = i;
  for (let p = 0; p < sz; p++) {
    let best = -1;
    let br = p;
    let bc = p;
    for (let i = p; i < sz; i++) for (let j = p; j < sz; j++) {
      const a = Math.abs(k[i * sz + j]);
      if (a > best) {
        best = a;
        br = i;
        bc = j;
      }
    }
    if (br !== p) {
      for (let j = 0; j < sz; j++) [k[p * sz + j], k[br * sz + j]] = [k[br * sz + j], k[p * sz + j]];
      [rhs[p], rhs[br]] = [rhs[br], rhs[p]];
    }
    if (bc !== p) {
      for (let i = 0; i < sz; i++) [k[i * sz + p], k[i * sz + bc]] = [k[i * sz + bc], k[i * sz + p]];
      [colPerm[p], colPerm[bc]] = [colPerm[bc], colPerm[p]];
    }
    if (Math.abs(k[p * sz + p]) < smin) k[p * sz + p] = smin;
    const piv = k[p * sz + p];
    for (let i = p + 1; i < sz; i++) {
      const f = k[i * sz + p] / piv;
      if (f === 0) continue;
      for (let j = p; j < sz; j++) k[i * sz + j] -= f * k[p * sz + j];
      rhs[i] -= f * rhs[p];
    }
  }
  const y = new Float64Array(sz);
  for (let i = sz - 1; i >= 0; i--) {
    let s = rhs[i];
    for (let j = i + 1; j < sz; j++) s -= k[i * sz + j] * y[j];
    y[i] = s / k[i * sz + i];
  }
  const out = new Float64Array(sz);
  for (let i = 0; i < sz; i++) out[colPerm[i]] = y[i];
  return out;
}

function rotateRows(m: Float64Array, n: number, r1: number, r2: number, c0: number, c1: number, cs: number, sn: number): void {
  for (let c = c0; c <= c1; c++) {
    const x = m[r1 * n + c];
    const y = m[r2 * n + c];
    m[r1 * n + c] = cs * x + sn * y;
    m[r2 * n + c] = cs * y - sn * x;
  }
}

function rotateCols(m: Float64Array, n: number, c1: number, c2: number, r0: number, r1: number, cs: number, sn: number): void {
  for (let r = r0; r <= r1; r++) {
    const x = m[r * n + c1];
    const y = m[r * n + c2];
    m[r * n + c1] = cs * x + sn * y;
    m[r * n + c2] = cs * y - sn * x;
  }
}
