import { describe, expect, it } from "vitest";
import { EngineError } from "../../../shared-engine/errors";
import { integrateDormandPrince } from "../../../shared-engine/nonlinear";
import { expectAtMost, expectRelativeClose } from "../../helpers/assertions";
import fixture from "../../fixtures/nonlinear/solve_ivp.json";

const tight = { rtol: 1e-11, atol: 1e-13 };

describe("integrateDormandPrince", () => {
  it("follows exponential decay x = e^(−2t) (closed form)", () => {
    const times = [0, 0.5, 1, 2, 5];
    const s = integrateDormandPrince((_t, x, d) => { d[0] = -2 * x[0]!; }, 0, [1], times, tight);
    expect(s.times).toEqual(times);
    s.states.forEach((x, k) => expectRelativeClose(x[0]!, Math.exp(-2 * times[k]!), 1e-9, `x(${times[k]})`));
    expect(s.stoppedEarly).toBeNull();
  });

  it("keeps the harmonic oscillator on cos t, −sin t over ten periods (closed form)", () => {
    const T = 20 * Math.PI;
    const s = integrateDormandPrince((_t, x, d) => { d[0] = x[1]!; d[1] = -x[0]!; }, 0, [1, 0], [T / 2, T], tight);
    expectAtMost(Math.abs(s.states[1]![0]! - 1) + Math.abs(s.states[1]![1]!), 1e-8, "error after 10 periods");
    expectAtMost(Math.abs(s.states[0]![0]! - 1), 1e-8, "error after 5 periods");
  });

  it("matches the logistic equation's closed form x = K/(1 + (K/x0 − 1)e^(−rt))", () => {
    const [r, K, x0] = [1.3, 10, 0.2];
    const times = Array.from({ length: 11 }, (_, k) => k);
    const s = integrateDormandPrince((_t, x, d) => { d[0] = r * x[0]! * (1 - x[0]! / K); }, 0, [x0], times, tight);
    s.states.forEach((x, k) => expectRelativeClose(x[0]!, K / (1 + (K / x0 - 1) * Math.exp(-r * times[k]!)), 1e-9, `x(${k})`));
  });

  it("reaches a relative accuracy near rtol with default tolerances", () => {
    const s = integrateDormandPrince((_t, x, d) => { d[0] = -x[0]!; }, 0, [1], [3]);
    expectRelativeClose(s.states[0]![0]!, Math.exp(-3), 1e-5, "x(3) at rtol 1e-6");
    expect(s.acceptedSteps).toBeLessThan(60);
  });

  for (const c of fixture.cases) {
    it(`agrees with scipy solve_ivp RK45 at rtol 1e-12 on ${c.name} (fixture generate_solve_ivp.py)`, () => {
      const rhs = {
        van_der_pol_mu1: (_t: number, x: Float64Array, d: Float64Array) => { d[0] = x[1]!; d[1] = (1 - x[0]! ** 2) * x[1]! - x[0]!; },
        lotka_volterra: (_t: number, x: Float64Array, d: Float64Array) => { d[0] = 1.5 * x[0]! - x[0]! * x[1]!; d[1] = -3 * x[1]! + x[0]! * x[1]!; },
        damped_pendulum: (_t: number, x: Float64Array, d: Float64Array) => { d[0] = x[1]!; d[1] = -9.81 * Math.sin(x[0]!) - 0.2 * x[1]!; },
      }[c.name as "van_der_pol_mu1"];
      const s = integrateDormandPrince(rhs, 0, c.x0, c.times, { rtol: 1e-12, atol: 1e-14 });
      c.states.forEach((row, k) => row.forEach((v, i) => {
        expectAtMost(Math.abs(s.states[k]![i]! - v), 1e-8 * Math.max(1, Math.abs(v)), `${c.name} x${i}(${c.times[k]})`);
      }));
    });
  }

  it("stops early with the last good state when the solution blows up", () => {
    // x' = x², x(0) = 1 has x = 1/(1 − t): finite-time blow-up at t = 1 (closed form).
    const s = integrateDormandPrince((_t, x, d) => { d[0] = x[0]! * x[0]!; }, 0, [1], [0.5, 2], { rtol: 1e-8, atol: 1e-10 });
    expect(s.stoppedEarly).not.toBeNull();
    expect(s.times).toEqual([0.5]);
    expectRelativeClose(s.states[0]![0]!, 2, 1e-7, "x(0.5)");
    expect(s.stoppedEarly!.time).toBeGreaterThan(0.99);
    expect(s.stoppedEarly!.time).toBeLessThan(1.001); // the numerical blow-up time is within tolerance of 1
  });

  it("stops early when the right-hand side leaves its domain", () => {
    // h' = −√h with an evaluation error for h < 0: reaches 0 at t = 2√h0 = 2 (closed form).
    const s = integrateDormandPrince((_t, x, d) => {
      if (x[0]! < 0) throw new EngineError("non-finite", "square root of a negative number", {});
      d[0] = -Math.sqrt(x[0]!);
    }, 0, [1], [1, 3]);
    expect(s.times).toEqual([1]);
    expect(s.stoppedEarly).not.toBeNull();
    expect(s.stoppedEarly!.time).toBeGreaterThan(1.9);
  });

  it("throws no-convergence with the step count at the step cap", () => {
    let caught: unknown;
    try {
      integrateDormandPrince((_t, x, d) => { d[0] = x[1]!; d[1] = -1e6 * x[0]!; }, 0, [1, 0], [100], { maxSteps: 50 });
    } catch (error) { caught = error; }
    expect(caught).toBeInstanceOf(EngineError);
    expect((caught as EngineError).kind).toBe("no-convergence");
    expect((caught as EngineError).details.iterations).toBe(50);
  });

  it("rejects decreasing output times and non-finite initial states", () => {
    expect(() => integrateDormandPrince((_t, x, d) => { d[0] = x[0]!; }, 0, [1], [1, 0.5])).toThrow(/non-decreasing/);
    expect(() => integrateDormandPrince((_t, x, d) => { d[0] = x[0]!; }, 0, [NaN], [1])).toThrow(/x0 must be finite/);
    expect(() => integrateDormandPrince((_t, x, d) => { d[0] = x[0]!; }, 0, [1], [1], { rtol: -1 })).toThrow(/rtol/);
  });
});
