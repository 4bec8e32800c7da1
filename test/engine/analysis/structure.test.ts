import { describe, expect, it } from "vitest";
import fc from "fast-check";
import { Matrix, QrDecomposition, SingularValueDecomposition } from "ml-matrix";
import { stateSpaceFromMatrices } from "../../../shared-engine/model";
import { numericalRank, type Complex } from "../../../shared-engine/linalg";
import { structure, controllabilityStaircase } from "../../../shared-engine/analysis/structure";
import { poles } from "../../../shared-engine/analysis/poles";
import { stability } from "../../../shared-engine/analysis/stability";
import { dcGain } from "../../../shared-engine/analysis/dcGain";
import { expectAtMost, expectComplexSetsClose, expectMatrixClose, seededMatrix } from "../../helpers/assertions";
import { expectEngineError } from "../model/modelTestUtils";

/** Random orthogonal n×n from the QR factor of a seeded matrix. */
function orthogonal(n: number, seed: number): Matrix {
  return new QrDecomposition(new Matrix(seededMatrix(n, n, seed))).orthogonalMatrix;
}

/** PBH test, independent of the staircase: σ_min of the real form of [A − λI, B], relative to ‖[A B]‖_F. */
function pbhGap(A: Matrix, B: Matrix, l: Complex): number {
  const n = A.rows, m = B.columns;
  const M = new Matrix(2 * n, 2 * (n + m));
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < n; j++) {
      const v = A.get(i, j) - (i === j ? l.re : 0);
      M.set(i, j, v);
      M.set(n + i, n + j, v);
    }
    M.set(i, n + i, l.im);
    M.set(n + i, i, -l.im);
    for (let j = 0; j < m; j++) {
      M.set(i, 2 * n + j, B.get(i, j));
      M.set(n + i, 2 * n + m + j, B.get(i, j));
    }
  }
  const sv = new SingularValueDecomposition(M.transpose(), { computeLeftSingularVectors: false, computeRightSingularVectors: false }).diagonal;
  const scale = Math.hypot(A.norm("frobenius"), B.norm("frobenius"));
  return sv[2 * n - 1]! / scale;
}

