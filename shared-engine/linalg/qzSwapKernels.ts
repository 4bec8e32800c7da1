/**
 * Fixed-size kernels of the block swaps in qzSwap.ts: products of the (at most 4×4) swap
 * windows, written out per size (at these sizes loop overhead, not arithmetic, is the cost),
 * and the application of a swap's m×m factors to rows and columns of the whole pencil.
 * Internal to linalg/: nothing here validates input.
 */

// Products of the strong test (at most 4×4), module-level so no swap allocates.
const prodA = new Float64Array(16), prodB = new Float64Array(16);

/**
 * outA = Uᵀ·A·V and outB = Uᵀ·B·V for m×m row-major windows (m = 2, 3, 4); `ta`, `tb` are
 * scratch. The products are written out per size (mulTN3 … mulNT4): at these sizes loop
 * overhead, not arithmetic, is the cost. The windows' lower-left block is exactly zero, so its
 * terms add exact zeros.
 */
export function similarityPair(
  U: Float64Array, A: Float64Array, B: Float64Array, V: Float64Array, m: number,
  outA: Float64Array, outB: Float64Array, ta: Float64Array, tb: Float64Array,
): void {
  if (m === 4) {
    mulTN4(U, A, ta); mulTN4(U, B, tb); mulNN4(ta, V, outA); mulNN4(tb, V, outB);
  } else if (m === 3) {
    mulTN3(U, A, ta); mulTN3(U, B, tb); mulNN3(ta, V, outA); mulNN3(tb, V, outB);
  } else {
    smallProduct(U, A, ta, m, true, false); smallProduct(U, B, tb, m, true, false);
    smallProduct(ta, V, outA, m, false, false); smallProduct(tb, V, outB, m, false, false);
  }
}

/**
 * The residuals of the strong stability test for both matrices: dA = U·MA·Vᵀ − A0 and
 * dB = U·MB·Vᵀ − B0 (m×m row-major, m = 2, 3, 4).
 */
export function reconstructionPair(
  U: Float64Array, MA: Float64Array, MB: Float64Array, V: Float64Array, A0: Float64Array, B0: Float64Array,
  m: number, dA: Float64Array, dB: Float64Array,
): void {
  const pa = prodA, pb = prodB;
  if (m === 4) {
    mulNN4(U, MA, pa); mulNN4(U, MB, pb); mulNT4(pa, V, dA); mulNT4(pb, V, dB);
  } else if (m === 3) {
    mulNN3(U, MA, pa); mulNN3(U, MB, pb); mulNT3(pa, V, dA); mulNT3(pb, V, dB);
  } else {
    smallProduct(U, MA, pa, m, false, false); smallProduct(U, MB, pb, m, false, false);
    smallProduct(pa, V, dA, m, false, true); smallProduct(pb, V, dB, m, false, true);
  }
  for (let k = 0; k < m * m; k++) {
    dA[k] -= A0[k];
    dB[k] -= B0[k];
  }
}

/** out = op(X)·op(Y) for m×m row-major X, Y (op = transpose when the flag is set). */
function smallProduct(X: Float64Array, Y: Float64Array, out: Float64Array, m: number, transX: boolean, transY: boolean): void {
  for (let i = 0; i < m; i++) for (let j = 0; j < m; j++) {
    let s = 0;
    for (let k = 0; k < m; k++) s += (transX ? X[k * m + i] : X[i * m + k]) * (transY ? Y[j * m + k] : Y[k * m + j]);
    out[i * m + j] = s;
  }
}

