// Hand-worked scalar cases for the sampled controller export (all references are worked by hand
// in the comments beside them), plus cross-checks against the design layer's own anti-windup
// update (`integratorUpdate`) and servo loop (`designIntegralPoles`).
import { describe, expect, it } from "vitest";
import { Matrix } from "ml-matrix";
import fc from "fast-check";
import { createStateSpace } from "../../../shared-engine/model";
import { controllerImplementation, type ControllerImplementation } from "../../../shared-engine/design/implementation";
import { integratorUpdate } from "../../../shared-engine/design/antiWindup";
import { designIntegralPoles } from "../../../shared-engine/design/integralAction";
import { expectMatrixClose, expectRelativeClose } from "../../helpers/assertions";

const T = 0.1;
// x[k+1] = 0.9x + 0.5u, y = x (hand-made scalar plant).
const plant = createStateSpace({ A: [[0.9]], B: [[0.5]], C: [[1]], sampleTime: T });

/** One sample of the exported execution order (absolute = deviation here: linear plant). */
function sample(c: ControllerImplementation, xc: number[], r: number[], y: number[], uPrev: number[]): { u: number[]; uUnsat: number[]; next: number[] } {
  const v = [...r, ...y];
  const uUnsat = c.Cc.to2DArray().map((row, i) => c.operatingPoint.inputs[i]! + row.reduce((s, a, j) => s + a * xc[j]!, 0) + c.Dc.to2DArray()[i]!.reduce((s, a, j) => s + a * v[j]!, 0));
  const u = uUnsat.map((value, j) => {
    const l = c.limits[j]!;
    let lo = l.min ?? -Infinity;
    let hi = l.max ?? Infinity;
    if (l.rateLimit !== null) { lo = Math.max(lo, uPrev[j]! - l.rateLimit * c.sampleTime); hi = Math.min(hi, uPrev[j]! + l.rateLimit * c.sampleTime); }
    return Math.min(hi, Math.max(lo, value));
  });
  const next = c.Ac.to2DArray().map((row, i) => row.reduce((s, a, j) => s + a * xc[j]!, 0) + c.Bc.to2DArray()[i]!.reduce((s, a, j) => s + a * v[j]!, 0) + c.Bsat.to2DArray()[i]!.reduce((s, a, j) => s + a * (u[j]! - uUnsat[j]!), 0));
  return { u, uUnsat, next };
}

describe("controllerImplementation: state feedback on measured states", () => {
  it("exports u = r − K·y with no controller state for a placed scalar gain", () => {
    // a − bK = 0.4 ⇒ K = 1 (hand-worked); N = I without feedforward: Dc = [1, −1].
    const c = controllerImplementation({ model: plant, K: [[1]] });
    expect(c.Ac.rows).toBe(0);
    expectMatrixClose(c.Dc, [[1, -1]], 1e-15, "Dc");
    expect(c.checks.every((k) => k.passed)).toBe(true);
    expect(c.signals.references.map((s) => s.name)).toEqual(["r_u1"]);
  });

  it("puts the feedforward gain in the reference column of Dc", () => {
    // DC gain of y/r: 0.5/(1 − 0.4) = 5/6 ⇒ N = 1.2 (hand-worked).
    const c = controllerImplementation({ model: plant, K: [[1]], referenceGain: [[1.2]] });
    expectMatrixClose(c.Dc, [[1.2, -1]], 1e-15, "Dc");
    expect(c.signals.references.map((s) => s.name)).toEqual(["r_y1"]);
  });

  it("refuses a plant that does not measure every state, saying an observer is needed", () => {
    const two = createStateSpace({ A: [[0.9, 0.1], [0, 0.8]], B: [[0], [1]], C: [[1, 0]], sampleTime: T });
    expect(() => controllerImplementation({ model: two, K: [[1, 1]] })).toThrow(/needs an observer: the plant measures 1 of 2 states/);
  });

  it("rejects a period that differs from a sampled design's own", () => {
    expect(() => controllerImplementation({ model: plant, K: [[1]] }, { sampleTime: 0.2 })).toThrow(/sampled at 0.1 s/);
  });
});

