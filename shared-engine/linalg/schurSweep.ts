/**
 * One implicit double-shift QR sweep of the Francis iteration (LAPACK dlahqr's loop 130): the
 * 3×3 bulge chased down the active window by 3-row Householder reflectors, applied to T (the
 * active window, or all of T) and to Zᵀ. Row-major Float64Array kernels behind
 * `francisQRTransposedInPlace`.
 */
import { sign } from "./schurBlocks";

const ULP = Number.EPSILON; // LAPACK dlamch('P') = 2^-52
const SAFE_MIN = 2.2250738585072014e-308; // dlamch('S'): smallest normal number

/**
 * One implicit double-shift sweep (dlahqr loop 130): chase the 3×3 bulge from row m to row i
 * of the active window l..i, updating T's columns up to i2 and rows from i1, and Zᵀ when
 * given. On entry `v` holds the normalised first column of the double-shift polynomial (from
 * the bulge-start search); it is used as scratch (length 4).
 *
 * Steps are taken two at a time. Two consecutive 3-row reflectors are applied together where
 * they act on the same data: the far columns of T's rows k..k+3, T's rows above the bulge
 * (columns k..k+3) and Zᵀ's rows k..k+3 (one pass loading and storing four entries instead of
 * two passes over three). The 4×4 "near" block where both reflectors act from both sides is
 * held in locals (straight-line code instead of loops of 2–4 iterations), and the reflector
 * of the next pair, whose source column is final once that block is done, is formed before
 * the long loops so that its square root and divisions overlap with them. Every entry sees
 * the same operations in the same order as with one reflector at a time (as dlahqr applies
 * them), so the fusion changes no result, with a third less memory traffic. A sweep with an
 * odd number of steps starts with one step on its own; every sweep ends with the (3-row,
 * 2-row) tail pair.
 */
export function chaseBulge(h: Float64Array, n: number, m: number, l: number, i: number, i1: number, i2: number, zt: Float64Array | null, v: Float64Array): void {
  let k = m; // steps m..i−1
  if ((i - m) % 2 === 1) bulgeFirstStep(h, n, k++, l, i1, i2, zt, v);
  for (; k < i - 2; k += 2) bulgePairStep(h, n, k, m, l, i1, i2, zt, v);
  bulgeTailPair(h, n, k, m, l, i1, i2, zt, v);
}

/**
 * The last two steps of the sweep (k = i − 2 with a 3-row reflector P1, k + 1 = i − 1 with a
 * 2-row reflector P2), fused like bulgePairStep: the 3×3 near block in locals, one pass over
 * the far columns, the rows above and the rows of Zᵀ.
 */
