import { describe, expect, it } from "vitest";
import { EngineError } from "../../../shared-engine/errors";
import { compileNonlinearPlant, linearize, solveOperatingPoint } from "../../../shared-engine/nonlinear";
import { expectMatrixClose, expectRelativeClose } from "../../helpers/assertions";
import { linearTwoState, pendulum, queue, tank } from "./plantModels";

describe("linearize", () => {
  it("gives the pendulum's closed forms at θ = 0 (hanging) and θ = π (inverted)", () => {
    const plant = compileNonlinearPlant(pendulum);
    const [g, l, c, m] = [9.81, 0.5, 0.3, 2];
    for (const [theta, sign] of [[0, -1], [Math.PI, 1]] as const) {
      const op = solveOperatingPoint(plant, { unknowns: ["omega", "torque"], states: { theta } });
      const { model } = linearize(plant, op);
      // Closed form (textbook linearization, from memory): A = [[0, 1], [∓g/l, −c]], B = [0; 1/(m l²)].
      expectMatrixClose(model.A, [[0, 1], [sign * g / l, -c]], 1e-14, `A at θ = ${theta}`);
      expectMatrixClose(model.B, [[0], [1 / (m * l * l)]], 1e-15, "B");
      expectMatrixClose(model.F, [[0], [1 / (m * l * l)]], 1e-15, "F");
      expectMatrixClose(model.C, [[1, 0]], 0, "C");
      expect(model.D.get(0, 0)).toBe(0);
      expect(model.names.states).toEqual(["theta", "omega"]);
      expect(model.units.inputs).toEqual(["N m"]);
    }
  });

  it("gives the Torricelli tank's ∂h'/∂h = −a√(2g)/(2√h)/A", () => {
    const plant = compileNonlinearPlant(tank);
    const h0 = 1.7;
    const op = solveOperatingPoint(plant, { unknowns: ["q_in"], states: { h: h0 } });
    const lin = linearize(plant, op);
    const [A, a, g] = [2, 0.01, 9.81];
    // Hand-derived from A·h' = q_in − a√(2gh).
    expectRelativeClose(lin.model.A.get(0, 0), -a * Math.sqrt(2 * g) / (2 * Math.sqrt(h0)) / A, 4e-16, "∂f/∂h");
    expectRelativeClose(lin.model.B.get(0, 0), 1 / A, 0, "∂f/∂q_in");
    expectRelativeClose(lin.model.F.get(0, 0), -1 / A, 0, "∂f/∂leak");
    expect(lin.operatingPoint.inputs[0]).toBeCloseTo(a * Math.sqrt(2 * g * h0), 14);
    expect(lin.equilibriumResidual).toBeLessThanOrEqual(1e-15);
  });

  it("gives the saturating service rate's derivative μK/(K + x)² (hand-derived)", () => {
    const plant = compileNonlinearPlant(queue);
    const x0 = 3;
    const op = solveOperatingPoint(plant, { unknowns: ["lambda"], states: { x: x0 } });
    const { model } = linearize(plant, op);
    const [mu, K] = [10, 4];
    expectRelativeClose(model.A.get(0, 0), -mu * K / (K + x0) ** 2, 4e-16, "∂f/∂x");
    expectRelativeClose(model.C.get(1, 0), mu * K / (K + x0) ** 2, 4e-16, "∂throughput/∂x");
    expect(op.inputs[0]).toBeCloseTo(mu * x0 / (K + x0), 14);
  });

  it("returns a linear plant's own matrices, including D and E", () => {
    const plant = compileNonlinearPlant(linearTwoState);
    const op = solveOperatingPoint(plant, { unknowns: ["p", "v"], inputs: { f: 1 } });
    const { model } = linearize(plant, op);
    expectMatrixClose(model.A, [[0, 1], [-2, -0.5]], 0);
    expectMatrixClose(model.D, [[0], [0.2]], 1e-16);
    expectMatrixClose(model.E, [[0.1], [0]], 1e-16);
    expect(op.states[0]).toBeCloseTo(0.5, 14); // 2p = f ⇒ p = 1/2
  });

  it("reports an undefined derivative at the tank's empty state instead of an infinite entry", () => {
    const plant = compileNonlinearPlant(tank);
    const op = solveOperatingPoint(plant, { unknowns: ["q_in"], states: { h: 0 } });
    expect(() => linearize(plant, op)).toThrow(EngineError);
    expect(() => linearize(plant, op)).toThrow(/infinite derivative \(square root at 0\)/);
  });
});
