/**
 * Step 1 and 2 of the QZ algorithm (Moler & Stewart 1973): reduction of a pencil held in
 * row-major arrays to Hessenberg–triangular form, accumulating the orthogonal factors.
 * Internal to linalg/ (qz.ts is the public surface).
 */
import { type PencilWork, givens as givensShared, rot as rotShared, rotRows as rotRowsShared } from "./qzKernels";

// Module-level aliases of the shared scratch arrays and hot kernels: read through an import
// binding, every access in the inner loops cost a getter call under per-file CommonJS transpilation (tsx, vitest).
const rot = rotShared;
const givens = givensShared;
const rotRows = rotRowsShared;

/**
 * Moler & Stewart (1973) step 1 and 2: T ← Householder QR of E (applied to A as well, with Q
 * formed by backward accumulation when wanted), then Givens rotations from the left zero A
 * column by column from the bottom, each followed by a right rotation removing the fill it
 * creates below T's diagonal.
 */
export function reduceToHessenbergTriangular(w: PencilWork & { scratch: Float64Array }): void {
  const { n, S, T, QT, ZT } = w;
  const sc = w.scratch;
  const taus = sc.subarray(0, n);
  let v = sc.subarray(n, 2 * n), vNext = sc.subarray(2 * n, 3 * n);
  let accT = sc.subarray(3 * n, 4 * n), accS = sc.subarray(4 * n, 5 * n);
  let nextT = sc.subarray(5 * n, 6 * n), nextS = sc.subarray(6 * n, 7 * n);
  // Householder QR of T (Golub & Van Loan §5.2.2), applied to S at once. Each reflector is
  // applied on its own, in sequence (no two-reflector WY form: on structured pencils such as
  // the Riccati ones the sequential form keeps exact zeros exact, which the WY form fills with
  // rounding noise), but pipelined: the pass that applies H_k = I − τ_k·v_k·v_kᵀ (M ← M − τ_k·v_k·
  // (v_kᵀM)) also forms v_{k+1}ᵀ·(H_k·M) from the entries it has just written, so each reflector
  // costs one pass over the rows instead of two. v_{k+1} comes from column k+1, updated first.
  // The reflectors are kept below T's diagonal so that Q can be formed afterwards by backward
  // accumulation (4n³/3 flops instead of 2n³ for applying them to an identity matrix in forward
  // order).
  if (n >= 2) {
    let tau = householderOfColumn(T, n, 0, v);
    taus[0] = tau;
    accumulateRows(T, n, v, 0, 1, n, accT);
    accumulateRows(S, n, v, 0, 0, n, accS);
    for (let k = 0; k < n - 1; k++) {
      const a = accT[k + 1];
      for (let i = k; i < n; i++) T[i * n + k + 1] -= tau * v[i] * a;
      if (k + 1 < n - 1) {
        const tauNext = householderOfColumn(T, n, k + 1, vNext);
        taus[k + 1] = tauNext;
        vNext[k] = 0;
        nextT.fill(0, k + 2, n);
        nextS.fill(0);
        reflectAndAccumulateRows(T, n, v, tau, accT, vNext, nextT, k, k + 2, n);
        reflectAndAccumulateRows(S, n, v, tau, accS, vNext, nextS, k, 0, n);
        [v, vNext] = [vNext, v];
        [accT, nextT] = [nextT, accT];
        [accS, nextS] = [nextS, accS];
        tau = tauNext;
      } else {
        reflectRows(S, n, v, tau, accS, k, 0, n);
      }
    }
  }
  if (QT && ZT) {
    // Q = H_0·H_1·…·H_{n−2}, accumulated backward in ZT's storage (still unused), then Qᵀ:
    // M ← H_k·M for k = n−2, …, 0 on rows and columns k..n−1 (the rest is still the identity),
    // pipelined as above (row k−1 of M, an identity row, adds e_{k−1} to v_{k−1}ᵀ·M).
    ZT.fill(0);
    for (let i = 0; i < n; i++) ZT[i * n + i] = 1;
    if (n >= 2) {
      reflectorFromBelow(T, n, n - 2, v);
      accT.fill(0);
      accT[n - 2] = v[n - 2]; accT[n - 1] = v[n - 1]; // v_{n−2}ᵀ·I on columns n−2, n−1
      for (let k = n - 2; k >= 0; k--) {
        if (k >= 1) {
          reflectorFromBelow(T, n, k - 1, vNext);
          nextT.fill(0, k - 1, n);
          nextT[k - 1] = 1;
          reflectAndAccumulateRows(ZT, n, v, taus[k], accT, vNext, nextT, k, k, n);
          [v, vNext] = [vNext, v];
          [accT, nextT] = [nextT, accT];
        } else {
          reflectRows(ZT, n, v, taus[0], accT, 0, 0, n);
        }
      }
    }
    for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) QT[j * n + i] = ZT[i * n + j];
    ZT.fill(0);
    for (let i = 0; i < n; i++) ZT[i * n + i] = 1;
  }
  for (let k = 0; k < n - 1; k++) for (let i = k + 1; i < n; i++) T[i * n + k] = 0;

  // Column j: left rotations (rows i−1, i) zero S[i][j] from the bottom; each leaves a fill at
  // T[i][i−1] that a right rotation (columns i, i−1) removes. Right rotations never touch
  // column j of S, so the left ones do not depend on them: S's right rotations are stored and
  // applied afterwards row by row, on contiguous memory (associativity of L·S·R).
  // T's right rotations are deferred the same way, row by row: a row of T needs the pending
  // ones only just before a left rotation first mixes it with the row below (which already
  // has them), so row i−1 is brought up to date then, in one contiguous pass; rows 0..j, never
  // touched from the left, get them all at the end with S. Every entry sees the same
  // operations in the same order as with column rotations applied at once (bit-identical),
  // without the stride-n column walks through T.
  // Two neighbouring steps (i and i−1) are fused where their left rotations act on the same
  // data (S's rows, T's far columns, Qᵀ's and Zᵀ's rows): one pass over three rows instead of
  // two passes over two, the fusion of the bulge chase in schur.ts. Per entry the operations
  // and their order are unchanged, so the result is bit-identical.
  const cs = v, sn = accT;
  for (let j = 0; j < n - 2; j++) {
    let i = n - 1;
    while (i >= j + 2) {
      if (i - 1 >= j + 2 && S[i * n + j] !== 0) {
        hessenbergTriangularPair(w, j, i, cs, sn);
        i -= 2;
        continue;
      }
      catchUpRow(T, n, i - 1, i + 1, cs, sn);
      const g = S[i * n + j];
      if (g === 0) {
        cs[i] = 1; sn[i] = 0;
        i--;
        continue;
      }
      givens(S[(i - 1) * n + j], g);
      const c = rot[0], s = rot[1];
      S[(i - 1) * n + j] = rot[2];
      S[i * n + j] = 0;
      rotRows(S, n, i - 1, i, c, s, j + 1, i - 1);
      rotRowsOfBoth(S, T, n, i - 1, c, s, i - 1);
      givens(T[i * n + i], T[i * n + i - 1]);
      const c2 = rot[0], s2 = rot[1];
      // The right rotation on rows i−1 and i now; rows above get it in their catch-up pass.
      const up = (i - 1) * n;
      const x = T[up + i], y = T[up + i - 1];
      T[up + i] = c2 * x + s2 * y;
      T[up + i - 1] = c2 * y - s2 * x;
      T[i * n + i] = rot[2];
      T[i * n + i - 1] = 0;
      cs[i] = c2; sn[i] = s2;
      if (QT) rotRows(QT, n, i - 1, i, c, s, 0, n);
      if (ZT) rotRows(ZT, n, i, i - 1, c2, s2, zeroColumnsOfZt(i - 1, j), n);
      i--;
    }
    // Rows in pairs: each row's pass is a chain of dependent rotations (latency-bound), and
    // two independent chains in one loop overlap.
    let r = 0;
    for (; r + 3 <= j; r += 4) catchUpFourRows(T, n, r, j + 2, cs, sn);
    for (; r + 1 <= j; r += 2) catchUpTwoRows(T, n, r, r + 1, j + 2, cs, sn);
    if (r <= j) catchUpRow(T, n, r, j + 2, cs, sn);
    for (r = 0; r + 3 < n; r += 4) catchUpFourRows(S, n, r, j + 2, cs, sn);
    for (; r + 1 < n; r += 2) catchUpTwoRows(S, n, r, r + 1, j + 2, cs, sn);
    if (r < n) catchUpRow(S, n, r, j + 2, cs, sn);
  }
}

