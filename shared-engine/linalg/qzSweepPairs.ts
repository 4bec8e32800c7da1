/**
 * The paired 3-row steps of a double-shift QZ sweep (see qzSweep.ts), software-pipelined: the
 * near block of one pair is computed between the long loops of the previous pair. Internal to
 * linalg/.
 */
import type { PencilWork } from "./qzKernels";

/**
 * Steps k, k+1 for k = k0, k0+2, …, kEnd−2 of a sweep (Golub & Van Loan Alg. 7.7.2: per step a
 * 3-row left reflector P and a right transformation W = H·G, see qzSweep.ts; for every pair
 * k + 4 ≤ l). `pending` holds the first pair's P1 on entry ([τ, v1, v2], its β already stored
 * in S) and, on return, the reflector of step kEnd (from column kEnd−1).
 *
 * A pair's work splits into its near block (rows k..k+4, columns k..k+3, held in locals: a chain
 * of dependent square roots and divisions, latency-bound) and its long loops (the far columns of
 * rows k..k+3 and rows k..k+3 of Qᵀ take P1 then P2 in one pass; the rows above the bulge and
 * rows k..k+3 of Zᵀ take W1·W2 as one 4×4 matrix). H1 and H2 act by their explicit entries
 * (full relative accuracy, see qzSweep.ts on graded pencils), in the near block and in W1·W2.
 * The near block of pair k+2 needs from pair k
 * only its near block and its far columns k+4, k+5, so after those two columns it is computed
 * in four pieces placed between pair k's long loops, where the processor can run a loop while
 * the square root or division just issued is pending (measured: about 4 % less time at n = 10
 * and 20 than the near block followed by the loops; the order changes no result).
 */
