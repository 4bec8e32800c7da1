import { describe, it, expect } from "vitest";
import { Matrix } from "ml-matrix";
import {
  matrixAdoptingRowMajor, matrixOfRowMajor, multiply, multiplyAddInto, multiplyInto, rowMajorOf, solveInPlace, transpose,
} from "../../../shared-engine/linalg/denseKernels";
import { EngineError } from "../../../shared-engine/errors";
import { expectAtMost } from "../../helpers/assertions";
import { subtractProductIntoArray } from "../../../shared-engine/linalg/arraySolve";

/** Deterministic pseudo-random entries in [−0.5, 0.5) (Mulberry32, common practice). */
function randomArray(length: number, seed: number): Float64Array {
  let a = seed >>> 0;
  const out = new Float64Array(length);
  for (let i = 0; i < length; i++) {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    out[i] = ((t ^ (t >>> 14)) >>> 0) / 4294967296 - 0.5;
  }
  return out;
}

function naiveProduct(a: Float64Array, b: Float64Array, m: number, p: number, q: number): Float64Array {
  const out = new Float64Array(m * q);
  for (let i = 0; i < m; i++) for (let j = 0; j < q; j++) {
    let s = 0;
    for (let k = 0; k < p; k++) s += a[i * p + k]! * b[k * q + j]!;
    out[i * q + j] = s;
  }
  return out;
}

function maxAbs(a: Float64Array): number {
  let m = 0;
  for (const v of a) m = Math.max(m, Math.abs(v));
  return m;
}

describe("dense row-major kernels", () => {
  it("tiled product matches the naive triple loop for every remainder shape", () => {
    for (const [m, p, q] of [[1, 1, 1], [2, 3, 4], [3, 5, 7], [7, 2, 9], [10, 10, 10], [33, 17, 6]] as const) {
      const a = randomArray(m * p, m * 100 + p), b = randomArray(p * q, q);
      const diff = multiply(a, b, m, p, q).map((v, i) => v - naiveProduct(a, b, m, p, q)[i]!);
      expectAtMost(maxAbs(diff), 4 * p * Number.EPSILON, `product ${m}×${p}·${p}×${q}`);
    }
  });

  it("strided subtract-product updates only the addressed sub-block", () => {
    const n = 9;
    // the update inside the LU solve (arraySolve.ts), on plain arrays as the solver holds them
    const a = Array.from(randomArray(n * n, 1)), b = Array.from(randomArray(n * n, 2)), c = Array.from(randomArray(n * n, 3));
    const before = c.slice();
    subtractProductIntoArray(a, 1 * n + 2, n, b, 2 * n + 3, n, c, 4 * n + 1, n, 3, 5, 6); // C[4:7, 1:7] −= A[1:4, 2:7] B[2:7, 3:9]
    for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) {
      const inside = i >= 4 && i < 7 && j >= 1 && j < 7;
      let expected = before[i * n + j]!;
      if (inside) for (let k = 0; k < 5; k++) expected -= a[(1 + i - 4) * n + 2 + k]! * b[(2 + k) * n + 3 + j - 1]!;
      expect(Math.abs(c[i * n + j]! - expected)).toBeLessThanOrEqual(1e-15);
    }
  });

  it("blocked LU solve has a small residual across block boundaries (n = 1…70, q = 1…n)", () => {
    for (const n of [1, 2, 7, 8, 9, 17, 33, 70]) {
      for (const q of [1, 3, n]) {
        const m = randomArray(n * n, n * 7 + q);
        const r = randomArray(n * q, n + q);
        const x = r.slice();
        solveInPlace(m.slice(), x, n, q, "M");
        const res = multiply(m, x, n, n, q).map((v, i) => v - r[i]!);
        // Backward-stable LU: ‖MX − R‖ ≲ n·ε·‖M‖·‖X‖ (Higham, "Accuracy and Stability", Thm 9.4).
        expectAtMost(maxAbs(res), 50 * n * Number.EPSILON * Math.max(1, maxAbs(x)) * n, `residual n = ${n}, q = ${q}`);
      }
    }
  });

  it("needs pivoting and gets it: a zero leading entry is solved exactly", () => {
    const m = Float64Array.from([0, 1, 1, 0]);
    const r = Float64Array.from([2, 3]);
    solveInPlace(m, r, 2, 1, "M");
    expect(Array.from(r)).toEqual([3, 2]);
  });

  it("reports a singular matrix with kind singular", () => {
    const n = 12;
    const m = randomArray(n * n, 5);
    for (let j = 0; j < n; j++) m[11 * n + j] = m[3 * n + j]! * 2; // row 11 = 2·row 3
    try {
      solveInPlace(m, new Float64Array(n), n, 1, "M");
      expect.fail("expected singular");
    } catch (e) {
      expect(e).toBeInstanceOf(EngineError);
      expect((e as EngineError).kind).toBe("singular");
    }
  });

  it("transpose is an involution", () => {
    const a = randomArray(15, 9);
    expect(Array.from(transpose(transpose(a, 3, 5), 5, 3))).toEqual(Array.from(a));
  });
});

