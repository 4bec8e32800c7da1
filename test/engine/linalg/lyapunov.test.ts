import { describe, it, expect } from "vitest";
import fc from "fast-check";
import { Matrix } from "ml-matrix";
import { solveContinuousLyapunov, solveDiscreteLyapunov } from "../../../shared-engine/linalg/lyapunov";
import { expm } from "../../../shared-engine/linalg/expm";
import { discreteNoiseCovariance } from "../../../shared-engine/linalg/vanLoan";
import { expectMatrixClose, expectAtMost, frobenius, expectEngineError as expectKind } from "../../helpers/assertions";
import fixtures from "../../fixtures/linalg/expm_lyap.json";

/** ‖AX + XAᵀ + Q‖_F / (2‖A‖_F‖X‖_F + ‖Q‖_F) */
function continuousResidual(A: Matrix, Q: Matrix, X: Matrix): number {
  const R = A.mmul(X).add(X.mmul(A.transpose())).add(Q);
  return frobenius(R) / (2 * frobenius(A) * frobenius(X) + frobenius(Q));
}
/** ‖AXAᵀ − X + Q‖_F / ((‖A‖_F² + 1)‖X‖_F + ‖Q‖_F) */
function discreteResidual(A: Matrix, Q: Matrix, X: Matrix): number {
  const R = A.mmul(X).mmul(A.transpose()).sub(X).add(Q);
  return frobenius(R) / ((frobenius(A) ** 2 + 1) * frobenius(X) + frobenius(Q));
}

const boundedMatrix = (n: number) =>
  fc.array(fc.integer({ min: -1000, max: 1000 }), { minLength: n * n, maxLength: n * n }).map((v) => {
    const m = new Matrix(n, n);
    v.forEach((x, k) => m.set(Math.floor(k / n), k % n, x / 1000));
    return m;
  });

/** Deterministic pseudo-random matrix (Mulberry32, common practice), entries in [−0.5, 0.5). */
function randomMatrix(n: number, seed: number): Matrix {
  let a = seed >>> 0;
  const next = () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
  const m = new Matrix(n, n);
  for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) m.set(i, j, next() - 0.5);
  return m;
}

