import { describe, it } from "vitest";
import { brysonWeights } from "../../../shared-engine/design/bryson";
import { expectMatrixClose, expectEngineError as expectKind } from "../../helpers/assertions";

describe("brysonWeights", () => {
  it("sets each diagonal weight to one over the squared limit", () => {
    // Bryson's rule, Bryson & Ho, "Applied Optimal Control", 1975 (from memory): Qii = 1/xᵢ², Rjj = 1/uⱼ².
    const { Q, R } = brysonWeights([0.1, 2, 0.5], [5, 0.25]);
    expectMatrixClose(Q, [[100, 0, 0], [0, 0.25, 0], [0, 0, 4]], 1e-15, "Q");
    expectMatrixClose(R, [[0.04, 0], [0, 16]], 1e-15, "R");
  });

  it("leaves a state with an infinite limit unweighted", () => {
    const { Q } = brysonWeights([Infinity, 1], [1]);
    expectMatrixClose(Q, [[0, 0], [0, 1]], 0, "Q", 1);
  });

  it("rejects empty, zero, negative, NaN and infinite input limits, naming the entry", () => {
    expectKind(() => brysonWeights([], [1]), "empty", /maxState/);
    expectKind(() => brysonWeights([1], []), "empty", /maxInput/);
    expectKind(() => brysonWeights([1, 0], [1]), "invalid-argument", /maxState\[1\]/);
    expectKind(() => brysonWeights([1], [-2]), "invalid-argument", /maxInput\[0\]/);
    expectKind(() => brysonWeights([NaN], [1]), "non-finite", /maxState\[0\]/);
    expectKind(() => brysonWeights([1], [Infinity]), "invalid-argument", /maxInput\[0\]/);
    expectKind(() => brysonWeights([1e-200], [1]), "invalid-argument", /overflows/);
  });
});
