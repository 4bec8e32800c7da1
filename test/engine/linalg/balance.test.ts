import { describe, it, expect } from "vitest";
import fc from "fast-check";
import { Matrix } from "ml-matrix";
import { balance, type Balanced } from "../../../shared-engine/linalg/balance";
import { eigenvalues } from "../../../shared-engine/linalg/eigen";
import { expectComplexSetsClose, seededMatrix, expectEngineError as expectKind } from "../../helpers/assertions";

/** The documented identity B[i][j] = A[perm[i]][perm[j]]·scale[j]/scale[i], exactly (powers of two). */
function expectBalancedIdentity(A: Matrix, r: Balanced): void {
  const n = A.rows;
  expect([...r.perm].sort((a, b) => a - b)).toEqual(Array.from({ length: n }, (_, i) => i));
  for (const s of r.scale) expect(Number.isInteger(Math.log2(s))).toBe(true);
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < n; j++) {
      expect(r.B.get(i, j)).toBe((A.get(r.perm[i]!, r.perm[j]!) * r.scale[j]!) / r.scale[i]!);
    }
  }
  // triangular outside the window low..high
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < i; j++) {
      if (j < r.low || i > r.high) expect(r.B.get(i, j)).toBe(0);
    }
  }
  for (let i = 0; i < n; i++) if (i < r.low || i > r.high) expect(r.scale[i]).toBe(1);
}

describe("balance", () => {
  it("scales [[1, 1e6], [1e-6, 1]] so the off-diagonal entries are within a factor 4 of each other", () => {
    // common practice: radix-2 balancing equalises row and column norms to within the radix squared
    const A = new Matrix([[1, 1e6], [1e-6, 1]]);
    const r = balance(A);
    expectBalancedIdentity(A, r);
    const ratio = Math.abs(r.B.get(0, 1) / r.B.get(1, 0));
    expect(ratio).toBeGreaterThan(1 / 4);
    expect(ratio).toBeLessThan(4);
  });

  it("reduces the norm of a graded matrix by orders of magnitude and keeps its eigenvalues", () => {
    const n = 8;
    const d = Array.from({ length: n }, (_, i) => 10 ** (-4 + i));
    const A = new Matrix(seededMatrix(n, n, 11).map((row, i) => row.map((v, j) => (v * d[i]!) / d[j]!)));
    const r = balance(A);
    expectBalancedIdentity(A, r);
    expect(r.B.norm("frobenius")).toBeLessThan(A.norm("frobenius") * 1e-4);
    // eigenvalues of B and A agree (similar matrices); both through the same pipeline
    expectComplexSetsClose(eigenvalues(r.B), eigenvalues(A), 1e-10);
  });

  it("isolates every eigenvalue of a triangular matrix by permutation alone", () => {
    const A = new Matrix([[1, 2, 3], [0, 4, 5], [0, 0, 6]]);
    const r = balance(A);
    expectBalancedIdentity(A, r);
    expect(r.low).toBe(r.high);
  });

  it("isolates a row with zero off-diagonal part to the bottom and a column to the top", () => {
    // row 1 has only its diagonal entry; column 2 has only its diagonal entry (rows beside it zero)
    const A = new Matrix([
      [1, 2, 0, 4],
      [0, 5, 0, 0],
      [3, 1, 7, 2],
      [2, 3, 0, 1],
    ]);
    const r = balance(A);
    expectBalancedIdentity(A, r);
    expect(r.perm[3]).toBe(1); // isolated row moved to the bottom
    expect(r.perm[0]).toBe(2); // isolated column moved to the top
    expect([r.low, r.high]).toEqual([1, 2]);
  });

  it("leaves the matrix unpermuted with permute: false and unscaled with scale: false", () => {
    const A = new Matrix([[1, 1e6, 0], [1e-6, 1, 0], [5, 5, 2]]);
    const noPerm = balance(A, { permute: false });
    expectBalancedIdentity(A, noPerm);
    expect([...noPerm.perm]).toEqual([0, 1, 2]);
    expect([noPerm.low, noPerm.high]).toEqual([0, 2]);
    const noScale = balance(A, { scale: false });
    expectBalancedIdentity(A, noScale);
    expect([...noScale.scale]).toEqual([1, 1, 1]);
    const neither = balance(A, { permute: false, scale: false });
    expect(neither.B.to2DArray()).toEqual(A.to2DArray());
  });

  it("handles 1×1 and zero matrices", () => {
    const one = balance(new Matrix([[3]]));
    expect(one.B.get(0, 0)).toBe(3);
    expect([one.low, one.high]).toEqual([0, 0]);
    const zero = balance(Matrix.zeros(3, 3));
    expectBalancedIdentity(Matrix.zeros(3, 3), zero);
  });

  it("balances entries near 1e-150 next to entries of size 10 without overflow or underflow", () => {
    const A = new Matrix([[10, 1e-150, 0, 0], [1e-150, 10, 1e-150, 0], [0, 1e-150, -3, 1], [1e-150, 0, 2, 5]]);
    const r = balance(A);
    expectBalancedIdentity(A, r);
    expect(r.B.to2DArray().flat().every(Number.isFinite)).toBe(true);
  });

  it("satisfies the exact balancing identity on generated sparse graded matrices (property)", () => {
    const gen = fc.integer({ min: 1, max: 9 }).chain((n) =>
      fc.record({
        n: fc.constant(n),
        entries: fc.array(fc.integer({ min: -20, max: 20 }), { minLength: n * n, maxLength: n * n }),
        exponents: fc.array(fc.integer({ min: -30, max: 30 }), { minLength: n * n, maxLength: n * n }),
        zeros: fc.array(fc.boolean(), { minLength: n * n, maxLength: n * n }),
      }),
    );
    fc.assert(
      fc.property(gen, ({ n, entries, exponents, zeros }) => {
        const A = Matrix.from1DArray(n, n, entries.map((v, k) => (zeros[k] ? 0 : v * 10 ** exponents[k]!)));
        expectBalancedIdentity(A, balance(A));
      }),
      { seed: 2468, numRuns: 200 },
    );
  });

  it("rejects bad input with typed errors", () => {
    expectKind(() => balance(new Matrix(2, 3)), "shape-mismatch");
    expectKind(() => balance(new Matrix(0, 0)), "empty");
    expectKind(() => balance(new Matrix([[NaN]])), "non-finite");
    expectKind(() => balance(new Matrix([[1, Infinity], [0, 1]])), "non-finite");
  });

  it("returns copies: changing B does not change A", () => {
    const A = new Matrix([[1, 2], [3, 4]]);
    const r = balance(A);
    r.B.set(0, 0, 42);
    expect(A.get(0, 0)).toBe(1);
  });
});
