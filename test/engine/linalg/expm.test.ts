import { describe, it, expect } from "vitest";
import fc from "fast-check";
import { Matrix } from "ml-matrix";
import { expm } from "../../../shared-engine/linalg/expm";
import { expmIntegral, discreteNoiseCovariance } from "../../../shared-engine/linalg/vanLoan";
import { expectMatrixClose, expectAtMost, frobeniusDifference, frobenius, expectEngineError as expectKind } from "../../helpers/assertions";
import fixtures from "../../fixtures/linalg/expm_lyap.json";

describe("expm against scipy.linalg.expm fixtures", () => {
  // Source: test/fixtures/linalg/generate_expm_lyap.py (scipy.linalg.expm, versions in the JSON).
  for (const c of fixtures.expm) {
    it(`matches the reference to 1e-12 relative for ${c.name}`, () => {
      const E = expm(c.A);
      expect(frobenius(c.expA), "reference is not negligible").toBeGreaterThan(1e-100);
      expectMatrixClose(E, c.expA, 1e-12, c.name, 0);
    });
  }
});

describe("expm closed forms", () => {
  it("rotation generator [[0,−w],[w,0]] exponentiates to the rotation by angle w", () => {
    // Closed form: e^{[[0,−w],[w,0]]} = [[cos w, −sin w],[sin w, cos w]] (common textbook identity).
    for (const w of [1e-6, 0.3, 1, Math.PI, 10, 100]) {
      const E = expm([[0, -w], [w, 0]]);
      expectMatrixClose(E, [[Math.cos(w), -Math.sin(w)], [Math.sin(w), Math.cos(w)]], 2e-14 * Math.max(1, w), `w = ${w}`);
    }
  });

  it("nilpotent shift generator gives the finite series I + N + N²/2 + … (entries t^k/k!)", () => {
    // Closed form: for the n×n upper shift N, e^{tN}[i][i+k] = t^k / k! (finite Taylor series).
    for (const [n, t] of [[4, 1], [6, 2.5], [8, 10]] as const) {
      const A = Matrix.zeros(n, n);
      for (let i = 0; i + 1 < n; i++) A.set(i, i + 1, t);
      const expected = Matrix.zeros(n, n);
      let fact = 1;
      for (let k = 0; k < n; k++) {
        if (k > 0) fact *= k;
        for (let i = 0; i + k < n; i++) expected.set(i, i + k, Math.pow(t, k) / fact);
      }
      expectMatrixClose(expm(A), expected, 1e-14, `n = ${n}, t = ${t}`);
    }
  });

  it("general strictly upper triangular generator matches its finite series", () => {
    // Closed form: N nilpotent (N³ = 0 for 3×3 strictly upper) ⇒ e^N = I + N + N²/2.
    const N = new Matrix([[0, 2, -3], [0, 0, 5], [0, 0, 0]]);
    const expected = new Matrix(Matrix.eye(3).add(N).add(N.mmul(N).mul(0.5)));
    expectMatrixClose(expm(N), expected, 1e-15, "e^N");
  });

  it("1×1 input returns the scalar exponential and zero gives the identity", () => {
    for (const a of [-700, -3, 0, 1e-10, 2, 700]) {
      const e = expm([[a]]).get(0, 0);
      expect(Math.abs(e - Math.exp(a))).toBeLessThanOrEqual(4 * Number.EPSILON * Math.exp(a));
    }
    expectMatrixClose(expm(new Matrix(5, 5)), Matrix.eye(5), 0, "e^0");
  });

  it("diagonal input exponentiates entrywise on the diagonal", () => {
    const d = [-50, -1, 0, 0.5, 3];
    const E = expm(new Matrix(Matrix.diag(d)));
    expectMatrixClose(E, Matrix.diag(d.map(Math.exp)), 1e-14, "diag");
  });

  it("does not modify its argument", () => {
    const A = new Matrix([[1, 2], [3, -4]]);
    const before = A.to2DArray();
    expm(A);
    expect(A.to2DArray()).toEqual(before);
  });
});

