/**
 * The closing steps of a double-shift QZ sweep (see qzSweep.ts) when the sweep has an odd
 * number of 3-row steps: the last one fused with the final 2-row step (qzSweepTailPair.ts has
 * the even case). Internal to linalg/.
 */
import { type PencilWork, reflectorEntries as reflectorEntriesShared, reflectorH as reflectorHShared } from "./qzKernels";

// Module-level aliases: read through an import binding, every access in the inner loops cost a
// getter call under per-file CommonJS transpilation (tsx, vitest).
const reflectorEntries = reflectorEntriesShared;
const hq = reflectorHShared;

/**
 * The last two steps, k = l−2 (3-row: P from `pending`, W = H·G) and l−1 (a rotation G2 on
 * rows l−1, l zeroing s_{l,l−2}, then a rotation R on columns l−1, l zeroing the fill
 * t_{l,l−1}), fused like the pairs of qzSweepPairs.ts: the 3×3 near block in locals, one pass
 * over the far columns, the rows above and the rows of Qᵀ and Zᵀ.
 */
export function sweepTail(w: PencilWork, k: number, rowStart: number, colEnd: number, pending: Float64Array): void {
  const { n, S, T, QT, ZT } = w;
  const r0 = k * n, r1 = r0 + n, r2 = r1 + n;
  const k1 = k + 1, k2 = k + 2;
  const ta = pending[0], a1 = pending[1], a2 = pending[2];
  const ta1 = ta * a1, ta2 = ta * a2;
  let s00 = S[r0 + k], s01 = S[r0 + k1], s02 = S[r0 + k2];
  let s10 = S[r1 + k], s11 = S[r1 + k1], s12 = S[r1 + k2];
  let s20 = S[r2 + k], s21 = S[r2 + k1], s22 = S[r2 + k2];
  let t00 = T[r0 + k], t01 = T[r0 + k1], t02 = T[r0 + k2];
  let t11 = T[r1 + k1], t12 = T[r1 + k2], t22 = T[r2 + k2];
  // P from the left on rows k..k+2, columns k..k+2 (T's zeros below its diagonal skipped).
  let d = s00 + a1 * s10 + a2 * s20;
  s00 -= ta * d; s10 -= ta1 * d; s20 -= ta2 * d;
  d = s01 + a1 * s11 + a2 * s21;
  s01 -= ta * d; s11 -= ta1 * d; s21 -= ta2 * d;
  d = s02 + a1 * s12 + a2 * s22;
  s02 -= ta * d; s12 -= ta1 * d; s22 -= ta2 * d;
  d = t00;
  t00 -= ta * d;
  const t10 = -(ta1 * d), t20 = -(ta2 * d);
  d = t01 + a1 * t11;
  t01 -= ta * d; t11 -= ta1 * d;
  const t21 = -(ta2 * d);
  d = t02 + a1 * t12 + a2 * t22;
  t02 -= ta * d; t12 -= ta1 * d; t22 -= ta2 * d;
  // W = H·G on columns k..k+2: rows k..k+2 of S, rows k, k+1 of T (row k+2 becomes (0, 0, β)).
  // H maps T's row k+2 on columns k..k+2 to (0, 0, β); G zeroes the (k+1, k) entry of T's row
  // k+1 after H. H is applied as its explicit 3×3 matrix with entries of full relative accuracy
  // (`reflectorEntries`), not as x − τ·v·(vᵀx): see qzSweep.ts on graded pencils.
  const beta = reflectorBeta(t22, t20, t21);
  reflectorEntries(t22, t20, t21, beta);
  const h00 = hq[0], h11 = hq[1], h22 = hq[2], h01 = hq[3], h02 = hq[4], h12 = hq[5];
  t22 = beta;
  const gf = h01 * t10 + h11 * t11 + h12 * t12, gg = h00 * t10 + h01 * t11 + h02 * t12;
  const rg = givensRadius(gf, gg);
  const c1 = givensCos(gf, gg, rg), sn1 = givensSin(gf, gg, rg);
  let y0 = h00 * s00 + h01 * s01 + h02 * s02, y1 = h01 * s00 + h11 * s01 + h12 * s02;
  s02 = h02 * s00 + h12 * s01 + h22 * s02;
  s00 = c1 * y0 - sn1 * y1; s01 = c1 * y1 + sn1 * y0;
  y0 = h00 * t00 + h01 * t01 + h02 * t02; y1 = h01 * t00 + h11 * t01 + h12 * t02;
  t02 = h02 * t00 + h12 * t01 + h22 * t02;
  t00 = c1 * y0 - sn1 * y1; t01 = c1 * y1 + sn1 * y0;
  y0 = h00 * s10 + h01 * s11 + h02 * s12; y1 = h01 * s10 + h11 * s11 + h12 * s12;
  s12 = h02 * s10 + h12 * s11 + h22 * s12;
  s10 = c1 * y0 - sn1 * y1; s11 = c1 * y1 + sn1 * y0;
  // T's (k+1, k) entry becomes 0: (gf, gg) is the row after H.
  t12 = h02 * t10 + h12 * t11 + h22 * t12;
  t11 = c1 * gf + sn1 * gg;
  y0 = h00 * s20 + h01 * s21 + h02 * s22; y1 = h01 * s20 + h11 * s21 + h12 * s22;
  s22 = h02 * s20 + h12 * s21 + h22 * s22;
  s20 = c1 * y0 - sn1 * y1; s21 = c1 * y1 + sn1 * y0;
  // Last step: G2 on rows k+1, k+2 zeroing s_{k+2,k}; from column k+1 on, T's row k+2 being
  // (0, β) there.
  const rl = givensRadius(s10, s20);
  const c2 = givensCos(s10, s20, rl), sn2 = givensSin(s10, s20, rl);
  s10 = rl;
  let x = s11, y = s21;
  s11 = c2 * x + sn2 * y; s21 = c2 * y - sn2 * x;
  x = s12; y = s22;
  s12 = c2 * x + sn2 * y; s22 = c2 * y - sn2 * x;
  const t21g = -(sn2 * t11);
  t11 = c2 * t11;
  x = t12; y = t22;
  t12 = c2 * x + sn2 * y; t22 = c2 * y - sn2 * x;
  // R on columns (k+2, k+1) zeroing the fill t_{k+2,k+1}: rows k, k+1 of S and T, row k+2 of S.
  const rr = givensRadius(t22, t21g);
  const c3 = givensCos(t22, t21g, rr), sn3 = givensSin(t22, t21g, rr);
  t22 = rr;
  x = s02; y = s01;
  s02 = c3 * x + sn3 * y; s01 = c3 * y - sn3 * x;
  x = t02; y = t01;
  t02 = c3 * x + sn3 * y; t01 = c3 * y - sn3 * x;
  x = s12; y = s11;
  s12 = c3 * x + sn3 * y; s11 = c3 * y - sn3 * x;
  x = t12; y = t11;
  t12 = c3 * x + sn3 * y; t11 = c3 * y - sn3 * x;
  x = s22; y = s21;
  s22 = c3 * x + sn3 * y; s21 = c3 * y - sn3 * x;
  S[r0 + k] = s00; S[r0 + k1] = s01; S[r0 + k2] = s02;
  S[r1 + k] = s10; S[r1 + k1] = s11; S[r1 + k2] = s12;
  S[r2 + k] = 0; S[r2 + k1] = s21; S[r2 + k2] = s22;
  T[r0 + k] = t00; T[r0 + k1] = t01; T[r0 + k2] = t02;
  T[r1 + k] = 0; T[r1 + k1] = t11; T[r1 + k2] = t12;
  T[r2 + k] = 0; T[r2 + k1] = 0; T[r2 + k2] = t22;
  // Far columns k+3..colEnd−1 of rows k..k+2: P then G2, in one pass.
  for (let j = k + 3; j < colEnd; j++) {
    let x0 = S[r0 + j], x1 = S[r1 + j], x2 = S[r2 + j];
    let e = x0 + a1 * x1 + a2 * x2;
    x0 -= ta * e; x1 -= ta1 * e; x2 -= ta2 * e;
    S[r0 + j] = x0;
    S[r1 + j] = c2 * x1 + sn2 * x2;
    S[r2 + j] = c2 * x2 - sn2 * x1;
    x0 = T[r0 + j]; x1 = T[r1 + j]; x2 = T[r2 + j];
    e = x0 + a1 * x1 + a2 * x2;
    x0 -= ta * e; x1 -= ta1 * e; x2 -= ta2 * e;
    T[r0 + j] = x0;
    T[r1 + j] = c2 * x1 + sn2 * x2;
    T[r2 + j] = c2 * x2 - sn2 * x1;
  }
  // Rows rowStart..k−1, columns k..k+2: W then R, in one pass.
  for (let o = rowStart * n + k; o < r0; o += n) {
    rightTailOnRow(S, o, h00, h11, h22, h01, h02, h12, c1, sn1, c3, sn3);
    rightTailOnRow(T, o, h00, h11, h22, h01, h02, h12, c1, sn1, c3, sn3);
  }
  // Qᵀ rows k..k+2 ← G2·P·Qᵀ; Zᵀ rows k..k+2 ← Rᵀ·Wᵀ·Zᵀ (one loop when both are wanted).
  if (QT && ZT) {
    for (let j = 0; j < n; j++) {
      tailQtColumn(QT, j, r0, r1, r2, ta, a1, a2, ta1, ta2, c2, sn2);
      tailZtColumn(ZT, j, r0, r1, r2, h00, h11, h22, h01, h02, h12, c1, sn1, c3, sn3);
    }
  } else if (ZT) {
    for (let j = 0; j < n; j++) tailZtColumn(ZT, j, r0, r1, r2, h00, h11, h22, h01, h02, h12, c1, sn1, c3, sn3);
  }
}