describe("structure: controllability and observability by the staircase form", () => {
  it("names an unstable uncontrollable mode and says the pair is not stabilizable", () => {
    // hand-worked: x2' = 2x2 is not driven by u; y = x1 + x2 sees both modes.
    const r = structure(stateSpaceFromMatrices({ A: [[-1, 0], [0, 2]], B: [[1], [0]], C: [[1, 1]] }));
    expect(r).toMatchObject({ controllable: false, observable: true, stabilizable: false, detectable: true, controllableDimension: 1, observableDimension: 2 });
    expectComplexSetsClose(r.uncontrollableModes, [{ re: 2, im: 0 }], 1e-14);
    expectComplexSetsClose(r.unstableUncontrollableModes, [{ re: 2, im: 0 }], 1e-14);
  });

  it("names a stable unobservable complex pair and says the pair is still detectable", () => {
    // hand-worked: states 2, 3 form the oscillator −1 ± 3i that y = x1 never sees.
    const r = structure(stateSpaceFromMatrices({ A: [[-2, 0, 0], [0, -1, 3], [0, -3, -1]], B: [[1], [1], [1]], C: [[1, 0, 0]] }));
    expect(r).toMatchObject({ controllable: true, observable: false, detectable: true, observableDimension: 1 });
    expectComplexSetsClose(r.unobservableModes, [{ re: -1, im: 3 }, { re: -1, im: -3 }], 1e-13);
    expect(r.unstableUnobservableModes).toEqual([]);
  });

  it("finds an uncontrollable mode 1e-6 away from a controllable one, after a random rotation", () => {
    // planted: Ã = [[A_c, a12], [0, −1 − 1e−6]], B̃ = [b_c; 0] with A_c having eigenvalues −1, −3.
    const At = new Matrix([[-1, 1, 0.5], [0, -3, 0.25], [0, 0, -1 - 1e-6]]);
    const Bt = new Matrix([[0], [1], [0]]);
    const Q = orthogonal(3, 11);
    const model = stateSpaceFromMatrices({ A: Q.mmul(At).mmul(Q.transpose()), B: Q.mmul(Bt), C: [[1, 1, 1]] });
    const r = structure(model);
    expect(r.controllableDimension).toBe(2);
    expect(r.uncontrollableModes).toHaveLength(1);
    expectAtMost(Math.abs(r.uncontrollableModes[0]!.re - (-1 - 1e-6)), 1e-12, "error of the uncontrollable mode");
    expect(r.stabilizable).toBe(true);
    // PBH agrees: rank drop at −1 − 1e−6 only
    expectAtMost(pbhGap(model.A, model.B, { re: -1 - 1e-6, im: 0 }), 1e-14, "PBH gap at the planted mode");
    expect(pbhGap(model.A, model.B, { re: -1, im: 0 })).toBeGreaterThan(1e-8);
  });

  it("calls a pair controllable whose controllability matrix is numerically rank deficient", () => {
    // in the spirit of C. C. Paige, IEEE TAC 26(1), 1981 (recalled from memory): A = diag(2^−k),
    // k = 0..13, b = ones. Distinct eigenvalues and no zero entry of b ⇒ controllable (PBH,
    // hand-worked); the PBH gap stays above 1e−5 while [b, Ab, …, A¹³b] has numerical rank ≈ 10.
    const n = 14;
    const A = Matrix.diag(Array.from({ length: n }, (_, k) => 2 ** -k));
    const b = new Matrix(Matrix.ones(n, 1));
    const K = new Matrix(n, n);
    let v = b.clone();
    for (let k = 0; k < n; k++) { K.setColumn(k, v.getColumn(0)); v = A.mmul(v); }
    expect(numericalRank(K).rank).toBeLessThan(n);
    const r = structure(stateSpaceFromMatrices({ A, B: b, C: new Matrix(Matrix.ones(1, n)) }));
    expect(r.controllable).toBe(true);
    expect(r.observable).toBe(true);
    for (let k = 0; k < n; k++) expect(pbhGap(A, b, { re: 2 ** -k, im: 0 })).toBeGreaterThan(1e-6);
  });

  it("treats a model with no inputs as having every mode uncontrollable and a static gain as trivially controllable", () => {
    const noInputs = structure(stateSpaceFromMatrices({ A: [[-1, 0], [0, 3]], B: [[], []], C: [[1, 0]] }));
    expect(noInputs).toMatchObject({ controllableDimension: 0, stabilizable: false });
    expectComplexSetsClose(noInputs.uncontrollableModes, [{ re: -1, im: 0 }, { re: 3, im: 0 }], 1e-14);
    const zeroB = structure(stateSpaceFromMatrices({ A: [[-1]], B: [[0]], C: [[1]] }));
    expect(zeroB).toMatchObject({ controllable: false, stabilizable: true });
    expect(structure(stateSpaceFromMatrices({ A: [], B: [], C: [], D: [[1]] }))).toMatchObject({ controllable: true, observable: true });
  });

  it("judges stabilizability of a sampled model against the unit circle", () => {
    // hand-worked: uncontrollable mode z = 0.5 is stable in discrete time, z = 1.5 is not.
    const stableMode = structure(stateSpaceFromMatrices({ A: [[0.5, 0], [0, 2]], B: [[0], [1]], C: [[1, 1]], sampleTime: 0.1 }));
    expect(stableMode.stabilizable).toBe(true);
    const unstableMode = structure(stateSpaceFromMatrices({ A: [[1.5, 0], [0, 0.2]], B: [[0], [1]], C: [[1, 1]], sampleTime: 0.1 }));
    expect(unstableMode.stabilizable).toBe(false);
  });

  it("the staircase is an orthogonal similarity with exact zeros below the controllable part", () => {
    const A = new Matrix(seededMatrix(6, 6, 5));
    const B = new Matrix(seededMatrix(6, 2, 6));
    const s = controllabilityStaircase(A, B);
    expectMatrixClose(s.Z.mmul(s.A).mmul(s.Z.transpose()), A, 1e-14, "Z Ã Zᵀ");
    expectMatrixClose(s.Z.mmul(s.B), B, 1e-14, "Z B̃");
    expectMatrixClose(s.Z.transpose().mmul(s.Z), Matrix.eye(6), 1e-14, "ZᵀZ");
    expect(s.blockSizes).toEqual([2, 2, 2]);
    expectEngineError(() => controllabilityStaircase(A, B, -1), "invalid-argument", /tol must be a finite non-negative number/);
  });

  it("reduces a 40-state single-input pair with 10 planted uncontrollable states one state per step", () => {
    // planted: Ã = [[A_c, A_12], [0, A_u]] (30 + 10 states), b̃ = [b_c; 0], rotated by a random Q.
    // Checks: Z orthogonal and Z Ã Zᵀ = A to rounding (common practice), 30 blocks of size 1
    // (single input), and every reported mode failing the PBH rank test (Hautus 1969), which
    // the SVD in `pbhGap` decides independently of the staircase.
    const n = 40, nc = 30;
    const At = new Matrix(seededMatrix(n, n, 71)).mul(4);
    for (let i = nc; i < n; i++) for (let j = 0; j < nc; j++) At.set(i, j, 0);
    const Bt = new Matrix(seededMatrix(n, 1, 72));
    for (let i = nc; i < n; i++) Bt.set(i, 0, 0);
    const Q = orthogonal(n, 73);
    const A = Q.mmul(At).mmul(Q.transpose());
    const B = Q.mmul(Bt);
    const s = controllabilityStaircase(A, B);
    expect(s.controllableDimension).toBe(nc);
    expect(s.blockSizes).toEqual(Array.from({ length: nc }, () => 1));
    expectMatrixClose(s.Z.transpose().mmul(s.Z), Matrix.eye(n), 1e-13, "ZᵀZ");
    expectMatrixClose(s.Z.mmul(s.A).mmul(s.Z.transpose()), A, 1e-12, "Z Ã Zᵀ");
    expectMatrixClose(s.Z.mmul(s.B), B, 1e-13, "Z b̃");
    for (let i = nc; i < n; i++) {
      expect(s.B.get(i, 0)).toBe(0);
      for (let j = 0; j < nc; j++) expect(s.A.get(i, j)).toBe(0);
    }
    const r = structure(stateSpaceFromMatrices({ A, B, C: new Matrix(Matrix.ones(1, n)) }));
    expect(r.uncontrollableModes).toHaveLength(n - nc);
    for (const l of r.uncontrollableModes) expectAtMost(pbhGap(A, B, l), 1e-10, `PBH gap at reported mode ${l.re}+${l.im}i`);
  });

  it("agrees with the PBH definition on random systems with planted uncontrollable modes", () => {
    const prop = fc.property(
      fc.integer({ min: 1, max: 4 }), fc.integer({ min: 1, max: 3 }), fc.integer({ min: 1, max: 2 }), fc.integer({ min: 1, max: 100000 }),
      (nc, nu, m, seed) => {
        const n = nc + nu;
        // planted block triangular form; entries from the seeded generator, scaled to [−2, 2)
        const At = new Matrix(seededMatrix(n, n, seed)).mul(4);
        for (let i = nc; i < n; i++) for (let j = 0; j < nc; j++) At.set(i, j, 0);
        const Bt = new Matrix(seededMatrix(n, m, seed + 1)).mul(4);
        for (let i = nc; i < n; i++) for (let j = 0; j < m; j++) Bt.set(i, j, 0);
        const Q = orthogonal(n, seed + 2);
        const A = Q.mmul(At).mmul(Q.transpose());
        const B = Q.mmul(Bt);
        const lambdas = poles(stateSpaceFromMatrices({ A, B, C: Matrix.eye(n) }));
        // well separated eigenvalues keep the PBH reference decisive
        for (let i = 0; i < n; i++) for (let j = i + 1; j < n; j++) fc.pre(Math.hypot(lambdas[i]!.re - lambdas[j]!.re, lambdas[i]!.im - lambdas[j]!.im) > 1e-2);
        const r = structure(stateSpaceFromMatrices({ A, B, C: new Matrix(Matrix.ones(1, n)) }));
        expect(r.controllableDimension).toBeLessThanOrEqual(nc);
        expect(r.uncontrollableModes).toHaveLength(n - r.controllableDimension);
        // every reported mode fails PBH; every eigenvalue that fails PBH is reported
        for (const l of r.uncontrollableModes) expectAtMost(pbhGap(A, B, l), 1e-10, `PBH gap at reported mode ${l.re}+${l.im}i`);
        for (const l of lambdas) {
          const failsPbh = pbhGap(A, B, l) <= 1e-10;
          const reported = r.uncontrollableModes.some((u) => Math.hypot(u.re - l.re, u.im - l.im) <= 1e-8);
          if (pbhGap(A, B, l) > 1e-10 && pbhGap(A, B, l) < 1e-6) fc.pre(false); // ambiguous draw
          expect(reported, `mode ${l.re}+${l.im}i: PBH fails = ${failsPbh}`).toBe(failsPbh);
        }
        expect(r.controllable).toBe(lambdas.every((l) => pbhGap(A, B, l) > 1e-10));
      },
    );
    fc.assert(prop, { seed: 20240613, numRuns: 80 });
  });
});