describe("expm properties", () => {
  const smallMatrix = (n: number, scale: number) =>
    fc.array(fc.integer({ min: -1000, max: 1000 }), { minLength: n * n, maxLength: n * n }).map((v) => {
      const m = new Matrix(n, n);
      v.forEach((x, k) => m.set(Math.floor(k / n), k % n, (x / 1000) * scale));
      return m;
    });

  it("e^A · e^{−A} is the identity for bounded random A", () => {
    fc.assert(
      fc.property(fc.integer({ min: 1, max: 8 }).chain((n) => smallMatrix(n, 3)), (A) => {
        const P = expm(A).mmul(expm(A.clone().mul(-1)));
        // cond(e^A) ≤ e^{2‖A‖}; ‖A‖ ≤ 24 here, so allow a generous rounding multiple.
        expectMatrixClose(P, Matrix.eye(A.rows), 1e-11 * Math.exp(0.5 * A.norm("frobenius")), "e^A e^{−A}");
      }),
      { seed: 12345, numRuns: 60 },
    );
  });

  it("e^{2A} equals (e^A)² and commutes with A", () => {
    fc.assert(
      fc.property(fc.integer({ min: 1, max: 8 }).chain((n) => smallMatrix(n, 2)), (A) => {
        const E = expm(A);
        const E2 = expm(A.clone().mul(2));
        expectMatrixClose(E.mmul(E), E2, 1e-12, "(e^A)² vs e^{2A}");
        const comm = A.mmul(E).sub(E.mmul(A));
        expectAtMost(frobenius(comm), 1e-13 * Math.max(1, frobenius(A) * frobenius(E)), "‖A e^A − e^A A‖");
      }),
      { seed: 4242, numRuns: 60 },
    );
  });

  it("det(e^A) equals e^{trace A}", () => {
    fc.assert(
      fc.property(fc.integer({ min: 2, max: 3 }).chain((n) => smallMatrix(n, 2)), (A) => {
        const det = expm(A);
        const d = det.rows === 2
          ? det.get(0, 0) * det.get(1, 1) - det.get(0, 1) * det.get(1, 0)
          : det.get(0, 0) * (det.get(1, 1) * det.get(2, 2) - det.get(1, 2) * det.get(2, 1)) -
            det.get(0, 1) * (det.get(1, 0) * det.get(2, 2) - det.get(1, 2) * det.get(2, 0)) +
            det.get(0, 2) * (det.get(1, 0) * det.get(2, 1) - det.get(1, 1) * det.get(2, 0));
        const expected = Math.exp(A.trace());
        expect(Math.abs(d - expected)).toBeLessThanOrEqual(1e-12 * Math.max(1, expected) * Math.exp(A.norm("frobenius")));
      }),
      { seed: 777, numRuns: 60 },
    );
  });
});

describe("expm input errors", () => {
  it("rejects non-square, empty, NaN and Infinity inputs with typed errors", () => {
    expectKind(() => expm([[1, 2, 3], [4, 5, 6]]), "shape-mismatch");
    expectKind(() => expm([]), "empty");
    expectKind(() => expm([[1, NaN], [0, 1]]), "non-finite");
    expectKind(() => expm([[Infinity]]), "non-finite");
    expectKind(() => expm([[1, 2], [3]]), "shape-mismatch");
  });

  it("reports overflow of e^A as non-finite instead of returning Infinity", () => {
    expectKind(() => expm([[800]]), "non-finite");
    expectKind(() => expm([[1e308, 1e308], [1e308, 1e308]]), "non-finite");
  });

  it("handles very large negative norm without overflow (e^{−1e4·I} underflows to zero)", () => {
    const E = expm(Matrix.eye(3).mul(-1e4));
    expect(E.to2DArray().flat().every((v) => v === 0)).toBe(true);
  });
});

