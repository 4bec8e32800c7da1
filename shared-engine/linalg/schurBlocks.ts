/**
 * The 2×2 diagonal blocks of a real Schur form: their standardisation (LAPACK dlanv2) and the
 * eigenvalues read off a standardised quasi-triangular matrix.
 */
import type { Complex } from "./complex";

const ULP = Number.EPSILON; // LAPACK dlamch('P') = 2^-52

/** Fortran SIGN(a, b): |a| with the sign of b (+ for b = ±0). */
export const sign = (a: number, b: number): number => (b >= 0 ? Math.abs(a) : -Math.abs(a));

/** Result of standardising a 2×2 block, with the rotation [cs −sn; sn cs] that achieved it. */
export interface StandardizedBlock {
  a: number; b: number; c: number; d: number;
  cs: number; sn: number;
  re1: number; im1: number; re2: number; im2: number;
}


/**
 * Standardises the real 2×2 matrix [a b; c d] = R·[a' b'; c' d']·Rᵀ with R = [cs −sn; sn cs]:
 * either c' = 0 (real eigenvalues a', d') or a' = d' and b'·c' < 0 (complex pair
 * a' ± i·sqrt(|b'c'|)). Method: LAPACK dlanv2 (Bai & Demmel, "On swapping diagonal blocks in
 * real Schur form", Linear Algebra Appl. 186, 1993, §4), without its over/underflow rescaling
 * loop (callers pass blocks of a matrix with finite, normal-range entries).
 */
export function standardizeBlock2x2(a: number, b: number, c: number, d: number): StandardizedBlock {
  let cs = 1;
  let sn = 0;
  if (c === 0) {
    // already upper triangular
  } else if (b === 0) {
    // swap rows and columns
    cs = 0;
    sn = 1;
    const t = d;
    d = a;
    a = t;
    b = -c;
    c = 0;
  } else if (a - d === 0 && Math.sign(b) !== Math.sign(c)) {
    // already standard complex form
  } else {
    const temp = a - d;
    let p = 0.5 * temp;
    const bcmax = Math.max(Math.abs(b), Math.abs(c));
    const bcmis = Math.min(Math.abs(b), Math.abs(c)) * sign(1, b) * sign(1, c);
    const scale = Math.max(Math.abs(p), bcmax);
    let z = (p / scale) * p + (bcmax / scale) * bcmis;
    if (z >= 4 * ULP) {
      // real eigenvalues: compute a and d, then the rotation
      z = p + sign(Math.sqrt(scale) * Math.sqrt(z), p);
      a = d + z;
      d = d - (bcmax / z) * bcmis;
      const tau = Math.hypot(c, z);
      cs = z / tau;
      sn = c / tau;
      b = b - c;
      c = 0;
    } else {
      // complex or nearly equal real eigenvalues: make the diagonal entries equal
      const sigma = b + c;
      const tau = Math.hypot(sigma, temp);
      cs = Math.sqrt(0.5 * (1 + Math.abs(sigma) / tau));
      sn = -(p / (tau * cs)) * sign(1, sigma);
      const aa = a * cs + b * sn;
      const bb = -a * sn + b * cs;
      const cc = c * cs + d * sn;
      const dd = -c * sn + d * cs;
      a = aa * cs + cc * sn;
      b = bb * cs + dd * sn;
      c = -aa * sn + cc * cs;
      d = -bb * sn + dd * cs;
      const mid = 0.5 * (a + d);
      a = mid;
      d = mid;
      if (c !== 0) {
        if (b !== 0) {
          if (Math.sign(b) === Math.sign(c)) {
            // real eigenvalues after all: reduce to upper triangular form
            const sab = Math.sqrt(Math.abs(b));
            const sac = Math.sqrt(Math.abs(c));
            p = sign(sab * sac, c);
            const tau2 = 1 / Math.sqrt(Math.abs(b + c));
            a = mid + p;
            d = mid - p;
            b = b - c;
            c = 0;
            const cs1 = sab * tau2;
            const sn1 = sac * tau2;
            const t = cs * cs1 - sn * sn1;
            sn = cs * sn1 + sn * cs1;
            cs = t;
          }
        } else {
          b = -c;
          c = 0;
          const t = cs;
          cs = -sn;
          sn = t;
        }
      }
    }
  }
  const im = c === 0 ? 0 : Math.sqrt(Math.abs(b)) * Math.sqrt(Math.abs(c));
  return { a, b, c, d, cs, sn, re1: a, im1: im, re2: d, im2: im === 0 ? 0 : -im }; // never −0
}

/**
 * Applies the 2×2 standardisation at rows/columns (p, p+1) of the row-major n×n quasi-triangular
 * `t` (columns 0..p+1 above the block and rows to the right up to column n−1) and to the columns
 * of `q` when given. Returns true when the block is a complex pair after standardisation.
 */
export function standardizeBlockAt(t: Float64Array, n: number, p: number, q: Float64Array | null): boolean {
  const i0 = p * n;
  const i1 = (p + 1) * n;
  const s = standardizeBlock2x2(t[i0 + p], t[i0 + p + 1], t[i1 + p], t[i1 + p + 1]);
  t[i0 + p] = s.a;
  t[i0 + p + 1] = s.b;
  t[i1 + p] = s.c;
  t[i1 + p + 1] = s.d;
  const { cs, sn } = s;
  if (sn !== 0 || cs !== 1) {
    for (let j = p + 2; j < n; j++) {
      const x = t[i0 + j];
      const y = t[i1 + j];
      t[i0 + j] = cs * x + sn * y;
      t[i1 + j] = cs * y - sn * x;
    }
    for (let i = 0; i < p; i++) {
      const x = t[i * n + p];
      const y = t[i * n + p + 1];
      t[i * n + p] = cs * x + sn * y;
      t[i * n + p + 1] = cs * y - sn * x;
    }
    if (q) rotateColumns(q, n, p, cs, sn);
  }
  return s.c !== 0;
}

function rotateColumns(q: Float64Array, n: number, p: number, cs: number, sn: number): void {
  for (let i = 0; i < n; i++) {
    const x = q[i * n + p];
    const y = q[i * n + p + 1];
    q[i * n + p] = cs * x + sn * y;
    q[i * n + p + 1] = cs * y - sn * x;
  }
}

/** Eigenvalues read off a standardised quasi-triangular row-major T, in diagonal order. */
export function eigenvaluesOfQuasiTriangular(t: Float64Array, n: number): Complex[] {
  const out: Complex[] = [];
  for (let i = 0; i < n; i++) {
    if (i + 1 < n && t[(i + 1) * n + i] !== 0) {
      const re = t[i * n + i];
      const im = Math.sqrt(Math.abs(t[i * n + i + 1])) * Math.sqrt(Math.abs(t[(i + 1) * n + i]));
      out.push({ re, im }, { re, im: -im });
      i++;
    } else {
      out.push({ re: t[i * n + i], im: 0 });
    }
  }
  return out;
}