export function chasePairs(w: PencilWork, k0: number, kEnd: number, rowStart: number, colEnd: number, pending: Float64Array): void {
  const { n, S, T, QT, ZT } = w;
  // The current pair (near block done, long loops pending): its row offset and transformations
  // (P1 = (ta, a1, a2), P2 = (tb, b1, b2), and W1·W2 as the 4×4 matrix m).
  let kc = -1;
  let ta = 0, a1 = 0, a2 = 0, tb = 0, b1 = 0, b2 = 0;
  let m00 = 0, m01 = 0, m02 = 0, m03 = 0, m10 = 0, m11 = 0, m12 = 0, m13 = 0;
  let m20 = 0, m21 = 0, m22 = 0, m23 = 0, m31 = 0, m32 = 0, m33 = 0;
  // The left reflector of the next pair's first step.
  let pa = pending[0], pa1 = pending[1], pa2 = pending[2];
  for (let kn = k0; ; kn += 2) {
    const next = kn < kEnd, cur = kc >= 0;
    const r0 = kc * n, r1 = r0 + n, r2 = r1 + n, r3 = r2 + n;
    const ta1 = ta * a1, ta2 = ta * a2, tb1 = tb * b1, tb2 = tb * b2;
    // (1) Current pair: far columns kc+4, kc+5 (the next near block reads them).
    const farSplit = Math.min(kc + 6, colEnd);
    if (cur) {
      for (let j = kc + 4; j < farSplit; j++) {
        farColumn(S, j, r0, r1, r2, r3, ta, a1, a2, ta1, ta2, tb, b1, b2, tb1, tb2);
        farColumn(T, j, r0, r1, r2, r3, ta, a1, a2, ta1, ta2, tb, b1, b2, tb1, tb2);
      }
    }
    // (2) Next pair, first piece: P1 on its near block, H1 and the rotation input of G1.
    const q0 = kn * n, q1 = q0 + n, q2 = q1 + n, q3 = q2 + n, q4 = q3 + n;
    const k1 = kn + 1, k2 = kn + 2, k3 = kn + 3;
    let s00 = 0, s01 = 0, s02 = 0, s03 = 0, s10 = 0, s11 = 0, s12 = 0, s13 = 0;
    let s20 = 0, s21 = 0, s22 = 0, s23 = 0, s30 = 0, s31 = 0, s32 = 0, s33 = 0, s41 = 0, s42 = 0, s43 = 0;
    let t00 = 0, t01 = 0, t02 = 0, t03 = 0, t10 = 0, t11 = 0, t12 = 0, t13 = 0, t21 = 0, t22 = 0, t23 = 0;
    let t31 = 0, t32 = 0, t33 = 0;
    let na = 0, na1 = 0, na2 = 0, nb = 0, nb1 = 0, nb2 = 0;
    // H1 and H2 by their explicit entries (`reflectorEntries`; identity until computed).
    let h00 = 1, h11 = 1, h22 = 1, h01 = 0, h02 = 0, h12 = 0, c1 = 0, sn1 = 0;
    let e11 = 1, e22 = 1, e33 = 1, e12 = 0, e13 = 0, e23 = 0, c2 = 0, sn2 = 0;
    let beta = 0, gf = 0, gg = 0;
    if (next) {
      na = pa; na1 = pa1; na2 = pa2;
      const na1t = na * na1, na2t = na * na2;
      s00 = S[q0 + kn]; s01 = S[q0 + k1]; s02 = S[q0 + k2]; s03 = S[q0 + k3];
      s10 = S[q1 + kn]; s11 = S[q1 + k1]; s12 = S[q1 + k2]; s13 = S[q1 + k3];
      s20 = S[q2 + kn]; s21 = S[q2 + k1]; s22 = S[q2 + k2]; s23 = S[q2 + k3];
      s32 = S[q3 + k2]; s33 = S[q3 + k3]; s43 = S[q4 + k3];
      t00 = T[q0 + kn]; t01 = T[q0 + k1]; t02 = T[q0 + k2]; t03 = T[q0 + k3];
      t11 = T[q1 + k1]; t12 = T[q1 + k2]; t13 = T[q1 + k3];
      t22 = T[q2 + k2]; t23 = T[q2 + k3]; t33 = T[q3 + k3];
      let d = s00 + na1 * s10 + na2 * s20;
      s00 -= na * d; s10 -= na1t * d; s20 -= na2t * d;
      d = s01 + na1 * s11 + na2 * s21;
      s01 -= na * d; s11 -= na1t * d; s21 -= na2t * d;
      d = s02 + na1 * s12 + na2 * s22;
      s02 -= na * d; s12 -= na1t * d; s22 -= na2t * d;
      d = s03 + na1 * s13 + na2 * s23;
      s03 -= na * d; s13 -= na1t * d; s23 -= na2t * d;
      // T's columns kn, kn+1 are zero below the diagonal: only the nonzero terms are summed.
      d = t00;
      t00 -= na * d;
      t10 = -(na1t * d);
      const t20 = -(na2t * d);
      d = t01 + na1 * t11;
      t01 -= na * d; t11 -= na1t * d;
      t21 = -(na2t * d);
      d = t02 + na1 * t12 + na2 * t22;
      t02 -= na * d; t12 -= na1t * d; t22 -= na2t * d;
      d = t03 + na1 * t13 + na2 * t23;
      t03 -= na * d; t13 -= na1t * d; t23 -= na2t * d;
      // H1 maps T's row kn+2 on columns kn..kn+2 to (0, 0, β) (house3(t22, t20, t21)).
      {
        let nrm = Math.sqrt(t22 * t22 + t20 * t20 + t21 * t21);
        if (!(nrm > 1e-150 && nrm < 1e150)) nrm = Math.hypot(t22, t20, t21);
        beta = t20 === 0 && t21 === 0 ? t22 : t22 >= 0 ? -nrm : nrm;
      }
      // Explicit entries, not x − τ·v·(vᵀx): no cancellation when H1 is close to a
      // permutation (graded pencils, see qzSweep.ts).
      // (`reflectorEntries` written out: no call or scratch array on this dependency chain.)
      if (beta !== t22) {
        const nu = Math.abs(beta), inv = 1 / nu, f = nu / (nu + Math.abs(t22));
        let a: number, p: number, q: number;
        if (nu > 1e-300) {
          a = Math.abs(t22) * inv; p = t20 * inv; q = t21 * inv;
        } else {
          a = Math.abs(t22) / nu; p = t20 / nu; q = t21 / nu;
        }
        h00 = a + q * q * f; h11 = a + p * p * f; h22 = -a; h01 = -(p * q * f);
        h02 = beta > 0 ? p : -p; h12 = beta > 0 ? q : -q;
      }
      gf = h01 * t10 + h11 * t11 + h12 * t12; gg = h00 * t10 + h01 * t11 + h02 * t12;
    }
    // (3) Current pair: the remaining far columns.
    if (cur) {
      for (let j = farSplit; j < colEnd; j++) {
        farColumn(S, j, r0, r1, r2, r3, ta, a1, a2, ta1, ta2, tb, b1, b2, tb1, tb2);
        farColumn(T, j, r0, r1, r2, r3, ta, a1, a2, ta1, ta2, tb, b1, b2, tb1, tb2);
      }
    }
    // (4) Next pair: G1, W1 = H1·G1 on its near rows, and P2 from column kn.
    if (next) {
      if (gg === 0) {
        c1 = 1; sn1 = 0;
      } else if (gf === 0) {
        c1 = 0; sn1 = 1;
      } else {
        let r = Math.sqrt(gf * gf + gg * gg);
        if (r === 0 || r === Infinity) r = Math.hypot(gf, gg);
        if (r > 1e-290) {
          const inv = 1 / r;
          c1 = gf * inv; sn1 = gg * inv;
        } else {
          c1 = gf / r; sn1 = gg / r;
        }
      }
      t22 = beta;
      let y0 = h00 * s00 + h01 * s01 + h02 * s02, y1 = h01 * s00 + h11 * s01 + h12 * s02;
      s02 = h02 * s00 + h12 * s01 + h22 * s02;
      s00 = c1 * y0 - sn1 * y1; s01 = c1 * y1 + sn1 * y0;
      y0 = h00 * t00 + h01 * t01 + h02 * t02; y1 = h01 * t00 + h11 * t01 + h12 * t02;
      t02 = h02 * t00 + h12 * t01 + h22 * t02;
      t00 = c1 * y0 - sn1 * y1; t01 = c1 * y1 + sn1 * y0;
      y0 = h00 * s10 + h01 * s11 + h02 * s12; y1 = h01 * s10 + h11 * s11 + h12 * s12;
      s12 = h02 * s10 + h12 * s11 + h22 * s12;
      s10 = c1 * y0 - sn1 * y1; s11 = c1 * y1 + sn1 * y0;
      t12 = h02 * t10 + h12 * t11 + h22 * t12; // t10 becomes 0; (gf, gg) is row kn+1 after H1
      t11 = c1 * gf + sn1 * gg;
      y0 = h00 * s20 + h01 * s21 + h02 * s22; y1 = h01 * s20 + h11 * s21 + h12 * s22;
      s22 = h02 * s20 + h12 * s21 + h22 * s22;
      s20 = c1 * y0 - sn1 * y1; s21 = c1 * y1 + sn1 * y0;
      y0 = h02 * s32; y1 = h12 * s32; // row kn+3 of S is (0, 0, s32) on these columns
      s30 = c1 * y0 - sn1 * y1; s31 = c1 * y1 + sn1 * y0;
      s32 = h22 * s32;
      {
        let nrm = Math.sqrt(s10 * s10 + s20 * s20 + s30 * s30);
        if (!(nrm > 1e-150 && nrm < 1e150)) nrm = Math.hypot(s10, s20, s30);
        beta = s20 === 0 && s30 === 0 ? s10 : s10 >= 0 ? -nrm : nrm;
      }
      if (beta !== s10) {
        const sc = 1 / (s10 - beta);
        nb = (beta - s10) / beta; nb1 = s20 * sc; nb2 = s30 * sc;
      }
      s10 = beta;
    }
    // (5) Current pair: rows rowStart..kc−1, columns kc..kc+3, take W1·W2.
    if (cur) {
      for (let o = rowStart * n + kc; o < r0; o += n) {
        let x0 = S[o], x1 = S[o + 1], x2 = S[o + 2], x3 = S[o + 3];
        S[o] = x0 * m00 + x1 * m10 + x2 * m20;
        S[o + 1] = x0 * m01 + x1 * m11 + x2 * m21 + x3 * m31;
        S[o + 2] = x0 * m02 + x1 * m12 + x2 * m22 + x3 * m32;
        S[o + 3] = x0 * m03 + x1 * m13 + x2 * m23 + x3 * m33;
        x0 = T[o]; x1 = T[o + 1]; x2 = T[o + 2]; x3 = T[o + 3];
        T[o] = x0 * m00 + x1 * m10 + x2 * m20;
        T[o + 1] = x0 * m01 + x1 * m11 + x2 * m21 + x3 * m31;
        T[o + 2] = x0 * m02 + x1 * m12 + x2 * m22 + x3 * m32;
        T[o + 3] = x0 * m03 + x1 * m13 + x2 * m23 + x3 * m33;
      }
    }
    // (6) Next pair: P2 on its near block, H2 and the rotation input of G2.
    if (next) {
      const nb1t = nb * nb1, nb2t = nb * nb2;
      let d = s11 + nb1 * s21 + nb2 * s31;
      s11 -= nb * d; s21 -= nb1t * d; s31 -= nb2t * d;
      d = s12 + nb1 * s22 + nb2 * s32;
      s12 -= nb * d; s22 -= nb1t * d; s32 -= nb2t * d;
      d = s13 + nb1 * s23 + nb2 * s33;
      s13 -= nb * d; s23 -= nb1t * d; s33 -= nb2t * d;
      d = t11;
      t11 -= nb * d;
      t21 = -(nb1t * d); t31 = -(nb2t * d);
      d = t12 + nb1 * t22;
      t12 -= nb * d; t22 -= nb1t * d;
      t32 = -(nb2t * d);
      d = t13 + nb1 * t23 + nb2 * t33;
      t13 -= nb * d; t23 -= nb1t * d; t33 -= nb2t * d;
      {
        let nrm = Math.sqrt(t33 * t33 + t31 * t31 + t32 * t32);
        if (!(nrm > 1e-150 && nrm < 1e150)) nrm = Math.hypot(t33, t31, t32);
        beta = t31 === 0 && t32 === 0 ? t33 : t33 >= 0 ? -nrm : nrm;
      }
      if (beta !== t33) {
        const nu = Math.abs(beta), inv = 1 / nu, f = nu / (nu + Math.abs(t33));
        let a: number, p: number, q: number;
        if (nu > 1e-300) {
          a = Math.abs(t33) * inv; p = t31 * inv; q = t32 * inv;
        } else {
          a = Math.abs(t33) / nu; p = t31 / nu; q = t32 / nu;
        }
        e11 = a + q * q * f; e22 = a + p * p * f; e33 = -a; e12 = -(p * q * f);
        e13 = beta > 0 ? p : -p; e23 = beta > 0 ? q : -q;
      }
      gf = e12 * t21 + e22 * t22 + e23 * t23; gg = e11 * t21 + e12 * t22 + e13 * t23;
    }
    // (7) Current pair: Qᵀ rows kc..kc+3 ← P2·P1·Qᵀ and Zᵀ rows ← (W1·W2)ᵀ·Zᵀ, in one loop.
    if (cur && QT && ZT) {
      for (let j = 0; j < n; j++) {
        farColumn(QT, j, r0, r1, r2, r3, ta, a1, a2, ta1, ta2, tb, b1, b2, tb1, tb2);
        const x0 = ZT[r0 + j], x1 = ZT[r1 + j], x2 = ZT[r2 + j], x3 = ZT[r3 + j];
        ZT[r0 + j] = x0 * m00 + x1 * m10 + x2 * m20;
        ZT[r1 + j] = x0 * m01 + x1 * m11 + x2 * m21 + x3 * m31;
        ZT[r2 + j] = x0 * m02 + x1 * m12 + x2 * m22 + x3 * m32;
        ZT[r3 + j] = x0 * m03 + x1 * m13 + x2 * m23 + x3 * m33;
      }
    }
    // (8) Next pair: G2, W2 = H2·G2 on its near rows, P1 of the pair after (from column kn+1),
    // the near block stored, and W1·W2 as a 4×4 matrix.
    if (next) {
      if (gg === 0) {
        c2 = 1; sn2 = 0;
      } else if (gf === 0) {
        c2 = 0; sn2 = 1;
      } else {
        let r = Math.sqrt(gf * gf + gg * gg);
        if (r === 0 || r === Infinity) r = Math.hypot(gf, gg);
        if (r > 1e-290) {
          const inv = 1 / r;
          c2 = gf * inv; sn2 = gg * inv;
        } else {
          c2 = gf / r; sn2 = gg / r;
        }
      }
      t33 = beta;
      let y0 = e11 * s01 + e12 * s02 + e13 * s03, y1 = e12 * s01 + e22 * s02 + e23 * s03;
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
      t23 = e13 * t21 + e23 * t22 + e33 * t23; // t21 becomes 0; (gf, gg) is row kn+2 after H2
      t22 = c2 * gf + sn2 * gg;
      y0 = e11 * s31 + e12 * s32 + e13 * s33; y1 = e12 * s31 + e22 * s32 + e23 * s33;
      s33 = e13 * s31 + e23 * s32 + e33 * s33;
      s31 = c2 * y0 - sn2 * y1; s32 = c2 * y1 + sn2 * y0;
      y0 = e13 * s43; y1 = e23 * s43; // row kn+4 of S is (0, 0, s43) on these columns
      s41 = c2 * y0 - sn2 * y1; s42 = c2 * y1 + sn2 * y0;
      s43 = e33 * s43;
      // The reflector of step kn+2 from column kn+1, rows kn+2..kn+4 (final now).
      {
        let nrm = Math.sqrt(s21 * s21 + s31 * s31 + s41 * s41);
        if (!(nrm > 1e-150 && nrm < 1e150)) nrm = Math.hypot(s21, s31, s41);
        beta = s31 === 0 && s41 === 0 ? s21 : s21 >= 0 ? -nrm : nrm;
      }
      pa = 0; pa1 = 0; pa2 = 0;
      if (beta !== s21) {
        const sc = 1 / (s21 - beta);
        pa = (beta - s21) / beta; pa1 = s31 * sc; pa2 = s41 * sc;
      }
      s21 = beta;
      S[q0 + kn] = s00; S[q0 + k1] = s01; S[q0 + k2] = s02; S[q0 + k3] = s03;
      S[q1 + kn] = s10; S[q1 + k1] = s11; S[q1 + k2] = s12; S[q1 + k3] = s13;
      S[q2 + kn] = 0; S[q2 + k1] = s21; S[q2 + k2] = s22; S[q2 + k3] = s23;
      S[q3 + kn] = 0; S[q3 + k1] = 0; S[q3 + k2] = s32; S[q3 + k3] = s33;
      S[q4 + k1] = 0; S[q4 + k2] = s42; S[q4 + k3] = s43;
      T[q0 + kn] = t00; T[q0 + k1] = t01; T[q0 + k2] = t02; T[q0 + k3] = t03;
      T[q1 + kn] = 0; T[q1 + k1] = t11; T[q1 + k2] = t12; T[q1 + k3] = t13;
      T[q2 + kn] = 0; T[q2 + k1] = 0; T[q2 + k2] = t22; T[q2 + k3] = t23;
      T[q3 + k1] = 0; T[q3 + k2] = 0; T[q3 + k3] = t33;
    }
    // (9) Current pair without Qᵀ: Zᵀ rows kc..kc+3 ← (W1·W2)ᵀ·Zᵀ.
    if (cur && ZT && !QT) {
      for (let j = 0; j < n; j++) {
        const x0 = ZT[r0 + j], x1 = ZT[r1 + j], x2 = ZT[r2 + j], x3 = ZT[r3 + j];
        ZT[r0 + j] = x0 * m00 + x1 * m10 + x2 * m20;
        ZT[r1 + j] = x0 * m01 + x1 * m11 + x2 * m21 + x3 * m31;
        ZT[r2 + j] = x0 * m02 + x1 * m12 + x2 * m22 + x3 * m32;
        ZT[r3 + j] = x0 * m03 + x1 * m13 + x2 * m23 + x3 * m33;
      }
    }
    if (!next) break;
    // The next pair becomes the current one.
    kc = kn;
    ta = na; a1 = na1; a2 = na2; tb = nb; b1 = nb1; b2 = nb2;
    // W1 = H1·G1 (3×3): H1 by its entries, then G1 on its columns 0, 1; W2 likewise on entries
    // 1..3; m = W1·W2 (rows: input entry, columns: output entry; m[3][0] = 0).
    const w01 = c1 * h01 + sn1 * h00, w11 = c1 * h11 + sn1 * h01, w21 = c1 * h12 + sn1 * h02;
    m00 = c1 * h00 - sn1 * h01; m10 = c1 * h01 - sn1 * h11; m20 = c1 * h02 - sn1 * h12;
    const x11 = c2 * e11 - sn2 * e12, x12 = c2 * e12 + sn2 * e11;
    const x21 = c2 * e12 - sn2 * e22, x22 = c2 * e22 + sn2 * e12;
    m01 = w01 * x11 + h02 * x21; m02 = w01 * x12 + h02 * x22; m03 = w01 * e13 + h02 * e23;
    m11 = w11 * x11 + h12 * x21; m12 = w11 * x12 + h12 * x22; m13 = w11 * e13 + h12 * e23;
    m21 = w21 * x11 + h22 * x21; m22 = w21 * x12 + h22 * x22; m23 = w21 * e13 + h22 * e23;
    m31 = c2 * e13 - sn2 * e23; m32 = c2 * e23 + sn2 * e13; m33 = e33;
  }
  pending[0] = pa; pending[1] = pa1; pending[2] = pa2;
}

/**
 * Column j of rows r0..r3 (offsets) of M: the reflector (ta, (1, a1, a2)) on rows r0..r2, then
 * (tb, (1, b1, b2)) on rows r1..r3 (ta1 = ta·a1 etc. precomputed).
 */
function farColumn(
  M: Float64Array, j: number, r0: number, r1: number, r2: number, r3: number,
  ta: number, a1: number, a2: number, ta1: number, ta2: number, tb: number, b1: number, b2: number, tb1: number, tb2: number,
): void {
  let x0 = M[r0 + j], x1 = M[r1 + j], x2 = M[r2 + j];
  const x3 = M[r3 + j];
  let e = x0 + a1 * x1 + a2 * x2;
  x0 -= ta * e; x1 -= ta1 * e; x2 -= ta2 * e;
  e = x1 + b1 * x2 + b2 * x3;
  M[r0 + j] = x0;
  M[r1 + j] = x1 - tb * e;
  M[r2 + j] = x2 - tb1 * e;
  M[r3 + j] = x3 - tb2 * e;
}