describe("Van Loan integrals", () => {
  // Source: test/fixtures/linalg/generate_expm_lyap.py (scipy.signal.cont2discrete zoh).
  for (const c of fixtures.zoh) {
    it(`zero-order hold matches cont2discrete to 1e-12 for ${c.name}`, () => {
      const { Phi, Gamma } = expmIntegral(new Matrix(c.A), new Matrix(c.B), c.T);
      expectMatrixClose(Phi, c.Phi, 1e-12, "Phi", 0);
      expectMatrixClose(Gamma, c.Gamma, 1e-12, "Gamma", 0);
    });
  }

  it("double integrator gives Φ = [[1,T],[0,1]] and Γ = [[T²/2],[T]]", () => {
    // Closed form (textbook, from memory): ZOH of ẍ = u.
    for (const T of [1e-4, 0.01, 0.5, 3, 40]) {
      const { Phi, Gamma } = expmIntegral(new Matrix([[0, 1], [0, 0]]), new Matrix([[0], [1]]), T);
      expectMatrixClose(Phi, [[1, T], [0, 1]], 1e-15, `Phi, T = ${T}`);
      expectMatrixClose(Gamma, [[(T * T) / 2], [T]], 1e-15, `Gamma, T = ${T}`);
    }
  });

  it("for invertible A, Γ equals A⁻¹(Φ − I)B", () => {
    // Identity ∫₀^T e^{As} ds = A⁻¹(e^{AT} − I) for invertible A (common textbook identity).
    const A = new Matrix([[-1, 2, 0], [0, -3, 1], [1, 0, -2]]);
    const B = new Matrix([[1, 0], [0, 1], [1, 1]]);
    const { Phi, Gamma } = expmIntegral(A, B, 0.7);
    const AGamma = A.mmul(Gamma);
    expectMatrixClose(AGamma, Phi.clone().sub(Matrix.eye(3)).mmul(B), 1e-14, "A Γ vs (Φ − I) B");
  });

  it("accepts B with no columns", () => {
    const { Phi, Gamma } = expmIntegral(new Matrix([[-1]]), new Matrix(1, 0), 1);
    expect(Gamma.rows).toBe(1);
    expect(Gamma.columns).toBe(0);
    expect(Math.abs(Phi.get(0, 0) - Math.exp(-1))).toBeLessThan(1e-16);
  });

  // Source: test/fixtures/linalg/generate_expm_lyap.py (scipy.integrate.quad_vec of the integrand).
  for (const c of fixtures.noiseCovariance) {
    it(`noise covariance matches numerical quadrature for ${c.name}`, () => {
      const { Phi, Qd } = discreteNoiseCovariance(new Matrix(c.A), new Matrix(c.Qc), c.T);
      expectMatrixClose(Phi, c.Phi, 1e-12, "Phi", 0);
      // quad_vec was asked for 1e-13 relative; allow 1e-11.
      expectMatrixClose(Qd, c.Qd, 1e-11, "Qd", 0);
      expect(Qd.isSymmetric()).toBe(true);
    });
  }

  it("scalar integrator noise covariance is Qc·T and white noise on a double integrator gives the known Qd", () => {
    // Closed form: A = 0 ⇒ Qd = Qc T. Double integrator with Qc = diag(0, q):
    // Qd = q [[T³/3, T²/2], [T²/2, T]] (textbook, from memory).
    const r1 = discreteNoiseCovariance(new Matrix([[0]]), new Matrix([[2]]), 0.5);
    expect(Math.abs(r1.Qd.get(0, 0) - 1)).toBeLessThan(1e-15);
    const T = 0.2;
    const q = 3;
    const r2 = discreteNoiseCovariance(new Matrix([[0, 1], [0, 0]]), new Matrix([[0, 0], [0, q]]), T);
    expectMatrixClose(r2.Qd, [[(q * T ** 3) / 3, (q * T ** 2) / 2], [(q * T ** 2) / 2, q * T]], 1e-14, "Qd");
  });

  it("rejects non-positive or non-finite T, mismatched shapes, NaN and asymmetric Qc", () => {
    const A = new Matrix([[0, 1], [0, 0]]);
    const B = new Matrix([[0], [1]]);
    expectKind(() => expmIntegral(A, B, 0), "invalid-argument");
    expectKind(() => expmIntegral(A, B, -1), "invalid-argument");
    expectKind(() => expmIntegral(A, B, NaN), "non-finite");
    expectKind(() => expmIntegral(A, B, Infinity), "non-finite");
    expectKind(() => expmIntegral(A, new Matrix([[1], [2], [3]]), 1), "shape-mismatch");
    expectKind(() => expmIntegral(new Matrix([[0, 1]]), B, 1), "shape-mismatch");
    expectKind(() => expmIntegral(A, new Matrix([[NaN], [1]]), 1), "non-finite");
    expectKind(() => discreteNoiseCovariance(A, new Matrix([[1, 2], [0, 1]]), 1), "invalid-argument");
    expectKind(() => discreteNoiseCovariance(A, new Matrix([[1]]), 1), "shape-mismatch");
    expectKind(() => discreteNoiseCovariance(A, Matrix.eye(2), -0.1), "invalid-argument");
  });

  const boundedRect = (rows: number, cols: number, scale: number) =>
    fc.array(fc.integer({ min: -1000, max: 1000 }), { minLength: rows * cols, maxLength: rows * cols }).map((v) => {
      const m = new Matrix(rows, cols);
      v.forEach((x, k) => m.set(Math.floor(k / cols), k % cols, (x / 1000) * scale));
      return m;
    });

  it("Φ equals e^{AT} and A·Γ equals (Φ − I)·B for random bounded A, B, T (property)", () => {
    const problem = fc
      .tuple(fc.integer({ min: 1, max: 6 }), fc.integer({ min: 1, max: 3 }), fc.integer({ min: 1, max: 200 }))
      .chain(([n, m, t]) => fc.tuple(boundedRect(n, n, 2), boundedRect(n, m, 1), fc.constant(t / 100)));
    fc.assert(
      fc.property(problem, ([A, B, T]) => {
        const { Phi, Gamma } = expmIntegral(A, B, T);
        expectMatrixClose(Phi, expm(A.clone().mul(T)), 1e-13, "Φ vs e^{AT}");
        // Identity A∫₀^T e^{As}ds = e^{AT} − I (exact for any A, singular or not).
        const lhs = A.mmul(Gamma);
        const rhs = Phi.clone().sub(Matrix.eye(A.rows)).mmul(B);
        expectAtMost(frobeniusDifference(lhs, rhs), 1e-13 * Math.max(1, frobenius(A) * frobenius(Gamma)), "‖AΓ − (Φ − I)B‖");
      }),
      { seed: 6060, numRuns: 60 },
    );
  });

  it("Qd is symmetric positive semidefinite for Qc = LLᵀ (property)", () => {
    const problem = fc
      .tuple(fc.integer({ min: 1, max: 5 }), fc.integer({ min: 1, max: 100 }))
      .chain(([n, t]) => fc.tuple(boundedRect(n, n, 2), boundedRect(n, n, 1), fc.constant(t / 100)));
    fc.assert(
      fc.property(problem, ([A, L, T]) => {
        const Qc = L.mmul(L.transpose());
        for (let i = 0; i < Qc.rows; i++) for (let j = 0; j < i; j++) Qc.set(i, j, Qc.get(j, i)); // exact symmetry
        const { Qd } = discreteNoiseCovariance(A, Qc, T);
        expect(Qd.isSymmetric()).toBe(true);
        // xᵀ Qd x ≥ −tol for the coordinate and all-ones directions (PSD up to rounding).
        const n = A.rows;
        const scale = 1e-13 * Math.max(1e-300, frobenius(Qd));
        for (let i = 0; i < n; i++) expect(Qd.get(i, i)).toBeGreaterThanOrEqual(-scale);
        let ones = 0;
        for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) ones += Qd.get(i, j);
        expect(ones).toBeGreaterThanOrEqual(-scale * n);
      }),
      { seed: 9090, numRuns: 60 },
    );
  });

  it("Van Loan Γ agrees with a fine Simpson quadrature of e^{As}B", () => {
    // Independent check: composite Simpson rule on 2000 panels (error O(h⁴) ≈ 1e-13 here).
    const A = new Matrix([[-0.5, 2], [-2, -0.5]]);
    const B = new Matrix([[1], [0.5]]);
    const T = 1;
    const { Gamma } = expmIntegral(A, B, T);
    const N = 2000;
    const h = T / N;
    let acc = Matrix.zeros(2, 1);
    for (let k = 0; k <= N; k++) {
      const w = k === 0 || k === N ? 1 : k % 2 === 1 ? 4 : 2;
      acc = acc.add(expm(A.clone().mul(k * h)).mmul(B).mul(w));
    }
    acc.mul(h / 3);
    expectAtMost(frobeniusDifference(Gamma, acc), 1e-12 * frobenius(acc), "‖Γ − Simpson‖");
  });
});
