/**
 * The orthogonal factor of the Householder Hessenberg reduction (hessenberg.ts), formed from the
 * reflectors the reduction leaves below the subdiagonal.
 */

/**
 * Qᵀ = H_last·…·H_ilo from the reflectors stored below the subdiagonal of `a` (restoring the
 * zeros there), formed from the left end: Qᵀ ← Qᵀ·H_k changes columns k..ihi of rows k..ihi
 * only (the rest of Qᵀ is still the identity), each row on its own. Two reflectors at a time
 * (the compact WY form with two columns, Schreiber & Van Loan 1989, cited from memory:
 * row ← row − s₁ v_kᵀ − s₂ v_(k−1)ᵀ with s₁ = τ_k row·v_k and
 * s₂ = τ_(k−1)(row·v_(k−1) − s₁ v_k·v_(k−1))), so each row is read once and written once per
 * pair; `vA`, `vB` are scratch vectors of length n.
 */
export function accumulateTransposedQ(a: Float64Array, n: number, ilo: number, ihi: number, qt: Float64Array, taus: Float64Array, vA: Float64Array, vB: Float64Array): void {
  qt.fill(0, 0, n * n);
  for (let i = 0; i < n; i++) qt[i * n + i] = 1;
  let k = ihi - 2;
  for (; k - 1 >= ilo; k -= 2) {
    // H_k (vA, from row k+1) then H_(k−1) (vB, from row k)
    const tA = taus[k], tB = taus[k - 1];
    vA[k + 1] = 1;
    vB[k] = 1;
    vB[k + 1] = a[(k + 1) * n + k - 1];
    a[(k + 1) * n + k - 1] = 0;
    let c = vB[k + 1]; // v_k·v_(k−1) over rows k+1..ihi
    for (let i = k + 2, p = (k + 2) * n + k; i <= ihi; i++, p += n) {
      const x = a[p], z = a[p - 1];
      vA[i] = x;
      vB[i] = z;
      a[p] = 0;
      a[p - 1] = 0;
      c += x * z;
    }
    // row k is e_k before the pair: H_k leaves it, H_(k−1) makes it e_k − τ_(k−1)·v_(k−1)
    const rk = k * n;
    for (let i = k; i <= ihi; i++) qt[rk + i] = 0 - tB * vB[i]; // (0 − x, not −x: never −0)
    qt[rk + k] = 1 - tB;
    // rows k+1..ihi (zero in column k so far), four at a time
    const r0 = k + 1;
    let j = r0;
    for (; j + 3 <= ihi; j += 4) {
      const p0 = j * n, p1 = p0 + n, p2 = p1 + n, p3 = p2 + n;
      let a0 = 0, a1 = 0, a2 = 0, a3 = 0, b0 = 0, b1 = 0, b2 = 0, b3 = 0;
      for (let i = r0; i <= ihi; i++) {
        const x0 = qt[p0 + i], x1 = qt[p1 + i], x2 = qt[p2 + i], x3 = qt[p3 + i];
        const va = vA[i], vb = vB[i];
        a0 += x0 * va; a1 += x1 * va; a2 += x2 * va; a3 += x3 * va;
        b0 += x0 * vb; b1 += x1 * vb; b2 += x2 * vb; b3 += x3 * vb;
      }
      a0 *= tA; a1 *= tA; a2 *= tA; a3 *= tA;
      b0 = tB * (b0 - a0 * c); b1 = tB * (b1 - a1 * c); b2 = tB * (b2 - a2 * c); b3 = tB * (b3 - a3 * c);
      for (let i = r0; i <= ihi; i++) {
        const va = vA[i], vb = vB[i];
        qt[p0 + i] -= a0 * va + b0 * vb;
        qt[p1 + i] -= a1 * va + b1 * vb;
        qt[p2 + i] -= a2 * va + b2 * vb;
        qt[p3 + i] -= a3 * va + b3 * vb;
      }
      qt[p0 + k] = 0 - b0;
      qt[p1 + k] = 0 - b1;
      qt[p2 + k] = 0 - b2;
      qt[p3 + k] = 0 - b3;
    }
    for (; j <= ihi; j++) {
      const p0 = j * n;
      let a0 = 0, b0 = 0;
      for (let i = r0; i <= ihi; i++) {
        const x0 = qt[p0 + i];
        a0 += x0 * vA[i];
        b0 += x0 * vB[i];
      }
      a0 *= tA;
      b0 = tB * (b0 - a0 * c);
      for (let i = r0; i <= ihi; i++) qt[p0 + i] -= a0 * vA[i] + b0 * vB[i];
      qt[p0 + k] = 0 - b0;
    }
  }
  if (k === ilo) {
    // one reflector left: Qᵀ ← Qᵀ·H_k on rows k+1..ihi (row k+1 is e_(k+1) so far)
    const tau = taus[k];
    const r0 = k + 1;
    vA[r0] = 1;
    for (let i = r0 + 1, p = (r0 + 1) * n + k; i <= ihi; i++, p += n) {
      vA[i] = a[p];
      a[p] = 0;
    }
    for (let j = r0; j <= ihi; j++) {
      const p0 = j * n;
      let s0 = 0;
      for (let i = r0; i <= ihi; i++) s0 += qt[p0 + i] * vA[i];
      s0 *= tau;
      for (let i = r0; i <= ihi; i++) qt[p0 + i] -= s0 * vA[i];
    }
  }
}
