// The nonlinear requests of the bridge (equation check, operating point, linearization,
// closed-loop simulation, robustness sweep) on plants whose answers are known in closed form
// (the Torricelli tank and the pendulum of test/engine/nonlinear/plantModels.ts, and a scalar
// linear lag worked by hand), plus field-named parameter errors, progress and cancellation.
import { describe, expect, it } from "vitest";
import { call, expectMonotonicFractions, failure, recorder } from "./requestHelpers";
import { expectAtMost, expectComplexSetsClose, expectMatrixClose, expectRelativeClose } from "../../helpers/assertions";
import { pendulum, tank } from "../../engine/nonlinear/plantModels";


const [TANK_AREA, TANK_OUTLET, GRAVITY] = [2, 0.01, 9.81];

/** ẋ = −x + u, y = x, |u| ≤ 0.1: a scalar lag whose closed loops are solved by hand. */
const lag = {
  states: [{ name: "x" }],
  inputs: [{ name: "u", min: -0.1, max: 0.1 }],
  disturbances: [{ name: "w" }],
  parameters: [{ name: "k", value: 1 }],
  stateEquations: { x: "-k*x + u + w" },
  outputs: [{ name: "y", equation: "x" }],
};
const LAG_POINT = { unknowns: ["x"], inputs: { u: 0 } };

describe("nonlinear.check", () => {
  it("accepts the tank and lists the names each equation uses", async () => {
    const r = await call("nonlinear.check", { plant: tank });
    expect(r.ok).toBe(true);
    expect(r.problems).toEqual([]);
    const h = r.equations.find((e) => e.field === "stateEquations.h")!;
    // Names of "(q_in - leak - a*sqrt(2*g*h)) / A" in order of appearance (read off the text).
    expect(h.namesUsed).toEqual(["q_in", "leak", "a", "g", "h", "A"]);
    expect(h.unknownNames).toEqual([]);
    expect(r.equations.map((e) => e.field)).toEqual(["stateEquations.h", "outputs[0].equation"]);
  });

  it("reports a syntax error and an unknown name per equation with their columns, without throwing", async () => {
    const plant = { ...tank, stateEquations: { h: "q_in - * h" }, outputs: [{ name: "level", equation: "h + beta" }] };
    const r = await call("nonlinear.check", { plant });
    expect(r.ok).toBe(false);
    const syntax = r.problems.find((q) => q.field === "stateEquations.h")!;
    expect(syntax.column).toBe(8); // the "*" of "q_in - * h" is the 8th character (counted by hand)
    expect(syntax.message).toMatch(/column 8/);
    const unknown = r.problems.find((q) => q.field === "outputs[0].equation")!;
    expect(unknown.column).toBe(5); // "beta" starts at the 5th character of "h + beta"
    expect(unknown.message).toContain("beta");
    expect(r.equations[1]!.unknownNames).toEqual(["beta"]);
  });

  it("reports a structural problem of the plant by its path when the equations parse", async () => {
    const r = await call("nonlinear.check", { plant: { ...tank, parameters: [{ name: "h", value: 1 }, { name: "a", value: 1 }, { name: "g", value: 1 }, { name: "A", value: 1 }] } });
    expect(r.ok).toBe(false);
    expect(r.problems).toHaveLength(1);
    expect(r.problems[0]!.field).toBe("parameters[0].name");
    expect(r.problems[0]!.column).toBeNull();
    expect(r.problems[0]!.message).toContain("already used");
  });

  it("checks loose equations against given names, and only syntax without names", async () => {
    const equations = [{ field: "f1", text: "a*x + b" }, { field: "f2", text: "sin(x" }, { field: "f3", text: 3 }];
    const r = await call("nonlinear.check", { equations, names: ["a", "x"] });
    expect(r.problems.map((q) => q.field)).toEqual(["f1", "f2", "f3"]);
    expect(r.problems[0]!.column).toBe(7); // "b" in "a*x + b"
    expect(r.problems[2]!.column).toBeNull();
    const syntaxOnly = await call("nonlinear.check", { equations: { g: "a*x + b" } });
    expect(syntaxOnly.ok).toBe(true);
    expect(syntaxOnly.equations[0]!.namesUsed).toEqual(["a", "x", "b"]);
    expect(syntaxOnly.diagnostics.warnings.join(" ")).toMatch(/names not given/);
  });

  it("turns hostile text (too long, too deep) into problems rather than errors", async () => {
    const r = await call("nonlinear.check", { equations: [{ field: "long", text: "x+".repeat(1500) + "x" }, { field: "deep", text: "(".repeat(100) + "x" + ")".repeat(100) }] });
    expect(r.ok).toBe(false);
    expect(r.problems.map((q) => q.field)).toEqual(["long", "deep"]);
  });
});

