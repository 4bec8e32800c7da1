import { describe, it, expect } from "vitest";
import { Matrix } from "ml-matrix";
import { expm } from "../../../shared-engine/linalg/expm";
import {
  expmParameters, LEADING_COEFFICIENT_RECIPROCALS, THETA_3, THETA_5, THETA_7, THETA_9, THETA_13, THETA_13_BOUND,
} from "../../../shared-engine/linalg/expmSelection";
import { expectMatrixClose, expectRelativeClose, frobenius } from "../../helpers/assertions";
import fixtures from "../../fixtures/linalg/expm_selection.json";

function rowMajor(rows: number[][]): Float64Array {
  const n = rows.length;
  const out = new Float64Array(n * n);
  rows.forEach((row, i) => row.forEach((v, j) => { out[i * n + j] = v; }));
  return out;
}

describe("expm selection constants", () => {
  // Source: test/fixtures/linalg/generate_expm_selection.py (exact rational series of
  // log(e^{-x} r_m(x)) and a 50-digit bisection for h̃(θ)/θ = 2^-53, mpmath version in the JSON).
  const byDegree = new Map(fixtures.constants.map((c) => [c.m, c]));

  it("θ_3 … θ_9 and the degree-13 backward-error bound equal the values computed from the series", () => {
    // The published 16-digit θ_5 and θ_9 (kept: scipy uses the same) differ from the computed
    // values in their last digit (…3230 vs …3232, …7068 vs …7067), so compare to 15 digits.
    const ours: Record<number, number> = { 3: THETA_3, 5: THETA_5, 7: THETA_7, 9: THETA_9, 13: THETA_13_BOUND };
    for (const m of [3, 5, 7, 9, 13]) expectRelativeClose(ours[m]!, byDegree.get(m)!.theta, 1e-15, `θ_${m}`);
    // Algorithm 3.1's θ_13 is below the bound: it can only add squarings.
    expect(THETA_13).toBeLessThan(THETA_13_BOUND);
  });

  it("the leading coefficients c_{2m+1} of the backward-error series match the series", () => {
    for (const m of [3, 5, 7, 9, 13]) {
      const c = byDegree.get(m)!;
      expect(c.leadingPower).toBe(2 * m + 1);
      expectRelativeClose(LEADING_COEFFICIENT_RECIPROCALS[m]!, Number(c.reciprocalLeadingCoefficient), Number.EPSILON, `1/c_${2 * m + 1}`);
    }
  });

  it("θ_13 = 4.25 separates zero and one squaring for a normal matrix, as in scipy's selection", () => {
    // Source: generate_expm_selection.py "thetaProbe" (scipy pick_pade_structure on c·[[0,1],[−1,0]]).
    for (const probe of fixtures.thetaProbe) {
      const ours = expmParameters(rowMajor(probe.A), probe.A.length);
      expect({ degree: ours.degree, squarings: ours.squarings }).toEqual(probe.scipy);
    }
  });
});

