/**
 * Real Schur decomposition A = Q T Qᵀ by the Francis double-shift QR algorithm on the
 * Hessenberg form, with the small-subdiagonal deflation test of Ahues & Tisseur and the
 * standardisation of 2×2 blocks of LAPACK's dlanv2. Kernels work on row-major Float64Arrays.
 */
import { Matrix } from "ml-matrix";
import { EngineError } from "../errors";
import { matrixOfRowMajor, rowMajorOf } from "./denseKernels";
import type { Complex } from "./complex";
import { reduceToHessenbergInPlace } from "./hessenberg";
import { requireSquareFinite } from "./validate";

export interface RealSchurForm {
  /** Upper quasi-triangular: 1×1 blocks (real eigenvalues) and standardised 2×2 blocks. */
  T: Matrix;
  /** Orthogonal, A = Q T Qᵀ. */
  Q: Matrix;
  /** In the order of the diagonal of T; conjugate pairs adjacent, positive imaginary part first. */
  eigenvalues: Complex[];
  /** Francis QR sweeps used. */
  iterations: number;
}

const ULP = Number.EPSILON; // LAPACK dlamch('P') = 2^-52
const SAFE_MIN = 2.2250738585072014e-308; // dlamch('S'): smallest normal number
const EXCEPTIONAL_SHIFT_PERIOD = 10; // LAPACK dlahqr KEXSH
const EXCEPTIONAL_SHIFT_DAT1 = 0.75;
const EXCEPTIONAL_SHIFT_DAT2 = -0.4375;

/** Default total sweep limit: 30·max(10, n), the per-eigenvalue allowance of dlahqr used as a total. */
export function defaultSchurIterationLimit(n: number): number {
  return 30 * Math.max(10, n);
}

/** Result of standardising a 2×2 block, with the rotation [cs −sn; sn cs] that achieved it. */
export interface StandardizedBlock {
  a: number; b: number; c: number; d: number;
  cs: number; sn: number;
  re1: number; im1: number; re2: number; im2: number;
}

const sign = (a: number, b: number): number => (b >= 0 ? Math.abs(a) : -Math.abs(a)); // Fortran SIGN(a, b)

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

/**
 * Kernel: Francis double-shift QR on the upper Hessenberg row-major n×n array `h`, active
 * window ilo..ihi (0-based inclusive; outside it `h` must already be upper triangular).
 * Writes eigenvalues into wr/wi (indices ilo..ihi). With `wantT` the full quasi-triangular T is
 * formed (2×2 blocks standardised); without it only the active window is updated, which is
 * enough for eigenvalues. When `z` is given it is overwritten by z·Z. Returns the number of
 * sweeps. Throws "no-convergence" when `maxIterations` sweeps are used up.
 *
 * Method: LAPACK dlahqr's small-bulge double-shift iteration (Francis, "The QR transformation",
 * Computer J. 4, 1961–62; implicit double shift as in Golub & Van Loan 4th ed. Alg. 7.5.1),
 * deflation test of Ahues & Tisseur (LAPACK Working Note 122, 1997), exceptional shifts every
 * 10 sweeps without deflation.
 */