describe("continuous Lyapunov equation", () => {
  // Source: test/fixtures/linalg/generate_expm_lyap.py (scipy.linalg.solve_continuous_lyapunov).
  for (const c of fixtures.continuousLyapunov) {
    it(`matches scipy and has a tiny residual for ${c.name}`, () => {
      const A = new Matrix(c.A), Q = new Matrix(c.Q);
      const X = solveContinuousLyapunov(A, Q);
      expectMatrixClose(X, c.X, 1e-12, c.name, 0);
      expectAtMost(continuousResidual(A, Q, X), 1e-14, "relative residual");
    });
  }

  it("solves the scalar example X = q / (−2a)", () => {
    // Hand computation: 2aX + q = 0.
    expect(solveContinuousLyapunov(new Matrix([[-1]]), new Matrix([[2]])).get(0, 0)).toBeCloseTo(1, 15);
  });

  it("returns a symmetric positive definite X for Hurwitz A and Q = I (property)", () => {
    fc.assert(
      fc.property(fc.integer({ min: 1, max: 10 }).chain(boundedMatrix), (A0) => {
        const n = A0.rows;
        const A = A0.clone().sub(Matrix.eye(n).mul(n + 0.5)); // Gershgorin: Re λ ≤ −0.5
        const Q = Matrix.eye(n);
        const X = solveContinuousLyapunov(A, Q);
        expectAtMost(continuousResidual(A, Q, X), 1e-12, "relative residual");
        expect(X.isSymmetric()).toBe(true);
        for (let i = 0; i < n; i++) expect(X.get(i, i)).toBeGreaterThan(0);
      }),
      { seed: 2718, numRuns: 80 },
    );
  });

  it("keeps the relative residual ≤ 1e-12 for n = 120", () => {
    const n = 120;
    const A = randomMatrix(n, 99).sub(Matrix.eye(n).mul(8));
    const Q = Matrix.eye(n);
    const X = solveContinuousLyapunov(A, Q);
    expectAtMost(continuousResidual(A, Q, X), 1e-12, "relative residual");
  });

  it("is consistent with the Van Loan noise covariance: Qd = X − Φ X Φᵀ for Hurwitz A", () => {
    // Identity: ∫₀^T e^{As}Qc e^{Aᵀs} ds = X − e^{AT} X e^{AᵀT} with A X + X Aᵀ + Qc = 0
    // (differentiate s ↦ e^{As} X e^{Aᵀs}; textbook identity).
    const A = new Matrix([[-1, 2, 0], [-2, -1, 1], [0, 0, -3]]);
    const Qc = new Matrix([[2, 1, 0], [1, 2, 0], [0, 0, 1]]);
    const T = 0.4;
    const X = solveContinuousLyapunov(A, Qc);
    const Phi = expm(A.clone().mul(T));
    const { Qd } = discreteNoiseCovariance(A, Qc, T);
    expectMatrixClose(Qd, X.clone().sub(Phi.mmul(X).mmul(Phi.transpose())), 1e-13, "Qd vs X − ΦXΦᵀ");
  });

  it("reports singular equations for an eigenvalue at 0 and for an undamped pair ±iω", () => {
    const e1 = expectKind(() => solveContinuousLyapunov(new Matrix([[0, 1], [0, -1]]), Matrix.eye(2)), "singular");
    expect(e1.message).toMatch(/λ \+ μ ≈ 0/);
    const e2 = expectKind(() => solveContinuousLyapunov(new Matrix([[0, 3], [-3, 0]]), Matrix.eye(2)), "singular");
    expect(Math.abs((e2.details.eigenvalueFirst as { im: number }).im)).toBeCloseTo(3, 12);
    // λ = 1 and −1 (not Hurwitz but λ₁ + λ₂ = 0): singular too.
    expectKind(() => solveContinuousLyapunov(new Matrix([[1, 5], [0, -1]]), Matrix.eye(2)), "singular");
  });

  it("solves unstable but non-singular equations (λᵢ + λⱼ ≠ 0)", () => {
    const A = new Matrix([[1, 2], [0, 3]]);
    const Q = new Matrix([[1, 0], [0, 1]]);
    const X = solveContinuousLyapunov(A, Q);
    expectAtMost(continuousResidual(A, Q, X), 1e-15 * 10, "relative residual");
  });

  it("rejects mismatched, empty and non-finite inputs", () => {
    expectKind(() => solveContinuousLyapunov(Matrix.eye(2), Matrix.eye(3)), "shape-mismatch");
    expectKind(() => solveContinuousLyapunov(new Matrix([[1, 2]]), Matrix.eye(1)), "shape-mismatch");
    expectKind(() => solveContinuousLyapunov(new Matrix(0, 0), new Matrix(0, 0)), "empty");
    expectKind(() => solveContinuousLyapunov(new Matrix([[NaN]]), Matrix.eye(1)), "non-finite");
    expectKind(() => solveContinuousLyapunov(Matrix.eye(1).mul(-1), new Matrix([[Infinity]])), "non-finite");
  });
});

