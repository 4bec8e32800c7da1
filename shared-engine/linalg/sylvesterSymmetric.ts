/**
 * The quasi-triangular kernel of the continuous Lyapunov equation with a symmetric right-hand
 * side, S Y + Y Sᵀ = C, which solves for one triangle of the symmetric Y only.
 */
import { blockPairGap, blockSpectrumInto, clearlySeparated, pairSeparation, solveByCompletePivoting, throwSingular, type SingularLabels } from "./sylvesterBlocks";

// Scratch (the kernel is synchronous and not re-entrant): block starts and the ≤ 4×4 systems.
let blockStart = new Int32Array(0);
let spectrumRe = new Float64Array(0);
let spectrumIm = new Float64Array(0);
const kronecker = new Float64Array(16);
const rhs = new Float64Array(4);

/**
 * Kernel: solves S Y + Y Sᵀ = C for the symmetric n×n Y, in place in `y` (row-major n×n),
 * with S upper quasi-triangular (a real Schur form: 1×1 and 2×2 diagonal blocks). On entry the
 * upper triangle of `y` (i ≤ j) holds C (symmetric; the lower triangle is ignored); on return
 * `y` holds Y in full (both triangles, exactly symmetric). Throws "singular" when a block
 * pair's eigenvalue separation min |λ + μ| (`blockPairGap`; 2|a| for a diagonal pair a ± iω) is
 * ≤ `threshold` or its small system has a zero pivot, naming the eigenvalues and the gap.
 *
 * Method: the Bartels–Stewart block back substitution (R. H. Bartels & G. W. Stewart, Comm.
 * ACM 15(9), 1972) specialised to B = Sᵀ and symmetric C, so that only the blocks Y_IJ with
 * I ≤ J are solved, the others being their transposes. For column block J, from the last to
 * the first, and row block I from J up to the first:
 *   S_II Y_IJ + Y_IJ S_JJᵀ = C_IJ − Σ_{K>J} Y_IK S_JKᵀ − Σ_{K>I} S_IK Y_KJ,
 * where every Y_KJ or Y_IK on the right is either solved earlier in column J or, by symmetry,
 * the transpose of a block of an earlier column. Rows of Y are contiguous in row-major storage
 * and Y = Yᵀ, so every sum above is a dot product of two contiguous rows. The small systems
 * are solved with locals (1×1; 2×2 with complete pivoting) or by complete pivoting on the
 * Kronecker form (the 4×4 of two complex pairs, and the 3×3 symmetric system of a diagonal
 * complex pair), as LAPACK dlasy2 does.
 *
 * Cost: about n³ flops (half of the general kernel's 2n³). Memory: O(n) scratch.
 */
