import { describe, expect, it } from "vitest";
import { balanceStateSpace, createStateSpace } from "../../../shared-engine/model";
import { evaluateChannel, expectComplexClose, TEST_POINTS } from "./modelTestUtils";

describe("balanceStateSpace", () => {
  it("scales states by powers of two without changing the transfer function or the input model", () => {
    const model = createStateSpace({ A: [[-1, 1e6], [1e-6, -2]], B: [[1], [1]], C: [[1, 1]], F: [[1], [0]] });
    const { model: balanced, scale } = balanceStateSpace(model);
    for (const s of scale) expect(Math.log2(s) % 1).toBe(0);
    expect(balanced.A.get(0, 1)).toBeLessThan(1e3);
    expect(model.A.get(0, 1)).toBe(1e6);
    for (const s of TEST_POINTS) {
      expectComplexClose(evaluateChannel(balanced, s), evaluateChannel(model, s), 1e-12, "G(s)");
      expectComplexClose(
        evaluateChannel({ A: balanced.A, B: balanced.F, C: balanced.C, D: balanced.E }, s),
        evaluateChannel({ A: model.A, B: model.F, C: model.C, D: model.E }, s),
        1e-12,
        "disturbance channel",
      );
    }
  });
});