describe("nonlinear.operatingPoint and nonlinear.linearize", () => {
  it("solves the tank level for a given inflow: h = (q/a)²/(2g)", async () => {
    const r = await call("nonlinear.operatingPoint", { plant: tank, request: { unknowns: ["h"], states: { h: 4.5 }, inputs: { q_in: 0.02 } } });
    // Closed form of q = a√(2gh) (as in test/engine/nonlinear/operatingPoint.test.ts).
    expectRelativeClose(r.operatingPoint.states[0]!, (0.02 / TANK_OUTLET) ** 2 / (2 * GRAVITY), 1e-12, "h");
    expectAtMost(r.residual, 1e-10, "residual");
    expect(r.iterations).toBeGreaterThan(0);
    expect(r.operatingPoint.names.states).toEqual(["h"]);
  });

  it("linearizes the tank at h₀ = 1.7 with ∂h'/∂h = −a√(2g)/(2√h₀)/A and the point beside it", async () => {
    const h0 = 1.7;
    const r = await call("nonlinear.linearize", { plant: tank, request: { unknowns: ["q_in"], states: { h: h0 } } });
    // Closed form (Torricelli outflow differentiated by hand).
    expectRelativeClose(r.model.A[0]![0]!, (-TANK_OUTLET * Math.sqrt(2 * GRAVITY)) / (2 * Math.sqrt(h0)) / TANK_AREA, 1e-14, "A");
    expectMatrixClose(r.model.B, [[1 / TANK_AREA]], 1e-15, "B");
    expectMatrixClose(r.model.F, [[-1 / TANK_AREA]], 1e-15, "F");
    expectMatrixClose(r.model.C, [[1]], 0, "C");
    expect(r.model.sampleTime).toBeNull();
    expect(r.model.names.inputs).toEqual(["q_in"]);
    expect(r.model.units.states).toEqual(["m"]);
    expectRelativeClose(r.operatingPoint.inputs[0]!, TANK_OUTLET * Math.sqrt(2 * GRAVITY * h0), 1e-12, "q_in at h₀");
    expectAtMost(r.equilibriumResidual, 1e-12, "equilibrium residual");
    expectComplexSetsClose(r.poles, [{ re: r.model.A[0]![0]!, im: 0 }], 1e-15, "pole");
  });

  it("linearizes the inverted pendulum to A = [[0, 1], [g/l, −c]]", async () => {
    const r = await call("nonlinear.linearize", { plant: pendulum, request: { unknowns: ["omega", "torque"], states: { theta: Math.PI } } });
    // Textbook linearization (from memory), as in test/engine/nonlinear/linearize.test.ts.
    expectMatrixClose(r.model.A, [[0, 1], [9.81 / 0.5, -0.3]], 1e-14, "A");
    expectMatrixClose(r.model.B, [[0], [1 / (2 * 0.25)]], 1e-15, "B");
  });
});

