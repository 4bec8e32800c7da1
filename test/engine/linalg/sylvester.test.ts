import { describe, it, expect } from "vitest";
import fc from "fast-check";
import { Matrix } from "ml-matrix";
import { solveSylvester } from "../../../shared-engine/linalg/sylvester";
import { expectMatrixClose, expectAtMost, frobenius, expectEngineError as expectKind } from "../../helpers/assertions";
import fixtures from "../../fixtures/linalg/expm_lyap.json";

/** ‖AX + XB − C‖_F / ((‖A‖_F + ‖B‖_F)‖X‖_F + ‖C‖_F) */
function relativeResidual(A: Matrix, B: Matrix, C: Matrix, X: Matrix): number {
  const R = A.mmul(X).add(X.mmul(B)).sub(C);
  return frobenius(R) / ((frobenius(A) + frobenius(B)) * frobenius(X) + frobenius(C));
}

const boundedMatrix = (rows: number, cols: number) =>
  fc.array(fc.integer({ min: -1000, max: 1000 }), { minLength: rows * cols, maxLength: rows * cols }).map((v) => {
    const m = new Matrix(rows, cols);
    v.forEach((x, k) => m.set(Math.floor(k / cols), k % cols, x / 1000));
    return m;
  });

describe("solveSylvester against scipy.linalg.solve_sylvester fixtures", () => {
  // Source: test/fixtures/linalg/generate_expm_lyap.py (versions and call in the JSON).
  for (const c of fixtures.sylvester) {
    it(`matches the reference and has a tiny residual for ${c.name}`, () => {
      const A = new Matrix(c.A), B = new Matrix(c.B), C = new Matrix(c.C);
      const X = solveSylvester(A, B, C);
      expectMatrixClose(X, c.X, 1e-12, c.name, 0);
      expectAtMost(relativeResidual(A, B, C, X), 1e-14, "relative residual");
    });
  }
});

describe("solveSylvester behaviour", () => {
  it("solves the documented diagonal example exactly", () => {
    // Hand computation: (1+3)x₁ = 4, (2+3)x₂ = 10.
    const X = solveSylvester(new Matrix([[1, 0], [0, 2]]), new Matrix([[3]]), new Matrix([[4], [10]]));
    expectMatrixClose(X, [[1], [2]], 1e-15, "X");
  });

  it("has relative residual ≤ 1e-12 for random well-separated A, B of mixed sizes (property)", () => {
    const problem = fc
      .tuple(fc.integer({ min: 1, max: 9 }), fc.integer({ min: 1, max: 9 }))
      .chain(([n, m]) => fc.tuple(boundedMatrix(n, n), boundedMatrix(m, m), boundedMatrix(n, m)));
    fc.assert(
      fc.property(problem, ([A0, B0, C]) => {
        // Shift both spectra right of Re = 1 − ‖·‖ bound: λ + μ has real part ≥ 1, well separated.
        const A = A0.clone().add(Matrix.eye(A0.rows).mul(A0.rows + 1));
        const B = B0.clone().add(Matrix.eye(B0.rows).mul(B0.rows + 1));
        const X = solveSylvester(A, B, C);
        expectAtMost(relativeResidual(A, B, C, X), 1e-12, "relative residual");
      }),
      { seed: 31415, numRuns: 80 },
    );
  });

  it("handles complex eigenvalue pairs on both sides (2×2 by 2×2 blocks)", () => {
    const A = new Matrix([[1, 4, 0], [-4, 1, 2], [0, 0, 3]]);
    const B = new Matrix([[2, -5], [5, 2]]);
    const C = new Matrix([[1, 2], [3, 4], [5, 6]]);
    const X = solveSylvester(A, B, C);
    expectAtMost(relativeResidual(A, B, C, X), 1e-15 * 20, "relative residual");
  });

  it("keeps the relative residual below 1e-14 on a diagonally dominant 30×20 problem", () => {
    const rnd = mulberry(7);
    const A = new Matrix(30, 30);
    for (let i = 0; i < 30; i++) for (let j = 0; j < 30; j++) A.set(i, j, rnd() - 0.5 + (i === j ? 8 : 0));
    const B = new Matrix(20, 20);
    for (let i = 0; i < 20; i++) for (let j = 0; j < 20; j++) B.set(i, j, rnd() - 0.5 + (i === j ? 8 : 0));
    const C = new Matrix(30, 20);
    for (let i = 0; i < 30; i++) for (let j = 0; j < 20; j++) C.set(i, j, rnd() - 0.5);
    const X = solveSylvester(A, B, C);
    expectAtMost(relativeResidual(A, B, C, X), 1e-14, "relative residual");
  });

  it("reports a singular equation when λ(A) + μ(B) = 0, naming both eigenvalues", () => {
    const e = expectKind(() => solveSylvester(new Matrix([[1, 0], [0, 2]]), new Matrix([[-1, 0], [0, 3]]), Matrix.ones(2, 2)), "singular");
    expect((e.details.eigenvalueFirst as { re: number }).re).toBeCloseTo(1, 12);
    expect((e.details.eigenvalueSecond as { re: number }).re).toBeCloseTo(-1, 12);
    expect(e.message).toMatch(/λ \+ μ ≈ 0/);
  });

  it("reports a singular equation for complex λ = 1+2i in A and μ = −1−2i in B after similarity transforms", () => {
    const V = new Matrix([[1, 2], [0.5, 3]]);
    const Vi = new Matrix([[3, -2], [-0.5, 1]]).mul(1 / 2);
    const A = V.mmul(new Matrix([[1, 2], [-2, 1]])).mmul(Vi);
    const B = new Matrix([[-1, -2], [2, -1]]);
    expectKind(() => solveSylvester(A, B, Matrix.ones(2, 2)), "singular");
  });

  it("still solves nearly singular equations above the threshold (|λ + μ| = 1e-8)", () => {
    // Hand computation: (1 + (−1 + 1e-8))·x = 1 ⇒ x = 1/(1e-8 + rounding of −1 + 1e-8).
    const mu = -1 + 1e-8;
    const X = solveSylvester(new Matrix([[1]]), new Matrix([[mu]]), new Matrix([[1]]));
    expect(Math.abs(X.get(0, 0) * (1 + mu) - 1)).toBeLessThan(1e-15);
  });

  it("rejects non-square, mismatched, empty and non-finite inputs with typed errors", () => {
    const I2 = Matrix.eye(2);
    expectKind(() => solveSylvester(new Matrix([[1, 2]]), I2, I2), "shape-mismatch");
    expectKind(() => solveSylvester(I2, I2, Matrix.ones(3, 2)), "shape-mismatch");
    expectKind(() => solveSylvester(new Matrix(0, 0), I2, I2), "empty");
    expectKind(() => solveSylvester(I2, new Matrix([[NaN, 0], [0, 1]]), I2), "non-finite");
    expectKind(() => solveSylvester(I2, I2, new Matrix([[Infinity, 0], [0, 1]])), "non-finite");
    expectKind(() => solveSylvester([[1]] as unknown as Matrix, I2, I2), "invalid-argument");
  });

  it("does not modify its arguments", () => {
    const A = new Matrix([[2, 1], [0, 3]]), B = new Matrix([[1]]), C = new Matrix([[1], [1]]);
    const copies = [A, B, C].map((m) => m.to2DArray());
    solveSylvester(A, B, C);
    expect([A, B, C].map((m) => m.to2DArray())).toEqual(copies);
  });
});

/** Small deterministic generator (Mulberry32, common practice) for non-property fixtures. */
function mulberry(seed: number): () => number {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}