function bulgeTailPair(h: Float64Array, n: number, k: number, m: number, l: number, i1: number, i2: number, zt: Float64Array | null, v: Float64Array): void {
  const r0 = k * n, r1 = r0 + n, r2 = r1 + n;
  let tA1: number;
  if (k > m) {
    tA1 = v[3]; // formed by the previous step (see bulgePairStep)
  } else {
    tA1 = householder3(v, 3);
    if (m > l) h[r0 + k - 1] *= 1 - tA1; // see bulgeFirstStep
  }
  const a2 = v[1], a3 = v[2];
  const tA2 = tA1 * a2, tA3 = tA1 * a3;
  let h00 = h[r0 + k], h01 = h[r0 + k + 1], h02 = h[r0 + k + 2];
  let h10 = h[r1 + k], h11 = h[r1 + k + 1], h12 = h[r1 + k + 2];
  let h20 = h[r2 + k], h21 = h[r2 + k + 1], h22 = h[r2 + k + 2];
  // P1 from the left on columns k..k+2, then from the right on rows k..k+2 (= i)
  let s = h00 + a2 * h10 + a3 * h20;
  h00 -= s * tA1; h10 -= s * tA2; h20 -= s * tA3;
  s = h01 + a2 * h11 + a3 * h21;
  h01 -= s * tA1; h11 -= s * tA2; h21 -= s * tA3;
  s = h02 + a2 * h12 + a3 * h22;
  h02 -= s * tA1; h12 -= s * tA2; h22 -= s * tA3;
  s = h00 + a2 * h01 + a3 * h02;
  h00 -= s * tA1; h01 -= s * tA2; h02 -= s * tA3;
  s = h10 + a2 * h11 + a3 * h12;
  h10 -= s * tA1; h11 -= s * tA2; h12 -= s * tA3;
  s = h20 + a2 * h21 + a3 * h22;
  h20 -= s * tA1; h21 -= s * tA2; h22 -= s * tA3;
  // P2 (2 rows) from column k, rows k+1..k+2
  v[0] = h10;
  v[1] = h20;
  v[2] = 0;
  const tB1 = householder3(v, 2);
  h10 = v[0];
  h20 = 0;
  const b2 = v[1];
  const tB2 = tB1 * b2;
  // P2 from the left on columns k+1..k+2, then from the right on rows k..k+2
  s = h11 + b2 * h21;
  h11 -= s * tB1; h21 -= s * tB2;
  s = h12 + b2 * h22;
  h12 -= s * tB1; h22 -= s * tB2;
  s = h01 + b2 * h02;
  h01 -= s * tB1; h02 -= s * tB2;
  s = h11 + b2 * h12;
  h11 -= s * tB1; h12 -= s * tB2;
  s = h21 + b2 * h22;
  h21 -= s * tB1; h22 -= s * tB2;
  h[r0 + k] = h00; h[r0 + k + 1] = h01; h[r0 + k + 2] = h02;
  h[r1 + k] = h10; h[r1 + k + 1] = h11; h[r1 + k + 2] = h12;
  h[r2 + k] = h20; h[r2 + k + 1] = h21; h[r2 + k + 2] = h22;
  // Far columns k+3..i2: P1 on rows k..k+2, then P2 on rows k+1..k+2.
  for (let j = k + 3; j <= i2; j++) {
    let x0 = h[r0 + j], x1 = h[r1 + j], x2 = h[r2 + j];
    const s1 = x0 + a2 * x1 + a3 * x2;
    x0 -= s1 * tA1;
    x1 -= s1 * tA2;
    x2 -= s1 * tA3;
    const s2 = x1 + b2 * x2;
    h[r0 + j] = x0;
    h[r1 + j] = x1 - s2 * tB1;
    h[r2 + j] = x2 - s2 * tB2;
  }
  // Rows i1..k−1: P1 on columns k..k+2, then P2 on columns k+1..k+2.
  for (let j = i1, p = i1 * n + k; j < k; j++, p += n) {
    let x0 = h[p], x1 = h[p + 1], x2 = h[p + 2];
    const s1 = x0 + a2 * x1 + a3 * x2;
    x0 -= s1 * tA1;
    x1 -= s1 * tA2;
    x2 -= s1 * tA3;
    const s2 = x1 + b2 * x2;
    h[p] = x0;
    h[p + 1] = x1 - s2 * tB1;
    h[p + 2] = x2 - s2 * tB2;
  }
  if (zt) {
    for (let j = 0; j < n; j++) {
      let x0 = zt[r0 + j], x1 = zt[r1 + j], x2 = zt[r2 + j];
      const s1 = x0 + a2 * x1 + a3 * x2;
      x0 -= s1 * tA1;
      x1 -= s1 * tA2;
      x2 -= s1 * tA3;
      const s2 = x1 + b2 * x2;
      zt[r0 + j] = x0;
      zt[r1 + j] = x1 - s2 * tB1;
      zt[r2 + j] = x2 - s2 * tB2;
    }
  }
}

/**
 * Steps k and k+1 of the sweep (both with 3-row reflectors: k + 1 ≤ i − 2), fused as described
 * above. On entry `v` holds the reflector of step k: for k = m the normalised vector from the
 * bulge-start search (the reflector is formed here), for k > m the reflector already formed by
 * the previous step ([β, u1, u2, τ], column k−1 already reduced). On return `v` holds, in the
 * same form, the reflector of step k+2 (from column k+1, final once the near block is done),
 * formed before the long loops so that its square root and divisions overlap with them.
 */
