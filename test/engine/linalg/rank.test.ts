import { describe, it, expect } from "vitest";
import fc from "fast-check";
import { Matrix } from "ml-matrix";
import { numericalRank, nullSpace, rangeSpace, reciprocalCondition, rankDecomposition } from "../../../shared-engine/linalg/rank";
import { expectAtMost, expectMatrixClose, frobenius, EPS, expectEngineError as expectKind } from "../../helpers/assertions";

const bounded = (rows: number, cols: number) =>
  fc.array(fc.integer({ min: -1000, max: 1000 }), { minLength: rows * cols, maxLength: rows * cols }).map((v) => {
    const m = new Matrix(rows, cols);
    v.forEach((x, k) => m.set(Math.floor(k / cols), k % cols, x / 1000));
    return m;
  });

function expectOrthonormalColumns(M: Matrix, what: string): void {
  const G = M.transpose().mmul(M);
  expectMatrixClose(G, Matrix.eye(M.columns), 50 * M.rows * EPS, `${what}: ᵀ·`);
}

describe("numerical rank", () => {
  it("finds the rank of constructed low-rank products L·Rᵀ (property)", () => {
    // L: m×r, R: n×r with bounded integer-scaled entries plus r·I on top: rank exactly r.
    const problem = fc
      .tuple(fc.integer({ min: 1, max: 9 }), fc.integer({ min: 1, max: 9 }), fc.integer({ min: 1, max: 9 }))
      .filter(([m, n, r]) => r <= Math.min(m, n))
      .chain(([m, n, r]) => fc.tuple(bounded(m, r), bounded(n, r), fc.constant(r)));
    fc.assert(
      fc.property(problem, ([L0, R0, r]) => {
        // Adding 3·[I; 0] makes L and R full column rank (diagonally dominant top block).
        const L = L0.clone();
        const R = R0.clone();
        for (let i = 0; i < r; i++) { L.set(i, i, L.get(i, i) + 3 * r); R.set(i, i, R.get(i, i) + 3 * r); }
        const A = L.mmul(R.transpose());
        const d = rankDecomposition(A);
        expect(d.rank).toBe(r);
        expect(d.singularValues.length).toBe(Math.min(A.rows, A.columns));
        if (d.nullSpace.columns > 0) {
          expectAtMost(frobenius(A.mmul(d.nullSpace)), 100 * Math.max(A.rows, A.columns) * EPS * frobenius(A), "‖A·N‖_F");
          expectOrthonormalColumns(d.nullSpace, "null space");
        }
        expectOrthonormalColumns(d.range, "range");
        // (I − R Rᵀ)A ≈ 0: range really spans the columns of A.
        const P = A.clone().sub(d.range.mmul(d.range.transpose()).mmul(A));
        expectAtMost(frobenius(P), 100 * Math.max(A.rows, A.columns) * EPS * frobenius(A), "‖(I − RRᵀ)A‖_F");
        // The values-only paths (no singular vectors) decide the same rank from the same values.
        const values = numericalRank(A);
        expect(values.rank).toBe(r);
        values.singularValues.forEach((sv, i) => expect(Math.abs(sv - d.singularValues[i]!)).toBeLessThanOrEqual(10 * Math.max(A.rows, A.columns) * EPS * d.singularValues[0]!));
        if (r === Math.min(A.rows, A.columns)) expect(Math.abs(reciprocalCondition(A) - d.reciprocalCondition)).toBeLessThanOrEqual(1e-12);
      }),
      { seed: 8675309, numRuns: 100 },
    );
  });

  it("reports the documented default tolerance max(m,n)·σ_max·ε", () => {
    const A = new Matrix([[3, 0, 0], [0, 1e-20, 0]]);
    const r = numericalRank(A);
    expect(r.rank).toBe(1);
    expect(r.tolerance).toBeCloseTo(3 * 3 * EPS, 30);
    expect(r.singularValues).toEqual([3, 1e-20]);
  });

  it("honours an explicit tolerance", () => {
    const A = Matrix.diag([1, 1e-3, 1e-8]);
    expect(numericalRank(A, 1e-4).rank).toBe(2);
    expect(numericalRank(A, 1e-9).rank).toBe(3);
    expect(numericalRank(A, 2).rank).toBe(0);
  });

  it("gives rank 0, a full null space and an empty range for the zero matrix", () => {
    const d = rankDecomposition(new Matrix(2, 3));
    expect(d.rank).toBe(0);
    expect(d.range.columns).toBe(0);
    expect(d.nullSpace.columns).toBe(3);
    expectOrthonormalColumns(d.nullSpace, "null space of 0");
    expect(reciprocalCondition(Matrix.zeros(2, 2))).toBe(0);
  });

  it("handles 1×1 and wide 1×n matrices", () => {
    expect(numericalRank(new Matrix([[5]])).rank).toBe(1);
    const N = nullSpace(new Matrix([[1, 1]]));
    expect(N.columns).toBe(1);
    // Closed form: null([1 1]) = ±[1, −1]/√2.
    expect(Math.abs(Math.abs(N.get(0, 0)) - Math.SQRT1_2)).toBeLessThan(1e-15);
    expect(Math.abs(N.get(0, 0) + N.get(1, 0))).toBeLessThan(1e-15);
  });

  it("spans the documented example range ±[1, 2]/√5 of [[1, 2], [2, 4]]", () => {
    const R = rangeSpace(new Matrix([[1, 2], [2, 4]]));
    expect(R.columns).toBe(1);
    // Closed form: column space of a rank-one matrix u vᵀ is span(u), u = [1, 2].
    expect(Math.abs(Math.abs(R.get(0, 0)) - 1 / Math.sqrt(5))).toBeLessThan(1e-15);
    expect(Math.abs(R.get(1, 0) - 2 * R.get(0, 0))).toBeLessThan(1e-15);
  });

  it("recognises a numerically rank-deficient Hilbert-like matrix", () => {
    // 12×12 Hilbert matrix: cond ≈ 1.7e16 (Higham, "Accuracy and Stability", Table 28.1, from memory),
    // so the default tolerance sees rank < 12.
    const H = new Matrix(12, 12);
    for (let i = 0; i < 12; i++) for (let j = 0; j < 12; j++) H.set(i, j, 1 / (i + j + 1));
    expect(numericalRank(H).rank).toBeLessThan(12);
    expect(reciprocalCondition(H)).toBeLessThan(1e-15);
  });

  it("returns copies that the caller may modify freely", () => {
    const A = new Matrix([[1, 2], [2, 4]]);
    const N1 = nullSpace(A);
    N1.set(0, 0, 99);
    expect(nullSpace(A).get(0, 0)).not.toBe(99);
  });
});

describe("reciprocal condition", () => {
  it("is σ_min/σ_max in the 2-norm", () => {
    // Closed forms: diagonal singular values; orthogonal matrix has condition 1.
    expect(reciprocalCondition(new Matrix([[2, 0], [0, 0.5]]))).toBeCloseTo(0.25, 15);
    const c = Math.cos(0.3), s = Math.sin(0.3);
    expect(reciprocalCondition(new Matrix([[c, -s], [s, c]]))).toBeCloseTo(1, 14);
    expect(reciprocalCondition(new Matrix([[1, 1], [1, 1]]))).toBeLessThan(1e-15);
  });
});

describe("rank input errors", () => {
  it("rejects empty, NaN, Infinity and bad tolerances", () => {
    expectKind(() => numericalRank(new Matrix(0, 0)), "empty");
    expectKind(() => numericalRank(new Matrix([[NaN, 1]])), "non-finite");
    expectKind(() => nullSpace(new Matrix([[Infinity]])), "non-finite");
    expectKind(() => numericalRank(Matrix.eye(2), -1), "invalid-argument");
    expectKind(() => rangeSpace(Matrix.eye(2), NaN), "invalid-argument");
    expectKind(() => reciprocalCondition(new Matrix(3, 0)), "empty");
  });
});