describe("nonlinear.simulate", () => {
  it("follows x(t) = 0.5·e^{−2t} for ẋ = −x + u under u = −x, reporting monotonic progress", async () => {
    const times = Array.from({ length: 21 }, (_, k) => k * 0.1);
    const { context, fractions } = recorder();
    const r = await call("nonlinear.simulate", { plant: lag, request: LAG_POINT, K: [[1]], scenario: { initialOffset: { x: 0.05 } }, times, rtol: 1e-10, atol: 1e-13 }, context);
    // Hand-worked: the closed loop is ẋ = −2x (the input stays inside ±0.1 since |x| ≤ 0.05).
    r.time.forEach((t, k) => expectRelativeClose(r.states[k]![0]!, 0.05 * Math.exp(-2 * t), 1e-8, `x(${t})`, 1e-6));
    r.time.forEach((t, k) => expectRelativeClose(r.linear.outputs[k]![0]!, 0.05 * Math.exp(-2 * t), 1e-12, `linear y(${t})`, 1e-6));
    expect(r.saturated).toBe(false);
    expect(r.stoppedEarly).toBeNull();
    expect(r.names).toEqual({ states: ["x"], inputs: ["u"], outputs: ["y"] });
    expectMonotonicFractions(fractions);
  });

  it("saturates at u = −0.1 and follows x(t) = −0.1 + 1.1·e^{−t} while saturated", async () => {
    const times = [0, 0.5, 1, 1.5, 2];
    const r = await call("nonlinear.simulate", { plant: lag, request: LAG_POINT, K: [[10]], scenario: { initialOffset: { x: 1 } }, times, rtol: 1e-10, atol: 1e-13 });
    // Hand-worked: −10x < −0.1 while x > 0.01, i.e. until t = ln 10 ≈ 2.3 > 2.
    times.forEach((t, k) => expectRelativeClose(r.states[k]![0]!, -0.1 + 1.1 * Math.exp(-t), 1e-8, `x(${t})`));
    expect(r.inputs.every((u) => u[0] === -0.1)).toBe(true);
    expect(r.saturated).toBe(true);
    expect(r.largestDivergence!.output).toBe("y");
    expect(r.largestDivergence!.size).toBeGreaterThan(0.1); // the unsaturated prediction decays as e^{−11t}
  });

  it("ends an unstable loop's result at the last finite sample of its overflowing linear prediction", async () => {
    const times = Array.from({ length: 201 }, (_, k) => k);
    const r = await call("nonlinear.simulate", { plant: pendulum, request: { unknowns: ["omega", "torque"], states: { theta: Math.PI } }, K: [[0, 0]], scenario: { initialOffset: { theta: 0.01 } }, times });
    expect(r.stoppedEarly).not.toBeNull();
    expect(r.time.length).toBeLessThan(times.length);
    expect(r.time.length).toBe(r.linear.states.length);
    // Hand-worked: the inverted pendulum's unstable pole λ = (−c + √(c² + 4g/l))/2 dominates, so
    // consecutive samples (1 s apart) of the linear prediction grow by e^λ.
    const lambda = (-0.3 + Math.sqrt(0.09 + (4 * 9.81) / 0.5)) / 2;
    const k = r.time.length - 1;
    expectRelativeClose(r.linear.states[k]![0]! / r.linear.states[k - 1]![0]!, Math.exp(lambda), 1e-9, "growth per second");
    // The engine itself ends the record there and says why; the bridge passes it on.
    expect(`${r.stoppedEarly!.reason} ${r.diagnostics.warnings.join(" ")}`).toMatch(/floating-point range|not finite/);
  });

  it("stops with kind cancelled when cancellation follows the first progress report", async () => {
    const { context, fractions } = recorder(1);
    const e = await failure("nonlinear.simulate", { plant: lag, request: LAG_POINT, K: [[1]], scenario: { initialOffset: { x: 0.05 } }, times: [0, 0.5, 1, 1.5, 2] }, context);
    expect(e.kind).toBe("cancelled");
    expect(fractions.length).toBe(1);
  });

  it("names integral-action and scenario fields in its errors", async () => {
    const base = { plant: lag, request: LAG_POINT, K: [[1]], times: [0, 1] };
    const wrongKi = await failure("nonlinear.simulate", { ...base, integral: { outputs: ["y"], Ki: [[1, 2]] } });
    expect(wrongKi.kind).toBe("shape-mismatch");
    expect(wrongKi.details.field).toBe("integral.Ki");
    const unknownOutput = await failure("nonlinear.simulate", { ...base, scenario: { setpointSteps: [{ output: "y", size: 1 }] } });
    expect(unknownOutput.kind).toBe("invalid-argument");
    expect(unknownOutput.details.field).toBe("scenario.setpointSteps[0]");
    const badKind = await failure("nonlinear.simulate", { ...base, scenario: { disturbanceChanges: [{ disturbance: "w", kind: "pulse", size: 1 }] } });
    expect(badKind.details.field).toBe("scenario.disturbanceChanges[0].kind");
  });
});

describe("nonlinear.robustness", () => {
  const sweep = {
    plant: tank,
    request: { unknowns: ["q_in"], states: { h: 1.7 } },
    K: [[0.5]],
    parameters: [{ name: "a", percent: 10 }],
    sampling: { kind: "grid", pointsPerParameter: 3 },
  };

  it("gives the tank's closed-loop pole −a√(2g)/(2√h₀)/A − K/A at a = 0.009, 0.01, 0.011, with progress", async () => {
    const { context, fractions } = recorder();
    const r = await call("nonlinear.robustness", sweep, context);
    expect(r.parameterNames).toEqual(["a"]);
    // Grid of ±10 % with its end points: a = 0.009, 0.010, 0.011 (hand-worked).
    [0.009, 0.01, 0.011].forEach((a, i) => expectRelativeClose(r.samples[i]!.values[0]!, a, 1e-15, `a[${i}]`));
    for (const s of r.samples) {
      const a = s.values[0]!;
      // Hand-worked closed loop of the scalar linearization (h held at h₀, q_in re-solved).
      const pole = (-a * Math.sqrt(2 * GRAVITY)) / (2 * Math.sqrt(1.7)) / TANK_AREA - 0.5 / TANK_AREA;
      expectComplexSetsClose(s.poles, [{ re: pole, im: 0 }], 1e-13, `pole at a = ${a}`);
      expect(s.stable).toBe(true);
      expect(s.error).toBeNull();
    }
    expect(r.allStable).toBe(true);
    expectMonotonicFractions(fractions);
  });

  it("stops with kind cancelled when cancellation follows the first progress report", async () => {
    const { context } = recorder(1);
    const e = await failure("nonlinear.robustness", { ...sweep, sampling: { kind: "grid", pointsPerParameter: 20 } }, context);
    expect(e.kind).toBe("cancelled");
  });

  it("sweeps a controller sampled at T through a zero-order hold: pole e^{pT}·… from the scalar closed form", async () => {
    const T = 2;
    const r = await call("nonlinear.robustness", { ...sweep, sampleTime: T }, recorder().context);
    expect(r.sampleTime).toBe(T);
    for (const s of r.samples) {
      const a = s.values[0]!;
      // Hand-worked: the scalar linearization δh' = α·δh + β·δq with α = −a√(2g)/(2√h₀)/A,
      // β = 1/A; zero-order hold Φ = e^{αT}, Γ = β(e^{αT} − 1)/α; sampled pole Φ − Γ·K.
      const alpha = (-a * Math.sqrt(2 * GRAVITY)) / (2 * Math.sqrt(1.7)) / TANK_AREA;
      const Phi = Math.exp(alpha * T), Gamma = ((1 / TANK_AREA) * (Phi - 1)) / alpha;
      expectComplexSetsClose(s.poles, [{ re: Phi - Gamma * 0.5, im: 0 }], 1e-13, `z-plane pole at a = ${a}`);
      expect(s.stable).toBe(true);
    }
    const bad = await failure("nonlinear.robustness", { ...sweep, sampleTime: -1 });
    expect(bad.kind).toBe("invalid-argument");
  });
});

