import { describe, expect, test } from "vitest";
import { Matrix } from "ml-matrix";
import { placeRobustKernel, complexConditionNumber } from "../../../shared-engine/design/placeRobust";
import { eigenvalues } from "../../../shared-engine/linalg/eigen";
import { EngineError } from "../../../shared-engine/errors";
import { expectAtMost, expectComplexSetsClose } from "../../helpers/assertions";

describe("placeRobustKernel", () => {
  test("with a fully actuated system the eigenvectors become orthonormal (κ₂ = 1)", () => {
    // r = n: every vector is allowed, so the optimum X is unitary (KNV 1985, §4 remark).
    const a = Float64Array.from([1, 2, 0, 3, 4, 1, 0, 1, 5]);
    const poles = [{ re: -1, im: 1 }, { re: -1, im: -1 }, { re: -2, im: 0 }];
    const res = placeRobustKernel(a, 3, 3, poles, [0, 1, 2], 100, 1e-8);
    expectAtMost(complexConditionNumber(res.X, 3) - 1, 1e-8, "κ₂(X) − 1");
    const closed = new Matrix(3, 3);
    for (let i = 0; i < 3; i++) for (let j = 0; j < 3; j++) closed.set(i, j, a[i * 3 + j]! - res.G[i * 3 + j]!);
    expectComplexSetsClose(eigenvalues(closed), poles, 1e-12, "eig(A − G)");
  });

  test("the sweep limit is enforced with a no-convergence error carrying the last change", () => {
    const a = Float64Array.from([0, 1, 0, 0, 0, 0, 1, 0, 0, 0, 0, 1, 1, 2, 3, 4]);
    const poles = [-1, -2, -3, -4].map((re) => ({ re, im: 0 }));
    try {
      placeRobustKernel(a, 4, 2, poles, [0, 1, 2, 3], 1, 1e-12);
      expect.fail("expected no-convergence");
    } catch (e) {
      expect((e as EngineError).kind).toBe("no-convergence");
      expect((e as EngineError).details.iterations).toBe(1);
    }
  });
});