function bulgePairStep(h: Float64Array, n: number, k: number, m: number, l: number, i1: number, i2: number, zt: Float64Array | null, v: Float64Array): void {
  const r0 = k * n, r1 = r0 + n, r2 = r1 + n, r3 = r2 + n;
  let tA1: number;
  if (k > m) {
    tA1 = v[3];
  } else {
    tA1 = householder3(v, 3);
    if (m > l) h[r0 + k - 1] *= 1 - tA1; // see bulgeFirstStep
  }
  const a2 = v[1], a3 = v[2];
  const tA2 = tA1 * a2, tA3 = tA1 * a3;
  // The near block, rows k..k+3 × columns k..k+3, is held in locals while P1 and P2 act on it
  // from both sides (straight-line code: these loops would have 2–4 iterations).
  const c3 = k + 3;
  let h00 = h[r0 + k], h01 = h[r0 + k + 1], h02 = h[r0 + k + 2], h03 = h[r0 + c3];
  let h10 = h[r1 + k], h11 = h[r1 + k + 1], h12 = h[r1 + k + 2], h13 = h[r1 + c3];
  let h20 = h[r2 + k], h21 = h[r2 + k + 1], h22 = h[r2 + k + 2], h23 = h[r2 + c3];
  let h30 = h[r3 + k], h31 = h[r3 + k + 1], h32 = h[r3 + k + 2], h33 = h[r3 + c3];
  // P1 from the left on columns k..k+3 (rows k..k+2)
  let s = h00 + a2 * h10 + a3 * h20;
  h00 -= s * tA1; h10 -= s * tA2; h20 -= s * tA3;
  s = h01 + a2 * h11 + a3 * h21;
  h01 -= s * tA1; h11 -= s * tA2; h21 -= s * tA3;
  s = h02 + a2 * h12 + a3 * h22;
  h02 -= s * tA1; h12 -= s * tA2; h22 -= s * tA3;
  s = h03 + a2 * h13 + a3 * h23;
  h03 -= s * tA1; h13 -= s * tA2; h23 -= s * tA3;
  // P1 from the right on rows k..k+3 (k + 3 ≤ i); rows i1..k−1 follow in the fused column
  // pass at the end (rows above k see only the two right reflectors).
  s = h00 + a2 * h01 + a3 * h02;
  h00 -= s * tA1; h01 -= s * tA2; h02 -= s * tA3;
  s = h10 + a2 * h11 + a3 * h12;
  h10 -= s * tA1; h11 -= s * tA2; h12 -= s * tA3;
  s = h20 + a2 * h21 + a3 * h22;
  h20 -= s * tA1; h21 -= s * tA2; h22 -= s * tA3;
  s = h30 + a2 * h31 + a3 * h32;
  h30 -= s * tA1; h31 -= s * tA2; h32 -= s * tA3;
  // Reflector P2 for step k+1 from column k, rows k+1..k+3.
  v[0] = h10;
  v[1] = h20;
  v[2] = h30;
  const tB1 = householder3(v, 3);
  h10 = v[0];
  h20 = 0;
  h30 = 0;
  const b2 = v[1], b3 = v[2];
  const tB2 = tB1 * b2, tB3 = tB1 * b3;
  // P2 from the left on columns k+1..k+3 (rows k+1..k+3)
  s = h11 + b2 * h21 + b3 * h31;
  h11 -= s * tB1; h21 -= s * tB2; h31 -= s * tB3;
  s = h12 + b2 * h22 + b3 * h32;
  h12 -= s * tB1; h22 -= s * tB2; h32 -= s * tB3;
  s = h13 + b2 * h23 + b3 * h33;
  h13 -= s * tB1; h23 -= s * tB2; h33 -= s * tB3;
  // P2 from the right on columns k+1..k+3, rows k..k+3, then row k+4 (inside the window:
  // a pair is always followed by another step, so k + 4 ≤ i)
  s = h01 + b2 * h02 + b3 * h03;
  h01 -= s * tB1; h02 -= s * tB2; h03 -= s * tB3;
  s = h11 + b2 * h12 + b3 * h13;
  h11 -= s * tB1; h12 -= s * tB2; h13 -= s * tB3;
  s = h21 + b2 * h22 + b3 * h23;
  h21 -= s * tB1; h22 -= s * tB2; h23 -= s * tB3;
  s = h31 + b2 * h32 + b3 * h33;
  h31 -= s * tB1; h32 -= s * tB2; h33 -= s * tB3;
  const p4 = r3 + n + k + 1;
  let h41 = h[p4];
  let x4 = h[p4 + 1], y4 = h[p4 + 2];
  s = h41 + b2 * x4 + b3 * y4;
  h41 -= s * tB1;
  x4 -= s * tB2;
  y4 -= s * tB3;
  // Reflector of step k+2 from column k+1, rows k+2..k+4 (final now: nothing below touches it)
  v[0] = h21;
  v[1] = h31;
  v[2] = h41;
  v[3] = householder3(v, 3);
  h21 = v[0];
  h31 = 0;
  h41 = 0;
  h[p4] = h41; h[p4 + 1] = x4; h[p4 + 2] = y4;
  h[r0 + k] = h00; h[r0 + k + 1] = h01; h[r0 + k + 2] = h02; h[r0 + c3] = h03;
  h[r1 + k] = h10; h[r1 + k + 1] = h11; h[r1 + k + 2] = h12; h[r1 + c3] = h13;
  h[r2 + k] = h20; h[r2 + k + 1] = h21; h[r2 + k + 2] = h22; h[r2 + c3] = h23;
  h[r3 + k] = h30; h[r3 + k + 1] = h31; h[r3 + k + 2] = h32; h[r3 + c3] = h33;
  // Far columns k+4..i2: P1 on rows k..k+2, then P2 on rows k+1..k+3, in one pass.
  for (let j = k + 4; j <= i2; j++) {
    let x0 = h[r0 + j], x1 = h[r1 + j], x2 = h[r2 + j];
    const x3 = h[r3 + j];
    const s1 = x0 + a2 * x1 + a3 * x2;
    x0 -= s1 * tA1;
    x1 -= s1 * tA2;
    x2 -= s1 * tA3;
    const s2 = x1 + b2 * x2 + b3 * x3;
    h[r0 + j] = x0;
    h[r1 + j] = x1 - s2 * tB1;
    h[r2 + j] = x2 - s2 * tB2;
    h[r3 + j] = x3 - s2 * tB3;
  }
  // Rows i1..k−1: P1 on columns k..k+2, then P2 on columns k+1..k+3, in one pass.
  for (let j = i1, p = i1 * n + k; j < k; j++, p += n) {
    let x0 = h[p], x1 = h[p + 1], x2 = h[p + 2];
    const x3 = h[p + 3];
    const s1 = x0 + a2 * x1 + a3 * x2;
    x0 -= s1 * tA1;
    x1 -= s1 * tA2;
    x2 -= s1 * tA3;
    const s2 = x1 + b2 * x2 + b3 * x3;
    h[p] = x0;
    h[p + 1] = x1 - s2 * tB1;
    h[p + 2] = x2 - s2 * tB2;
    h[p + 3] = x3 - s2 * tB3;
  }
  if (zt) {
    // rows k..k+3 of Zᵀ: P1 then P2, in one pass
    for (let j = 0; j < n; j++) {
      let x0 = zt[r0 + j], x1 = zt[r1 + j], x2 = zt[r2 + j];
      const x3 = zt[r3 + j];
      const s1 = x0 + a2 * x1 + a3 * x2;
      x0 -= s1 * tA1;
      x1 -= s1 * tA2;
      x2 -= s1 * tA3;
      const s2 = x1 + b2 * x2 + b3 * x3;
      zt[r0 + j] = x0;
      zt[r1 + j] = x1 - s2 * tB1;
      zt[r2 + j] = x2 - s2 * tB2;
      zt[r3 + j] = x3 - s2 * tB3;
    }
  }
}

