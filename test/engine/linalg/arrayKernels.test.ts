import { describe, it, expect } from "vitest";
import { doubleArray, oneNormArray, productIntoArray } from "../../../shared-engine/linalg/arrayKernels";
import { solveInPlaceArray } from "../../../shared-engine/linalg/arraySolve";
import { EngineError } from "../../../shared-engine/errors";
import { expectAtMost, seededDoubles } from "../../helpers/assertions";

const randomArray = seededDoubles;

function naiveProduct(a: number[], b: number[], m: number, p: number, q: number): number[] {
  const out: number[] = [];
  for (let i = 0; i < m; i++) for (let j = 0; j < q; j++) {
    let s = 0;
    for (let k = 0; k < p; k++) s += a[i * p + k]! * b[k * q + j]!;
    out.push(s);
  }
  return out;
}

describe("number-array kernels", () => {
  it("doubleArray gives zero-filled arrays of the asked length", () => {
    for (const n of [0, 1, 7, 8, 9, 100]) {
      const x = doubleArray(n);
      expect(x.length).toBe(n);
      expect(x.every((v) => v === 0)).toBe(true);
    }
  });

  it("the 3×3-tiled product equals the naive triple loop bit for bit for every remainder shape", () => {
    // Same summation order per entry, so equality is exact (also with the addend, added last).
    for (const [m, p, q] of [[1, 1, 1], [2, 3, 4], [3, 5, 7], [4, 2, 9], [5, 6, 3], [10, 10, 10], [11, 7, 6], [20, 20, 20], [33, 17, 13]] as const) {
      const a = randomArray(m * p, m * 100 + p), b = randomArray(p * q, q + 7), c = randomArray(m * q, m + q);
      const expected = naiveProduct(a, b, m, p, q);
      expect(productIntoArray(a, b, null, m, p, q, doubleArray(m * q))).toEqual(expected);
      const withC = expected.map((v, i) => v + c[i]!);
      expect(productIntoArray(a, b, c, m, p, q, doubleArray(m * q))).toEqual(withC);
      const inPlace = c.slice();
      productIntoArray(a, b, inPlace, m, p, q, inPlace);
      expect(inPlace).toEqual(withC);
    }
  });

  it("oneNormArray is the largest absolute column sum", () => {
    expect(oneNormArray([1.5, -2, 3, 4], 2)).toBe(6); // columns: 4.5 and 6
    expect(oneNormArray(doubleArray(9), 3)).toBe(0);
  });

  it("the LU solve has a small residual, unblocked (n ≤ 80) and across block boundaries (q = 1…n)", () => {
    for (const n of [1, 2, 7, 8, 9, 17, 33, 70, 81, 97]) {
      for (const q of [1, 3, n]) {
        const m = randomArray(n * n, n * 7 + q);
        const r = randomArray(n * q, n + q);
        const x = r.slice();
        solveInPlaceArray(m.slice(), x, n, q, "M");
        const res = naiveProduct(m, x, n, n, q).map((v, i) => v - r[i]!);
        // Backward-stable LU: ‖MX − R‖ ≲ n·ε·‖M‖·‖X‖ (Higham, "Accuracy and Stability", Thm 9.4).
        const maxX = Math.max(1, ...x.map(Math.abs));
        expectAtMost(Math.max(...res.map(Math.abs)), 50 * n * n * Number.EPSILON * maxX, `residual n = ${n}, q = ${q}`);
      }
    }
  });

  it("the LU solve pivots, and reports a singular matrix with kind singular (small and blocked)", () => {
    const m = [0, 1, 1, 0.5];
    const r = [2, 3];
    solveInPlaceArray(m, r, 2, 1, "M");
    expect(r).toEqual([2, 2]);
    for (const n of [12, 90]) {
      const s = randomArray(n * n, 5);
      for (let j = 0; j < n; j++) s[(n - 1) * n + j] = s[3 * n + j]! * 2; // last row = 2·row 3
      try {
        solveInPlaceArray(s, doubleArray(n), n, 1, "M");
        expect.fail("expected singular");
      } catch (e) {
        expect(e).toBeInstanceOf(EngineError);
        expect((e as EngineError).kind).toBe("singular");
      }
    }
  });
});