export function solveSymmetricLyapunovTriangularInPlace(s: Float64Array, n: number, y: Float64Array, threshold: number, labels: SingularLabels): void {
  if (blockStart.length < n + 1) blockStart = new Int32Array(n + 1);
  let nb = 0;
  for (let i = 0; i < n; ) {
    blockStart[nb++] = i;
    i += i + 1 < n && s[(i + 1) * n + i] !== 0 ? 2 : 1;
  }
  blockStart[nb] = n;
  if (spectrumRe.length < n) {
    spectrumRe = new Float64Array(n);
    spectrumIm = new Float64Array(n);
  }
  const re = spectrumRe, im = spectrumIm;
  blockSpectrumInto(s, n, re, im);
  const fastTest = threshold >= 1e-140;
  for (let jb = nb - 1; jb >= 0; jb--) {
    const j0 = blockStart[jb];
    const jEnd = blockStart[jb + 1] - 1;
    const q = jEnd - j0 + 1;
    // Move the solved columns K > J to the right-hand side, for rows i ≤ j of each column j
    // of the block: y[i][j] −= Σ_{k>jEnd} (Y[i][k]·S[j][k] + S[i][k]·Y[j][k]).
    if (jEnd + 1 < n) {
      for (let j = j0; j <= jEnd; j++) subtractTrailingProducts(s, y, n, j, jEnd + 1);
    }
    // Back substitution over the row blocks I = J, J−1, …, 0. The right-hand side of block
    // (I, J) is rhs[a·q + c] = C[i][j] − Σ_{iEnd<k≤jEnd} S[i][k]·Y[j][k]   (Y[k][j] = Y[j][k]).
    for (let ib = jb; ib >= 0; ib--) {
      const i0 = blockStart[ib];
      const iEnd = blockStart[ib + 1] - 1;
      const p = iEnd - i0 + 1;
      if (p === 1 && q === 1) {
        // both eigenvalues real (the common case): scalar code, no small system
        const si = i0 * n, yj = j0 * n;
        let v = y[si + j0];
        for (let k = i0 + 1; k <= j0; k++) v -= s[si + k] * y[yj + k];
        const d = s[si + i0] + s[yj + j0];
        if (!(Math.abs(d) > threshold)) throwSingular("sylvester", s, n, i0, 1, s, n, j0, 1, threshold, labels);
        v /= d;
        y[si + j0] = v;
        y[yj + i0] = v;
        continue;
      }
      if (ib < jb) {
        // off-diagonal block: the (up to) four sums in one pass, four independent chains (a
        // 1-row or 1-column block repeats its row, and the duplicate sums are dropped)
        const s0 = i0 * n, s1 = iEnd * n, y0 = j0 * n, y1 = jEnd * n;
        let v00 = y[s0 + j0], v01 = y[s0 + jEnd], v10 = y[s1 + j0], v11 = y[s1 + jEnd];
        for (let k = iEnd + 1; k <= jEnd; k++) {
          const a0 = s[s0 + k], a1 = s[s1 + k], b0 = y[y0 + k], b1 = y[y1 + k];
          v00 -= a0 * b0;
          v01 -= a0 * b1;
          v10 -= a1 * b0;
          v11 -= a1 * b1;
        }
        rhs[0] = v00;
        if (q === 2) {
          rhs[1] = v01;
          if (p === 2) {
            rhs[2] = v10;
            rhs[3] = v11;
          }
        } else {
          rhs[1] = v10;
        }
      } else {
        // the diagonal block (2×2 here): its upper triangle, nothing below it to subtract
        rhs[0] = y[i0 * n + i0];
        rhs[1] = y[i0 * n + i0 + 1];
        rhs[3] = y[(i0 + 1) * n + i0 + 1];
      }
      // The test compares the separation of the pair's eigenvalues, the number the error
      // reports (|λ + μ|; a diagonal complex pair a ± iω gives 2|a|), not a pivot.
      const si = im[i0], sj = im[j0];
      if (!(fastTest && si >= 0 && sj >= 0 && clearlySeparated("sylvester", re[i0], si, re[j0], sj, threshold))) {
        const gap = si >= 0 && sj >= 0 ? pairSeparation("sylvester", re[i0], si, re[j0], sj) : blockPairGap("sylvester", s, n, i0, p, s, n, j0, q);
        if (!(gap > threshold)) throwSingular("sylvester", s, n, i0, p, s, n, j0, q, threshold, labels);
      }
      const solved = ib === jb ? solveDiagonalBlock(s, n, i0, p) : solveOffDiagonalBlock(s, n, i0, p, j0, q);
      if (!solved) throwSingular("sylvester", s, n, i0, p, s, n, j0, q, threshold, labels, true);
      if (ib === jb) {
        const d = i0 * n + i0;
        y[d] = rhs[0];
        y[d + 1] = rhs[1];
        y[d + n] = rhs[1];
        y[d + n + 1] = rhs[3];
      } else {
        for (let a = 0; a < p; a++) {
          for (let c = 0; c < q; c++) {
            const i = i0 + a, j = j0 + c;
            const z = rhs[a * q + c];
            y[i * n + j] = z;
            y[j * n + i] = z;
          }
        }
      }
    }
  }
}

/**
 * y[i][j] −= Σ_{k ≥ k0} (y[i][k]·s[j][k] + s[i][k]·y[j][k]) for the rows i = 0..j of column j,
 * four rows per pass (four independent sums sharing the loads of row j).
 */
