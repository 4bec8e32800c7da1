import fc from "fast-check";
import { Matrix } from "ml-matrix";
import { describe, expect, it } from "vitest";
import { EngineError } from "../../../shared-engine/errors";
import { solveDiscreteRiccati } from "../../../shared-engine/design/riccatiDiscrete";
import { expectAtMost, expectComplexSetsClose, expectMatrixClose, frobenius, frobeniusDifference, expectEngineError } from "../../helpers/assertions";
import fixture from "../../fixtures/design/riccati.json";
import precise from "../../fixtures/design/riccati_precise.json";
import { closedLoopNorm, ENTRYWISE_TOLERANCE, expectEntrywiseClose, expectNormwiseClose, expectPolesRelativeClose, NORMWISE_TOLERANCE } from "./riccatiPreciseChecks";
import { diag, discreteResidual, eye, riccatiProblem, scale } from "./riccatiTestSystems";

type Case = (typeof fixture.cases)[number];
const discreteCases = fixture.cases.filter((c) => c.kind === "discrete") as Case[];

const shift = (n: number): number[][] => Array.from({ length: n }, (_, i) => Array.from({ length: n }, (_, j) => (j === i + 1 ? 1 : 0)));
const lastUnit = (n: number): number[][] => Array.from({ length: n }, (_, i) => [i === n - 1 ? 1 : 0]);

describe("solveDiscreteRiccati on benchmark examples", () => {
  for (const n of [1, 2, 5, 10, 30]) {
    it(`solves Benner–Laub–Mehrmann discrete example 15 with n = ${n}: X = diag(1, …, n)`, () => {
      // Benner, Laub & Mehrmann, "A collection of benchmark examples for the numerical solution
      // of algebraic Riccati equations II: discrete-time case", TU Chemnitz SPC 95_23, 1995,
      // Example 15 (recalled from memory): A = upper shift (singular), B = eₙ, Q = I, R = 1.
      const s = solveDiscreteRiccati(shift(n), lastUnit(n), eye(n), [[1]]);
      expectMatrixClose(s.X, diag(Array.from({ length: n }, (_, i) => i + 1)), 1e-13, "X");
      expectAtMost(s.residual, 1e-14, "relative residual");
      for (const p of s.closedLoopPoles) expect(Math.hypot(p.re, p.im)).toBeLessThan(1);
    });
  }

  it("matches the scalar closed form of the discrete equation", () => {
    // b²X² − ((a² − 1)r + qb²)X − qr = 0, positive root (from clearing the denominator of the
    // scalar equation by hand; common practice).
    for (const [a, b, q, r] of [[2, 1, 1, 1], [0.5, 3, 2, 0.1], [1, 1, 1, 1], [-1.5, 0.5, 0, 2]] as const) {
      const p = (a * a - 1) * r + q * b * b;
      const expected = (p + Math.sqrt(p * p + 4 * b * b * q * r)) / (2 * b * b);
      const s = solveDiscreteRiccati([[a]], [[b]], [[q]], [[r]]);
      expectMatrixClose(s.X, [[expected]], 1e-14, `X for a=${a}, b=${b}, q=${q}, r=${r}`);
    }
  });

  it("returns X = Q and K = 0 when A = 0 (the pencil needs no A⁻¹)", () => {
    // AᵀXA = 0 and AᵀXB = 0, so X = Q solves the equation exactly (direct substitution).
    const Q = [[2, 1, 0], [1, 3, 0], [0, 0, 1]];
    const s = solveDiscreteRiccati([[0, 0, 0], [0, 0, 0], [0, 0, 0]], [[1, 0], [0, 1], [1, 1]], Q, eye(2));
    expectMatrixClose(s.X, Q, 1e-14, "X");
    expect(frobenius(s.K)).toBeLessThanOrEqual(1e-14);
  });
});

