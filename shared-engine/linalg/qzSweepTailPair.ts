/**
 * The closing steps of a double-shift QZ sweep (see qzSweep.ts) when the sweep has an even
 * number of 3-row steps: the last two fused with the final 2-row step (qzSweepTail.ts has the
 * odd case). Internal to linalg/.
 */
import { type PencilWork, reflectorEntries as reflectorEntriesShared, reflectorH as reflectorHShared } from "./qzKernels";

// Module-level aliases: read through an import binding, every access in the inner loops cost a
// getter call under per-file CommonJS transpilation (tsx, vitest).
const reflectorEntries = reflectorEntriesShared;
const hq = reflectorHShared;

/**
 * The last three steps, k = l−3 and k+1 = l−2 (3-row: P1 from `pending`, W1 = H1·G1, P2 from
 * column k, W2 = H2·G2) and l−1 (G3 on rows l−1, l zeroing s_{l,l−2}, R on columns l−1, l
 * zeroing the fill t_{l,l−1}), fused: the 4×4 near block in locals, one pass over the far
 * columns and the rows of Qᵀ (P1, P2, G3), and the rows above and the rows of Zᵀ taking
 * W1·W2·R as one 4×4 matrix. Used when the sweep has an even number of 3-row steps, so that
 * no step runs on its own.
 */
