import { describe, expect, test } from "vitest";
import fc from "fast-check";
import { Matrix } from "ml-matrix";
import { placeObserverPoles } from "../../../shared-engine/design/observerByPoles";
import { placePoles } from "../../../shared-engine/design/placePoles";
import { eigenvalues } from "../../../shared-engine/linalg/eigen";
import { EngineError } from "../../../shared-engine/errors";
import { expectAtMost, expectComplexSetsClose, expectMatrixClose, quarterIntegerMatrix } from "../../helpers/assertions";

describe("placeObserverPoles", () => {
  test("places the observer error poles of a second-order system (hand-checked gain)", () => {
    // By hand: A − LC = [[−l₁, 1], [−2 − l₂, −3]], char. poly s² + (3 + l₁)s + (3l₁ + 2 + l₂);
    // (s + 10)(s + 11) = s² + 21s + 110 gives l₁ = 18, l₂ = 54.
    const r = placeObserverPoles([[0, 1], [-2, -3]], [[1, 0]], [{ re: -10, im: 0 }, { re: -11, im: 0 }]);
    expectMatrixClose(r.L, [[18], [54]], 1e-13, "L");
    expectAtMost(r.maxPoleError, 1e-13, "pole error");
  });

  test("the observer gain is the transpose of the dual feedback gain", () => {
    fc.assert(
      fc.property(
        fc.integer({ min: 2, max: 6 }).chain((n) =>
          fc.record({
            A: fc.array(fc.integer({ min: -20, max: 20 }), { minLength: n * n, maxLength: n * n }).map((e) => quarterIntegerMatrix(e, n, n)),
            C: fc.array(fc.integer({ min: -20, max: 20 }), { minLength: 2 * n, maxLength: 2 * n }).map((e) => quarterIntegerMatrix(e, 2, n)),
          }),
        ),
        ({ A, C }) => {
          const poles = eigenvalues(A).map((z, k) => ({ re: -Math.abs(z.re) - 1 - 0.1 * k, im: 0 }));
          let dual;
          try { dual = placePoles(new Matrix(A).transpose(), new Matrix(C).transpose(), poles); } catch (e) {
            fc.pre(!(e instanceof EngineError && e.kind === "not-controllable"));
            throw e;
          }
          const obs = placeObserverPoles(A, C, poles);
          expectMatrixClose(obs.L, dual.K.transpose(), 1e-14, "L against Kᵀ of the dual problem");
          const closed = new Matrix(A).sub(obs.L.mmul(new Matrix(C)));
          expectComplexSetsClose(eigenvalues(closed), poles, 1e-7, "eig(A − LC)");
        },
      ),
      { seed: 777, numRuns: 60 },
    );
  });

  test("an unobservable mode that would have to move is reported as not observable", () => {
    try {
      placeObserverPoles([[1, 0], [0, 2]], [[1, 0]], [{ re: -1, im: 0 }, { re: -3, im: 0 }]);
      expect.fail("expected an error");
    } catch (e) {
      expect(e).toBeInstanceOf(EngineError);
      expect((e as EngineError).kind).toBe("not-observable");
      expect((e as EngineError).message).toContain("the mode(s) at 2 are not observable through C");
    }
  });

  test("C with the wrong number of columns or NaN entries is refused naming C", () => {
    expect(() => placeObserverPoles([[0, 1], [0, 0]], [[1, 0, 0]], [{ re: -1, im: 0 }, { re: -2, im: 0 }])).toThrow(/C must have as many columns as A/);
    expect(() => placeObserverPoles([[0, 1], [0, 0]], [[NaN, 0]], [{ re: -1, im: 0 }, { re: -2, im: 0 }])).toThrow(/C\[0\]\[0\] is NaN/);
  });
});