describe("solveDiscreteRiccati against scipy fixtures", () => {
  for (const c of discreteCases) {
    it(`matches ${c.source} for ${c.name}`, () => {
      // Reference: test/fixtures/design/generate_riccati.py (scipy recorded in the JSON).
      const s = solveDiscreteRiccati(c.A, c.B, c.Q, c.R, c.N);
      const tol = Math.max(1e-10, 100 * c.referenceRelativeResidual);
      expectMatrixClose(s.X, c.X, tol, "X");
      expectMatrixClose(s.K, c.K, tol, "K");
      expectComplexSetsClose(s.closedLoopPoles, c.closedLoopPoles.map(([re, im]) => ({ re: re!, im: im! })), 1e-6);
      expectAtMost(discreteResidual(c.A, c.B, c.Q, c.R, c.N, s.X.to2DArray()), Math.max(1e-12, c.referenceRelativeResidual), "relative residual recomputed in plain arrays");
      expect(s.X.isSymmetric()).toBe(true);
    });
  }
});

describe("solveDiscreteRiccati properties", () => {
  it("gives a Schur-stable symmetric X with relative residual ≤ 1e-10 for random well-conditioned problems", () => {
    fc.assert(
      fc.property(riccatiProblem(true), ({ A, B, Q, R, N }) => {
        let s;
        try {
          s = solveDiscreteRiccati(scale(A, 0.5), B, Q, R, N);
        } catch (error) {
          expect((error as EngineError).kind).toBe("no-stabilizing-solution");
          return;
        }
        expect(s.X.isSymmetric()).toBe(true);
        for (const p of s.closedLoopPoles) expect(Math.hypot(p.re, p.im)).toBeLessThan(1);
        if (s.conditionIndicator > 1e-4) expectAtMost(s.residual, 1e-10, "relative residual");
      }),
      { seed: 31337, numRuns: 120 },
    );
  });

  it("gives the same X from the pencil alone as after Newton (Hewer) refinement", () => {
    fc.assert(
      fc.property(riccatiProblem(false), ({ A, B, Q, R }) => {
        let plain, refined;
        try {
          plain = solveDiscreteRiccati(A, B, Q, R, null, { refine: false });
          refined = solveDiscreteRiccati(A, B, Q, R, null, { refine: true });
        } catch (error) {
          expect((error as EngineError).kind).toBe("no-stabilizing-solution");
          return;
        }
        expect(plain.refined).toBe(false);
        if (plain.conditionIndicator > 1e-4) {
          expectAtMost(frobeniusDifference(plain.X, refined.X) / Math.max(1, frobenius(refined.X)), 1e-10, "‖X_pencil − X_refined‖/‖X‖");
        }
      }),
      { seed: 2024, numRuns: 80 },
    );
  });
});

describe("solveDiscreteRiccati errors and degenerate input", () => {
  it("rejects an unstabilizable pair with a typed no-stabilizing-solution error", () => {
    // Mode at 2 is not reachable from B.
    expectEngineError(() => solveDiscreteRiccati([[2, 0], [0, 0.5]], [[0], [1]], eye(2), [[1]]), "no-stabilizing-solution");
  });

  it("reports pencil eigenvalues on the unit circle for an undamped rotation that Q does not see", () => {
    const e = expectEngineError(() => solveDiscreteRiccati([[0, 1], [-1, 0]], [[0], [1]], [[0, 0], [0, 0]], [[1]]), "no-stabilizing-solution", /unit circle/);
    expect(e.details.reason).toBe("eigenvalue-on-unit-circle");
  });

  it("rejects a singular R + BᵀXB as having no stabilizing solution", () => {
    expectEngineError(() => solveDiscreteRiccati([[0.5]], [[1]], [[0]], [[0]]), "no-stabilizing-solution");
  });

  it("rejects indefinite weights and non-symmetric Q", () => {
    expectEngineError(() => solveDiscreteRiccati([[0.5]], [[1]], [[1]], [[-1]]), "invalid-argument", /positive semidefinite/);
    expectEngineError(() => solveDiscreteRiccati([[0.5]], [[1]], [[1]], [[1]], [[3]]), "invalid-argument", /positive semidefinite/);
    expectEngineError(() => solveDiscreteRiccati([[0.5, 0], [0, 0.5]], [[1], [0]], [[1, 2], [0, 1]], [[1]]), "invalid-argument", /Q must be symmetric/);
  });

  it("rejects bad shapes, NaN and empty input", () => {
    expectEngineError(() => solveDiscreteRiccati([[0.5, 0], [0, 0.5]], [[1]], eye(2), [[1]]), "shape-mismatch", /B must have as many rows as A \(A is 2×2, B is 1×1\)/);
    expectEngineError(() => solveDiscreteRiccati([[0.5]], [[1]], [[NaN]], [[1]]), "non-finite");
    expectEngineError(() => solveDiscreteRiccati([[0.5]], new Matrix(1, 0), [[1]], [[1]]), "empty");
  });
});