export function francisQRInPlace(
  h: Float64Array,
  n: number,
  ilo: number,
  ihi: number,
  wantT: boolean,
  z: Float64Array | null,
  wr: Float64Array,
  wi: Float64Array,
  maxIterations: number,
): number {
  if (ilo > ihi) return 0;
  if (ilo === ihi) {
    wr[ilo] = h[ilo * n + ilo];
    wi[ilo] = 0;
    return 0;
  }
  // clear out the trash below the subdiagonal
  for (let j = ilo; j <= ihi - 3; j++) {
    h[(j + 2) * n + j] = 0;
    h[(j + 3) * n + j] = 0;
  }
  if (ilo <= ihi - 2) h[ihi * n + ihi - 2] = 0;

  const nh = ihi - ilo + 1;
  const smlnum = SAFE_MIN * (nh / ULP);
  // Z is updated through its transpose: a reflector then touches three contiguous rows
  // instead of three entries in each of n rows (row-major), which is much kinder to the cache.
  const zt = z ? transposeInto(z, n, transposeWorkspace(n * n)) : null;
  let i1 = 0;
  let i2 = n - 1;
  let sweeps = 0;
  let kdefl = 0;
  const v = new Float64Array(3);
  let i = ihi;
  while (i >= ilo) {
    let l = ilo;
    for (;;) {
      // look for a single small subdiagonal element (Ahues & Tisseur test)
      let k = i;
      for (; k > l; k--) {
        const hkk1 = Math.abs(h[k * n + k - 1]);
        if (hkk1 <= smlnum) break;
        let tst = Math.abs(h[(k - 1) * n + k - 1]) + Math.abs(h[k * n + k]);
        if (tst === 0) {
          if (k - 2 >= ilo) tst += Math.abs(h[(k - 1) * n + k - 2]);
          if (k + 1 <= ihi) tst += Math.abs(h[(k + 1) * n + k]);
        }
        if (hkk1 <= ULP * tst) {
          const hk1k = Math.abs(h[(k - 1) * n + k]);
          const ab = Math.max(hkk1, hk1k);
          const ba = Math.min(hkk1, hk1k);
          const hkk = Math.abs(h[k * n + k]);
          const diff = Math.abs(h[(k - 1) * n + k - 1] - h[k * n + k]);
          const aa = Math.max(hkk, diff);
          const bb = Math.min(hkk, diff);
          const s = aa + ab;
          if (ba * (ab / s) <= Math.max(smlnum, ULP * (bb * (aa / s)))) break;
        }
      }
      l = k;
      if (l > ilo) h[l * n + l - 1] = 0;
      if (l >= i - 1) {
        break;
      }
      if (sweeps >= maxIterations) {
        throw new EngineError(
          "no-convergence",
          `Francis QR did not converge within ${maxIterations} sweeps (${i - ilo + 1} eigenvalues still unresolved)`,
          { iterations: sweeps, maxIterations, unresolved: i - ilo + 1, lastResidual: Math.abs(h[i * n + i - 1]) },
        );
      }
      sweeps++;
      kdefl++;
      if (!wantT) {
        i1 = l;
        i2 = i;
      }
      // shifts: exceptional every KEXSH sweeps without deflation, else the trailing 2×2 eigenvalues
      let h11: number, h12: number, h21: number, h22: number;
      if (kdefl % (2 * EXCEPTIONAL_SHIFT_PERIOD) === 0) {
        const s = Math.abs(h[i * n + i - 1]) + Math.abs(h[(i - 1) * n + i - 2]);
        h11 = EXCEPTIONAL_SHIFT_DAT1 * s + h[i * n + i];
        h12 = EXCEPTIONAL_SHIFT_DAT2 * s;
        h21 = s;
        h22 = h11;
      } else if (kdefl % EXCEPTIONAL_SHIFT_PERIOD === 0) {
        const s = Math.abs(h[(l + 1) * n + l]) + Math.abs(h[(l + 2) * n + l + 1]);
        h11 = EXCEPTIONAL_SHIFT_DAT1 * s + h[l * n + l];
        h12 = EXCEPTIONAL_SHIFT_DAT2 * s;
        h21 = s;
        h22 = h11;
      } else {
        h11 = h[(i - 1) * n + i - 1];
        h21 = h[i * n + i - 1];
        h12 = h[(i - 1) * n + i];
        h22 = h[i * n + i];
      }
      let rt1r: number, rt1i: number, rt2r: number, rt2i: number;
      const s0 = Math.abs(h11) + Math.abs(h12) + Math.abs(h21) + Math.abs(h22);
      if (s0 === 0) {
        rt1r = rt1i = rt2r = rt2i = 0;
      } else {
        h11 /= s0;
        h21 /= s0;
        h12 /= s0;
        h22 /= s0;
        const tr = (h11 + h22) / 2;
        const det = (h11 - tr) * (h22 - tr) - h12 * h21;
        const rtdisc = Math.sqrt(Math.abs(det));
        if (det >= 0) {
          rt1r = tr * s0;
          rt2r = rt1r;
          rt1i = rtdisc * s0;
          rt2i = -rt1i;
        } else {
          // real shifts: use the one closer to h22 twice
          rt1r = tr + rtdisc;
          rt2r = tr - rtdisc;
          if (Math.abs(rt1r - h22) <= Math.abs(rt2r - h22)) {
            rt1r *= s0;
            rt2r = rt1r;
          } else {
            rt2r *= s0;
            rt1r = rt2r;
          }
          rt1i = rt2i = 0;
        }
      }
      // look for two consecutive small subdiagonal elements (start of the bulge)
      let m = i - 2;
      for (; m >= l; m--) {
        const hmm = h[m * n + m];
        let h21s = h[(m + 1) * n + m];
        let s = Math.abs(hmm - rt2r) + Math.abs(rt2i) + Math.abs(h21s);
        h21s /= s;
        v[0] = h21s * h[m * n + m + 1] + (hmm - rt1r) * ((hmm - rt2r) / s) - rt1i * (rt2i / s);
        v[1] = h21s * (hmm + h[(m + 1) * n + m + 1] - rt1r - rt2r);
        v[2] = h21s * h[(m + 2) * n + m + 1];
        s = Math.abs(v[0]) + Math.abs(v[1]) + Math.abs(v[2]);
        v[0] /= s;
        v[1] /= s;
        v[2] /= s;
        if (m === l) break;
        const h00 = Math.abs(h[m * n + m - 1]) * (Math.abs(v[1]) + Math.abs(v[2]));
        const h01 = Math.abs(v[0]) * (Math.abs(h[(m - 1) * n + m - 1]) + Math.abs(hmm) + Math.abs(h[(m + 1) * n + m + 1]));
        if (h00 <= ULP * h01) break;
      }
      chaseBulge(h, n, m, l, i, i1, i2, zt, v);
    }
    if (l === i) {
      // one real eigenvalue has converged
      wr[i] = h[i * n + i];
      wi[i] = 0;
    } else {
      // a 2×2 block has converged: standardise it (dlanv2)
      const p = i - 1;
      const s = standardizeBlock2x2(h[p * n + p], h[p * n + i], h[i * n + p], h[i * n + i]);
      h[p * n + p] = s.a;
      h[p * n + i] = s.b;
      h[i * n + p] = s.c;
      h[i * n + i] = s.d;
      wr[p] = s.re1;
      wi[p] = s.im1;
      wr[i] = s.re2;
      wi[i] = s.im2;
      if (wantT) {
        const { cs, sn } = s;
        for (let j = i + 1; j <= i2; j++) {
          const x = h[p * n + j];
          const y = h[i * n + j];
          h[p * n + j] = cs * x + sn * y;
          h[i * n + j] = cs * y - sn * x;
        }
        for (let j = i1; j < p; j++) {
          const x = h[j * n + p];
          const y = h[j * n + i];
          h[j * n + p] = cs * x + sn * y;
          h[j * n + i] = cs * y - sn * x;
        }
      }
      if (zt) {
        const { cs, sn } = s;
        const r0 = p * n;
        const r1 = i * n;
        for (let j = 0; j < n; j++) {
          const x = zt[r0 + j];
          const y = zt[r1 + j];
          zt[r0 + j] = cs * x + sn * y;
          zt[r1 + j] = cs * y - sn * x;
        }
      }
    }
    kdefl = 0;
    i = l - 1;
  }
  if (z && zt) transposeInto(zt, n, z);
  return sweeps;
}