/**
 * Steps i and i−1 of column j of the Hessenberg–triangular reduction (S[i][j] ≠ 0, i − 1 ≥ j + 2):
 * left rotations L_i (rows i−1, i) and L_{i−1} (rows i−2, i−1) zeroing S[i][j] and S[i−1][j],
 * right rotations R_i, R_{i−1} removing their fills in T. The near entries of T (columns
 * i−2..i) are updated step by step, because R_i needs T after L_i; everything else sees L_i
 * then L_{i−1} (or R_i then R_{i−1}) in one pass over three rows.
 */
function hessenbergTriangularPair(w: PencilWork, j: number, i: number, cs: Float64Array, sn: Float64Array): void {
  const { n, S, T, QT, ZT } = w;
  const oa = (i - 2) * n, ob = oa + n, oc = ob + n;
  // Rows i−1 and i−2 take the pending right rotations R_{n−1}..R_{i+1} together (row i−2 gets
  // R_i below, once it is known; nothing else touches row i−2 before that).
  catchUpTwoRows(T, n, i - 1, i - 2, i + 1, cs, sn);
  // Both left rotations come from column j of S alone.
  givens(S[ob + j], S[oc + j]);
  const c1 = rot[0], s1 = rot[1];
  S[ob + j] = rot[2];
  S[oc + j] = 0;
  givens(S[oa + j], S[ob + j]);
  const c0 = rot[0], s0 = rot[1];
  S[oa + j] = rot[2];
  S[ob + j] = 0;
  // Step i on T's near columns i−1, i: L_i, then R_i from the fill T[i][i−1].
  for (let k = i - 1; k <= i; k++) {
    const x = T[ob + k], y = T[oc + k];
    T[ob + k] = c1 * x + s1 * y;
    T[oc + k] = c1 * y - s1 * x;
  }
  givens(T[oc + i], T[oc + i - 1]);
  const c2 = rot[0], s2 = rot[1];
  {
    const x = T[ob + i], y = T[ob + i - 1];
    T[ob + i] = c2 * x + s2 * y;
    T[ob + i - 1] = c2 * y - s2 * x;
  }
  T[oc + i] = rot[2];
  T[oc + i - 1] = 0;
  cs[i] = c2; sn[i] = s2;
  // Step i−1: row i−2 takes R_i, then L_{i−1} on the near columns i−2..i and R_{i−1} from the
  // fill T[i−1][i−2].
  {
    const x = T[oa + i], y = T[oa + i - 1];
    T[oa + i] = c2 * x + s2 * y;
    T[oa + i - 1] = c2 * y - s2 * x;
  }
  for (let k = i - 2; k <= i; k++) {
    const x = T[oa + k], y = T[ob + k];
    T[oa + k] = c0 * x + s0 * y;
    T[ob + k] = c0 * y - s0 * x;
  }
  givens(T[ob + i - 1], T[ob + i - 2]);
  const c3 = rot[0], s3 = rot[1];
  {
    const x = T[oa + i - 1], y = T[oa + i - 2];
    T[oa + i - 1] = c3 * x + s3 * y;
    T[oa + i - 2] = c3 * y - s3 * x;
  }
  T[ob + i - 1] = rot[2];
  T[ob + i - 2] = 0;
  cs[i - 1] = c3; sn[i - 1] = s3;
  // Far columns: L_i on rows (i−1, i), then L_{i−1} on rows (i−2, i−1); S from column j+1, T
  // from column i+1.
  for (let k = j + 1; k <= i; k++) {
    const xa = S[oa + k], xb = S[ob + k], xc = S[oc + k];
    const yb = c1 * xb + s1 * xc;
    S[oc + k] = c1 * xc - s1 * xb;
    S[oa + k] = c0 * xa + s0 * yb;
    S[ob + k] = c0 * yb - s0 * xa;
  }
  for (let k = i + 1; k < n; k++) {
    let xa = S[oa + k], xb = S[ob + k], xc = S[oc + k];
    let yb = c1 * xb + s1 * xc;
    S[oc + k] = c1 * xc - s1 * xb;
    S[oa + k] = c0 * xa + s0 * yb;
    S[ob + k] = c0 * yb - s0 * xa;
    xa = T[oa + k]; xb = T[ob + k]; xc = T[oc + k];
    yb = c1 * xb + s1 * xc;
    T[oc + k] = c1 * xc - s1 * xb;
    T[oa + k] = c0 * xa + s0 * yb;
    T[ob + k] = c0 * yb - s0 * xa;
  }
  // Qᵀ rows: L_i then L_{i−1}. Zᵀ rows: R_i on (i, i−1), then R_{i−1} on (i−1, i−2), only on the
  // columns where these rows can be nonzero (see `zeroColumnsOfZt`); one loop where both apply.
  const z0 = ZT ? zeroColumnsOfZt(i - 2, j) : n;
  for (let k = 0; QT && k < z0; k++) rotateQtColumn(QT, k, oa, ob, oc, c0, s0, c1, s1);
  for (let k = z0; k < n; k++) {
    if (QT) rotateQtColumn(QT, k, oa, ob, oc, c0, s0, c1, s1);
    const za = ZT![oa + k], zb = ZT![ob + k], zc = ZT![oc + k];
    const ub = c2 * zb - s2 * zc;
    ZT![oc + k] = c2 * zc + s2 * zb;
    ZT![ob + k] = c3 * ub + s3 * za;
    ZT![oa + k] = c3 * za - s3 * ub;
  }
}

