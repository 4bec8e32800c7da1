/** Shared nonlinear plant specs for the nonlinear tests. */
import type { NonlinearPlantSpec } from "../../../shared-engine/nonlinear";

/** Pendulum θ'' = −(g/l) sin θ − c θ' + u/(m l²), output θ. */
export const pendulum: NonlinearPlantSpec = {
  states: [{ name: "theta", unit: "rad" }, { name: "omega", unit: "rad/s" }],
  inputs: [{ name: "torque", unit: "N m", min: -3, max: 3 }],
  disturbances: [{ name: "push", unit: "N m" }],
  parameters: [{ name: "g", value: 9.81 }, { name: "l", value: 0.5 }, { name: "c", value: 0.3 }, { name: "m", value: 2 }],
  stateEquations: { theta: "omega", omega: "-(g/l)*sin(theta) - c*omega + (torque + push)/(m*l^2)" },
  outputs: [{ name: "angle", unit: "rad", equation: "theta" }],
};

/** Torricelli tank A·h' = q_in − a√(2 g h), output h. */
export const tank: NonlinearPlantSpec = {
  states: [{ name: "h", unit: "m", min: 0, max: 5, initial: 1 }],
  inputs: [{ name: "q_in", unit: "m^3/s", min: 0, max: 0.1, rateLimit: 0.01 }],
  disturbances: [{ name: "leak", unit: "m^3/s", nominal: 0 }],
  parameters: [{ name: "A", value: 2 }, { name: "a", value: 0.01 }, { name: "g", value: 9.81 }],
  stateEquations: { h: "(q_in - leak - a*sqrt(2*g*h)) / A" },
  outputs: [{ name: "level", unit: "m", equation: "h" }],
};

/** Queue with a saturating (Michaelis–Menten-style) service rate: x' = λ + d − μ x/(K + x). */
export const queue: NonlinearPlantSpec = {
  states: [{ name: "x", min: 0 }],
  inputs: [{ name: "lambda", min: 0 }],
  disturbances: [{ name: "d" }],
  parameters: [{ name: "mu", value: 10 }, { name: "K", value: 4 }],
  stateEquations: { x: "lambda + d - mu*x/(K + x)" },
  outputs: [{ name: "load", equation: "x" }, { name: "throughput", equation: "mu*x/(K + x) + 0*lambda" }],
};

/** A linear plant typed as equations (for the linear-agreement checks). */
export const linearTwoState: NonlinearPlantSpec = {
  states: [{ name: "p" }, { name: "v" }],
  inputs: [{ name: "f" }],
  disturbances: [{ name: "w" }],
  parameters: [{ name: "k", value: 2 }, { name: "b", value: 0.5 }],
  stateEquations: { p: "v", v: "-k*p - b*v + f + 0.5*w" },
  outputs: [{ name: "position", equation: "p + 0.1*w" }, { name: "y2", equation: "v + 0.2*f" }],
};