/* Written-out m×m products (m = 3, 4): TN out = Xᵀ·Y, NN out = X·Y, NT out = X·Yᵀ. */
function mulTN3(X: Float64Array, Y: Float64Array, out: Float64Array): void {
  const x00 = X[0], x01 = X[1], x02 = X[2], x10 = X[3], x11 = X[4], x12 = X[5], x20 = X[6], x21 = X[7], x22 = X[8];
  const y00 = Y[0], y01 = Y[1], y02 = Y[2], y10 = Y[3], y11 = Y[4], y12 = Y[5], y20 = Y[6], y21 = Y[7], y22 = Y[8];
  out[0] = x00 * y00 + x10 * y10 + x20 * y20;
  out[1] = x00 * y01 + x10 * y11 + x20 * y21;
  out[2] = x00 * y02 + x10 * y12 + x20 * y22;
  out[3] = x01 * y00 + x11 * y10 + x21 * y20;
  out[4] = x01 * y01 + x11 * y11 + x21 * y21;
  out[5] = x01 * y02 + x11 * y12 + x21 * y22;
  out[6] = x02 * y00 + x12 * y10 + x22 * y20;
  out[7] = x02 * y01 + x12 * y11 + x22 * y21;
  out[8] = x02 * y02 + x12 * y12 + x22 * y22;
}

function mulNN3(X: Float64Array, Y: Float64Array, out: Float64Array): void {
  const x00 = X[0], x01 = X[1], x02 = X[2], x10 = X[3], x11 = X[4], x12 = X[5], x20 = X[6], x21 = X[7], x22 = X[8];
  const y00 = Y[0], y01 = Y[1], y02 = Y[2], y10 = Y[3], y11 = Y[4], y12 = Y[5], y20 = Y[6], y21 = Y[7], y22 = Y[8];
  out[0] = x00 * y00 + x01 * y10 + x02 * y20;
  out[1] = x00 * y01 + x01 * y11 + x02 * y21;
  out[2] = x00 * y02 + x01 * y12 + x02 * y22;
  out[3] = x10 * y00 + x11 * y10 + x12 * y20;
  out[4] = x10 * y01 + x11 * y11 + x12 * y21;
  out[5] = x10 * y02 + x11 * y12 + x12 * y22;
  out[6] = x20 * y00 + x21 * y10 + x22 * y20;
  out[7] = x20 * y01 + x21 * y11 + x22 * y21;
  out[8] = x20 * y02 + x21 * y12 + x22 * y22;
}

function mulNT3(X: Float64Array, Y: Float64Array, out: Float64Array): void {
  const x00 = X[0], x01 = X[1], x02 = X[2], x10 = X[3], x11 = X[4], x12 = X[5], x20 = X[6], x21 = X[7], x22 = X[8];
  const y00 = Y[0], y01 = Y[1], y02 = Y[2], y10 = Y[3], y11 = Y[4], y12 = Y[5], y20 = Y[6], y21 = Y[7], y22 = Y[8];
  out[0] = x00 * y00 + x01 * y01 + x02 * y02;
  out[1] = x00 * y10 + x01 * y11 + x02 * y12;
  out[2] = x00 * y20 + x01 * y21 + x02 * y22;
  out[3] = x10 * y00 + x11 * y01 + x12 * y02;
  out[4] = x10 * y10 + x11 * y11 + x12 * y12;
  out[5] = x10 * y20 + x11 * y21 + x12 * y22;
  out[6] = x20 * y00 + x21 * y01 + x22 * y02;
  out[7] = x20 * y10 + x21 * y11 + x22 * y12;
  out[8] = x20 * y20 + x21 * y21 + x22 * y22;
}