/** Column k of Qᵀ's rows oa, ob, oc (offsets): L_i (c1, s1) on rows (ob, oc), then L_{i−1} (c0, s0) on (oa, ob). */
function rotateQtColumn(QT: Float64Array, k: number, oa: number, ob: number, oc: number, c0: number, s0: number, c1: number, s1: number): void {
  const xa = QT[oa + k], xb = QT[ob + k], xc = QT[oc + k];
  const yb = c1 * xb + s1 * xc;
  QT[oc + k] = c1 * xc - s1 * xb;
  QT[oa + k] = c0 * xa + s0 * yb;
  QT[ob + k] = c0 * yb - s0 * xa;
}

/**
 * Where rows r and r+1 of Zᵀ can first be nonzero when the reduction of column j mixes them:
 * Zᵀ starts as the identity and step i of column j rotates its rows i−1 and i, so (by induction
 * over the columns, the steps of a column being taken from the bottom) row c ≥ 1 vanishes on
 * columns 0..max(1, c − j)−1 before column j, and rows r, r+1 both vanish on columns
 * 0..max(1, r − j)−1 when they are mixed. The rotation is skipped there: it would only turn
 * zeros into zeros. Returns max(1, r − j).
 */
function zeroColumnsOfZt(r: number, j: number): number {
  return r - j > 1 ? r - j : 1;
}