/** Column j of Qᵀ's rows r0..r2 (offsets): the reflector (ta, (1, a1, a2)), then the rotation (c, s) on rows r1, r2. */
function tailQtColumn(QT: Float64Array, j: number, r0: number, r1: number, r2: number, ta: number, a1: number, a2: number, ta1: number, ta2: number, c: number, s: number): void {
  let x0 = QT[r0 + j], x1 = QT[r1 + j], x2 = QT[r2 + j];
  const e = x0 + a1 * x1 + a2 * x2;
  x0 -= ta * e; x1 -= ta1 * e; x2 -= ta2 * e;
  QT[r0 + j] = x0;
  QT[r1 + j] = c * x1 + s * x2;
  QT[r2 + j] = c * x2 - s * x1;
}

/** Column j of Zᵀ's rows r0..r2 (offsets): W = H·G (as rows of Z, H by its entries), then R on rows (r2, r1). */
function tailZtColumn(
  ZT: Float64Array, j: number, r0: number, r1: number, r2: number,
  h00: number, h11: number, h22: number, h01: number, h02: number, h12: number, c1: number, s1: number, c3: number, s3: number,
): void {
  const x0 = ZT[r0 + j], x1 = ZT[r1 + j], x2 = ZT[r2 + j];
  const p0 = h00 * x0 + h01 * x1 + h02 * x2, p1 = h01 * x0 + h11 * x1 + h12 * x2;
  const z1 = c1 * p1 + s1 * p0, z2 = h02 * x0 + h12 * x1 + h22 * x2;
  ZT[r0 + j] = c1 * p0 - s1 * p1;
  ZT[r2 + j] = c3 * z2 + s3 * z1;
  ZT[r1 + j] = c3 * z1 - s3 * z2;
}