function mulTN4(X: Float64Array, Y: Float64Array, out: Float64Array): void {
  const x00 = X[0], x01 = X[1], x02 = X[2], x03 = X[3], x10 = X[4], x11 = X[5], x12 = X[6], x13 = X[7], x20 = X[8], x21 = X[9], x22 = X[10], x23 = X[11], x30 = X[12], x31 = X[13], x32 = X[14], x33 = X[15];
  const y00 = Y[0], y01 = Y[1], y02 = Y[2], y03 = Y[3], y10 = Y[4], y11 = Y[5], y12 = Y[6], y13 = Y[7], y20 = Y[8], y21 = Y[9], y22 = Y[10], y23 = Y[11], y30 = Y[12], y31 = Y[13], y32 = Y[14], y33 = Y[15];
  out[0] = x00 * y00 + x10 * y10 + x20 * y20 + x30 * y30;
  out[1] = x00 * y01 + x10 * y11 + x20 * y21 + x30 * y31;
  out[2] = x00 * y02 + x10 * y12 + x20 * y22 + x30 * y32;
  out[3] = x00 * y03 + x10 * y13 + x20 * y23 + x30 * y33;
  out[4] = x01 * y00 + x11 * y10 + x21 * y20 + x31 * y30;
  out[5] = x01 * y01 + x11 * y11 + x21 * y21 + x31 * y31;
  out[6] = x01 * y02 + x11 * y12 + x21 * y22 + x31 * y32;
  out[7] = x01 * y03 + x11 * y13 + x21 * y23 + x31 * y33;
  out[8] = x02 * y00 + x12 * y10 + x22 * y20 + x32 * y30;
  out[9] = x02 * y01 + x12 * y11 + x22 * y21 + x32 * y31;
  out[10] = x02 * y02 + x12 * y12 + x22 * y22 + x32 * y32;
  out[11] = x02 * y03 + x12 * y13 + x22 * y23 + x32 * y33;
  out[12] = x03 * y00 + x13 * y10 + x23 * y20 + x33 * y30;
  out[13] = x03 * y01 + x13 * y11 + x23 * y21 + x33 * y31;
  out[14] = x03 * y02 + x13 * y12 + x23 * y22 + x33 * y32;
  out[15] = x03 * y03 + x13 * y13 + x23 * y23 + x33 * y33;
}

function mulNN4(X: Float64Array, Y: Float64Array, out: Float64Array): void {
  const x00 = X[0], x01 = X[1], x02 = X[2], x03 = X[3], x10 = X[4], x11 = X[5], x12 = X[6], x13 = X[7], x20 = X[8], x21 = X[9], x22 = X[10], x23 = X[11], x30 = X[12], x31 = X[13], x32 = X[14], x33 = X[15];
  const y00 = Y[0], y01 = Y[1], y02 = Y[2], y03 = Y[3], y10 = Y[4], y11 = Y[5], y12 = Y[6], y13 = Y[7], y20 = Y[8], y21 = Y[9], y22 = Y[10], y23 = Y[11], y30 = Y[12], y31 = Y[13], y32 = Y[14], y33 = Y[15];
  out[0] = x00 * y00 + x01 * y10 + x02 * y20 + x03 * y30;
  out[1] = x00 * y01 + x01 * y11 + x02 * y21 + x03 * y31;
  out[2] = x00 * y02 + x01 * y12 + x02 * y22 + x03 * y32;
  out[3] = x00 * y03 + x01 * y13 + x02 * y23 + x03 * y33;
  out[4] = x10 * y00 + x11 * y10 + x12 * y20 + x13 * y30;
  out[5] = x10 * y01 + x11 * y11 + x12 * y21 + x13 * y31;
  out[6] = x10 * y02 + x11 * y12 + x12 * y22 + x13 * y32;
  out[7] = x10 * y03 + x11 * y13 + x12 * y23 + x13 * y33;
  out[8] = x20 * y00 + x21 * y10 + x22 * y20 + x23 * y30;
  out[9] = x20 * y01 + x21 * y11 + x22 * y21 + x23 * y31;
  out[10] = x20 * y02 + x21 * y12 + x22 * y22 + x23 * y32;
  out[11] = x20 * y03 + x21 * y13 + x22 * y23 + x23 * y33;
  out[12] = x30 * y00 + x31 * y10 + x32 * y20 + x33 * y30;
  out[13] = x30 * y01 + x31 * y11 + x32 * y21 + x33 * y31;
  out[14] = x30 * y02 + x31 * y12 + x32 * y22 + x33 * y32;
  out[15] = x30 * y03 + x31 * y13 + x32 * y23 + x33 * y33;
}