// Zᵀ workspace of francisQRInPlace (synchronous, not re-entrant): reused across calls because
// an n² typed-array allocation per call is a measurable share of the cost at n ≤ 20.
let sharedTranspose = new Float64Array(0);
function transposeWorkspace(size: number): Float64Array {
  if (sharedTranspose.length < size) sharedTranspose = new Float64Array(Math.max(size, 2 * sharedTranspose.length));
  return sharedTranspose;
}

/** out (first n² entries) = aᵀ for a row-major n×n `a`; `out` must not alias `a`. */
function transposeInto(a: Float64Array, n: number, out: Float64Array): Float64Array {
  for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) out[j * n + i] = a[i * n + j];
  return out;
}

/**
 * One implicit double-shift sweep (dlahqr loop 130): chase the 3×3 bulge from row m to row i.
 * Two consecutive 3-row reflectors are applied together where they act on the same data: the
 * far columns of T's rows k..k+3, T's rows above the bulge (columns k..k+3) and Zᵀ's rows
 * k..k+3 (one pass loading and storing four entries instead of two passes over three). Every
 * entry sees the same operations in the same order as with one reflector at a time, so the
 * result is bit-identical to the unfused sweep, with a third less memory traffic.
 */
function chaseBulge(h: Float64Array, n: number, m: number, l: number, i: number, i1: number, i2: number, zt: Float64Array | null, v: Float64Array): void {
  let k2 = m;
  while (k2 + 1 <= i - 2) {
    bulgePairStep(h, n, k2, m, l, i, i1, i2, zt, v);
    k2 += 2;
  }
  for (; k2 <= i - 1; k2++) bulgeStep(h, n, k2, m, l, i, i1, i2, zt, v);
}