/**
 * The first step of a sweep with an odd number of steps, on its own (dlahqr loop 130 body with
 * k = m and a 3-row reflector; k + 3 ≤ i): the reflector comes from the bulge-start search
 * in `v`.
 */
function bulgeFirstStep(h: Float64Array, n: number, k: number, l: number, i1: number, i2: number, zt: Float64Array | null, v: Float64Array): void {
  const t1 = householder3(v, 3);
  // h(k,k−1)·(1 − t1) instead of −h(k,k−1) avoids a bug when v(2), v(3) underflow (dlahqr)
  if (k > l) h[k * n + k - 1] *= 1 - t1;
  const v2 = v[1], v3 = v[2];
  // (v is overwritten below with the next step's reflector)
  const t2 = t1 * v2, t3 = t1 * v3;
  const r0 = k * n, r1 = r0 + n, r2 = r1 + n;
  for (let j = k; j <= i2; j++) {
    const sum = h[r0 + j] + v2 * h[r1 + j] + v3 * h[r2 + j];
    h[r0 + j] -= sum * t1;
    h[r1 + j] -= sum * t2;
    h[r2 + j] -= sum * t3;
  }
  for (let j = i1, p = i1 * n + k; j <= k + 3; j++, p += n) {
    const sum = h[p] + v2 * h[p + 1] + v3 * h[p + 2];
    h[p] -= sum * t1;
    h[p + 1] -= sum * t2;
    h[p + 2] -= sum * t3;
  }
  // the reflector of step k+1, from column k, rows k+1..k+3 (final now), for the next step
  const c = r1 + k;
  v[0] = h[c];
  v[1] = h[c + n];
  v[2] = h[c + 2 * n];
  v[3] = householder3(v, 3);
  h[c] = v[0];
  h[c + n] = 0;
  h[c + 2 * n] = 0;
  if (zt) {
    // rows k, k+1, k+2 of Zᵀ (columns of Z)
    for (let j = 0; j < n; j++) {
      const sum = zt[r0 + j] + v2 * zt[r1 + j] + v3 * zt[r2 + j];
      zt[r0 + j] -= sum * t1;
      zt[r1 + j] -= sum * t2;
      zt[r2 + j] -= sum * t3;
    }
  }
}

