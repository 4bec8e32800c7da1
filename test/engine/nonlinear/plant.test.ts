import { describe, expect, it } from "vitest";
import { EngineError } from "../../../shared-engine/errors";
import { compileNonlinearPlant, type NonlinearPlantSpec } from "../../../shared-engine/nonlinear";
import { pendulum, tank } from "./plantModels";

function errorOf(fn: () => unknown): EngineError {
  try { fn(); } catch (error) { if (error instanceof EngineError) return error; throw error; }
  throw new Error("expected an EngineError");
}
const withChanges = (base: NonlinearPlantSpec, change: Partial<NonlinearPlantSpec>): NonlinearPlantSpec => ({ ...structuredClone(base), ...change });

describe("compileNonlinearPlant", () => {
  it("evaluates state derivatives and outputs on the [x | u | w | p] layout", () => {
    const plant = compileNonlinearPlant(pendulum);
    expect([plant.n, plant.m, plant.q, plant.r, plant.p]).toEqual([2, 1, 1, 4, 1]);
    const env = plant.environment([Math.PI / 2, 1], [0.5], [0], plant.parameterValues);
    const f = new Float64Array(2);
    plant.stateDerivative(env, f);
    // Hand-evaluated: θ'' = −19.62·1 − 0.3 + 0.5/(2·0.25) = −18.92.
    expect(f[0]).toBe(1);
    expect(Math.abs(f[1]! - -18.92)).toBeLessThan(1e-12);
  });

  it("requires exactly one equation per state, naming the missing or extra one", () => {
    expect(errorOf(() => compileNonlinearPlant(withChanges(pendulum, { stateEquations: { theta: "omega" } }))).message)
      .toBe("stateEquations.omega: state 'omega' has no equation");
    expect(errorOf(() => compileNonlinearPlant(withChanges(pendulum, { stateEquations: { ...pendulum.stateEquations, phi: "1" } }))).message)
      .toContain("stateEquations.phi: 'phi' is not a declared state");
  });

  it("requires names unique across states, inputs, disturbances, parameters and outputs", () => {
    const e = errorOf(() => compileNonlinearPlant(withChanges(tank, { parameters: [{ name: "h", value: 1 }] })));
    expect(e.kind).toBe("validation");
    expect(e.message).toBe("parameters[0].name: name 'h' is already used by states[0].name");
    expect(errorOf(() => compileNonlinearPlant(withChanges(tank, { outputs: [{ name: "q_in", equation: "h" }] }))).message).toContain("already used by inputs[0].name");
    expect(errorOf(() => compileNonlinearPlant(withChanges(tank, { states: [{ name: "2h" }] }))).message).toContain("states[0].name: must be a name");
    expect(errorOf(() => compileNonlinearPlant(withChanges(tank, { parameters: [{ name: "sqrt", value: 1 }] }))).message).toContain("built-in function");
  });

  it("rejects undeclared names in equations, naming the equation and the name", () => {
    const e = errorOf(() => compileNonlinearPlant(withChanges(tank, { stateEquations: { h: "q_in - beta*h" } })));
    expect(e.kind).toBe("parse-error");
    expect(e.message).toContain("in the equation of state 'h', at column 8: unknown name 'beta'");
  });

  it("checks bounds, initial values, rate limits and parameter values", () => {
    expect(errorOf(() => compileNonlinearPlant(withChanges(tank, { states: [{ name: "h", min: 2, max: 1 }] }))).message).toContain("min (2) is above max (1)");
    expect(errorOf(() => compileNonlinearPlant(withChanges(tank, { states: [{ name: "h", min: 0, initial: -1 }] }))).message).toContain("states[0].initial");
    expect(errorOf(() => compileNonlinearPlant(withChanges(tank, { inputs: [{ name: "q_in", rateLimit: 0 }] }))).message).toContain("inputs[0].rateLimit: must be positive");
    expect(errorOf(() => compileNonlinearPlant(withChanges(tank, { parameters: [{ name: "A", value: NaN }, { name: "a", value: 1 }, { name: "g", value: 1 }] }))).message).toContain("parameters[0].value");
    expect(errorOf(() => compileNonlinearPlant(withChanges(tank, { states: [] }))).message).toContain("at least one state");
  });

  it("keeps a private copy of the spec and hands out copies of parameter values", () => {
    const spec = structuredClone(tank);
    const plant = compileNonlinearPlant(spec);
    spec.parameters[0]!.value = 99;
    plant.parameterValues[0] = 42;
    expect(plant.parameterValues[0]).toBe(2);
    expect(plant.spec.parameters[0]!.value).toBe(2);
  });
});