function subtractTrailingProducts(s: Float64Array, y: Float64Array, n: number, j: number, k0: number): void {
  const rj = j * n;
  let i = 0;
  for (; i + 3 <= j; i += 4) {
    const p0 = i * n, p1 = p0 + n, p2 = p1 + n, p3 = p2 + n;
    let a0 = 0, a1 = 0, a2 = 0, a3 = 0;
    for (let k = k0; k < n; k++) {
      const sjk = s[rj + k], yjk = y[rj + k];
      a0 += y[p0 + k] * sjk + s[p0 + k] * yjk;
      a1 += y[p1 + k] * sjk + s[p1 + k] * yjk;
      a2 += y[p2 + k] * sjk + s[p2 + k] * yjk;
      a3 += y[p3 + k] * sjk + s[p3 + k] * yjk;
    }
    y[p0 + j] -= a0;
    y[p1 + j] -= a1;
    y[p2 + j] -= a2;
    y[p3 + j] -= a3;
  }
  if (i + 1 <= j) {
    const p0 = i * n, p1 = p0 + n;
    let a0 = 0, a1 = 0;
    for (let k = k0; k < n; k++) {
      const sjk = s[rj + k], yjk = y[rj + k];
      a0 += y[p0 + k] * sjk + s[p0 + k] * yjk;
      a1 += y[p1 + k] * sjk + s[p1 + k] * yjk;
    }
    y[p0 + j] -= a0;
    y[p1 + j] -= a1;
    i += 2;
  }
  if (i <= j) {
    const p0 = i * n;
    let a0 = 0;
    for (let k = k0; k < n; k++) a0 += y[p0 + k] * s[rj + k] + s[p0 + k] * y[rj + k];
    y[p0 + j] -= a0;
  }
}

/**
 * Off-diagonal block (I < J): S_II Z + Z S_JJᵀ = R for the p×q block Z (row-major in `rhs`).
 * The caller has tested the pair's separation; false only for a zero pivot (not solved).
 */
function solveOffDiagonalBlock(s: Float64Array, n: number, i0: number, p: number, j0: number, q: number): boolean {
  const ii = i0 * n + i0, jj = j0 * n + j0;
  if (p === 1 && q === 1) {
    rhs[0] /= s[ii] + s[jj];
    return true;
  }
  if (q === 1) {
    // (S_II + t·I) z = r
    const t = s[jj];
    return solve2x2(s[ii] + t, s[ii + 1], s[ii + n], s[ii + n + 1] + t) > 0;
  }
  if (p === 1) {
    // z·(s·I + S_JJᵀ) = r, i.e. (s·I + S_JJ) zᵀ = rᵀ
    const t = s[ii];
    return solve2x2(s[jj] + t, s[jj + 1], s[jj + n], s[jj + n + 1] + t) > 0;
  }
  // 4×4 Kronecker form, unknowns ordered (a, c) ↦ 2a + c:
  // M[(a,c),(a',c')] = S_II[a][a']·δ(c,c') + δ(a,a')·S_JJ[c][c']
  const a00 = s[ii], a01 = s[ii + 1], a10 = s[ii + n], a11 = s[ii + n + 1];
  const b00 = s[jj], b01 = s[jj + 1], b10 = s[jj + n], b11 = s[jj + n + 1];
  const M = kronecker;
  M[0] = a00 + b00; M[1] = b01; M[2] = a01; M[3] = 0;
  M[4] = b10; M[5] = a00 + b11; M[6] = 0; M[7] = a01;
  M[8] = a10; M[9] = 0; M[10] = a11 + b00; M[11] = b01;
  M[12] = 0; M[13] = a10; M[14] = b10; M[15] = a11 + b11;
  return solveByCompletePivoting(M, 4, rhs, 0) > 0;
}

/**
 * Diagonal block (I = J): S_II Y_II + Y_II S_IIᵀ = R with Y_II symmetric. 1×1: 2s·y = r.
 * 2×2 with S_II = [a b; c d] and unknowns (y00, y01, y11) from rhs[0], rhs[1], rhs[3]:
 *   [2a 2b 0; c a+d b; 0 2c 2d]·(y00, y01, y11) = (r00, r01, r11),
 * whose eigenvalues 2λ₁, λ₁+λ₂, 2λ₂ are those of the full Kronecker form (λ₁+λ₂ twice there).
 * The solution (y00, y01, y11) is left in rhs[0], rhs[1], rhs[3]. The caller has tested the
 * separation; false only for a zero pivot (not solved).
 */
function solveDiagonalBlock(s: Float64Array, n: number, i0: number, p: number): boolean {
  const ii = i0 * n + i0;
  if (p === 1) {
    rhs[0] /= 2 * s[ii];
    return true;
  }
  const a = s[ii], b = s[ii + 1], c = s[ii + n], d = s[ii + n + 1];
  const M = kronecker;
  M[0] = 2 * a; M[1] = 2 * b; M[2] = 0;
  M[3] = c; M[4] = a + d; M[5] = b;
  M[6] = 0; M[7] = 2 * c; M[8] = 2 * d;
  const r11 = rhs[3];
  rhs[2] = r11; // the 3-vector (r00, r01, r11) in rhs[0..2]
  const solved = solveByCompletePivoting(M, 3, rhs, 0) > 0;
  rhs[3] = rhs[2];
  return solved;
}