// Appended with the Q-free QZ path of the extended pencil (imports are hoisted).
import { prepareRiccatiData } from "../../../shared-engine/design/riccati";
import { solveByExtendedPencil } from "../../../shared-engine/design/riccatiPencil";

describe("the extended-pencil solver without the left Schur vectors", () => {
  const sameBits = (a: Float64Array, b: Float64Array): boolean => a.length === b.length && a.every((v, k) => Object.is(v, b[k]));
  /** Both paths give the same X and rcond bit for bit, or fail with the same error kind. */
  const expectSamePaths = (A: number[][], B: number[][], Q: number[][], R: number[][], N: number[][] | null, kind: "discrete" | "continuous"): void => {
    const data = prepareRiccatiData(A, B, Q, R, N);
    const run = (accumulateQ: boolean): { x: Float64Array; rcond: number } | string => {
      try {
        return solveByExtendedPencil(data, kind, accumulateQ);
      } catch (error) {
        return (error as EngineError).kind;
      }
    };
    const full = run(true), lean = run(false);
    if (typeof full === "string" || typeof lean === "string") {
      expect(lean).toEqual(full);
      return;
    }
    expect(sameBits(lean.x, full.x), "X bit-identical").toBe(true);
    expect(Object.is(lean.rcond, full.rcond), "rcond bit-identical").toBe(true);
  };

  it("gives an X bit-identical to the path accumulating Q on every discrete fixture case", () => {
    // Fixture problems from generate_riccati.py (scipy solve_discrete_are); here only the two
    // engine paths are compared with each other.
    for (const c of discreteCases) {
      expectSamePaths(c.A, c.B, c.Q, c.R, (c.N as number[][] | null) ?? null, "discrete");
    }
  });

  it("gives an X bit-identical to the path accumulating Q on generated discrete and continuous problems", () => {
    fc.assert(
      fc.property(riccatiProblem(true), fc.boolean(), ({ A, B, Q, R, N }, discrete) => {
        expectSamePaths(scale(A, 1 / 8), B, Q, R, N, discrete ? "discrete" : "continuous");
      }),
      { seed: 20240611, numRuns: 60 },
    );
  });
});

describe("solveDiscreteRiccati on badly scaled plants against 80-digit references", () => {
  // Reference: test/fixtures/design/generate_riccati_precise.py (mpmath stable subspace + Hewer's
  // Newton iteration, versions in the JSON). The discrete pencil has no ‖H‖-relative boundary test
  // (|λ| is compared with 1 directly), so these graded plants are solved on the default path;
  // entry-wise accuracy needs the Newton step (measured without it: worst entry 4.5e-10 for the
  // sampled hydraulic positioner, 2e-10 for the 2×2 case), hence refine: true for the tight bound.
  for (const c of precise.cases.filter((x) => x.kind === "discrete")) {
    it(`matches the mpmath reference entry by entry with Newton refinement for ${c.name}`, () => {
      const s = solveDiscreteRiccati(c.A, c.B, c.Q, c.R, null, { refine: true });
      expectNormwiseClose(s.X, c.X, NORMWISE_TOLERANCE, "X");
      expectEntrywiseClose(s.X, c.X, ENTRYWISE_TOLERANCE, "X");
      expectEntrywiseClose(s.K, c.K, ENTRYWISE_TOLERANCE, "K");
      expectPolesRelativeClose(s.closedLoopPoles, c.closedLoopPoles, closedLoopNorm(c.A, c.B, c.K), ENTRYWISE_TOLERANCE, "closed-loop poles");
    });

    it(`matches the mpmath reference normwise without refinement for ${c.name}`, () => {
      // Normwise accuracy of the QZ route as measured (≤ 1e-10 on the sampled positioner).
      const s = solveDiscreteRiccati(c.A, c.B, c.Q, c.R);
      expectNormwiseClose(s.X, c.X, 1e-9, "X");
    });
  }
});
