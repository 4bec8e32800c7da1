import { describe, expect, it } from "vitest";
import { EngineError } from "../../../shared-engine/errors";
import { expm } from "../../../shared-engine/linalg";
import { compileNonlinearPlant, linearize, simulateClosedLoop, solveOperatingPoint } from "../../../shared-engine/nonlinear";
import { expectAtMost } from "../../helpers/assertions";
import { linearTwoState, pendulum, tank } from "./plantModels";

const linearPlant = compileNonlinearPlant(linearTwoState);
const linearOp = solveOperatingPoint(linearPlant, { unknowns: ["p", "v"], inputs: { f: 1 } });
const times = Array.from({ length: 41 }, (_, k) => k * 0.25);

function maxRelativeGap(a: number[][], b: number[][]): number {
  let scale = 0, gap = 0;
  a.forEach((row, k) => row.forEach((v, i) => { scale = Math.max(scale, Math.abs(b[k]![i]!)); gap = Math.max(gap, Math.abs(v - b[k]![i]!)); }));
  return gap / Math.max(scale, 1e-300);
}

describe("simulateClosedLoop", () => {
  it("a linear plant agrees with the exact linear response of the closed loop (initial offset)", () => {
    const K = [[3, 1.5]];
    const sim = simulateClosedLoop({ plant: linearPlant, operatingPoint: linearOp, K, times, scenario: { initialOffset: { p: 0.4, v: -0.2 } }, rtol: 1e-10, atol: 1e-12 });
    // Independent reference: x(t) = x0 + e^{(A − BK)t} δx(0) by expm (Higham 2005) with A − BK hand-formed.
    const Acl = [[0, 1], [-2 - 3, -0.5 - 1.5]];
    const exact = times.map((t) => {
      const P = expm(Acl.map((row) => row.map((v) => v * t)));
      return [0.5 + P.get(0, 0) * 0.4 + P.get(0, 1) * -0.2, P.get(1, 0) * 0.4 + P.get(1, 1) * -0.2];
    });
    expectAtMost(maxRelativeGap(sim.states, exact), 1e-6, "nonlinear path vs expm");
    expectAtMost(maxRelativeGap(sim.linear.states, exact), 1e-12, "linear prediction vs expm");
    expectAtMost(sim.largestDivergence!.size, 1e-6, "largest divergence");
    expect(sim.time).toEqual(times);
    expect(sim.saturated).toBe(false);
  });

  it("a linear plant with integral action, set-point step and disturbance ramp matches its linear prediction, continuous and sampled", () => {
    for (const sampleTime of [null, 0.05]) {
      const sim = simulateClosedLoop({
        plant: linearPlant, operatingPoint: linearOp, K: [[3, 1.5]],
        integral: { outputs: ["position"], Ki: [[2]], antiWindup: "back-calculation" }, sampleTime,
        scenario: { setpointSteps: [{ output: "position", size: 0.3, time: 1 }], disturbanceChanges: [{ disturbance: "w", kind: "ramp", size: 0.2, time: 2 }, { disturbance: "w", kind: "step", size: -0.1, time: 0.6 }] },
        times, rtol: 1e-10, atol: 1e-12,
      });
      expectAtMost(maxRelativeGap(sim.outputs, sim.linear.outputs), 1e-6, `outputs, sampleTime ${sampleTime}`);
      expectAtMost(maxRelativeGap(sim.inputs, sim.linear.inputs), 1e-6, `inputs, sampleTime ${sampleTime}`);
      // Loop [[0, 1, 0], [−5, −2, 2], [1, 0, 0]] has s³ + 2s² + 5s + 2 (Hurwitz by Routh): the
      // set-point step moves the tracked output (hand-derived).
      expect(Math.abs(sim.outputs[8]![0]! - sim.outputs[3]![0]!)).toBeGreaterThan(0.01);
    }
  });

  it("the sampled loop holds the input between samples (zero-order hold)", () => {
    const sim = simulateClosedLoop({ plant: linearPlant, operatingPoint: linearOp, K: [[3, 1.5]], sampleTime: 0.5, times, scenario: { initialOffset: { p: 0.4 } } });
    // Output times 0.25 and 0.5 − ε... at t = 0.25 the input is still the one computed at t = 0.
    expect(sim.inputs[1]![0]).toBe(sim.inputs[0]![0]);
    expect(sim.inputs[2]![0]).not.toBe(sim.inputs[0]![0]);
  });

  it("the pendulum near the inverted point stays close to its linear prediction for a small offset and diverges for a large one", () => {
    const plant = compileNonlinearPlant(pendulum);
    const op = solveOperatingPoint(plant, { unknowns: ["omega", "torque"], states: { theta: Math.PI } });
    // Stabilizing gain by hand: A − BK with B = [0; 2] (1/(m l²) = 2), K = [20, 3] gives the
    // characteristic polynomial s² + 6.3 s + 20.38 (Hurwitz).
    const K = [[20, 3]];
    const small = simulateClosedLoop({ plant, operatingPoint: op, K, times: times.slice(0, 17), scenario: { initialOffset: { theta: 0.01 } } });
    const large = simulateClosedLoop({ plant, operatingPoint: op, K, times: times.slice(0, 17), scenario: { initialOffset: { theta: 0.8 } } });
    expectAtMost(small.largestDivergence!.size, 1e-5, "small offset divergence");
    expect(large.largestDivergence!.size).toBeGreaterThan(0.02);
    expect(large.saturated).toBe(true); // 20·0.8 = 16 N m > 3 N m limit
    expect(large.largestDivergence!.output).toBe("angle");
    // The linearization recorded beside the run is the one at θ = π.
    expect(linearize(plant, op).model.A.get(1, 0)).toBeCloseTo(9.81 / 0.5, 12);
  });

  it("anti-windup shortens the recovery after a saturating disturbance", () => {
    const plant = compileNonlinearPlant(tank);
    const op = solveOperatingPoint(plant, { unknowns: ["q_in"], states: { h: 1 } });
    const run = (antiWindup: "none" | "back-calculation" | "conditional") => simulateClosedLoop({
      // Linearized loop s² + (0.011 + 0.5·0.2)s + 0.5·0.02: ζ ≈ 0.55 (hand-derived). The leak of
      // 0.07 needs q_in ≈ 0.114 > max 0.1, so the input saturates until t = 40.
      plant, operatingPoint: op, K: [[0.2]], integral: { outputs: ["level"], Ki: [[0.02]], antiWindup }, sampleTime: 0.5,
      scenario: { disturbanceChanges: [{ disturbance: "leak", kind: "step", size: 0.07, time: 1 }, { disturbance: "leak", kind: "step", size: -0.07, time: 40 }] },
      times: Array.from({ length: 161 }, (_, k) => k),
    });
    const errorAfter = (sim: ReturnType<typeof run>) => sim.outputs.slice(60).reduce((s, y) => s + Math.abs(y[0]! - 1), 0);
    const none = run("none");
    const back = run("back-calculation");
    const conditional = run("conditional");
    expect(none.saturated).toBe(true);
    expect(none.stoppedEarly).toBeNull();
    expect(none.time.length).toBe(161);
    expect(errorAfter(back)).toBeLessThan(errorAfter(none));
    expect(errorAfter(conditional)).toBeLessThan(errorAfter(none));
    // Input limits and the 0.01 m³/s² rate limit hold at every sample.
    for (const sim of [none, back, conditional]) {
      sim.inputs.forEach((u, k) => {
        expect(u[0]!).toBeGreaterThanOrEqual(0);
        expect(u[0]!).toBeLessThanOrEqual(0.1);
        if (k > 0) expectAtMost(Math.abs(u[0]! - sim.inputs[k - 1]![0]!), 0.01 * 1 + 1e-15, "input change per second (rate limit 0.01/s)");
      });
    }
  });

  it("stops early with the last good time when the tank runs dry", () => {
    const plant = compileNonlinearPlant(tank);
    const op = solveOperatingPoint(plant, { unknowns: ["q_in"], states: { h: 1 } });
    const sim = simulateClosedLoop({
      plant, operatingPoint: op, K: [[0]], times: Array.from({ length: 101 }, (_, k) => k * 5),
      scenario: { disturbanceChanges: [{ disturbance: "leak", kind: "step", size: 0.2, time: 0 }] },
    });
    expect(sim.stoppedEarly).not.toBeNull();
    expect(sim.stoppedEarly!.reason).toContain("sqrt");
    expect(sim.time.length).toBeLessThan(101);
    expect(sim.states[sim.states.length - 1]![0]!).toBeGreaterThanOrEqual(0);
  });

  it("is cancelled between samples and reports progress", () => {
    const fractions: number[] = [];
    let calls = 0;
    let caught: unknown;
    try {
      simulateClosedLoop({ plant: linearPlant, operatingPoint: linearOp, K: [[3, 1.5]], sampleTime: 0.1, times, onProgress: (f) => fractions.push(f), isCancelled: () => ++calls > 5 });
    } catch (error) { caught = error; }
    expect((caught as EngineError).kind).toBe("cancelled");
    expect(fractions.length).toBe(5);
    expect(fractions.every((f, i) => i === 0 || f > fractions[i - 1]!)).toBe(true);
  });

  it("rejects a set-point step on an output without integral action and wrong gain shapes", () => {
    expect(() => simulateClosedLoop({ plant: linearPlant, operatingPoint: linearOp, K: [[3, 1.5]], times, scenario: { setpointSteps: [{ output: "position", size: 1 }] } }))
      .toThrow(/output 'position' has no integral action/);
    expect(() => simulateClosedLoop({ plant: linearPlant, operatingPoint: linearOp, K: [[3]], times })).toThrow(/K must be 1×2/);
    expect(() => simulateClosedLoop({ plant: linearPlant, operatingPoint: linearOp, K: [[3, 1]], times: [0, 2, 1] })).toThrow(/strictly increasing/);
  });
});

