/**
 * The Francis double-shift QR iteration on a Hessenberg matrix (LAPACK dlahqr): deflation,
 * shifts, bulge start, and the standardisation of converged 2×2 blocks; the sweeps themselves
 * are in schurSweep.ts.
 */
import { EngineError } from "../errors";
import { standardizeBlock2x2 } from "./schurBlocks";
import { chaseBulge } from "./schurSweep";

const ULP = Number.EPSILON; // LAPACK dlamch('P') = 2^-52
const SAFE_MIN = 2.2250738585072014e-308; // dlamch('S'): smallest normal number
const EXCEPTIONAL_SHIFT_PERIOD = 10; // LAPACK dlahqr KEXSH
const EXCEPTIONAL_SHIFT_DAT1 = 0.75;
const EXCEPTIONAL_SHIFT_DAT2 = -0.4375;

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
 * 10 sweeps without deflation. This entry point transposes `z` into a workspace, runs
 * `francisQRTransposedInPlace` and transposes back.
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
  if (!z || ilo >= ihi) return francisQRTransposedInPlace(h, n, ilo, ihi, wantT, null, wr, wi, maxIterations);
  // Z is updated through its transpose: a reflector then touches three contiguous rows
  // instead of three entries in each of n rows (row-major), which is much kinder to the cache.
  const zt = transposeInto(z, n, transposeWorkspace(n * n));
  const sweeps = francisQRTransposedInPlace(h, n, ilo, ihi, wantT, zt, wr, wi, maxIterations);
  transposeInto(zt, n, z);
  return sweeps;
}

/**
 * Kernel: as `francisQRInPlace`, with the accumulated transformation held transposed: when
 * `zt` is given (row-major n×n, holding Zᵀ₀) it is overwritten by (Z₀·Z)ᵀ, so a reflector
 * acting on columns k..k+2 of Z updates three contiguous rows of `zt`. The Hessenberg
 * reduction produces Qᵀ in this form (`reduceToHessenbergTransposedInPlace`), so the Schur
 * pipeline never transposes in between.
 */
export function francisQRTransposedInPlace(
  h: Float64Array,
  n: number,
  ilo: number,
  ihi: number,
  wantT: boolean,
  zt: Float64Array | null,
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
  let i1 = 0;
  let i2 = n - 1;
  let sweeps = 0;
  let kdefl = 0;
  const v = new Float64Array(4); // reflector [β, u1, u2, τ] handed from step to step
  let i = ihi;
  while (i >= ilo) {
    let l = ilo;
    for (;;) {
      // look for a single small subdiagonal element (Ahues & Tisseur test)
      let k = i;
      // (p runs along the diagonal, hkk carries |h(k,k)| from one k to the next)
      let p = k * n + k;
      let hkk = Math.abs(h[p]);
      for (; k > l; k--, p -= n + 1) {
        const hkk1 = Math.abs(h[p - 1]);
        if (hkk1 <= smlnum) break;
        const hk1k1 = Math.abs(h[p - n - 1]);
        let tst = hk1k1 + hkk;
        hkk = hk1k1;
        if (tst === 0) {
          if (k - 2 >= ilo) tst += Math.abs(h[(k - 1) * n + k - 2]);
          if (k + 1 <= ihi) tst += Math.abs(h[(k + 1) * n + k]);
        }
        if (hkk1 <= ULP * tst) {
          const hk1k = Math.abs(h[(k - 1) * n + k]);
          const ab = Math.max(hkk1, hk1k);
          const ba = Math.min(hkk1, hk1k);
          const dkk = Math.abs(h[p]);
          const diff = Math.abs(h[p - n - 1] - h[p]);
          const aa = Math.max(dkk, diff);
          const bb = Math.min(dkk, diff);
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
      // look for two consecutive small subdiagonal elements (start of the bulge). The test
      // compares |h(m,m−1)|·(|v1|+|v2|) with ε·|v0|·(…) for v normalised by the sum of its
      // magnitudes, as dlahqr does (one reciprocal per candidate); the scaling by 1/s inside
      // protects the products against over/underflow.
      let m = i - 2;
      let v0 = 0, v1 = 0, v2 = 0;
      for (; m >= l; m--) {
        const mm = m * n + m;
        const hmm = h[mm];
        const h21 = h[mm + n];
        const rs = 1 / (Math.abs(hmm - rt2r) + Math.abs(rt2i) + Math.abs(h21));
        const h21s = h21 * rs;
        const h22 = h[mm + n + 1];
        v0 = h21s * h[mm + 1] + (hmm - rt1r) * ((hmm - rt2r) * rs) - rt1i * (rt2i * rs);
        v1 = h21s * (hmm + h22 - rt1r - rt2r);
        v2 = h21s * h[mm + 2 * n + 1];
        if (m === l) break;
        // v is O(‖H‖): normalise it here too, or both sides overflow for entries beyond ~1e154
        // and Inf ≤ Inf would start the bulge at the wrong row (a silent wrong similarity).
        const rvm = 1 / (Math.abs(v0) + Math.abs(v1) + Math.abs(v2));
        const h00 = Math.abs(h[mm - 1]) * ((Math.abs(v1) + Math.abs(v2)) * rvm);
        const h01 = Math.abs(v0) * rvm * (Math.abs(h[mm - n - 1]) + Math.abs(hmm) + Math.abs(h22));
        if (h00 <= ULP * h01) break;
      }
      const rv = 1 / (Math.abs(v0) + Math.abs(v1) + Math.abs(v2));
      v[0] = v0 * rv;
      v[1] = v1 * rv;
      v[2] = v2 * rv;
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
  return sweeps;
}

// Zᵀ workspace of francisQRInPlace (synchronous, not re-entrant): reused across calls because
// an n² typed-array allocation per call is a measurable share of the cost at n ≤ 20.
let sharedTranspose = new Float64Array(0);
export function transposeWorkspace(size: number): Float64Array {
  if (sharedTranspose.length < size) sharedTranspose = new Float64Array(Math.max(size, 2 * sharedTranspose.length));
  return sharedTranspose;
}

/** out (first n² entries) = aᵀ for a row-major n×n `a`; `out` must not alias `a`. */
export function transposeInto(a: Float64Array, n: number, out: Float64Array): Float64Array {
  for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) out[j * n + i] = a[i * n + j];
  return out;
}