export function sweepTailPair(w: PencilWork, k: number, rowStart: number, colEnd: number, pending: Float64Array): void {
  const { n, S, T, QT, ZT } = w;
  const r0 = k * n, r1 = r0 + n, r2 = r1 + n, r3 = r2 + n;
  const k1 = k + 1, k2 = k + 2, k3 = k + 3;
  const ta = pending[0], a1 = pending[1], a2 = pending[2];
  const ta1 = ta * a1, ta2 = ta * a2;
  let s00 = S[r0 + k], s01 = S[r0 + k1], s02 = S[r0 + k2], s03 = S[r0 + k3];
  let s10 = S[r1 + k], s11 = S[r1 + k1], s12 = S[r1 + k2], s13 = S[r1 + k3];
  let s20 = S[r2 + k], s21 = S[r2 + k1], s22 = S[r2 + k2], s23 = S[r2 + k3];
  let s32 = S[r3 + k2], s33 = S[r3 + k3];
  let t00 = T[r0 + k], t01 = T[r0 + k1], t02 = T[r0 + k2], t03 = T[r0 + k3];
  let t11 = T[r1 + k1], t12 = T[r1 + k2], t13 = T[r1 + k3];
  let t22 = T[r2 + k2], t23 = T[r2 + k3], t33 = T[r3 + k3];
  // P1 on rows k..k+2, columns k..k+3 (T's zeros below its diagonal skipped).
  let d = s00 + a1 * s10 + a2 * s20;
  s00 -= ta * d; s10 -= ta1 * d; s20 -= ta2 * d;
  d = s01 + a1 * s11 + a2 * s21;
  s01 -= ta * d; s11 -= ta1 * d; s21 -= ta2 * d;
  d = s02 + a1 * s12 + a2 * s22;
  s02 -= ta * d; s12 -= ta1 * d; s22 -= ta2 * d;
  d = s03 + a1 * s13 + a2 * s23;
  s03 -= ta * d; s13 -= ta1 * d; s23 -= ta2 * d;
  d = t00;
  t00 -= ta * d;
  const t10 = -(ta1 * d), t20 = -(ta2 * d);
  d = t01 + a1 * t11;
  t01 -= ta * d; t11 -= ta1 * d;
  let t21 = -(ta2 * d);
  d = t02 + a1 * t12 + a2 * t22;
  t02 -= ta * d; t12 -= ta1 * d; t22 -= ta2 * d;
  d = t03 + a1 * t13 + a2 * t23;
  t03 -= ta * d; t13 -= ta1 * d; t23 -= ta2 * d;
  // W1 = H1·G1 on columns k..k+2: rows k..k+3 of S, rows k, k+1 of T. H1 by its explicit
  // entries (`reflectorEntries`: no cancellation when it is close to a permutation, see qzSweep.ts).
  let beta = Math.sqrt(t22 * t22 + t20 * t20 + t21 * t21);
  if (!(beta > 1e-150 && beta < 1e150)) beta = Math.hypot(t22, t20, t21);
  beta = t20 === 0 && t21 === 0 ? t22 : t22 >= 0 ? -beta : beta;
  reflectorEntries(t22, t20, t21, beta);
  const h00 = hq[0], h11 = hq[1], h22 = hq[2], h01 = hq[3], h02 = hq[4], h12 = hq[5];
  t22 = beta;
  let gf = h01 * t10 + h11 * t11 + h12 * t12, gg = h00 * t10 + h01 * t11 + h02 * t12;
  let rg = gg === 0 ? gf : gf === 0 ? gg : Math.sqrt(gf * gf + gg * gg);
  if (rg === 0 || rg === Infinity) rg = Math.hypot(gf, gg);
  const c1 = gg === 0 ? 1 : gf === 0 ? 0 : rg > 1e-290 ? gf * (1 / rg) : gf / rg;
  const sn1 = gg === 0 ? 0 : gf === 0 ? 1 : rg > 1e-290 ? gg * (1 / rg) : gg / rg;
  let y0 = h00 * s00 + h01 * s01 + h02 * s02, y1 = h01 * s00 + h11 * s01 + h12 * s02;
  s02 = h02 * s00 + h12 * s01 + h22 * s02;
  s00 = c1 * y0 - sn1 * y1; s01 = c1 * y1 + sn1 * y0;
  y0 = h00 * t00 + h01 * t01 + h02 * t02; y1 = h01 * t00 + h11 * t01 + h12 * t02;
  t02 = h02 * t00 + h12 * t01 + h22 * t02;
  t00 = c1 * y0 - sn1 * y1; t01 = c1 * y1 + sn1 * y0;
  y0 = h00 * s10 + h01 * s11 + h02 * s12; y1 = h01 * s10 + h11 * s11 + h12 * s12;
  s12 = h02 * s10 + h12 * s11 + h22 * s12;
  s10 = c1 * y0 - sn1 * y1; s11 = c1 * y1 + sn1 * y0;
  t12 = h02 * t10 + h12 * t11 + h22 * t12; // t10 becomes 0; (gf, gg) is row k+1 after H1
  t11 = c1 * gf + sn1 * gg;
  y0 = h00 * s20 + h01 * s21 + h02 * s22; y1 = h01 * s20 + h11 * s21 + h12 * s22;
  s22 = h02 * s20 + h12 * s21 + h22 * s22;
  s20 = c1 * y0 - sn1 * y1; s21 = c1 * y1 + sn1 * y0;
  // Row k+3 of S is (0, 0, s32) on these columns.
  y0 = h02 * s32; y1 = h12 * s32;
  const s30 = c1 * y0 - sn1 * y1;
  let s31 = c1 * y1 + sn1 * y0;
  s32 = h22 * s32;
  // P2 from column k, rows k+1..k+3; on columns k+1..k+3.
  let tb = 0, b1 = 0, b2 = 0;
  {
    let beta = Math.sqrt(s10 * s10 + s20 * s20 + s30 * s30);
    if (!(beta > 1e-150 && beta < 1e150)) beta = Math.hypot(s10, s20, s30);
    beta = s20 === 0 && s30 === 0 ? s10 : s10 >= 0 ? -beta : beta;
    if (beta !== s10) {
      const sc = 1 / (s10 - beta);
      tb = (beta - s10) / beta; b1 = s20 * sc; b2 = s30 * sc;
    }
    s10 = beta;
  }
  const tb1 = tb * b1, tb2 = tb * b2;
  d = s11 + b1 * s21 + b2 * s31;
  s11 -= tb * d; s21 -= tb1 * d; s31 -= tb2 * d;
  d = s12 + b1 * s22 + b2 * s32;
  s12 -= tb * d; s22 -= tb1 * d; s32 -= tb2 * d;
  d = s13 + b1 * s23 + b2 * s33;
  s13 -= tb * d; s23 -= tb1 * d; s33 -= tb2 * d;
  d = t11;
  t11 -= tb * d;
  t21 = -(tb1 * d);
  const t31 = -(tb2 * d);
  d = t12 + b1 * t22;
  t12 -= tb * d; t22 -= tb1 * d;
  const t32 = -(tb2 * d);
  d = t13 + b1 * t23 + b2 * t33;
  t13 -= tb * d; t23 -= tb1 * d; t33 -= tb2 * d;
  // W2 = H2·G2 on columns k+1..k+3: rows k..k+3 of S (the last row), rows k..k+2 of T.
  beta = Math.sqrt(t33 * t33 + t31 * t31 + t32 * t32);
  if (!(beta > 1e-150 && beta < 1e150)) beta = Math.hypot(t33, t31, t32);
  beta = t31 === 0 && t32 === 0 ? t33 : t33 >= 0 ? -beta : beta;
  reflectorEntries(t33, t31, t32, beta);
  const e11 = hq[0], e22 = hq[1], e33 = hq[2], e12 = hq[3], e13 = hq[4], e23 = hq[5];
  t33 = beta;
  gf = e12 * t21 + e22 * t22 + e23 * t23; gg = e11 * t21 + e12 * t22 + e13 * t23;
  rg = gg === 0 ? gf : gf === 0 ? gg : Math.sqrt(gf * gf + gg * gg);
  if (rg === 0 || rg === Infinity) rg = Math.hypot(gf, gg);
  const c2 = gg === 0 ? 1 : gf === 0 ? 0 : rg > 1e-290 ? gf * (1 / rg) : gf / rg;
  const sn2 = gg === 0 ? 0 : gf === 0 ? 1 : rg > 1e-290 ? gg * (1 / rg) : gg / rg;
  y0 = e11 * s01 + e12 * s02 + e13 * s03; y1 = e12 * s01 + e22 * s02 + e23 * s03;
  s03 = e13 * s01 + e23 * s02 + e33 * s03;
  s01 = c2 * y0 - sn2 * y1; s02 = c2 * y1 + sn2 * y0;
  y0 = e11 * t01 + e12 * t02 + e13 * t03; y1 = e12 * t01 + e22 * t02 + e23 * t03;
  t03 = e13 * t01 + e23 * t02 + e33 * t03;
  t01 = c2 * y0 - sn2 * y1; t02 = c2 * y1 + sn2 * y0;
  y0 = e11 * s11 + e12 * s12 + e13 * s13; y1 = e12 * s11 + e22 * s12 + e23 * s13;
  s13 = e13 * s11 + e23 * s12 + e33 * s13;
  s11 = c2 * y0 - sn2 * y1; s12 = c2 * y1 + sn2 * y0;
  y0 = e11 * t11 + e12 * t12 + e13 * t13; y1 = e12 * t11 + e22 * t12 + e23 * t13;
  t13 = e13 * t11 + e23 * t12 + e33 * t13;
  t11 = c2 * y0 - sn2 * y1; t12 = c2 * y1 + sn2 * y0;
  y0 = e11 * s21 + e12 * s22 + e13 * s23; y1 = e12 * s21 + e22 * s22 + e23 * s23;
  s23 = e13 * s21 + e23 * s22 + e33 * s23;
  s21 = c2 * y0 - sn2 * y1; s22 = c2 * y1 + sn2 * y0;
  t23 = e13 * t21 + e23 * t22 + e33 * t23; // t21 becomes 0; (gf, gg) is row k+2 after H2
  t22 = c2 * gf + sn2 * gg;
  y0 = e11 * s31 + e12 * s32 + e13 * s33; y1 = e12 * s31 + e22 * s32 + e23 * s33;
  s33 = e13 * s31 + e23 * s32 + e33 * s33;
  s31 = c2 * y0 - sn2 * y1; s32 = c2 * y1 + sn2 * y0;
  // Last step: G3 on rows k+2, k+3 zeroing s_{k+3,k+1}; T's row k+3 is (0, 0, β) on columns
  // k+1..k+3 here.
  rg = s31 === 0 ? s21 : s21 === 0 ? s31 : Math.sqrt(s21 * s21 + s31 * s31);
  if (rg === 0 || rg === Infinity) rg = Math.hypot(s21, s31);
  const c3 = s31 === 0 ? 1 : s21 === 0 ? 0 : rg > 1e-290 ? s21 * (1 / rg) : s21 / rg;
  const sn3 = s31 === 0 ? 0 : s21 === 0 ? 1 : rg > 1e-290 ? s31 * (1 / rg) : s31 / rg;
  s21 = rg;
  let x = s22, y = s32;
  s22 = c3 * x + sn3 * y; s32 = c3 * y - sn3 * x;
  x = s23; y = s33;
  s23 = c3 * x + sn3 * y; s33 = c3 * y - sn3 * x;
  const t32g = -(sn3 * t22);
  t22 = c3 * t22;
  x = t23; y = t33;
  t23 = c3 * x + sn3 * y; t33 = c3 * y - sn3 * x;
  // R on columns (k+3, k+2) zeroing the fill t_{k+3,k+2}: rows k..k+3 of S, rows k..k+2 of T.
  rg = t32g === 0 ? t33 : t33 === 0 ? t32g : Math.sqrt(t33 * t33 + t32g * t32g);
  if (rg === 0 || rg === Infinity) rg = Math.hypot(t33, t32g);
  const c4 = t32g === 0 ? 1 : t33 === 0 ? 0 : rg > 1e-290 ? t33 * (1 / rg) : t33 / rg;
  const sn4 = t32g === 0 ? 0 : t33 === 0 ? 1 : rg > 1e-290 ? t32g * (1 / rg) : t32g / rg;
  t33 = rg;
  x = s03; y = s02;
  s03 = c4 * x + sn4 * y; s02 = c4 * y - sn4 * x;
  x = t03; y = t02;
  t03 = c4 * x + sn4 * y; t02 = c4 * y - sn4 * x;
  x = s13; y = s12;
  s13 = c4 * x + sn4 * y; s12 = c4 * y - sn4 * x;
  x = t13; y = t12;
  t13 = c4 * x + sn4 * y; t12 = c4 * y - sn4 * x;
  x = s23; y = s22;
  s23 = c4 * x + sn4 * y; s22 = c4 * y - sn4 * x;
  x = t23; y = t22;
  t23 = c4 * x + sn4 * y; t22 = c4 * y - sn4 * x;
  x = s33; y = s32;
  s33 = c4 * x + sn4 * y; s32 = c4 * y - sn4 * x;
  S[r0 + k] = s00; S[r0 + k1] = s01; S[r0 + k2] = s02; S[r0 + k3] = s03;
  S[r1 + k] = s10; S[r1 + k1] = s11; S[r1 + k2] = s12; S[r1 + k3] = s13;
  S[r2 + k] = 0; S[r2 + k1] = s21; S[r2 + k2] = s22; S[r2 + k3] = s23;
  S[r3 + k] = 0; S[r3 + k1] = 0; S[r3 + k2] = s32; S[r3 + k3] = s33;
  T[r0 + k] = t00; T[r0 + k1] = t01; T[r0 + k2] = t02; T[r0 + k3] = t03;
  T[r1 + k] = 0; T[r1 + k1] = t11; T[r1 + k2] = t12; T[r1 + k3] = t13;
  T[r2 + k] = 0; T[r2 + k1] = 0; T[r2 + k2] = t22; T[r2 + k3] = t23;
  T[r3 + k1] = 0; T[r3 + k2] = 0; T[r3 + k3] = t33;
  // Far columns k+4..colEnd−1 of rows k..k+3: P1, P2, G3 in one pass.
  for (let j = k + 4; j < colEnd; j++) {
    leftColumn3(S, j, r0, r1, r2, r3, ta, a1, a2, ta1, ta2, tb, b1, b2, tb1, tb2, c3, sn3);
    leftColumn3(T, j, r0, r1, r2, r3, ta, a1, a2, ta1, ta2, tb, b1, b2, tb1, tb2, c3, sn3);
  }
  // M = W1·W2·R as a 4×4 matrix on row vectors (rows: input entry, columns: output entry;
  // M[3][0] = 0), for the rows above the bulge and the rows of Zᵀ.
  const w01 = c1 * h01 + sn1 * h00, w11 = c1 * h11 + sn1 * h01, w21 = c1 * h12 + sn1 * h02;
  const m00 = c1 * h00 - sn1 * h01, m10 = c1 * h01 - sn1 * h11, m20 = c1 * h02 - sn1 * h12;
  const x11 = c2 * e11 - sn2 * e12, x12 = c2 * e12 + sn2 * e11;
  const x21 = c2 * e12 - sn2 * e22, x22 = c2 * e22 + sn2 * e12;
  const x31 = c2 * e13 - sn2 * e23, x32 = c2 * e23 + sn2 * e13;
  // W1·W2, then R on output columns (3, 2).
  const p02 = w01 * x12 + h02 * x22, p03 = w01 * e13 + h02 * e23;
  const p12 = w11 * x12 + h12 * x22, p13 = w11 * e13 + h12 * e23;
  const p22 = w21 * x12 + h22 * x22, p23 = w21 * e13 + h22 * e23;
  const m01 = w01 * x11 + h02 * x21, m11 = w11 * x11 + h12 * x21, m21 = w21 * x11 + h22 * x21, m31 = x31;
  const m02 = c4 * p02 - sn4 * p03, m03 = c4 * p03 + sn4 * p02;
  const m12 = c4 * p12 - sn4 * p13, m13 = c4 * p13 + sn4 * p12;
  const m22 = c4 * p22 - sn4 * p23, m23 = c4 * p23 + sn4 * p22;
  const m32 = c4 * x32 - sn4 * e33, m33 = c4 * e33 + sn4 * x32;
  for (let o = rowStart * n + k; o < r0; o += n) {
    let q0 = S[o], q1 = S[o + 1], q2 = S[o + 2], q3 = S[o + 3];
    S[o] = q0 * m00 + q1 * m10 + q2 * m20;
    S[o + 1] = q0 * m01 + q1 * m11 + q2 * m21 + q3 * m31;
    S[o + 2] = q0 * m02 + q1 * m12 + q2 * m22 + q3 * m32;
    S[o + 3] = q0 * m03 + q1 * m13 + q2 * m23 + q3 * m33;
    q0 = T[o]; q1 = T[o + 1]; q2 = T[o + 2]; q3 = T[o + 3];
    T[o] = q0 * m00 + q1 * m10 + q2 * m20;
    T[o + 1] = q0 * m01 + q1 * m11 + q2 * m21 + q3 * m31;
    T[o + 2] = q0 * m02 + q1 * m12 + q2 * m22 + q3 * m32;
    T[o + 3] = q0 * m03 + q1 * m13 + q2 * m23 + q3 * m33;
  }
  for (let j = 0; j < n && (QT || ZT); j++) {
    if (QT) leftColumn3(QT, j, r0, r1, r2, r3, ta, a1, a2, ta1, ta2, tb, b1, b2, tb1, tb2, c3, sn3);
    if (!ZT) continue;
    const q0 = ZT[r0 + j], q1 = ZT[r1 + j], q2 = ZT[r2 + j], q3 = ZT[r3 + j];
    ZT[r0 + j] = q0 * m00 + q1 * m10 + q2 * m20;
    ZT[r1 + j] = q0 * m01 + q1 * m11 + q2 * m21 + q3 * m31;
    ZT[r2 + j] = q0 * m02 + q1 * m12 + q2 * m22 + q3 * m32;
    ZT[r3 + j] = q0 * m03 + q1 * m13 + q2 * m23 + q3 * m33;
  }
}

/**
 * Column j of rows r0..r3 (offsets) of M: the reflector (ta, (1, a1, a2)) on rows r0..r2,
 * (tb, (1, b1, b2)) on rows r1..r3, then the rotation (c, s) on rows r2, r3.
 */
function leftColumn3(
  M: Float64Array, j: number, r0: number, r1: number, r2: number, r3: number,
  ta: number, a1: number, a2: number, ta1: number, ta2: number, tb: number, b1: number, b2: number, tb1: number, tb2: number,
  c: number, s: number,
): void {
  let x0 = M[r0 + j], x1 = M[r1 + j], x2 = M[r2 + j];
  const x3 = M[r3 + j];
  let e = x0 + a1 * x1 + a2 * x2;
  x0 -= ta * e; x1 -= ta1 * e; x2 -= ta2 * e;
  e = x1 + b1 * x2 + b2 * x3;
  x2 -= tb1 * e;
  const z3 = x3 - tb2 * e;
  M[r0 + j] = x0;
  M[r1 + j] = x1 - tb * e;
  M[r2 + j] = c * x2 + s * z3;
  M[r3 + j] = c * z3 - s * x2;
}