/**
 * Row r of M ← row r · R_{n−1} ·…· R_{last}, where R_i is the stored right rotation (cs[i], sn[i])
 * on columns (i, i−1) (the convention of rotCols), applied from the right end as one carried pass.
 */
function catchUpRow(M: Float64Array, n: number, r: number, last: number, cs: Float64Array, sn: Float64Array): void {
  if (last > n - 1) return;
  const o = r * n;
  let xi = M[o + n - 1];
  for (let i = n - 1; i >= last; i--) {
    const c = cs[i], s = sn[i], y = M[o + i - 1];
    M[o + i] = c * xi + s * y;
    xi = c * y - s * xi;
  }
  M[o + last - 1] = xi;
}

/** `catchUpRow` on rows r and q at once (two independent rotation chains in one loop). */
function catchUpTwoRows(M: Float64Array, n: number, r: number, q: number, last: number, cs: Float64Array, sn: Float64Array): void {
  if (last > n - 1) return;
  const o = r * n, p = q * n;
  let xi = M[o + n - 1], zi = M[p + n - 1];
  for (let i = n - 1; i >= last; i--) {
    const c = cs[i], s = sn[i], y = M[o + i - 1], u = M[p + i - 1];
    M[o + i] = c * xi + s * y;
    xi = c * y - s * xi;
    M[p + i] = c * zi + s * u;
    zi = c * u - s * zi;
  }
  M[o + last - 1] = xi;
  M[p + last - 1] = zi;
}