describe("Al-Mohy–Higham selection against scipy", () => {
  // Source: test/fixtures/linalg/generate_expm_selection.py (scipy.linalg.expm and scipy's own
  // (m, s) from pick_pade_structure on the matrix after our trace shift; versions in the JSON).
  for (const c of fixtures.cases) {
    it(`picks scipy's degree and squarings and matches e^A to 1e-12 for ${c.name}`, () => {
      const n = c.A.length;
      const ours = expmParameters(rowMajor(c.A), n);
      expect({ degree: ours.degree, squarings: ours.squarings }, c.name).toEqual(c.scipy);
      expectRelativeClose(ours.traceShift, c.traceShift, 1e-15, "trace shift", 1e-300);
      // The 2009 selection never squares more than the 2005 one on these inputs, and here it
      // always picks another (m, s).
      expect(ours.squarings).toBeLessThanOrEqual(c.old.squarings);
      expect(ours.degree !== c.old.degree || ours.squarings !== c.old.squarings).toBe(true);
      const E = expm(new Matrix(c.A));
      expect(frobenius(c.expA)).toBeGreaterThan(1e-100);
      expectMatrixClose(E, c.expA, 1e-12, c.name, 0);
    });
  }

  it("the motivating example [[1, b], [0, −1]] is exact to a few ulps for b up to 1e8", () => {
    // Closed form (Al-Mohy & Higham 2009, §1, from memory; A² = I gives it directly):
    // e^A = [[e, b·sinh 1], [0, 1/e]]. The 2005 selection took log₂ b squarings here.
    for (const c of fixtures.cases.filter((k) => k.closedForm && k.name.startsWith("Al-Mohy"))) {
      expectMatrixClose(expm(new Matrix(c.A)), c.closedForm!, 4 * Number.EPSILON, c.name, 0);
    }
  });

  it("a banded nilpotent matrix of index 8 needs no squaring and matches its finite series", () => {
    // Closed form: A⁸ = 0 ⇒ e^A = Σ_{k<8} A^k/k! (numpy sum in the generator; all terms ≥ 0).
    const c = fixtures.cases.find((k) => k.name.startsWith("banded nilpotent"))!;
    expect(expmParameters(rowMajor(c.A), c.A.length).squarings).toBe(0);
    expectMatrixClose(expm(new Matrix(c.A)), c.closedForm!, 1e-14, c.name, 0);
  });
});

// The generator's formula matrices (generate_expm_selection.py), rebuilt exactly here.
function bandedNilpotent(n: number): Matrix {
  const A = Matrix.zeros(n, n);
  for (let i = 0; i < n; i++) for (let j = i + 6; j < n; j++) A.set(i, j, (((i + 2 * j) % 5) + 1) / 2);
  return A;
}

function shiftPlusDiagonal(n: number): { A: Matrix; expA: Matrix } {
  // P (J ⊕ D) Pᵀ with P: i ↦ 7i mod n; e^{P B Pᵀ} = P e^B Pᵀ and e^{J ⊕ D} = e^J ⊕ e^D, where
  // e^J = Σ_{k<5} J^k/k! has 10^k/k! on its k-th superdiagonal (J⁵ = 0).
  const B = Matrix.zeros(n, n), E = Matrix.zeros(n, n);
  for (let i = 0; i < 4; i++) B.set(i, i + 1, 10);
  let factorial = 1;
  for (let k = 0; k < 5; k++) {
    if (k > 0) factorial *= k;
    for (let i = 0; i + k < 5; i++) E.set(i, i + k, 10 ** k / factorial);
  }
  for (let k = 5; k < n; k++) {
    const d = (((7 * k) % 37) - 18) / 10;
    B.set(k, k, d);
    E.set(k, k, Math.exp(d));
  }
  const A = Matrix.zeros(n, n), expA = Matrix.zeros(n, n);
  for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) {
    A.set((7 * i) % n, (7 * j) % n, B.get(i, j));
    expA.set((7 * i) % n, (7 * j) % n, E.get(i, j));
  }
  return { A, expA };
}

describe("Al-Mohy–Higham selection with estimated ‖A⁸‖₁, ‖A¹⁰‖₁ (n > 40)", () => {
  // Source: generate_expm_selection.py "formulaCases" (scipy's (m, s) and ‖scipy.linalg.expm(A)‖_F).
  for (const c of fixtures.formulaCases) {
    it(`picks scipy's degree and squarings and the closed form for the ${c.recipe} matrix (n = ${c.n})`, () => {
      let A: Matrix, expected: Matrix;
      if (c.recipe === "banded-nilpotent") {
        // Closed form: A⁸ = 0 ⇒ e^A = Σ_{k<8} A^k/k! (all terms ≥ 0, so the sum is accurate).
        A = bandedNilpotent(c.n);
        expected = Matrix.eye(c.n);
        let term = Matrix.eye(c.n);
        for (let k = 1; k < 8; k++) { term = term.mmul(A).div(k); expected = expected.add(term); }
      } else {
        ({ A, expA: expected } = shiftPlusDiagonal(c.n));
      }
      const ours = expmParameters(rowMajor(A.to2DArray()), c.n);
      expect({ degree: ours.degree, squarings: ours.squarings }).toEqual(c.scipy);
      expect(ours.squarings).toBeLessThan(c.old.squarings);
      const E = expm(A);
      expectMatrixClose(E, expected, 1e-13, c.recipe, 0);
      expectRelativeClose(frobenius(E), c.expmCheck, 1e-12, "‖e^A‖_F against scipy");
    });
  }
});