function mulNT4(X: Float64Array, Y: Float64Array, out: Float64Array): void {
  const x00 = X[0], x01 = X[1], x02 = X[2], x03 = X[3], x10 = X[4], x11 = X[5], x12 = X[6], x13 = X[7], x20 = X[8], x21 = X[9], x22 = X[10], x23 = X[11], x30 = X[12], x31 = X[13], x32 = X[14], x33 = X[15];
  const y00 = Y[0], y01 = Y[1], y02 = Y[2], y03 = Y[3], y10 = Y[4], y11 = Y[5], y12 = Y[6], y13 = Y[7], y20 = Y[8], y21 = Y[9], y22 = Y[10], y23 = Y[11], y30 = Y[12], y31 = Y[13], y32 = Y[14], y33 = Y[15];
  out[0] = x00 * y00 + x01 * y01 + x02 * y02 + x03 * y03;
  out[1] = x00 * y10 + x01 * y11 + x02 * y12 + x03 * y13;
  out[2] = x00 * y20 + x01 * y21 + x02 * y22 + x03 * y23;
  out[3] = x00 * y30 + x01 * y31 + x02 * y32 + x03 * y33;
  out[4] = x10 * y00 + x11 * y01 + x12 * y02 + x13 * y03;
  out[5] = x10 * y10 + x11 * y11 + x12 * y12 + x13 * y13;
  out[6] = x10 * y20 + x11 * y21 + x12 * y22 + x13 * y23;
  out[7] = x10 * y30 + x11 * y31 + x12 * y32 + x13 * y33;
  out[8] = x20 * y00 + x21 * y01 + x22 * y02 + x23 * y03;
  out[9] = x20 * y10 + x21 * y11 + x22 * y12 + x23 * y13;
  out[10] = x20 * y20 + x21 * y21 + x22 * y22 + x23 * y23;
  out[11] = x20 * y30 + x21 * y31 + x22 * y32 + x23 * y33;
  out[12] = x30 * y00 + x31 * y01 + x32 * y02 + x33 * y03;
  out[13] = x30 * y10 + x31 * y11 + x32 * y12 + x33 * y13;
  out[14] = x30 * y20 + x31 * y21 + x32 * y22 + x33 * y23;
  out[15] = x30 * y30 + x31 * y31 + x32 * y32 + x33 * y33;
}

/**
 * Rows j..j+m−1 of M (columns [c0, c1)) ← Uᵀ·(those rows), U: m×m. Written out for each window
 * size (2, 3, 4): these loops run O(n) times per swap and O(n²) swaps per reordering, and the
 * generic triple loop with a buffer was three times slower. Same operations, same order.
 */
export function leftMultiplyRows(M: Float64Array, n: number, j: number, m: number, U: Float64Array, c0: number, c1: number): void {
  const o0 = j * n, o1 = o0 + n, o2 = o1 + n, o3 = o2 + n;
  if (m === 2) {
    const u00 = U[0], u01 = U[1], u10 = U[2], u11 = U[3];
    for (let c = c0; c < c1; c++) {
      const x0 = M[o0 + c], x1 = M[o1 + c];
      M[o0 + c] = u00 * x0 + u10 * x1;
      M[o1 + c] = u01 * x0 + u11 * x1;
    }
  } else if (m === 3) {
    const u00 = U[0], u01 = U[1], u02 = U[2], u10 = U[3], u11 = U[4], u12 = U[5], u20 = U[6], u21 = U[7], u22 = U[8];
    for (let c = c0; c < c1; c++) {
      const x0 = M[o0 + c], x1 = M[o1 + c], x2 = M[o2 + c];
      M[o0 + c] = u00 * x0 + u10 * x1 + u20 * x2;
      M[o1 + c] = u01 * x0 + u11 * x1 + u21 * x2;
      M[o2 + c] = u02 * x0 + u12 * x1 + u22 * x2;
    }
  } else {
    const u00 = U[0], u01 = U[1], u02 = U[2], u03 = U[3], u10 = U[4], u11 = U[5], u12 = U[6], u13 = U[7];
    const u20 = U[8], u21 = U[9], u22 = U[10], u23 = U[11], u30 = U[12], u31 = U[13], u32 = U[14], u33 = U[15];
    for (let c = c0; c < c1; c++) {
      const x0 = M[o0 + c], x1 = M[o1 + c], x2 = M[o2 + c], x3 = M[o3 + c];
      M[o0 + c] = u00 * x0 + u10 * x1 + u20 * x2 + u30 * x3;
      M[o1 + c] = u01 * x0 + u11 * x1 + u21 * x2 + u31 * x3;
      M[o2 + c] = u02 * x0 + u12 * x1 + u22 * x2 + u32 * x3;
      M[o3 + c] = u03 * x0 + u13 * x1 + u23 * x2 + u33 * x3;
    }
  }
}

