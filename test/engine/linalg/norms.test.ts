import { describe, it, expect } from "vitest";
import fc from "fast-check";
import { Matrix } from "ml-matrix";
import { norm1, normInf, normFrobenius } from "../../../shared-engine/linalg/norms";
import { expectRelativeClose, expectEngineError as expectKind } from "../../helpers/assertions";

describe("matrix norms", () => {
  it("give the documented values for a small example", () => {
    // Hand computation: column sums 4, 6; row sums 3, 7; Frobenius √30.
    const A = new Matrix([[1, -2], [3, 4]]);
    expect(norm1(A)).toBe(6);
    expect(normInf(A)).toBe(7);
    expectRelativeClose(normFrobenius(A), Math.sqrt(30), 2 * Number.EPSILON, "‖A‖_F");
  });

  it("satisfy ‖A‖₁ = ‖Aᵀ‖∞ and ‖A‖_F ≤ √n·min(‖A‖₁, ‖A‖∞) (property)", () => {
    const arb = fc.tuple(fc.integer({ min: 1, max: 8 }), fc.integer({ min: 1, max: 8 })).chain(([m, n]) =>
      fc.array(fc.integer({ min: -1000, max: 1000 }), { minLength: m * n, maxLength: m * n }).map((v) => {
        const A = new Matrix(m, n);
        v.forEach((x, k) => A.set(Math.floor(k / n), k % n, x / 10));
        return A;
      }),
    );
    fc.assert(
      fc.property(arb, (A) => {
        expect(norm1(A)).toBe(normInf(A.transpose()));
        const f = normFrobenius(A);
        expectRelativeClose(f, A.norm("frobenius"), 1e-14, "‖A‖_F vs ml-matrix", 1);
        const bound = Math.sqrt(Math.max(A.rows, A.columns)) * Math.min(norm1(A), normInf(A));
        expect(f).toBeLessThanOrEqual(bound * (1 + 1e-15));
      }),
      { seed: 99, numRuns: 100 },
    );
  });

  it("computes the Frobenius norm without overflow or underflow for extreme entries", () => {
    expectRelativeClose(normFrobenius([[3e200, 4e200]]), 5e200, 4 * Number.EPSILON, "large");
    expectRelativeClose(normFrobenius([[3e-200], [4e-200]]), 5e-200, 4 * Number.EPSILON, "tiny");
  });

  it("return 0 for an empty matrix and reject NaN or Infinity entries", () => {
    expect(norm1(new Matrix(0, 0))).toBe(0);
    expect(normFrobenius(new Matrix(2, 0))).toBe(0);
    expectKind(() => norm1([[NaN]]), "non-finite");
    expectKind(() => normInf([[1, Infinity]]), "non-finite");
    expectKind(() => normFrobenius([[1], [2, 3]] as number[][]), "shape-mismatch");
  });

  it("report overflow of a sum as non-finite rather than returning Infinity", () => {
    expectKind(() => norm1([[1e308], [1e308]]), "non-finite");
    expectKind(() => normFrobenius([[1.5e308, 1.5e308]]), "non-finite"); // √2·1.5e308 > 1.8e308
  });
});
