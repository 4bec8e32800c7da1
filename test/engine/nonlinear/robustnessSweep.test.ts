import { describe, expect, it } from "vitest";
import { EngineError } from "../../../shared-engine/errors";
import { compileNonlinearPlant, robustnessSweep } from "../../../shared-engine/nonlinear";
import { expectComplexSetsClose } from "../../helpers/assertions";
import { pendulum, tank } from "./plantModels";
import type { NonlinearPlantSpec } from "../../../shared-engine/nonlinear";

describe("robustnessSweep", () => {
  const plant = compileNonlinearPlant(pendulum);
  const base = { plant, operatingPoint: { unknowns: ["omega", "torque"], states: { theta: Math.PI } }, K: [[20, 3]] };

  it("a grid over l and c gives the closed-form closed-loop poles at every sample", () => {
    const sweep = robustnessSweep({ ...base, parameters: [{ name: "l", percent: 20 }, { name: "c", percent: 50 }], sampling: { kind: "grid", pointsPerParameter: 3 } });
    expect(sweep.samples.length).toBe(9);
    expect(sweep.parameterNames).toEqual(["l", "c"]);
    for (const s of sweep.samples) {
      const [l, c] = s.values as [number, number];
      // Hand-derived at θ = π: A − BK = [[0, 1], [g/l − 20b, −c − 3b]], b = 1/(m l²).
      const b = 1 / (2 * l * l);
      const tr = -c - 3 * b, det = -(9.81 / l - 20 * b);
      const disc = tr * tr - 4 * det;
      const expected = disc >= 0
        ? [{ re: (tr + Math.sqrt(disc)) / 2, im: 0 }, { re: (tr - Math.sqrt(disc)) / 2, im: 0 }]
        : [{ re: tr / 2, im: Math.sqrt(-disc) / 2 }, { re: tr / 2, im: -Math.sqrt(-disc) / 2 }];
      expectComplexSetsClose(s.poles, expected, 1e-10, `poles at l = ${l}, c = ${c}`);
      expect(s.stable).toBe(expected.every((z) => z.re < 0));
    }
    // l = 0.6: g/l − 20/(2·0.36) = 16.35 − 27.8 < 0 ⇒ stable; l = 0.4: 24.5 − 62.5 < 0 ⇒ stable.
    expect(sweep.allStable).toBe(true);
    expect(sweep.worstPhaseMarginDeg).not.toBeNull();
    expect(sweep.marginsNote).toContain("single-input");
  });

  it("flags instability when the gain no longer holds the inverted pendulum", () => {
    const sweep = robustnessSweep({ ...base, K: [[6, 1]], parameters: [{ name: "l", percent: 40 }], sampling: { kind: "grid", pointsPerParameter: 5 } });
    // Hand-derived: stable iff 20·... here 6/(2l²) > g/l ⇔ l < 3/9.81 ≈ 0.306, so only l = 0.3 is stable.
    expect(sweep.samples.map((s) => s.stable)).toEqual([true, false, false, false, false]);
    expect(sweep.allStable).toBe(false);
  });

  it("seeded random sampling is reproducible and stays within the ±percent box", () => {
    const a = robustnessSweep({ ...base, parameters: [{ name: "m", percent: 10 }], sampling: { kind: "random", samples: 6, seed: 99 } });
    const b = robustnessSweep({ ...base, parameters: [{ name: "m", percent: 10 }], sampling: { kind: "random", samples: 6, seed: 99 } });
    expect(a.samples.map((s) => s.values)).toEqual(b.samples.map((s) => s.values));
    for (const s of a.samples) { expect(s.values[0]!).toBeGreaterThanOrEqual(1.8); expect(s.values[0]!).toBeLessThanOrEqual(2.2); }
  });

  it("records samples whose operating point fails instead of aborting", () => {
    const tankPlant = compileNonlinearPlant(tank);
    // Level 4.9 m with a ±60% outlet: at a = 0.016 the inflow needed exceeds the input max 0.1.
    const sweep = robustnessSweep({ plant: tankPlant, operatingPoint: { unknowns: ["q_in"], states: { h: 4.9 } }, K: [[0.2]], parameters: [{ name: "a", percent: 60 }], sampling: { kind: "grid", pointsPerParameter: 3 } });
    expect(sweep.failedSamples).toBe(1);
    expect(sweep.samples[2]!.error!.message).toContain("input 'q_in'");
    expect(sweep.allStable).toBe(false);
  });

  it("is cancellable and reports progress", () => {
    const seen: number[] = [];
    let caught: unknown;
    try {
      robustnessSweep({ ...base, parameters: [{ name: "l", percent: 10 }], sampling: { kind: "grid", pointsPerParameter: 4 }, onProgress: (f) => seen.push(f), isCancelled: () => seen.length >= 2 });
    } catch (error) { caught = error; }
    expect((caught as EngineError).kind).toBe("cancelled");
    expect(seen).toEqual([0.25, 0.5]);
  });

  it("rejects unknown parameters and oversized grids", () => {
    expect(() => robustnessSweep({ ...base, parameters: [{ name: "zeta", percent: 10 }], sampling: { kind: "grid", pointsPerParameter: 3 } })).toThrow(/'zeta' is not a declared parameter/);
    expect(() => robustnessSweep({ ...base, parameters: [{ name: "l", percent: 10 }, { name: "c", percent: 10 }, { name: "m", percent: 10 }], sampling: { kind: "grid", pointsPerParameter: 30 } })).toThrow(/27000 samples/);
  });

  it("reports loop-at-a-time margins of a two-input loop, the worst channel per sample", () => {
    // Two decoupled lags x_j' = a_j x_j + u_j under u = −diag(k1, k2) x: loop j is k_j/(s − a_j)
    // whatever the other loop does. Hand-derived: |L| = 1 at ω = √(k² − a²), phase margin
    // 180° − atan(ω/|a|), no phase crossover (gain margin infinite, reported as null).
    const twoLags: NonlinearPlantSpec = {
      states: [{ name: "x1" }, { name: "x2" }],
      inputs: [{ name: "u1" }, { name: "u2" }],
      disturbances: [],
      parameters: [{ name: "a1", value: -1 }, { name: "a2", value: -2 }],
      stateEquations: { x1: "a1*x1 + u1", x2: "a2*x2 + u2" },
      outputs: [{ name: "y1", equation: "x1" }, { name: "y2", equation: "x2" }],
    };
    const k1 = 4, k2 = 3;
    const sweep = robustnessSweep({
      plant: compileNonlinearPlant(twoLags), operatingPoint: { unknowns: ["u1", "u2"], states: { x1: 0, x2: 0 } },
      K: [[k1, 0], [0, k2]], parameters: [{ name: "a1", percent: 50 }], sampling: { kind: "grid", pointsPerParameter: 3 },
    });
    const pm = (k: number, a: number) => 180 - (Math.atan(Math.sqrt(k * k - a * a) / Math.abs(a)) * 180) / Math.PI;
    for (const s of sweep.samples) {
      const a1 = s.values[0]!;
      expect(s.phaseMarginDeg!).toBeCloseTo(Math.min(pm(k1, a1), pm(k2, -2)), 6);
      expect(s.gainMarginDb).toBeNull();
    }
    expect(sweep.worstPhaseMarginDeg!).toBeCloseTo(Math.min(pm(k1, -1.5), pm(k1, -0.5), pm(k2, -2)), 6);
    expect(sweep.marginsNote).toContain("loop-at-a-time");
  });

  describe("with a sampled controller (zero-order hold)", () => {
    // A first-order plant typed as an equation: x' = a·x + b·u, y = x (a, b the swept parameters).
    const firstOrder: NonlinearPlantSpec = {
      states: [{ name: "x" }],
      inputs: [{ name: "u" }],
      disturbances: [],
      parameters: [{ name: "a", value: 0.5 }, { name: "b", value: 2 }],
      stateEquations: { x: "a*x + b*u" },
      outputs: [{ name: "y", equation: "x" }],
    };
    const lin = compileNonlinearPlant(firstOrder);
    const at = { plant: lin, operatingPoint: { unknowns: ["u"], states: { x: 0 } } };
    // Hand-derived zero-order hold of x' = a x + b u: Φ = e^{aT}, Γ = b(e^{aT} − 1)/a.
    const zoh = (a: number, b: number, T: number) => ({ Phi: Math.exp(a * T), Gamma: (b * (Math.exp(a * T) - 1)) / a });

    it("gives the hand-derived sampled pole Φ − ΓK and the gain margin (1 + Φ)/(KΓ) at z = −1", () => {
      const T = 0.05, K = 3;
      const sweep = robustnessSweep({ ...at, K: [[K]], sampleTime: T, parameters: [{ name: "a", percent: 20 }], sampling: { kind: "grid", pointsPerParameter: 3 } });
      expect(sweep.sampleTime).toBe(T);
      for (const s of sweep.samples) {
        const { Phi, Gamma } = zoh(s.values[0]!, 2, T);
        expectComplexSetsClose(s.poles, [{ re: Phi - Gamma * K, im: 0 }], 1e-12, `pole at a = ${s.values[0]}`);
        expect(s.stable).toBe(true);
        // L(z) = KΓ/(z − Φ) has phase −180° only at z = −1 (ω = π/T): |L(−1)| = KΓ/(1 + Φ).
        expect(s.gainMarginDb!).toBeCloseTo(20 * Math.log10((1 + Phi) / (K * Gamma)), 6);
      }
      expect(sweep.marginsNote).toContain("sampled at 0.05 s");
    });

    it("finds the loop unstable at a long period where the continuous loop is stable", () => {
      // continuous pole a − bK = −5.5 ± 20 %; sampled at T = 1 s: Φ − ΓK ≈ −6.1, outside the unit circle.
      const continuous = robustnessSweep({ ...at, K: [[3]], parameters: [{ name: "a", percent: 20 }], sampling: { kind: "grid", pointsPerParameter: 3 } });
      expect(continuous.allStable).toBe(true);
      expect(continuous.sampleTime).toBeNull();
      const sampled = robustnessSweep({ ...at, K: [[3]], sampleTime: 1, parameters: [{ name: "a", percent: 20 }], sampling: { kind: "grid", pointsPerParameter: 3 } });
      expect(sampled.samples.map((s) => s.stable)).toEqual([false, false, false]);
      const { Phi, Gamma } = zoh(0.5, 2, 1);
      expectComplexSetsClose(sampled.samples[1]!.poles, [{ re: Phi - 3 * Gamma, im: 0 }], 1e-12);
    });

    it("includes the accumulator ξ[k+1] = ξ[k] + T·e[k] of integral action", () => {
      const T = 0.1, K = 1.5, Ki = -0.8; // simulator convention: u = −Kx − Ki·ξ, ξ accumulates y − r
      const sweep = robustnessSweep({ ...at, K: [[K]], integral: { outputs: ["y"], Ki: [[Ki]] }, sampleTime: T, parameters: [{ name: "b", percent: 10 }], sampling: { kind: "grid", pointsPerParameter: 2 } });
      for (const s of sweep.samples) {
        const { Phi, Gamma } = zoh(0.5, s.values[0]!, T);
        // hand-derived: M = [[Φ − ΓK, −ΓKi], [T, 1]]; eigenvalues from trace and determinant
        const tr = Phi - Gamma * K + 1, det = Phi - Gamma * K + T * Gamma * Ki;
        const disc = tr * tr - 4 * det;
        const expected = disc >= 0
          ? [{ re: (tr + Math.sqrt(disc)) / 2, im: 0 }, { re: (tr - Math.sqrt(disc)) / 2, im: 0 }]
          : [{ re: tr / 2, im: Math.sqrt(-disc) / 2 }, { re: tr / 2, im: -Math.sqrt(-disc) / 2 }];
        expectComplexSetsClose(s.poles, expected, 1e-12, `poles at b = ${s.values[0]}`);
        expect(s.stable).toBe(expected.every((z) => Math.hypot(z.re, z.im) < 1));
      }
    });

    it("rejects a sample time that is not a positive finite number", () => {
      for (const bad of [0, -1, Number.NaN, Number.POSITIVE_INFINITY]) {
        expect(() => robustnessSweep({ ...at, K: [[1]], sampleTime: bad, parameters: [{ name: "a", percent: 10 }], sampling: { kind: "grid", pointsPerParameter: 2 } })).toThrow(/sampleTime must be a positive finite number/);
      }
    });
  });
});