/** Columns j..j+m−1 of M (rows [0, r1)) ← (those columns)·V, V: m×m; written out per size as above. */
export function rightMultiplyCols(M: Float64Array, n: number, j: number, m: number, V: Float64Array, r1: number): void {
  if (m === 2) {
    const v00 = V[0], v01 = V[1], v10 = V[2], v11 = V[3];
    for (let r = 0, o = j; r < r1; r++, o += n) {
      const x0 = M[o], x1 = M[o + 1];
      M[o] = x0 * v00 + x1 * v10;
      M[o + 1] = x0 * v01 + x1 * v11;
    }
  } else if (m === 3) {
    const v00 = V[0], v01 = V[1], v02 = V[2], v10 = V[3], v11 = V[4], v12 = V[5], v20 = V[6], v21 = V[7], v22 = V[8];
    for (let r = 0, o = j; r < r1; r++, o += n) {
      const x0 = M[o], x1 = M[o + 1], x2 = M[o + 2];
      M[o] = x0 * v00 + x1 * v10 + x2 * v20;
      M[o + 1] = x0 * v01 + x1 * v11 + x2 * v21;
      M[o + 2] = x0 * v02 + x1 * v12 + x2 * v22;
    }
  } else {
    const v00 = V[0], v01 = V[1], v02 = V[2], v03 = V[3], v10 = V[4], v11 = V[5], v12 = V[6], v13 = V[7];
    const v20 = V[8], v21 = V[9], v22 = V[10], v23 = V[11], v30 = V[12], v31 = V[13], v32 = V[14], v33 = V[15];
    for (let r = 0, o = j; r < r1; r++, o += n) {
      const x0 = M[o], x1 = M[o + 1], x2 = M[o + 2], x3 = M[o + 3];
      M[o] = x0 * v00 + x1 * v10 + x2 * v20 + x3 * v30;
      M[o + 1] = x0 * v01 + x1 * v11 + x2 * v21 + x3 * v31;
      M[o + 2] = x0 * v02 + x1 * v12 + x2 * v22 + x3 * v32;
      M[o + 3] = x0 * v03 + x1 * v13 + x2 * v23 + x3 * v33;
    }
  }
}

/**
 * `leftMultiplyRows` on S and T at once (rows j..j+m−1, columns j..n−1, m = 3 or 4): one loop
 * instead of two, the same operations in the same order for every entry.
 */
