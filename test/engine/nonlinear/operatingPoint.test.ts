import { describe, expect, it } from "vitest";
import { EngineError } from "../../../shared-engine/errors";
import { compileNonlinearPlant, solveOperatingPoint } from "../../../shared-engine/nonlinear";
import { expectAtMost, expectRelativeClose } from "../../helpers/assertions";
import { pendulum, queue, tank } from "./plantModels";

function errorOf(fn: () => unknown): EngineError {
  try { fn(); } catch (error) { if (error instanceof EngineError) return error; throw error; }
  throw new Error("expected an EngineError");
}

describe("solveOperatingPoint", () => {
  it("solves the tank for its level given the inflow, from a far initial guess", () => {
    const plant = compileNonlinearPlant(tank);
    const op = solveOperatingPoint(plant, { unknowns: ["h"], states: { h: 4.5 }, inputs: { q_in: 0.02 } });
    // Closed form: q = a√(2gh) ⇒ h = (q/a)²/(2g).
    expectRelativeClose(op.states[0]!, (0.02 / 0.01) ** 2 / (2 * 9.81), 1e-12, "h");
    expectAtMost(op.residual, 1e-10, "residual");
    expect(op.iterations).toBeGreaterThan(0);
    expect(op.iterations).toBeLessThan(30);
  });

  it("meets an output set-point by solving for a state and an input together", () => {
    const plant = compileNonlinearPlant(queue);
    const op = solveOperatingPoint(plant, { unknowns: ["x", "lambda"], outputSetpoints: { throughput: 6 }, states: { x: 1 }, inputs: { lambda: 1 } });
    // Hand-derived: μx/(K + x) = 6 with μ = 10, K = 4 ⇒ x = 6; λ = 6.
    expectRelativeClose(op.states[0]!, 6, 1e-12, "x");
    expectRelativeClose(op.inputs[0]!, 6, 1e-12, "lambda");
    expectRelativeClose(op.outputs[1]!, 6, 1e-12, "throughput");
  });

  it("checks that the system is square", () => {
    const plant = compileNonlinearPlant(pendulum);
    const e = errorOf(() => solveOperatingPoint(plant, { unknowns: ["omega"] }));
    expect(e.kind).toBe("invalid-argument");
    expect(e.message).toContain("not square: 1 unknown (omega) for 2 equations");
  });

  it("names the unknown that the equations cannot determine", () => {
    const plant = compileNonlinearPlant(pendulum);
    // Unknowns (θ, torque) at θ = π/2: Jacobian [[0, 0], [−(g/l)cos θ, 1/(ml²)]] (hand-derived)
    // has a zero θ column, so θ cannot be determined.
    const e = errorOf(() => solveOperatingPoint(plant, { unknowns: ["theta", "torque"], states: { theta: Math.PI / 2, omega: 1 } }));
    expect(e.kind).toBe("singular");
    expect(e.message).toContain("unknown 'theta' cannot be determined");
  });

  it("rejects a solution outside the declared bounds, naming the state", () => {
    const plant = compileNonlinearPlant(tank);
    // Closed form: outflow 0.05 + 0.06 = a√(2gh) ⇒ h = 11²/19.62 ≈ 6.17 > max 5.
    const e = errorOf(() => solveOperatingPoint(plant, { unknowns: ["h"], inputs: { q_in: 0.05 }, disturbances: { leak: -0.06 }, states: { h: 1 } }));
    expect(e.kind).toBe("invalid-argument");
    expect(e.message).toMatch(/outside the declared bounds: state 'h' = 6\.16\d* is above its max 5/);
  });

  it("reports no convergence with the last residual when there is no equilibrium", () => {
    const plant = compileNonlinearPlant({
      states: [{ name: "x" }], inputs: [], disturbances: [], parameters: [],
      stateEquations: { x: "x^2 + 1" }, outputs: [],
    });
    const e = errorOf(() => solveOperatingPoint(plant, { unknowns: ["x"], states: { x: 3 }, maxIterations: 3 }));
    expect(e.kind).toBe("no-convergence");
    expect(typeof e.details.residual).toBe("number");
    expect(e.details.iterations).toBeGreaterThan(0);
  });

  it("treats undefined trial points as failed line-search steps", () => {
    // f(h) = 1 − √h: a full Newton step from h = 0.01 lands at negative h.
    const plant = compileNonlinearPlant({
      states: [{ name: "h" }], inputs: [], disturbances: [], parameters: [],
      stateEquations: { h: "2 - 1/sqrt(h)" }, outputs: [],
    });
    const op = solveOperatingPoint(plant, { unknowns: ["h"], states: { h: 4 } });
    expectRelativeClose(op.states[0]!, 0.25, 1e-10, "h");
  });

  it("rejects undeclared names and disturbances as unknowns", () => {
    const plant = compileNonlinearPlant(tank);
    expect(errorOf(() => solveOperatingPoint(plant, { unknowns: ["leak"] })).message).toContain("'leak' cannot be solved for (it is a disturbance");
    expect(errorOf(() => solveOperatingPoint(plant, { unknowns: ["h"], states: { H: 1 } as Record<string, number> })).message).toContain("states.H");
  });
});