describe("discrete Lyapunov equation", () => {
  // Source: test/fixtures/linalg/generate_expm_lyap.py (scipy.linalg.solve_discrete_lyapunov).
  for (const c of fixtures.discreteLyapunov) {
    it(`matches scipy and has a tiny residual for ${c.name}`, () => {
      const A = new Matrix(c.A), Q = new Matrix(c.Q);
      const X = solveDiscreteLyapunov(A, Q);
      expectMatrixClose(X, c.X, 1e-12, c.name, 0);
      expectAtMost(discreteResidual(A, Q, X), 1e-14, "relative residual");
    });
  }

  it("solves the scalar example X = q / (1 − a²)", () => {
    // Hand computation: a²X − X + q = 0 with a = 0.5, q = 3 ⇒ X = 4.
    expect(solveDiscreteLyapunov(new Matrix([[0.5]]), new Matrix([[3]])).get(0, 0)).toBeCloseTo(4, 14);
  });

  it("has relative residual ≤ 1e-12 and a symmetric X for Schur-stable A (property)", () => {
    fc.assert(
      fc.property(fc.integer({ min: 1, max: 10 }).chain(boundedMatrix), (A0) => {
        const n = A0.rows;
        const A = A0.clone().mul(0.9 / n); // ‖A‖∞ ≤ 0.9 ⇒ spectral radius < 1
        const Q = Matrix.eye(n).add(A0.mmul(A0.transpose()));
        const X = solveDiscreteLyapunov(A, Q);
        expectAtMost(discreteResidual(A, Q, X), 1e-12, "relative residual");
        expect(X.isSymmetric()).toBe(true);
      }),
      { seed: 1618, numRuns: 80 },
    );
  });

  it("equals the convergent series Σ Aᵏ Q (Aᵀ)ᵏ for a contraction", () => {
    // Identity: X = Σ_{k≥0} Aᵏ Q (Aᵀ)ᵏ when ρ(A) < 1 (textbook). ρ ≈ 0.6 ⇒ 80 terms reach 1e-17.
    const A = new Matrix([[0.5, 0.2, 0], [-0.3, 0.4, 0.1], [0, 0.2, 0.6]]);
    const Q = new Matrix([[1, 0.5, 0], [0.5, 2, 0], [0, 0, 1]]);
    let term = Q.clone();
    let sum = Q.clone();
    for (let k = 1; k < 80; k++) {
      term = A.mmul(term).mmul(A.transpose());
      sum = sum.add(term);
    }
    expectMatrixClose(solveDiscreteLyapunov(A, Q), sum, 1e-14, "X vs series");
  });

  it("keeps the relative residual ≤ 1e-12 for n = 120 with complex pairs", () => {
    const n = 120;
    const A = randomMatrix(n, 5).mul(1.5 / Math.sqrt(n)); // circular law: spectral radius ≈ 0.43
    const Q = Matrix.eye(n);
    const X = solveDiscreteLyapunov(A, Q);
    expectAtMost(discreteResidual(A, Q, X), 1e-12, "relative residual");
  });

  it("reports singular equations for eigenvalues on the unit circle, naming them", () => {
    const e1 = expectKind(() => solveDiscreteLyapunov(new Matrix([[1, 1], [0, 0.5]]), Matrix.eye(2)), "singular");
    expect(e1.message).toMatch(/λ·μ ≈ 1/);
    const c = Math.cos(0.7), s = Math.sin(0.7);
    expectKind(() => solveDiscreteLyapunov(new Matrix([[c, -s], [s, c]]), Matrix.eye(2)), "singular");
    // λ = 2, μ = 0.5: product 1 although neither is on the unit circle.
    expectKind(() => solveDiscreteLyapunov(new Matrix([[2, 1], [0, 0.5]]), Matrix.eye(2)), "singular");
  });

  it("rejects mismatched, empty and non-finite inputs", () => {
    expectKind(() => solveDiscreteLyapunov(Matrix.eye(2), Matrix.eye(3)), "shape-mismatch");
    expectKind(() => solveDiscreteLyapunov(new Matrix(0, 0), new Matrix(0, 0)), "empty");
    expectKind(() => solveDiscreteLyapunov(new Matrix([[NaN]]), Matrix.eye(1)), "non-finite");
    expectKind(() => solveDiscreteLyapunov([[0.5]] as unknown as Matrix, Matrix.eye(1)), "invalid-argument");
  });
});