/** Steps k and k+1 of the sweep (both with 3-row reflectors: k + 1 ≤ i − 2), fused as described above. */
function bulgePairStep(h: Float64Array, n: number, k: number, m: number, l: number, i: number, i1: number, i2: number, zt: Float64Array | null, v: Float64Array): void {
  // Reflector P1 for step k (as in bulgeStep with nr = 3).
  if (k > m) {
    v[0] = h[k * n + k - 1];
    v[1] = h[(k + 1) * n + k - 1];
    v[2] = h[(k + 2) * n + k - 1];
  }
  const tA1 = householder3(v, 3);
  if (k > m) {
    h[k * n + k - 1] = v[0];
    h[(k + 1) * n + k - 1] = 0;
    h[(k + 2) * n + k - 1] = 0;
  } else if (m > l) {
    h[k * n + k - 1] *= 1 - tA1; // see bulgeStep
  }
  const a2 = v[1], a3 = v[2];
  const tA2 = tA1 * a2, tA3 = tA1 * a3;
  const r0 = k * n, r1 = r0 + n, r2 = r1 + n, r3 = r2 + n;
  // P1 from the left on the near columns k..k+2 (the far columns follow in the fused pass).
  for (let j = k; j <= k + 2; j++) {
    const sum = h[r0 + j] + a2 * h[r1 + j] + a3 * h[r2 + j];
    h[r0 + j] -= sum * tA1;
    h[r1 + j] -= sum * tA2;
    h[r2 + j] -= sum * tA3;
  }
  // P1 from the right on columns k..k+2, rows k..k+3 (k + 3 ≤ i); rows i1..k−1 follow in the
  // fused column pass at the end (rows above k see only the two right reflectors).
  for (let j = Math.max(i1, k); j <= k + 3; j++) {
    const p = j * n + k;
    const sum = h[p] + a2 * h[p + 1] + a3 * h[p + 2];
    h[p] -= sum * tA1;
    h[p + 1] -= sum * tA2;
    h[p + 2] -= sum * tA3;
  }
  // Reflector P2 for step k+1 from column k, rows k+1..k+3.
  v[0] = h[r1 + k];
  v[1] = h[r2 + k];
  v[2] = h[r3 + k];
  const tB1 = householder3(v, 3);
  h[r1 + k] = v[0];
  h[r2 + k] = 0;
  h[r3 + k] = 0;
  const b2 = v[1], b3 = v[2];
  const tB2 = tB1 * b2, tB3 = tB1 * b3;
  // Far columns k+3..i2: P1 on rows k..k+2, then P2 on rows k+1..k+3, in one pass.
  for (let j = k + 3; j <= i2; j++) {
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
  // P2 from the left on its near columns k+1..k+2.
  for (let j = k + 1; j <= k + 2; j++) {
    const sum = h[r1 + j] + b2 * h[r2 + j] + b3 * h[r3 + j];
    h[r1 + j] -= sum * tB1;
    h[r2 + j] -= sum * tB2;
    h[r3 + j] -= sum * tB3;
  }
  // P2 from the right on columns k+1..k+3, rows k..min(k+4, i).
  const jmax = Math.min(k + 4, i);
  for (let j = Math.max(i1, k); j <= jmax; j++) {
    const p = j * n + k + 1;
    const sum = h[p] + b2 * h[p + 1] + b3 * h[p + 2];
    h[p] -= sum * tB1;
    h[p + 1] -= sum * tB2;
    h[p + 2] -= sum * tB3;
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

/** Step k2 of the sweep on its own (dlahqr loop 130 body). */
function bulgeStep(h: Float64Array, n: number, k2: number, m: number, l: number, i: number, i1: number, i2: number, zt: Float64Array | null, v: Float64Array): void {
  {
    const nr = Math.min(3, i - k2 + 1);
    if (k2 > m) {
      v[0] = h[k2 * n + k2 - 1];
      v[1] = h[(k2 + 1) * n + k2 - 1];
      v[2] = nr === 3 ? h[(k2 + 2) * n + k2 - 1] : 0;
    }
    const t1 = householder3(v, nr);
    if (k2 > m) {
      h[k2 * n + k2 - 1] = v[0];
      h[(k2 + 1) * n + k2 - 1] = 0;
      if (k2 < i - 1) h[(k2 + 2) * n + k2 - 1] = 0;
    } else if (m > l) {
      // h(k,k-1)·(1 − t1) instead of −h(k,k-1) avoids a bug when v(2), v(3) underflow (dlahqr)
      h[k2 * n + k2 - 1] *= 1 - t1;
    }
    const v2 = v[1];
    const t2 = t1 * v2;
    const r0 = k2 * n;
    const r1 = r0 + n;
    if (nr === 3) {
      const v3 = v[2];
      const t3 = t1 * v3;
      const r2 = r1 + n;
      for (let j = k2; j <= i2; j++) {
        const sum = h[r0 + j] + v2 * h[r1 + j] + v3 * h[r2 + j];
        h[r0 + j] -= sum * t1;
        h[r1 + j] -= sum * t2;
        h[r2 + j] -= sum * t3;
      }
      const jmax = Math.min(k2 + 3, i);
      for (let j = i1; j <= jmax; j++) {
        const p = j * n + k2;
        const sum = h[p] + v2 * h[p + 1] + v3 * h[p + 2];
        h[p] -= sum * t1;
        h[p + 1] -= sum * t2;
        h[p + 2] -= sum * t3;
      }
      if (zt) {
        // rows k, k+1, k+2 of Zᵀ (columns of Z)
        const r2 = r1 + n;
        for (let j = 0; j < n; j++) {
          const sum = zt[r0 + j] + v2 * zt[r1 + j] + v3 * zt[r2 + j];
          zt[r0 + j] -= sum * t1;
          zt[r1 + j] -= sum * t2;
          zt[r2 + j] -= sum * t3;
        }
      }
    } else if (nr === 2) {
      for (let j = k2; j <= i2; j++) {
        const sum = h[r0 + j] + v2 * h[r1 + j];
        h[r0 + j] -= sum * t1;
        h[r1 + j] -= sum * t2;
      }
      for (let j = i1; j <= i; j++) {
        const p = j * n + k2;
        const sum = h[p] + v2 * h[p + 1];
        h[p] -= sum * t1;
        h[p + 1] -= sum * t2;
      }
      if (zt) {
        for (let j = 0; j < n; j++) {
          const sum = zt[r0 + j] + v2 * zt[r1 + j];
          zt[r0 + j] -= sum * t1;
          zt[r1 + j] -= sum * t2;
        }
      }
    }
  }
}

/**
 * Householder reflector (I − τ u uᵀ) with u = [1, v1, v2] mapping [v0, v1, v2] (first nr entries)
 * to [β, 0, 0]; overwrites v with [β, u1, u2] and returns τ (LAPACK dlarfg, including its
 * rescaling for tiny β so that entries near the underflow threshold keep full accuracy).
 */
function householder3(v: Float64Array, nr: number): number {
  let alpha = v[0];
  let x1 = v[1];
  let x2 = nr === 3 ? v[2] : 0;
  let xnorm = norm2(x1, x2);
  if (xnorm === 0) return 0;
  let beta = -sign(norm2(alpha, xnorm), alpha);
  const safmin = SAFE_MIN / ULP;
  let knt = 0;
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

/**
 * Cheap a-posteriori check (O(n²)): with a fixed probe vector x, compares A·(Q·x) with
 * Q·(T·x) and Qᵀ·(Q·x) with x. Throws "internal" when either relative residual exceeds
 * `tolerance`; a failure means a bug, since the algorithm is backward stable.
 */
export function checkSchurProbe(a: Float64Array, t: Float64Array, q: Float64Array, n: number, tolerance: number, what: string): void {
  const work = new Float64Array(5 * n); // one allocation for the five probe vectors
  const x = work.subarray(0, n);
  for (let i = 0; i < n; i++) x[i] = 1 + ((i * 7919) % 13) / 13; // deterministic, no cancellation pattern
  const qx = matVecInto(q, x, n, work.subarray(n, 2 * n));
  const aqx = matVecInto(a, qx, n, work.subarray(2 * n, 3 * n));
  const qtx = matVecInto(q, matVecInto(t, x, n, work.subarray(3 * n, 4 * n)), n, work.subarray(4 * n, 5 * n));
  let normA = 0;
  for (let i = 0; i < n * n; i++) normA += a[i] * a[i];
  normA = Math.sqrt(normA);
  let normX = 0;
  let res = 0;
  let orth = 0;
  for (let i = 0; i < n; i++) {
    normX += x[i] * x[i];
    res += (aqx[i] - qtx[i]) ** 2;
  }
  for (let j = 0; j < n; j++) {
    let s = 0;
    for (let i = 0; i < n; i++) s += q[i * n + j] * qx[i];
    orth += (s - x[j]) ** 2;
  }
  normX = Math.sqrt(normX);
  const relRes = Math.sqrt(res) / (Math.max(normA, SAFE_MIN) * normX);
  const relOrth = Math.sqrt(orth) / normX;
  if (!(relRes <= tolerance) || !(relOrth <= tolerance)) {
    throw new EngineError("internal", `${what}: a-posteriori check failed (relative residual ${relRes}, orthogonality ${relOrth})`, {
      residual: relRes,
      orthogonality: relOrth,
      tolerance,
    });
  }
}

function matVecInto(m: Float64Array, x: Float64Array, n: number, y: Float64Array): Float64Array {
  for (let i = 0; i < n; i++) {
    let s = 0;
    const row = i * n;
    for (let j = 0; j < n; j++) s += m[row + j] * x[j];
    y[i] = s;
  }
  return y;
}

/**
 * Computes: the real Schur decomposition A = Q T Qᵀ (A, T, Q: n×n) with Q orthogonal and T
 * upper quasi-triangular. 2×2 diagonal blocks hold complex conjugate pairs in standard form
 * (equal diagonal entries, off-diagonal entries of opposite sign); real eigenvalues sit in 1×1
 * blocks. `eigenvalues` follow the diagonal of T, each conjugate pair adjacent with the
 * positive imaginary part first.
 *
 * Requires: A square, non-empty, finite. No balancing is applied, so the identity holds for A
 * itself (use `eigenvalues` for balanced eigenvalue computation).
 *
 * Method: Householder reduction to Hessenberg form (Golub & Van Loan, 4th ed., Alg. 7.4.2),
 * then Francis implicit double-shift QR (J. G. F. Francis, "The QR transformation", Computer
 * J. 4, 1961–62) with the deflation criterion of Ahues & Tisseur (LAPACK Working Note 122,
 * 1997), exceptional shifts every 10 sweeps, and 2×2 blocks standardised as in Bai & Demmel,
 * Linear Algebra Appl. 186 (1993).
 *
 * Cost: about 25·n³ flops with Q (10/3·n³ Hessenberg, the rest QR sweeps, typically 2–4 per
 * eigenvalue); O(n²) memory. Iteration limit: `maxIterations` sweeps in total (default
 * 30·max(10, n)).
 *
 * Accuracy: backward stable, ‖A − QTQᵀ‖_F/‖A‖_F and ‖QᵀQ − I‖_F of order n·ε (tests require
 * ≤ 100·n·ε). Before returning, T and Q are checked finite and a probe-vector residual
 * ‖A Q x − Q T x‖/(‖A‖_F‖x‖) ≤ 1000·n·ε is verified.
 *
 * Errors: "empty", "shape-mismatch", "non-finite" (bad input); "invalid-argument" (bad
 * maxIterations); "no-convergence" when the sweep limit is reached (details.iterations);
 * "internal" if the a-posteriori check fails.
 *
 * Example:
 *   const A = new Matrix([[0, 1], [-2, -3]]);
 *   const { T, Q, eigenvalues } = realSchur(A); // eigenvalues −1, −2 (in some order)
 *   // ‖A − Q·T·Qᵀ‖_F / ‖A‖_F < 1e-15
 */
export function realSchur(A: Matrix, options: { maxIterations?: number } = {}): RealSchurForm {
  requireSquareFinite(A, "A");
  const n = A.rows;
  const maxIterations = options.maxIterations ?? defaultSchurIterationLimit(n);
  if (!Number.isInteger(maxIterations) || maxIterations < 0) {
    throw new EngineError("invalid-argument", `maxIterations must be a non-negative integer (got ${maxIterations})`, {
      argument: "maxIterations",
      value: maxIterations,
    });
  }
  const { t, q, iterations } = realSchurRowMajor(rowMajorOf(A), n, maxIterations);
  return { T: matrixOfRowMajor(t, n, n), Q: matrixOfRowMajor(q, n, n), eigenvalues: eigenvaluesOfQuasiTriangular(t, n), iterations };
}

/**
 * Kernel behind `realSchur` for callers that already hold a validated row-major copy `a`
 * (n×n, finite; not modified) and want T and Q row-major, skipping the Matrix round trips:
 * the same Hessenberg + Francis QR steps, zeroing below the quasi-triangle, finiteness check
 * and probe check (1000·n·ε) as `realSchur`. Throws the same errors.
 */
export function realSchurRowMajor(a: Float64Array, n: number, maxIterations: number): { t: Float64Array; q: Float64Array; iterations: number } {
  const t = a.slice();
  const q = new Float64Array(n * n); // reduceToHessenbergInPlace overwrites q with Q
  reduceToHessenbergInPlace(t, n, 0, n - 1, q);
  const wr = new Float64Array(n);
  const wi = new Float64Array(n);
  const iterations = francisQRInPlace(t, n, 0, n - 1, true, q, wr, wi, maxIterations);
  // exact zeros below the quasi-triangle (the sweeps leave them zero; make it a guarantee)
  for (let i = 2; i < n; i++) for (let j = 0; j < i - 1; j++) t[i * n + j] = 0;
  for (let i = 0; i < n * n; i++) {
    if (!Number.isFinite(t[i]) || !Number.isFinite(q[i])) {
      throw new EngineError("non-finite", "Schur decomposition of A overflowed (entries of A too large)", { argument: "A" });
    }
  }
  checkSchurProbe(a, t, q, n, 1000 * n * ULP, "realSchur");
  return { t, q, iterations };
}