describe("poles and stability", () => {
  it("poles are the eigenvalues of A", () => {
    // hand-worked: det(sI − A) = s² + 3s + 2
    expectComplexSetsClose(poles(stateSpaceFromMatrices({ A: [[0, 1], [-2, -3]], B: [[0], [1]], C: [[1, 0]] })), [{ re: -1, im: 0 }, { re: -2, im: 0 }], 1e-14);
    expect(poles(stateSpaceFromMatrices({ A: [], B: [], C: [], D: [[3]] }))).toEqual([]);
  });

  it("classifies stable, marginally stable, defective boundary and unstable continuous models", () => {
    const model = (A: number[][]) => stateSpaceFromMatrices({ A, B: A.map(() => [1]), C: [A.map(() => 1)] });
    expect(stability(model([[-1, 0], [0, -2]]))).toMatchObject({ stable: true, marginal: false, spectralAbscissa: -1, spectralRadius: null });
    const oscillator = stability(model([[0, 1], [-1, 0]]));
    expect(oscillator).toMatchObject({ stable: false, marginal: true, unstablePoles: [] });
    expect(oscillator.boundaryPoles).toHaveLength(2);
    // double integrator: the eigenvalue 0 is defective, so responses grow like t
    const doubleIntegrator = stability(model([[0, 1], [0, 0]]));
    expect(doubleIntegrator).toMatchObject({ stable: false, marginal: false });
    expect(doubleIntegrator.defectiveBoundaryPoles).toHaveLength(1);
    // two decoupled integrators: 0 twice but semisimple → marginal
    expect(stability(model([[0, 0], [0, 0]]))).toMatchObject({ marginal: true });
    const unstable = stability(model([[1, 0], [0, -1]]));
    expect(unstable).toMatchObject({ stable: false, marginal: false });
    expectComplexSetsClose(unstable.unstablePoles, [{ re: 1, im: 0 }], 1e-14);
  });

  it("judges sampled models by the unit circle and reports the spectral radius", () => {
    const r = stability(stateSpaceFromMatrices({ A: [[0.5, 0], [0, -1]], B: [[1], [1]], C: [[1, 1]], sampleTime: 0.1 }));
    expect(r).toMatchObject({ timeDomain: "discrete", stable: false, marginal: true, spectralRadius: 1, spectralAbscissa: null });
    expect(stability(stateSpaceFromMatrices({ A: [[0.5]], B: [[1]], C: [[1]], sampleTime: 1 })).stable).toBe(true);
  });
});

