// The disturbance-step response of a variant and the per-input margins of a multi-input loop.
import { describe, expect, it } from "vitest";
import { evaluateVariant } from "../../../shared-engine/project";
import type { PlantSpec } from "../../../shared-engine/project";
import { expectRelativeClose } from "../../helpers/assertions";

const scalar: PlantSpec = {
  id: "lag",
  model: { type: "state-space", A: [[-1]], B: [[1]], C: [[1]], F: [[1]], E: [[0]], sampleTime: null, names: { disturbances: ["load"] } },
};
const times = Array.from({ length: 401 }, (_, k) => k * 0.01);

describe("disturbance step", () => {
  it("matches the hand-worked response of a scalar loop without integral action", () => {
    // x' = −x + u + w with u = −Kx placed at −2 gives K = 1 and x' = −2x + w: for a step of
    // size 3, y(t) = 3(1 − e^{−2t})/2, final 1.5, and |y − 1.5| ≤ 0.02·1.5 from t = ln(50)/2
    // (worked by hand).
    const r = evaluateVariant(scalar, { id: "v", plant: "lag", stateFeedback: { method: "poles", poles: [-2] }, disturbanceStep: { times, disturbance: "load", size: 3 } });
    expect(r.error).toBeUndefined();
    const d = r.disturbanceStep!;
    expect(d.loop).toBe("closed-loop");
    expect(d.disturbance).toBe("load");
    expectRelativeClose(d.steadyStateValue!, 1.5, 1e-12, "final value");
    expectRelativeClose(d.output[0]![100]!, 1.5 * (1 - Math.exp(-2)), 1e-9, "y(1)");
    expectRelativeClose(d.settlingTime!, Math.log(50) / 2, 1e-3, "settling time");
    expectRelativeClose(d.peakDeviation, d.output[0]![400]!, 1e-12, "monotone: peak at the end");
    expect(d.status).toBe("settled");
  });

  it("returns to zero with integral action on the output (a constant disturbance is rejected)", () => {
    // Common practice (internal model principle): an integrator of the error in the loop
    // drives the steady-state effect of a constant disturbance to zero.
    const r = evaluateVariant(scalar, {
      id: "v",
      plant: "lag",
      stateFeedback: { method: "lqr", Q: [[1]], R: [[1]] },
      integralAction: { outputs: [0], weights: [4] },
      disturbanceStep: { times: Array.from({ length: 301 }, (_, k) => k * 0.05) },
    });
    expect(r.error).toBeUndefined();
    const d = r.disturbanceStep!;
    expect(Math.abs(d.steadyStateValue!)).toBeLessThan(1e-12);
    expect(Math.abs(d.output[0]![300]!)).toBeLessThan(1e-3 * Math.abs(d.peakDeviation));
    expect(d.control).toBeDefined();
  });

  it("is rejected for a plant without disturbance inputs, naming the path", () => {
    const plain: PlantSpec = { id: "p", model: { type: "state-space", A: [[-1]], B: [[1]], C: [[1]], sampleTime: null } };
    const r = evaluateVariant(plain, { id: "v", plant: "p", stateFeedback: { method: "poles", poles: [-2] }, disturbanceStep: { times: [0, 1] } });
    expect(r.error?.message).toMatch(/disturbanceStep: the plant has no disturbance inputs/);
  });
});

describe("margins of a multi-input loop", () => {
  it("breaks the loop at each input in turn", () => {
    // Two decoupled integrators with u_i = −2x_i: each channel's loop is 2/s, whose phase
    // margin is 90° at 2 rad/s and gain margin infinite (worked by hand).
    const plant: PlantSpec = { id: "two", model: { type: "state-space", A: [[0, 0], [0, 0]], B: [[1, 0], [0, 1]], C: [[1, 0], [0, 1]], sampleTime: null } };
    const r = evaluateVariant(plant, { id: "v", plant: "two", stateFeedback: { method: "poles", poles: [-2, -2] }, margins: { at: "plant-input" } });
    expect(r.error).toBeUndefined();
    const ch = r.margins!.channels!;
    expect(ch.map((c) => c.input)).toEqual(["u1", "u2"]);
    for (const c of ch) {
      expectRelativeClose(c.phaseDeg!, 90, 1e-9, "phase margin");
      expect(c.gainDb).toBeNull();
    }
  });
});