/** `catchUpRow` on rows r..r+3 at once (four independent rotation chains in one loop). */
function catchUpFourRows(M: Float64Array, n: number, r: number, last: number, cs: Float64Array, sn: Float64Array): void {
  if (last > n - 1) return;
  const o0 = r * n, o1 = o0 + n, o2 = o1 + n, o3 = o2 + n;
  let x0 = M[o0 + n - 1], x1 = M[o1 + n - 1], x2 = M[o2 + n - 1], x3 = M[o3 + n - 1];
  for (let i = n - 1; i >= last; i--) {
    const c = cs[i], s = sn[i];
    const y0 = M[o0 + i - 1], y1 = M[o1 + i - 1], y2 = M[o2 + i - 1], y3 = M[o3 + i - 1];
    M[o0 + i] = c * x0 + s * y0;
    x0 = c * y0 - s * x0;
    M[o1 + i] = c * x1 + s * y1;
    x1 = c * y1 - s * x1;
    M[o2 + i] = c * x2 + s * y2;
    x2 = c * y2 - s * x2;
    M[o3 + i] = c * x3 + s * y3;
    x3 = c * y3 - s * x3;
  }
  M[o0 + last - 1] = x0;
  M[o1 + last - 1] = x1;
  M[o2 + last - 1] = x2;
  M[o3 + last - 1] = x3;
}

/** Rotation (c, s) of rows r, r+1 of S and of T on columns [c0, n), in one loop. */
function rotRowsOfBoth(S: Float64Array, T: Float64Array, n: number, r: number, c: number, s: number, c0: number): void {
  const a = r * n, b = a + n;
  for (let k = c0; k < n; k++) {
    const x = S[a + k], y = S[b + k];
    S[a + k] = c * x + s * y;
    S[b + k] = c * y - s * x;
    const u = T[a + k], v = T[b + k];
    T[a + k] = c * u + s * v;
    T[b + k] = c * v - s * u;
  }
}

/**
 * Householder reflector I − τ·v·vᵀ (v[k] = 1, v[k+1..n) written to `v`) with T[k..n)[k] ↦ β·e_k
 * (LAPACK dlarfg, with the column scaled against overflow); writes β to T[k][k] and v below
 * it, returns τ (0 when the column is already zero below the diagonal).
 */
function householderOfColumn(T: Float64Array, n: number, k: number, v: Float64Array): number {
  // Column norm with scaling, so that entries near 1e±160 neither underflow nor overflow.
  let colMax = 0;
  for (let i = k + 1; i < n; i++) colMax = Math.max(colMax, Math.abs(T[i * n + k]));
  v[k] = 1;
  if (colMax === 0) {
    for (let i = k + 1; i < n; i++) v[i] = 0;
    return 0;
  }
  const alpha = T[k * n + k];
  const sc = Math.max(colMax, Math.abs(alpha));
  let sum = (alpha / sc) * (alpha / sc);
  for (let i = k + 1; i < n; i++) sum += (T[i * n + k] / sc) * (T[i * n + k] / sc);
  const norm = sc * Math.sqrt(sum);
  const beta = alpha >= 0 ? -norm : norm;
  const scal = 1 / (alpha - beta);
  for (let i = k + 1; i < n; i++) {
    v[i] = T[i * n + k] * scal;
    T[i * n + k] = v[i];
  }
  T[k * n + k] = beta;
  return (beta - alpha) / beta;
}