describe("an unstable linearized loop", () => {
  it("stops the record at the last finite sample of the linear prediction instead of returning NaN", () => {
    // Regression found through the bridge: inverted pendulum with K = 0 (no feedback), long
    // horizon; the exact linear prediction grows like e^{√(g/l) t} and overflows near t ≈ 167 s.
    const plant = compileNonlinearPlant({
      states: [{ name: "theta" }, { name: "omega" }],
      inputs: [{ name: "torque" }],
      disturbances: [],
      parameters: [{ name: "g", value: 9.81 }, { name: "l", value: 1 }],
      stateEquations: { theta: "omega", omega: "g/l*sin(theta) + torque" },
      outputs: [{ name: "angle", equation: "theta" }],
    });
    const op = solveOperatingPoint(plant, { unknowns: ["omega", "torque"], states: { theta: 0 } });
    const times = Array.from({ length: 401 }, (_, k) => k);
    const sim = simulateClosedLoop({ plant, operatingPoint: op, K: [[0, 0]], scenario: { initialOffset: { theta: 1e-9 } }, times });
    expect(sim.stoppedEarly).not.toBeNull();
    const all = [...sim.outputs.flat(), ...sim.linear.outputs.flat(), ...sim.linear.states.flat()];
    expect(all.every((v) => Number.isFinite(v))).toBe(true);
    expect(sim.time.length).toBe(sim.linear.outputs.length);
  });
});