/**
 * Entries o..o+2 of row-major M (a row above the bulge, columns l−2..l): W = H·G (H by its
 * entries), then the rotation (c3, s3) on the last two (columns (l, l−1)).
 */
function rightTailOnRow(
  M: Float64Array, o: number, h00: number, h11: number, h22: number, h01: number, h02: number, h12: number,
  c1: number, s1: number, c3: number, s3: number,
): void {
  const x0 = M[o], x1 = M[o + 1], x2 = M[o + 2];
  const y0 = h00 * x0 + h01 * x1 + h02 * x2, y1 = h01 * x0 + h11 * x1 + h12 * x2;
  const z1 = c1 * y1 + s1 * y0, z2 = h02 * x0 + h12 * x1 + h22 * x2;
  M[o] = c1 * y0 - s1 * y1;
  M[o + 2] = c3 * z2 + s3 * z1;
  M[o + 1] = c3 * z1 - s3 * z2;
}

/**
 * β of `house3(alpha, x1, x2)` (the entry the reflector leaves), as a plain return value so
 * that callers on a latency-critical path keep everything in registers: alpha itself when
 * x1 = x2 = 0 (no reflection), otherwise −sign(alpha)·‖(alpha, x1, x2)‖. A caller then forms
 * τ = (β − alpha)/β and v = (x1, x2)/(alpha − β) when β ≠ alpha, exactly as `house3` does.
 */
function reflectorBeta(alpha: number, x1: number, x2: number): number {
  if (x1 === 0 && x2 === 0) return alpha;
  let norm = Math.sqrt(alpha * alpha + x1 * x1 + x2 * x2);
  if (!(norm > 1e-150 && norm < 1e150)) norm = Math.hypot(alpha, x1, x2);
  return alpha >= 0 ? -norm : norm;
}

/** r of `givens(f, g)` as a return value (see `givensCos`, `givensSin`). */
function givensRadius(f: number, g: number): number {
  if (g === 0) return f;
  if (f === 0) return g;
  const r = Math.sqrt(f * f + g * g);
  return r === 0 || r === Infinity ? Math.hypot(f, g) : r;
}

/** c of `givens(f, g)`, given r = givensRadius(f, g) (bit for bit as `givens`). */
function givensCos(f: number, g: number, r: number): number {
  if (g === 0) return 1;
  if (f === 0) return 0;
  return r > 1e-290 ? f * (1 / r) : f / r;
}

/** s of `givens(f, g)`, given r = givensRadius(f, g) (bit for bit as `givens`). */
function givensSin(f: number, g: number, r: number): number {
  if (g === 0) return 0;
  if (f === 0) return 1;
  return r > 1e-290 ? g * (1 / r) : g / r;
}