describe("product-plus-addend and Matrix conversions used by the fast paths", () => {
  it("multiplyAddInto equals multiplyInto followed by adding c, bit for bit, also when out aliases c", () => {
    // odd and even shapes exercise the 2×4 tile and both remainder loops
    for (const [m, p, q] of [[1, 1, 1], [2, 3, 4], [5, 7, 9], [8, 8, 8], [11, 6, 3]] as const) {
      const a = randomArray(m * p, 11 + m), b = randomArray(p * q, 23 + q), c = randomArray(m * q, 37 + p);
      const expected = multiplyInto(a, b, m, p, q, new Float64Array(m * q));
      for (let i = 0; i < expected.length; i++) expected[i] = expected[i]! + c[i]!;
      const fresh = multiplyAddInto(a, b, c, m, p, q, new Float64Array(m * q));
      const aliased = multiplyAddInto(a, b, c, m, p, q, c.slice());
      const inPlace = c.slice();
      multiplyAddInto(a, b, inPlace, m, p, q, inPlace);
      for (const got of [fresh, aliased, inPlace]) expect(Array.from(got)).toEqual(Array.from(expected));
    }
  });

  it("large products (number-array path) equal the naive triple loop bit for bit, with and without addend", () => {
    // Same summation order per entry (k = 0…p−1, then the addend), so equality is exact.
    for (const [m, p, q] of [[48, 48, 48], [50, 61, 70], [67, 53, 49], [64, 64, 65]] as const) {
      const a = randomArray(m * p, m + 3 * p), b = randomArray(p * q, q + 5 * p), c = randomArray(m * q, m * q);
      const expected = naiveProduct(a, b, m, p, q);
      expect(Array.from(multiply(a, b, m, p, q))).toEqual(Array.from(expected));
      const withC = Array.from(expected, (v, i) => v + c[i]!);
      expect(Array.from(multiplyAddInto(a, b, c, m, p, q, new Float64Array(m * q)))).toEqual(withC);
      const inPlace = c.slice();
      multiplyAddInto(a, b, inPlace, m, p, q, inPlace);
      expect(Array.from(inPlace)).toEqual(withC);
    }
  });

  it("matrixAdoptingRowMajor wraps the array without copying", () => {
    const data = Float64Array.from([1, 2, 3, 4, 5, 6]);
    const m = matrixAdoptingRowMajor(data, 3, 2);
    expect(m.to2DArray()).toEqual([[1, 2], [3, 4], [5, 6]]);
    data[5] = 60; // the Matrix reads the adopted storage
    expect(m.get(2, 1)).toBe(60);
    expect(m.mmul(Matrix.eye(2)).get(2, 1)).toBe(60);
  });

  it("rowMajorOf and matrixOfRowMajor round-trip the entries and share no storage with their arguments", () => {
    const rows = [[1, 2, 3], [4, 5, 6]];
    const m = new Matrix(rows);
    const flat = rowMajorOf(m);
    expect(Array.from(flat)).toEqual([1, 2, 3, 4, 5, 6]);
    flat[0] = 99; // the copy is detached from m
    expect(m.get(0, 0)).toBe(1);
    const back = matrixOfRowMajor(flat, 2, 3);
    expect(back.to2DArray()).toEqual([[99, 2, 3], [4, 5, 6]]);
    flat[1] = -7; // and the Matrix is detached from the array it was built from
    expect(back.get(0, 1)).toBe(2);
    expect(back.rows).toBe(2);
    expect(back.columns).toBe(3);
    // a matrix built this way behaves like any other under ml-matrix operations
    expect(back.transpose().mmul(back).get(2, 2)).toBe(3 * 3 + 6 * 6);
  });
});
