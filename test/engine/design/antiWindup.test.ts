import { describe, expect, it } from "vitest";
import { integratorUpdate, saturate, type AntiWindupController, type AntiWindupMethod } from "../../../shared-engine/design/antiWindup";
import { designIntegralPoles } from "../../../shared-engine/design/integralAction";
import { createStateSpace } from "../../../shared-engine/model";
import { expectRelativeClose, expectEngineError as expectKind } from "../../helpers/assertions";

const base = (method: AntiWindupMethod): AntiWindupController => ({
  Kx: [[1]], Ki: [[-2]], limits: [{ min: -1, max: 1 }], method, trackingGain: 4,
});

describe("integratorUpdate", () => {
  it("integrates the error plainly when no anti-windup is selected, even when saturated", () => {
    expect(integratorUpdate([0.5], [1], [3], [1], 0.01, base("none"))).toEqual([0.51]);
  });

  it("back-calculates the integral part of u towards the limit at rate Kt·(u_sat − u_unsat)", () => {
    // Hand-worked: ẋᵢ = e + Kt·(u_sat − u_unsat)/k_i with k_i = 2: 1 + 4·(1 − 3)/2 = −3, so
    // xᵢ = 0.5 − 0.03; the integral contribution 2xᵢ falls by 0.06 = Kt·2·dt (Åström & Hägglund 2006, §3.5).
    const next = integratorUpdate([0.5], [1], [3], [1], 0.01, base("back-calculation"));
    expectRelativeClose(next[0]!, 0.47, 1e-14, "back-calculated state");
    // Unsaturated: identical to plain integration.
    expect(integratorUpdate([0.5], [1], [0.2], [0.2], 0.01, base("back-calculation"))).toEqual([0.51]);
  });

  it("freezes conditional integration only when the error drives further into saturation", () => {
    // −Ki·e = 2e: e > 0 pushes u up; u is above its upper limit → frozen.
    expect(integratorUpdate([0.5], [1], [3], [1], 0.01, base("conditional"))).toEqual([0.5]);
    // e < 0 pulls u back from the upper limit → integrates.
    expect(integratorUpdate([0.5], [-1], [3], [1], 0.01, base("conditional"))).toEqual([0.49]);
    // Saturated at the lower limit with e > 0 (pushing up, out of saturation) → integrates.
    expect(integratorUpdate([0.5], [1], [-3], [-1], 0.01, base("conditional"))).toEqual([0.51]);
  });

  it("rejects missing tracking gain, bad step, wrong lengths and non-finite values", () => {
    expectKind(() => integratorUpdate([0], [1], [0], [0], 0.1, { ...base("back-calculation"), trackingGain: undefined }), "invalid-argument", /trackingGain/);
    expectKind(() => integratorUpdate([0], [1], [0], [0], 0, base("none")), "invalid-argument", /dt/);
    expectKind(() => integratorUpdate([0, 1], [1], [0], [0], 0.1, base("none")), "shape-mismatch");
    expectKind(() => integratorUpdate([0], [NaN], [0], [0], 0.1, base("none")), "non-finite");
    expectKind(() => integratorUpdate([0], [1], [0], [0], 0.1, { ...base("none"), method: "clamp" as AntiWindupMethod }), "invalid-argument", /method/);
    expectKind(() => integratorUpdate([0], [1], [2], [1], 0.1, { ...base("back-calculation"), Ki: [[0]] }), "singular");
  });

  it("saturate clamps each input to its limits", () => {
    expect(saturate([3, -5, 0.5], [{ min: -1, max: 1 }, { min: -2, max: 2 }, { min: 0, max: 1 }])).toEqual([1, -2, 0.5]);
  });
});

describe("anti-windup on a saturating first-order plant", () => {
  // ẋ = −x + u, y = x, |u| ≤ 1.2, reference step 1 (steady-state u = 1, so the actuator is
  // saturated for most of the rise): a classic windup setting (Åström & Rundqwist 1989).
  const plant = createStateSpace({ A: [[-1]], B: [[1]], C: [[1]] });
  const design = designIntegralPoles(plant, [0], [{ re: -4, im: 0 }], [{ re: -5, im: 0 }]);
  const Kx = design.Kx.get(0, 0);
  const Ki = design.Ki.get(0, 0);
  const limits = [{ min: -1.2, max: 1.2 }];

  function simulate(method: AntiWindupMethod): { overshoot: number; final: number } {
    const form: AntiWindupController = { Kx: [[Kx]], Ki: [[Ki]], limits, method, trackingGain: 8 };
    const dt = 1e-3;
    let x = 0;
    let xi = [0];
    let peak = -Infinity;
    for (let k = 0; k < 15000; k++) {
      const uUnsat = [-Kx * x - Ki * xi[0]!];
      const uSat = saturate(uUnsat, limits);
      const e = [1 - x];
      xi = integratorUpdate(xi, e, uUnsat, uSat, dt, form);
      x += dt * (-x + uSat[0]!); // forward Euler, dt ≪ the fastest time constant 1/5 s
      peak = Math.max(peak, x);
    }
    return { overshoot: peak - 1, final: x };
  }

  it("reduces the overshoot after saturation with back-calculation and with conditional integration", () => {
    const none = simulate("none");
    const back = simulate("back-calculation");
    const cond = simulate("conditional");
    expect(none.overshoot).toBeGreaterThan(0.1); // the windup is there to be removed
    expect(back.overshoot).toBeLessThan(0.5 * none.overshoot);
    expect(cond.overshoot).toBeLessThan(0.5 * none.overshoot);
    // Integral action still removes the steady-state error once out of saturation.
    for (const r of [none, back, cond]) expectRelativeClose(r.final, 1, 1e-3, "final output");
  });
});
