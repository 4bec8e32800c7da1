import { multiplyInto } from "../../shared-engine/linalg/denseKernels";
// Variant: pack B into 4-column panels (k-major), 2x4 tile.
function packedMul(a: Float64Array, b: Float64Array, m: number, p: number, q: number, out: Float64Array, pack: Float64Array): void {
  const q4 = q - (q % 4);
  const m2 = m - (m % 2);
  for (let j = 0; j < q4; j += 4) {
    // pack panel j..j+3 of B: pack[k*4 + c]
    for (let k = 0, kb = j, o = 0; k < p; k++, kb += q, o += 4) { pack[o] = b[kb]!; pack[o + 1] = b[kb + 1]!; pack[o + 2] = b[kb + 2]!; pack[o + 3] = b[kb + 3]!; }
    for (let i = 0; i < m2; i += 2) {
      const i0 = i * p, i1 = i0 + p;
      let c00 = 0, c01 = 0, c02 = 0, c03 = 0, c10 = 0, c11 = 0, c12 = 0, c13 = 0;
      for (let k = 0, o = 0; k < p; k++, o += 4) {
        const a0 = a[i0 + k]!, a1 = a[i1 + k]!;
        const b0 = pack[o]!, b1 = pack[o + 1]!, b2 = pack[o + 2]!, b3 = pack[o + 3]!;
        c00 += a0 * b0; c01 += a0 * b1; c02 += a0 * b2; c03 += a0 * b3;
        c10 += a1 * b0; c11 += a1 * b1; c12 += a1 * b2; c13 += a1 * b3;
      }
      const o0 = i * q + j, o1 = o0 + q;
      out[o0] = c00; out[o0 + 1] = c01; out[o0 + 2] = c02; out[o0 + 3] = c03;
      out[o1] = c10; out[o1 + 1] = c11; out[o1 + 2] = c12; out[o1 + 3] = c13;
    }
    for (let i = m2; i < m; i++) {
      const i0 = i * p;
      let c0 = 0, c1 = 0, c2 = 0, c3 = 0;
      for (let k = 0, o = 0; k < p; k++, o += 4) { const a0 = a[i0 + k]!; c0 += a0 * pack[o]!; c1 += a0 * pack[o + 1]!; c2 += a0 * pack[o + 2]!; c3 += a0 * pack[o + 3]!; }
      const o0 = i * q + j; out[o0] = c0; out[o0 + 1] = c1; out[o0 + 2] = c2; out[o0 + 3] = c3;
    }
  }
  for (let j = q4; j < q; j++) for (let i = 0; i < m; i++) { let c = 0; for (let k = 0, kb = j; k < p; k++, kb += q) c += a[i * p + k]! * b[kb]!; out[i * q + j] = c; }
}
// Variant: 4x4 tile over packed A^T? Use 3x4 with packed B.
function packed34(a: Float64Array, b: Float64Array, m: number, p: number, q: number, out: Float64Array, pack: Float64Array): void {
  const q4 = q - (q % 4);
  const m3 = m - (m % 3);
  for (let j = 0; j < q4; j += 4) {
    for (let k = 0, kb = j, o = 0; k < p; k++, kb += q, o += 4) { pack[o] = b[kb]!; pack[o + 1] = b[kb + 1]!; pack[o + 2] = b[kb + 2]!; pack[o + 3] = b[kb + 3]!; }
    for (let i = 0; i < m3; i += 3) {
      const i0 = i * p, i1 = i0 + p, i2 = i1 + p;
      let c00 = 0, c01 = 0, c02 = 0, c03 = 0, c10 = 0, c11 = 0, c12 = 0, c13 = 0, c20 = 0, c21 = 0, c22 = 0, c23 = 0;
      for (let k = 0, o = 0; k < p; k++, o += 4) {
        const b0 = pack[o]!, b1 = pack[o + 1]!, b2 = pack[o + 2]!, b3 = pack[o + 3]!;
        const a0 = a[i0 + k]!; c00 += a0 * b0; c01 += a0 * b1; c02 += a0 * b2; c03 += a0 * b3;
        const a1 = a[i1 + k]!; c10 += a1 * b0; c11 += a1 * b1; c12 += a1 * b2; c13 += a1 * b3;
        const a2 = a[i2 + k]!; c20 += a2 * b0; c21 += a2 * b1; c22 += a2 * b2; c23 += a2 * b3;
      }
      const o0 = i * q + j, o1 = o0 + q, o2 = o1 + q;
      out[o0] = c00; out[o0 + 1] = c01; out[o0 + 2] = c02; out[o0 + 3] = c03;
      out[o1] = c10; out[o1 + 1] = c11; out[o1 + 2] = c12; out[o1 + 3] = c13;
      out[o2] = c20; out[o2 + 1] = c21; out[o2 + 2] = c22; out[o2 + 3] = c23;
    }
    for (let i = m3; i < m; i++) {
      const i0 = i * p;
      let c0 = 0, c1 = 0, c2 = 0, c3 = 0;
      for (let k = 0, o = 0; k < p; k++, o += 4) { const a0 = a[i0 + k]!; c0 += a0 * pack[o]!; c1 += a0 * pack[o + 1]!; c2 += a0 * pack[o + 2]!; c3 += a0 * pack[o + 3]!; }
      const o0 = i * q + j; out[o0] = c0; out[o0 + 1] = c1; out[o0 + 2] = c2; out[o0 + 3] = c3;
    }
  }
  for (let j = q4; j < q; j++) for (let i = 0; i < m; i++) { let c = 0; for (let k = 0, kb = j; k < p; k++, kb += q) c += a[i * p + k]! * b[kb]!; out[i * q + j] = c; }
}
// Variant: 2x8? no: 4x2 with B transposed (dot products) — both streams contiguous
function dot42(a: Float64Array, b: Float64Array, m: number, p: number, q: number, out: Float64Array, bt: Float64Array): void {
  for (let k = 0; k < p; k++) for (let j = 0; j < q; j++) bt[j * p + k] = b[k * q + j]!;
  const m2 = m - (m % 2), q4 = q - (q % 4);
  for (let i = 0; i < m2; i += 2) {
    const a0o = i * p, a1o = a0o + p;
    for (let j = 0; j < q4; j += 4) {
      const b0o = j * p, b1o = b0o + p, b2o = b1o + p, b3o = b2o + p;
      let c00 = 0, c01 = 0, c02 = 0, c03 = 0, c10 = 0, c11 = 0, c12 = 0, c13 = 0;
      for (let k = 0; k < p; k++) {
        const a0 = a[a0o + k]!, a1 = a[a1o + k]!;
        const b0 = bt[b0o + k]!, b1 = bt[b1o + k]!, b2 = bt[b2o + k]!, b3 = bt[b3o + k]!;
        c00 += a0 * b0; c01 += a0 * b1; c02 += a0 * b2; c03 += a0 * b3;
        c10 += a1 * b0; c11 += a1 * b1; c12 += a1 * b2; c13 += a1 * b3;
      }
      const o0 = i * q + j, o1 = o0 + q;
      out[o0] = c00; out[o0 + 1] = c01; out[o0 + 2] = c02; out[o0 + 3] = c03;
      out[o1] = c10; out[o1 + 1] = c11; out[o1 + 2] = c12; out[o1 + 3] = c13;
    }
    for (let j = q4; j < q; j++) { let c0 = 0, c1 = 0; for (let k = 0; k < p; k++) { c0 += a[a0o + k]! * bt[j * p + k]!; c1 += a[a1o + k]! * bt[j * p + k]!; } out[i * q + j] = c0; out[(i + 1) * q + j] = c1; }
  }
  for (let i = m2; i < m; i++) for (let j = 0; j < q; j++) { let c = 0; for (let k = 0; k < p; k++) c += a[i * p + k]! * bt[j * p + k]!; out[i * q + j] = c; }
}
const variants: [string, (a: Float64Array, b: Float64Array, n: number, c: Float64Array, w: Float64Array) => void][] = [
  ["base", (a, b, n, c) => { multiplyInto(a, b, n, n, n, c); }],
  ["pack24", (a, b, n, c, w) => packedMul(a, b, n, n, n, c, w)],
  ["pack34", (a, b, n, c, w) => packed34(a, b, n, n, n, c, w)],
  ["dot24", (a, b, n, c, w) => dot42(a, b, n, n, n, c, w)],
];
for (const n of [10, 20, 50, 100, 200]) {
  const a = new Float64Array(n * n).map(() => Math.random() - 0.5);
  const b = new Float64Array(n * n).map(() => Math.random() - 0.5);
  const ref = new Float64Array(n * n); multiplyInto(a, b, n, n, n, ref);
  const reps = Math.max(3, Math.floor(1e8 / (2 * n * n * n)));
  const line: string[] = [];
  for (const [name, f] of variants) {
    const c = new Float64Array(n * n); const w = new Float64Array(n * n + 8);
    f(a, b, n, c, w);
    let err = 0; for (let i = 0; i < n * n; i++) err = Math.max(err, Math.abs(c[i]! - ref[i]!));
    let best = Infinity;
    for (let r = 0; r < 7; r++) { const t0 = performance.now(); for (let i = 0; i < reps; i++) f(a, b, n, c, w); best = Math.min(best, (performance.now() - t0) / reps); }
    line.push(`${name} ${(2 * n ** 3 / best / 1e6).toFixed(2)}GF${err > 1e-12 ? " ERR" : ""}`);
  }
  console.log(`n=${n} ` + line.join("  "));
}