/**
 * 2×2 system [m00 m01; m10 m11]·z = (rhs[0], rhs[1]) by Gaussian elimination with complete
 * pivoting, in locals; the solution replaces rhs[0..1]. Returns the smaller pivot magnitude
 * (0: stopped at a zero pivot, not solved).
 */
function solve2x2(m00: number, m01: number, m10: number, m11: number): number {
  let r0 = rhs[0], r1 = rhs[1];
  const x00 = Math.abs(m00), x01 = Math.abs(m01), x10 = Math.abs(m10), x11 = Math.abs(m11);
  const big = Math.max(x00, x01, x10, x11);
  let swapColumns = false;
  if (big === x10 || big === x11) {
    // largest entry in row 1: swap the rows
    let t = m00; m00 = m10; m10 = t;
    t = m01; m01 = m11; m11 = t;
    t = r0; r0 = r1; r1 = t;
  }
  if (Math.abs(m01) > Math.abs(m00)) {
    // largest entry in column 1: swap the columns (and the unknowns)
    let t = m00; m00 = m01; m01 = t;
    t = m10; m10 = m11; m11 = t;
    swapColumns = true;
  }
  const pivot1 = Math.abs(m00);
  if (!(pivot1 > 0)) return 0;
  const l = m10 / m00;
  const u11 = m11 - l * m01;
  const pivot2 = Math.abs(u11);
  if (!(pivot2 > 0)) return 0;
  const z1 = (r1 - l * r0) / u11;
  const z0 = (r0 - m01 * z1) / m00;
  rhs[0] = swapColumns ? z1 : z0;
  rhs[1] = swapColumns ? z0 : z1;
  return Math.min(pivot1, pivot2);
}

/**
 * out[i][j] = Σ_k a[i][k]·b[k][j] for j ≥ i (at least: the 2×4 tiles that touch the upper
 * triangle are computed whole), all row-major n×n; `out` must not alias `a` or `b`. The upper
 * triangle of a product known to be symmetric, at half the cost of the full product, with the
 * 2×4 register tile of denseKernels' multiplyInto.
 */
export function multiplyUpperInto(a: Float64Array, b: Float64Array, n: number, out: Float64Array): void {
  const n4 = n - (n % 4);
  let i = 0;
  for (; i + 1 < n; i += 2) {
    const i0 = i * n, i1 = i0 + n;
    let j = i - (i % 4);
    for (; j < n4; j += 4) {
      let c00 = 0, c01 = 0, c02 = 0, c03 = 0, c10 = 0, c11 = 0, c12 = 0, c13 = 0;
      for (let k = 0, kb = j; k < n; k++, kb += n) {
        const a0 = a[i0 + k], a1 = a[i1 + k];
        const b0 = b[kb], b1 = b[kb + 1], b2 = b[kb + 2], b3 = b[kb + 3];
        c00 += a0 * b0; c01 += a0 * b1; c02 += a0 * b2; c03 += a0 * b3;
        c10 += a1 * b0; c11 += a1 * b1; c12 += a1 * b2; c13 += a1 * b3;
      }
      out[i0 + j] = c00; out[i0 + j + 1] = c01; out[i0 + j + 2] = c02; out[i0 + j + 3] = c03;
      out[i1 + j] = c10; out[i1 + j + 1] = c11; out[i1 + j + 2] = c12; out[i1 + j + 3] = c13;
    }
    for (j = Math.max(j, i); j < n; j++) {
      let c0 = 0, c1 = 0;
      for (let k = 0, kb = j; k < n; k++, kb += n) {
        const bk = b[kb];
        c0 += a[i0 + k] * bk;
        c1 += a[i1 + k] * bk;
      }
      out[i0 + j] = c0;
      out[i1 + j] = c1;
    }
  }
  if (i < n) {
    const i0 = i * n;
    for (let j = i; j < n; j++) {
      let c0 = 0;
      for (let k = 0, kb = j; k < n; k++, kb += n) c0 += a[i0 + k] * b[kb];
      out[i0 + j] = c0;
    }
  }
}