describe("dcGain", () => {
  it("computes G(0) = D − C A⁻¹ B of a continuous MIMO model", () => {
    // hand-worked: G(0) of [[1/(s+1), 2/(s+3)], [1/(s+1), 1/(s+1)]] is [[1, 2/3], [1, 1]]
    const model = stateSpaceFromMatrices({ A: [[-1, 0, 0], [0, -3, 0], [0, 0, -1]], B: [[1, 0], [0, 1], [0, 1]], C: [[1, 2, 0], [1, 0, 1]], D: [[0, 0], [0, 0]] });
    expectMatrixClose(dcGain(model).gain!, [[1, 2 / 3], [1, 1]], 1e-15);
  });

  it("computes G(1) = D + C (I − A)⁻¹ B of a sampled model", () => {
    // hand-worked: x[k+1] = 0.5x + u, y = x + 2u: G(1) = 1/(1 − 0.5) + 2 = 4
    expectMatrixClose(dcGain(stateSpaceFromMatrices({ A: [[0.5]], B: [[1]], C: [[1]], D: [[2]], sampleTime: 0.1 })).gain!, [[4]], 1e-15);
  });

  it("returns null with the reason when an integrator reaches the output", () => {
    expect(dcGain(stateSpaceFromMatrices({ A: [[0, 1], [0, -2]], B: [[0], [1]], C: [[1, 0]] }))).toEqual({ gain: null, reason: "pole at s = 0 (integrator): the DC gain is unbounded" });
    expect(dcGain(stateSpaceFromMatrices({ A: [[1]], B: [[1]], C: [[1]], sampleTime: 1 }))).toEqual({ gain: null, reason: "pole at z = 1 (integrator): the DC gain is unbounded" });
  });

  it("gives a finite gain when the pole at s = 0 is uncontrollable", () => {
    // hand-worked: the integrator x2 is not driven by u, so G(s) = 1/(s + 2) and G(0) = 1/2.
    const r = dcGain(stateSpaceFromMatrices({ A: [[-2, 0], [0, 0]], B: [[1], [0]], C: [[1, 1]] }));
    expectMatrixClose(r.gain!, [[0.5]], 1e-14);
    expect(r.reason).toBeUndefined();
    expect(dcGain(stateSpaceFromMatrices({ A: [], B: [], C: [], D: [[3]] })).gain).toEqual([[3]]);
  });
});