export function leftMultiplyRowsOfBoth(S: Float64Array, T: Float64Array, n: number, j: number, m: number, U: Float64Array): void {
  const o0 = j * n, o1 = o0 + n, o2 = o1 + n, o3 = o2 + n;
  if (m === 3) {
    const u00 = U[0], u01 = U[1], u02 = U[2], u10 = U[3], u11 = U[4], u12 = U[5], u20 = U[6], u21 = U[7], u22 = U[8];
    for (let c = j; c < n; c++) {
      const x0 = S[o0 + c], x1 = S[o1 + c], x2 = S[o2 + c];
      S[o0 + c] = u00 * x0 + u10 * x1 + u20 * x2;
      S[o1 + c] = u01 * x0 + u11 * x1 + u21 * x2;
      S[o2 + c] = u02 * x0 + u12 * x1 + u22 * x2;
      const y0 = T[o0 + c], y1 = T[o1 + c], y2 = T[o2 + c];
      T[o0 + c] = u00 * y0 + u10 * y1 + u20 * y2;
      T[o1 + c] = u01 * y0 + u11 * y1 + u21 * y2;
      T[o2 + c] = u02 * y0 + u12 * y1 + u22 * y2;
    }
  } else {
    const u00 = U[0], u01 = U[1], u02 = U[2], u03 = U[3], u10 = U[4], u11 = U[5], u12 = U[6], u13 = U[7];
    const u20 = U[8], u21 = U[9], u22 = U[10], u23 = U[11], u30 = U[12], u31 = U[13], u32 = U[14], u33 = U[15];
    for (let c = j; c < n; c++) {
      const x0 = S[o0 + c], x1 = S[o1 + c], x2 = S[o2 + c], x3 = S[o3 + c];
      S[o0 + c] = u00 * x0 + u10 * x1 + u20 * x2 + u30 * x3;
      S[o1 + c] = u01 * x0 + u11 * x1 + u21 * x2 + u31 * x3;
      S[o2 + c] = u02 * x0 + u12 * x1 + u22 * x2 + u32 * x3;
      S[o3 + c] = u03 * x0 + u13 * x1 + u23 * x2 + u33 * x3;
      const y0 = T[o0 + c], y1 = T[o1 + c], y2 = T[o2 + c], y3 = T[o3 + c];
      T[o0 + c] = u00 * y0 + u10 * y1 + u20 * y2 + u30 * y3;
      T[o1 + c] = u01 * y0 + u11 * y1 + u21 * y2 + u31 * y3;
      T[o2 + c] = u02 * y0 + u12 * y1 + u22 * y2 + u32 * y3;
      T[o3 + c] = u03 * y0 + u13 * y1 + u23 * y2 + u33 * y3;
    }
  }
}

/** `rightMultiplyCols` on S and T at once (columns j..j+m−1, rows 0..j+m−1, m = 3 or 4). */
export function rightMultiplyColsOfBoth(S: Float64Array, T: Float64Array, n: number, j: number, m: number, V: Float64Array): void {
  const r1 = j + m;
  if (m === 3) {
    const v00 = V[0], v01 = V[1], v02 = V[2], v10 = V[3], v11 = V[4], v12 = V[5], v20 = V[6], v21 = V[7], v22 = V[8];
    for (let r = 0, o = j; r < r1; r++, o += n) {
      const x0 = S[o], x1 = S[o + 1], x2 = S[o + 2];
      S[o] = x0 * v00 + x1 * v10 + x2 * v20;
      S[o + 1] = x0 * v01 + x1 * v11 + x2 * v21;
      S[o + 2] = x0 * v02 + x1 * v12 + x2 * v22;
      const y0 = T[o], y1 = T[o + 1], y2 = T[o + 2];
      T[o] = y0 * v00 + y1 * v10 + y2 * v20;
      T[o + 1] = y0 * v01 + y1 * v11 + y2 * v21;
      T[o + 2] = y0 * v02 + y1 * v12 + y2 * v22;
    }
  } else {
    const v00 = V[0], v01 = V[1], v02 = V[2], v03 = V[3], v10 = V[4], v11 = V[5], v12 = V[6], v13 = V[7];
    const v20 = V[8], v21 = V[9], v22 = V[10], v23 = V[11], v30 = V[12], v31 = V[13], v32 = V[14], v33 = V[15];
    for (let r = 0, o = j; r < r1; r++, o += n) {
      const x0 = S[o], x1 = S[o + 1], x2 = S[o + 2], x3 = S[o + 3];
      S[o] = x0 * v00 + x1 * v10 + x2 * v20 + x3 * v30;
      S[o + 1] = x0 * v01 + x1 * v11 + x2 * v21 + x3 * v31;
      S[o + 2] = x0 * v02 + x1 * v12 + x2 * v22 + x3 * v32;
      S[o + 3] = x0 * v03 + x1 * v13 + x2 * v23 + x3 * v33;
      const y0 = T[o], y1 = T[o + 1], y2 = T[o + 2], y3 = T[o + 3];
      T[o] = y0 * v00 + y1 * v10 + y2 * v20 + y3 * v30;
      T[o + 1] = y0 * v01 + y1 * v11 + y2 * v21 + y3 * v31;
      T[o + 2] = y0 * v02 + y1 * v12 + y2 * v22 + y3 * v32;
      T[o + 3] = y0 * v03 + y1 * v13 + y2 * v23 + y3 * v33;
    }
  }
}