describe("expm selection edge cases", () => {
  it("a nilpotent matrix of norm 1e30 (above the pre-scaling limit 2^90) is exponentiated exactly", () => {
    // Closed form: N² = 0 ⇒ e^N = I + N. The pre-scaling adds squarings; Code Fragment 2.1 keeps
    // the triangular result exact.
    const E = expm([[0, 1e30], [0, 0]]);
    expect(E.to2DArray()).toEqual([[1, 1e30], [0, 1]]);
    const p = expmParameters(Float64Array.from([0, 1e30, 0, 0]), 2);
    expect(p.squarings).toBeGreaterThan(0);
  });

  it("an extremely non-normal [[1, b], [0, −1]] (b = 1e17) falls back to the 2005 scaling and stays exact", () => {
    // Closed form (Al-Mohy & Higham 2009, §1, from memory): e^A = [[e, b·sinh 1], [0, 1/e]]. With
    // s = 0 the Padé denominator has a pivot below n·ε·‖q‖₁ and the LU reports it; the fallback
    // squares, and Code Fragment 2.1 keeps the triangular result exact.
    const b = 1e17;
    expectMatrixClose(expm([[1, b], [0, -1]]), [[Math.E, b * Math.sinh(1)], [0, Math.exp(-1)]], 4 * Number.EPSILON, "e^A", 0);
  });

  it("lower triangular input with squarings keeps its zero pattern and matches the upper case transposed", () => {
    // Identity: e^{Aᵀ} = (e^A)ᵀ (common textbook identity).
    const U = [[-1, 200, 7], [0, 3, -90], [0, 0, 0.5]];
    const L = U[0]!.map((_, j) => U.map((row) => row[j]!));
    const eU = expm(U), eL = expm(L);
    // The trace shift is taken for U but not for Uᵀ (their 1-norms differ), so not bit for bit.
    expectMatrixClose(eL, eU.transpose(), 1e-14, "e^{Uᵀ} vs (e^U)ᵀ", 0);
    for (let i = 0; i < 3; i++) for (let j = i + 1; j < 3; j++) expect(eL.get(i, j)).toBe(0);
    expect(expmParameters(rowMajor(U), 3).squarings).toBeGreaterThan(0);
  });

  it("diagonal input gets the scalar exponentials on its diagonal to rounding (Code Fragment 2.1)", () => {
    // exp(d − μ)·e^μ with μ = mean(d) rounded: a few ulps times |d|.
    const d = [-50, -1, 0, 0.5, 30];
    const E = expm(new Matrix(Matrix.diag(d)));
    for (let i = 0; i < d.length; i++) expectRelativeClose(E.get(i, i), Math.exp(d[i]!), 4e-15 * Math.max(1, Math.abs(d[i]!)), `e^${d[i]}`);
    for (let i = 0; i < d.length; i++) for (let j = 0; j < d.length; j++) if (i !== j) expect(E.get(i, j)).toBe(0);
  });

  it("orders above the cached workspace (n = 70) satisfy e^A e^{−A} = I", () => {
    // Deterministic entries in [−0.5, 0.5) scaled to ‖A‖₁ ≈ 6 (common practice: identity check).
    const n = 70;
    let state = 12345;
    const A = new Matrix(n, n);
    for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) {
      state = (state * 16807) % 2147483647;
      A.set(i, j, (state / 2147483647 - 0.5) * (12 / n));
    }
    const P = expm(A).mmul(expm(A.clone().mul(-1)));
    expectMatrixClose(P, Matrix.eye(n), 1e-12, "e^A e^{−A}");
  });
});
