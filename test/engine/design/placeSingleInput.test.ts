import { describe, expect, test } from "vitest";
import { Matrix } from "ml-matrix";
import { placeSingleInputHessenberg } from "../../../shared-engine/design/placeSingleInput";
import { eigenvalues } from "../../../shared-engine/linalg/eigen";
import { EngineError } from "../../../shared-engine/errors";
import { expectComplexSetsClose } from "../../helpers/assertions";

describe("placeSingleInputHessenberg", () => {
  test("the gain on a Hessenberg matrix with input e₁ places real poles and a pair", () => {
    // A fixed unreduced Hessenberg matrix (hand-made, entries chosen arbitrarily).
    const h = [[1, 2, -1, 0.5], [3, -2, 1, 4], [0, 0.5, 1, -1], [0, 0, -2, 3]];
    const poles = [{ re: -1, im: 2 }, { re: -1, im: -2 }, { re: -3, im: 0 }, { re: -4, im: 0 }];
    const k = placeSingleInputHessenberg(Float64Array.from(h.flat()), 4, poles);
    const closed = new Matrix(h);
    for (let j = 0; j < 4; j++) closed.set(0, j, closed.get(0, j) - k[j]!);
    expectComplexSetsClose(eigenvalues(closed), poles, 1e-12, "eig(H − e₁kᵀ)");
  });

  test("a zero subdiagonal entry is reported as lost controllability", () => {
    const h = [1, 2, 0, 0, 3, 1, 0, 0, 1];
    expect(() => placeSingleInputHessenberg(Float64Array.from(h), 3, [{ re: -1, im: 0 }, { re: -2, im: 0 }, { re: -3, im: 0 }])).toThrow(EngineError);
  });
});