/**
 * Householder reflector (I − τ u uᵀ) with u = [1, v1, v2] mapping [v0, v1, v2] (first nr entries)
 * to [β, 0, 0]; overwrites v with [β, u1, u2] and returns τ (LAPACK dlarfg, including its
 * rescaling for tiny β so that entries near the underflow threshold keep full accuracy).
 * β comes from one square root of v0² + v1² + v2² whenever that sum is safely inside the normal
 * range (dlarfg's two nested dlapy2/dnrm2 norms otherwise).
 */
function householder3(v: Float64Array, nr: number): number {
  let alpha = v[0];
  let x1 = v[1];
  let x2 = nr === 3 ? v[2] : 0;
  const xs = x1 * x1 + x2 * x2;
  const total = alpha * alpha + xs;
  let beta: number;
  let knt = 0;
  const safmin = SAFE_MIN / ULP;
  if (xs > 1e-280 && total < 1e280) {
    // the common case: one square root of the whole sum (no under/overflow possible, and
    // |β| ≥ 1e-140 needs no rescaling)
    beta = alpha >= 0 ? -Math.sqrt(total) : Math.sqrt(total);
  } else {
    let xnorm = norm2(x1, x2);
    if (xnorm === 0) return 0;
    beta = -sign(norm2(alpha, xnorm), alpha);
    if (Math.abs(beta) < safmin) {
      const rsafmn = 1 / safmin;
      do {
        knt++;
        x1 *= rsafmn;
        x2 *= rsafmn;
        beta *= rsafmn;
        alpha *= rsafmn;
      } while (Math.abs(beta) < safmin && knt < 20);
      xnorm = norm2(x1, x2);
      beta = -sign(norm2(alpha, xnorm), alpha);
    }
  }
  const tau = (beta - alpha) / beta;
  const scal = 1 / (alpha - beta);
  v[1] = x1 * scal;
  v[2] = x2 * scal;
  for (let j = 0; j < knt; j++) beta *= safmin;
  v[0] = beta;
  return tau;
}

/**
 * sqrt(x² + y²) without harmful overflow or underflow. Math.hypot is exact but slow in V8 (it
 * is variadic); squares are safe whenever their sum lies well inside the normal range, and the
 * scaled form (LAPACK dlapy2) covers the rest.
 */
function norm2(x: number, y: number): number {
  const sq = x * x + y * y;
  if (sq > 1e-280 && sq < 1e280) return Math.sqrt(sq);
  const ax = Math.abs(x);
  const ay = Math.abs(y);
  const w = ax > ay ? ax : ay;
  const z = ax > ay ? ay : ax;
  if (z === 0 || w === Infinity) return w;
  const r = z / w;
  return w * Math.sqrt(1 + r * r);
}
