import { describe, expect, test } from "vitest";
import fc from "fast-check";
import { Matrix } from "ml-matrix";
import { reducedOrderObserver } from "../../../shared-engine/design/reducedObserver";
import { eigenvalues } from "../../../shared-engine/linalg/eigen";
import { EngineError } from "../../../shared-engine/errors";
import { expectComplexSetsClose, expectMatrixClose, quarterIntegerMatrix } from "../../helpers/assertions";

describe("reducedOrderObserver", () => {
  test("a second-order plant with position measured gets a first-order observer at the requested pole", () => {
    // By hand: y = x₁ so T = I, A₁₂ = 1, A₂₂ = −3: F = −3 − L = −8 gives L = 5.
    const obs = reducedOrderObserver([[0, 1], [-2, -3]], [[0], [1]], [[1, 0]], [{ re: -8, im: 0 }]);
    expectMatrixClose(obs.F, [[-8]], 1e-14, "F");
    expectMatrixClose(obs.L, [[5]], 1e-14, "L");
  });

  test("the observer equations reproduce d/dt(w − L y) and x̂ = x for the exact q", () => {
    fc.assert(
      fc.property(
        fc.integer({ min: 3, max: 7 }).chain((n) =>
          fc.record({
            n: fc.constant(n),
            A: fc.array(fc.integer({ min: -20, max: 20 }), { minLength: n * n, maxLength: n * n }).map((e) => quarterIntegerMatrix(e, n, n)),
            B: fc.array(fc.integer({ min: -20, max: 20 }), { minLength: n, maxLength: n }).map((e) => quarterIntegerMatrix(e, n, 1)),
            C: fc.array(fc.integer({ min: -20, max: 20 }), { minLength: 2 * n, maxLength: 2 * n }).map((e) => quarterIntegerMatrix(e, 2, n)),
            x: fc.array(fc.integer({ min: -20, max: 20 }), { minLength: n, maxLength: n }).map((e) => e.map((v) => [v / 4])),
            u: fc.integer({ min: -20, max: 20 }).map((v) => [[v / 4]]),
          }),
        ),
        ({ n, A, B, C, x, u }) => {
          const poles = Array.from({ length: n - 2 }, (_, k) => ({ re: -1 - k, im: 0 }));
          let obs;
          try { obs = reducedOrderObserver(A, B, C, poles); } catch (e) {
            fc.pre(!(e instanceof EngineError && (e.kind === "not-observable" || e.kind === "invalid-argument")));
            throw e;
          }
          expectComplexSetsClose(eigenvalues(obs.F), poles, 1e-8, "eig(F)");
          const Am = new Matrix(A), Bm = new Matrix(B), Cm = new Matrix(C), X = new Matrix(x), U = new Matrix(u);
          const W = obs.T.subMatrix(2, n - 1, 0, n - 1); // rows Wᵀ
          const y = Cm.mmul(X);
          const q = W.mmul(X).sub(obs.L.mmul(y));
          const xdot = Am.mmul(X).add(Bm.mmul(U));
          const qdot = W.sub(obs.L.mmul(Cm)).mmul(xdot);
          const rhs = obs.F.mmul(q).add(obs.G.mmul(y)).add(obs.H.mmul(U));
          expectMatrixClose(rhs, qdot, 1e-10, "q' from the observer equations");
          expectMatrixClose(obs.M.mmul(q).add(obs.N.mmul(y)), X, 1e-10, "x̂ = M q + N y");
          expectMatrixClose(obs.T.mmul(obs.Tinverse), Matrix.eye(n), 1e-12, "T T⁻¹");
        },
      ),
      { seed: 99, numRuns: 60 },
    );
  });

  test("dependent outputs, p = n and a wrong pole count are refused", () => {
    expect(() => reducedOrderObserver([[0, 1], [0, 0]], [[0], [1]], [[1, 0], [2, 0]], [])).toThrow(/fewer outputs than states/);
    expect(() => reducedOrderObserver([[0, 1, 0], [0, 0, 1], [0, 0, 0]], [[0], [0], [1]], [[1, 0, 0], [2, 0, 0]], [{ re: -1, im: 0 }])).toThrow(/full row rank 2 \(its rank is 1\)/);
    expect(() => reducedOrderObserver([[0, 1], [0, 0]], [[0], [1]], [[1, 0]], [])).toThrow(/exactly 1 entries/);
  });
});