describe("controllerImplementation: integral action with anti-windup", () => {
  // Kx = 1, Ki = −0.2 (hand-picked, stable): Ac = [1], Bc = [T, −T], Cc = [0.2], Dc = [0, −1].
  const design = { model: plant, K: [[1]], Ki: [[-0.2]], integratedOutputs: [0] };

  it("writes the integrator as the accumulator xᵢ[k+1] = xᵢ[k] + T(r − y)", () => {
    const c = controllerImplementation(design, { trackingGain: 4 });
    expectMatrixClose(c.Ac, [[1]], 0, "Ac");
    expectMatrixClose(c.Bc, [[T, -T]], 1e-15, "Bc");
    expectMatrixClose(c.Cc, [[0.2]], 1e-15, "Cc");
    expectMatrixClose(c.Dc, [[0, -1]], 1e-15, "Dc");
    // Bsat = T·Kt·(−Ki⁺) = 0.1·4·5 = 2 (hand-worked).
    expectMatrixClose(c.Bsat, [[2]], 1e-14, "Bsat");
    expect(c.checks.every((k) => k.passed)).toBe(true);
  });

  it("equals the plain accumulator while unsaturated and pulls the integrator back when saturated", () => {
    const c = controllerImplementation(design, { trackingGain: 4, limits: [{ min: -1, max: 1 }] });
    const free = sample(c, [0.3], [1], [0.2], [0]);
    expectRelativeClose(free.next[0]!, 0.3 + T * (1 - 0.2), 1e-15, "unsaturated update");
    // xᵢ = 20: u_unsat = 0.2·20 − 0.2 = 3.8, u = 1; back-calculation: 20 + 0.08 + 2·(1 − 3.8) = 14.48.
    const sat = sample(c, [20], [1], [0.2], [0]);
    expect(sat.u[0]).toBe(1);
    expectRelativeClose(sat.next[0]!, 14.48, 1e-14, "back-calculated integrator");
    // The design layer's update step gives the same number (independent implementation).
    const ref = integratorUpdate([20], [0.8], sat.uUnsat, sat.u, T, { Kx: [[1]], Ki: [[-0.2]], limits: [{ min: -1, max: 1 }], method: "back-calculation", trackingGain: 4 });
    expectRelativeClose(sat.next[0]!, ref[0]!, 1e-14, "integratorUpdate");
  });

  it("matches integratorUpdate on bounded random samples (property, seed 4242)", () => {
    const c = controllerImplementation(design, { trackingGain: 3, limits: [{ min: -1, max: 1 }] });
    fc.assert(fc.property(fc.integer({ min: -400, max: 400 }), fc.integer({ min: -100, max: 100 }), fc.integer({ min: -100, max: 100 }), (xi, r, y) => {
      const s = sample(c, [xi / 10], [r / 50], [y / 50], [0]);
      const ref = integratorUpdate([xi / 10], [r / 50 - y / 50], s.uUnsat, s.u, T, { Kx: [[1]], Ki: [[-0.2]], limits: [{ min: -1, max: 1 }], method: "back-calculation", trackingGain: 3 });
      return Math.abs(s.next[0]! - ref[0]!) <= 1e-12 * Math.max(1, Math.abs(ref[0]!));
    }), { seed: 4242, numRuns: 200 });
  });

  it("uses Kt = 1/max(T, 1/|λ_fastest|) by default, as the nonlinear simulation does", () => {
    // Closed loop [[0.4, 0.1], [−0.1, 1]]: z = 0.7 ± √0.08 (hand-worked); fastest λ = |ln(0.7 − √0.08)|/T.
    const c = controllerImplementation(design);
    const fast = Math.abs(Math.log(0.7 - Math.sqrt(0.08))) / T;
    expectRelativeClose(c.antiWindup.trackingGain!, 1 / Math.max(T, 1 / fast), 1e-12, "default Kt");
    expect(c.antiWindup.method).toBe("back-calculation");
  });

  it("keeps the integrator rows of Bsat zero for conditional integration and says how to freeze", () => {
    const c = controllerImplementation(design, { antiWindup: "conditional" });
    expect(c.Bsat.get(0, 0)).toBe(0);
    expect(c.executionOrder.join(" ")).toMatch(/conditional integration/);
  });

  it("reproduces the design layer's servo loop step (step check against designIntegralPoles, and it can fail)", () => {
    const d = designIntegralPoles(plant, [0], [{ re: 0.5, im: 0 }], [{ re: 0.6, im: 0 }]);
    const c = controllerImplementation({ model: plant, K: d.Kx, Ki: d.Ki, integratedOutputs: [0] }, { referenceLoop: d.servoLoop });
    const step = c.checks.find((k) => k.name === "implementation-step")!;
    expect(step.passed, step.detail).toBe(true);
    const wrong = designIntegralPoles(plant, [0], [{ re: 0.5, im: 0 }], [{ re: 0.55, im: 0 }]);
    const bad = controllerImplementation({ model: plant, K: d.Kx, Ki: d.Ki, integratedOutputs: [0] }, { referenceLoop: wrong.servoLoop });
    expect(bad.checks.find((k) => k.name === "implementation-step")!.passed).toBe(false);
  });
});