describe("nonlinear parameter checks", () => {
  const cases: [string, string, unknown, string, string][] = [
    ["a plant that is not an object", "nonlinear.check", { plant: "tank" }, "invalid-argument", "plant"],
    ["equations that are neither list nor object", "nonlinear.check", { equations: 3 }, "invalid-argument", "equations"],
    ["an equation with a syntax error", "nonlinear.operatingPoint", { plant: { ...tank, stateEquations: { h: "q_in -" } }, request: { unknowns: ["h"] } }, "parse-error", "plant.stateEquations.h"],
    ["a duplicated name", "nonlinear.linearize", { plant: { ...tank, outputs: [{ name: "q_in", equation: "h" }] }, request: { unknowns: ["h"] } }, "validation", "plant.outputs[0].name"],
    ["a missing request", "nonlinear.operatingPoint", { plant: tank }, "invalid-argument", "request"],
    ["unknowns that are not a list", "nonlinear.operatingPoint", { plant: tank, request: { unknowns: "h" } }, "invalid-argument", "request.unknowns"],
    ["a text state value", "nonlinear.operatingPoint", { plant: tank, request: { unknowns: ["h"], states: { h: "1" } } }, "invalid-argument", "request.states.h"],
    ["an undeclared state", "nonlinear.operatingPoint", { plant: tank, request: { unknowns: ["h"], states: { z: 1 } } }, "invalid-argument", "request.states.z"],
    ["a negative tolerance", "nonlinear.operatingPoint", { plant: tank, request: { unknowns: ["h"], tolerance: -1 } }, "invalid-argument", "request.tolerance"],
    ["a K of the wrong size", "nonlinear.simulate", { plant: lag, request: LAG_POINT, K: [[1, 2]], times: [0, 1] }, "shape-mismatch", "K"],
    ["decreasing times", "nonlinear.simulate", { plant: lag, request: LAG_POINT, K: [[1]], times: [1, 0] }, "invalid-argument", "times"],
    ["a zero sample time", "nonlinear.simulate", { plant: lag, request: LAG_POINT, K: [[1]], times: [0, 1], sampleTime: 0 }, "invalid-argument", "sampleTime"],
    ["no varied parameters", "nonlinear.robustness", { plant: lag, request: LAG_POINT, K: [[1]], parameters: [], sampling: { kind: "grid", pointsPerParameter: 3 } }, "empty", "parameters"],
    ["an undeclared parameter", "nonlinear.robustness", { plant: lag, request: LAG_POINT, K: [[1]], parameters: [{ name: "zz", percent: 5 }], sampling: { kind: "grid", pointsPerParameter: 3 } }, "invalid-argument", "parameters[0].name"],
    ["a grid of one point", "nonlinear.robustness", { plant: lag, request: LAG_POINT, K: [[1]], parameters: [{ name: "k", percent: 5 }], sampling: { kind: "grid", pointsPerParameter: 1 } }, "invalid-argument", "sampling.pointsPerParameter"],
  ];
  it.each(cases)("rejects %s (%s) with a specific kind naming the field", async (_what, method, params, kind, field) => {
    const e = await failure(method, params);
    expect(e.kind).toBe(kind);
    expect(e.details.field).toBe(field);
    expect(e.message).toContain(field.split(/[.[]/)[0]!);
  });
});