/** v ← the stored reflector vector of column k (v[k] = 1, v[k+1..n) from below T's diagonal). */
function reflectorFromBelow(T: Float64Array, n: number, k: number, v: Float64Array): void {
  v[k] = 1;
  for (let i = k + 1; i < n; i++) v[i] = T[i * n + k];
}

/** acc[c0..c1) = v[k0..n)ᵀ·M[k0..n)[c0..c1) (rows taken in pairs: one pass over acc serves two rows). */
function accumulateRows(M: Float64Array, n: number, v: Float64Array, k0: number, c0: number, c1: number, acc: Float64Array): void {
  acc.fill(0, c0, c1);
  let i = k0;
  for (; i + 1 < n; i += 2) {
    const v0 = v[i], v1 = v[i + 1], o0 = i * n, o1 = o0 + n;
    for (let c = c0; c < c1; c++) acc[c] += v0 * M[o0 + c] + v1 * M[o1 + c];
  }
  if (i < n) {
    const v0 = v[i], o0 = i * n;
    for (let c = c0; c < c1; c++) acc[c] += v0 * M[o0 + c];
  }
}

/** M[k0..n)[c0..c1) −= τ·v·acc (the update of a reflector whose vᵀ·M is in acc). */
function reflectRows(M: Float64Array, n: number, v: Float64Array, tau: number, acc: Float64Array, k0: number, c0: number, c1: number): void {
  for (let i = k0; i < n; i++) {
    const f = tau * v[i], o = i * n;
    for (let c = c0; c < c1; c++) M[o + c] -= f * acc[c];
  }
}

/**
 * `reflectRows` fused with the next reflector's product: M[k0..n)[c0..c1) −= τ·v·acc, and
 * next[c] += Σ_i w[i]·M[i][c] over the rows just updated (w: the next reflector's vector,
 * zero where it does not reach; `next` must hold the contributions of the other rows).
 */
function reflectAndAccumulateRows(
  M: Float64Array, n: number, v: Float64Array, tau: number, acc: Float64Array, w: Float64Array, next: Float64Array,
  k0: number, c0: number, c1: number,
): void {
  let i = k0;
  // Four rows per pass over acc and next (fewer loads and stores per flop), then pairs.
  for (; i + 3 < n; i += 4) {
    const f0 = tau * v[i], f1 = tau * v[i + 1], f2 = tau * v[i + 2], f3 = tau * v[i + 3];
    const g0 = w[i], g1 = w[i + 1], g2 = w[i + 2], g3 = w[i + 3];
    const o0 = i * n, o1 = o0 + n, o2 = o1 + n, o3 = o2 + n;
    for (let c = c0; c < c1; c++) {
      const a = acc[c];
      const x0 = M[o0 + c] - f0 * a, x1 = M[o1 + c] - f1 * a, x2 = M[o2 + c] - f2 * a, x3 = M[o3 + c] - f3 * a;
      M[o0 + c] = x0;
      M[o1 + c] = x1;
      M[o2 + c] = x2;
      M[o3 + c] = x3;
      next[c] += (g0 * x0 + g1 * x1) + (g2 * x2 + g3 * x3);
    }
  }
  for (; i + 1 < n; i += 2) {
    const f0 = tau * v[i], f1 = tau * v[i + 1], g0 = w[i], g1 = w[i + 1], o0 = i * n, o1 = o0 + n;
    for (let c = c0; c < c1; c++) {
      const a = acc[c];
      const x0 = M[o0 + c] - f0 * a, x1 = M[o1 + c] - f1 * a;
      M[o0 + c] = x0;
      M[o1 + c] = x1;
      next[c] += g0 * x0 + g1 * x1;
    }
  }
  if (i < n) {
    const f0 = tau * v[i], g0 = w[i], o0 = i * n;
    for (let c = c0; c < c1; c++) {
      const x0 = M[o0 + c] - f0 * acc[c];
      M[o0 + c] = x0;
      next[c] += g0 * x0;
    }
  }
}