describe("controllerImplementation: observer-based", () => {
  it("exports the predictor form by hand: Ac = a − bK − Lc, Bc = [bN, L], Cc = −K", () => {
    // K = 1, L = 0.5: Ac = 0.9 − 0.5 − 0.5 = −0.1, Bc = [0.5, 0.5], Cc = [−1], Dc = [1, 0], Bsat = b.
    const c = controllerImplementation({ model: plant, K: [[1]], L: [[0.5]] });
    expectMatrixClose(c.Ac, [[-0.1]], 1e-15, "Ac");
    expectMatrixClose(c.Bc, [[0.5, 0.5]], 1e-15, "Bc");
    expectMatrixClose(c.Cc, [[-1]], 1e-15, "Cc");
    expectMatrixClose(c.Dc, [[1, 0]], 1e-15, "Dc");
    expectMatrixClose(c.Bsat, [[0.5]], 1e-15, "Bsat");
    expect(c.checks.every((k) => k.passed)).toBe(true);
  });

  it("exports the current-estimate form by hand: u = −K(1 − Mc)x̄ − KM·y + r", () => {
    // M = 0.5, Lp = aM = 0.45: Cc = −0.5, Dc = [1, −0.5]; x̄⁺ = 0.45x̄ + 0.5u + 0.45y ⇒ Ac = 0.2, Bc = [0.5, 0.2].
    const c = controllerImplementation({ model: plant, K: [[1]], L: [[0.45]], M: [[0.5]], observerForm: "current" });
    expectMatrixClose(c.Ac, [[0.2]], 1e-15, "Ac");
    expectMatrixClose(c.Bc, [[0.5, 0.2]], 1e-15, "Bc");
    expectMatrixClose(c.Cc, [[-0.5]], 1e-15, "Cc");
    expectMatrixClose(c.Dc, [[1, -0.5]], 1e-15, "Dc");
    expect(c.checks.every((k) => k.passed)).toBe(true);
    expect(c.warnings.join(" ")).toMatch(/computation time/);
  });
});

describe("controllerImplementation: continuous designs", () => {
  const integrator = createStateSpace({ A: [[0]], B: [[1]], C: [[1]] }); // ẋ = u

  it("needs a sample period", () => {
    expect(() => controllerImplementation({ model: integrator, K: [[2]] })).toThrow(/continuous: give the sample period/);
  });

  it("samples the integrator exactly as the accumulator and warns that sampling costs margin", () => {
    const c = controllerImplementation({ model: integrator, K: [[2]], Ki: [[-1]], integratedOutputs: [0] }, { sampleTime: 0.01, antiWindup: "none" });
    expectMatrixClose(c.Ac, [[1]], 1e-15, "Ac");
    expectMatrixClose(c.Bc, [[0.01, -0.01]], 1e-15, "Bc");
    expect(c.warnings.join(" ")).toMatch(/designing in discrete time/);
    expect(c.checks.every((k) => k.passed)).toBe(true);
  });

  it("fails the pole check when T is too slow and the stability check when the sampled loop diverges", () => {
    // K = 2 on ẋ = u: the ZOH loop pole is 1 − 2T (hand-worked) against e^{−2T}.
    const slow = controllerImplementation({ model: integrator, K: [[2]] }, { sampleTime: 0.5 });
    expect(slow.checks.find((k) => k.name === "implementation-poles")!.passed).toBe(false); // 0 vs e^{−1}
    const unstable = controllerImplementation({ model: integrator, K: [[2]] }, { sampleTime: 1.5 });
    const stable = unstable.checks.find((k) => k.name === "implementation-stable")!;
    expect(stable.passed).toBe(false);
    expectRelativeClose(stable.value, 2, 1e-12, "|1 − 2T|");
  });
});

describe("controllerImplementation: degenerate input", () => {
  it("rejects non-finite gains and inverted limits", () => {
    expect(() => controllerImplementation({ model: plant, K: [[Number.NaN]] })).toThrow();
    expect(() => controllerImplementation({ model: plant, K: [[1]] }, { limits: [{ min: 2, max: 1 }] })).toThrow(/min 2 above max 1/);
  });

  it("returns copies: editing the result does not change a second export", () => {
    const a = controllerImplementation({ model: plant, K: [[1]], L: [[0.5]] });
    a.Ac.set(0, 0, 99);
    const b = controllerImplementation({ model: plant, K: [[1]], L: [[0.5]] });
    expect(b.Ac.get(0, 0)).toBeCloseTo(-0.1, 15);
    expect(Matrix.isMatrix(b.Bsat)).toBe(true);
  });
});
