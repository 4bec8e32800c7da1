// Validation catalogue for nonlinear plants and the nonlinearCheck / robustness variant keys:
// each invalid file is rejected with kind "validation" and a problem at the exact JSON path.
import { describe, expect, it } from "vitest";
import { EngineError } from "../../../shared-engine/errors";
import { loadProjectText } from "../../../shared-engine/project/loadProject";

/** The queue plant of the example (invented), as a second plant after a linear one. */
const base = () => ({
  format: "loopwright-project",
  version: 1,
  name: "Nonlinear validation test",
  plants: [
    {
      id: "lin",
      model: { type: "state-space", A: [[-1]], B: [[1]], C: [[1]], sampleTime: null },
    },
    {
      id: "queue",
      model: {
        type: "nonlinear",
        states: [{ name: "backlog", unit: "msg", min: 0 }, { name: "consumers", min: 0 }],
        inputs: [{ name: "u", min: 1, max: 120, rateLimit: 2 }],
        disturbances: [{ name: "lam", nominal: 2000 }],
        parameters: [{ name: "mu", value: 60 }, { name: "K", value: 2000 }, { name: "tau", value: 20 }],
        stateEquations: { backlog: "lam - consumers*mu*backlog/(K + backlog)", consumers: "(u - consumers)/tau" },
        outputs: [{ name: "y", equation: "backlog" }],
        operatingPoint: { unknowns: ["consumers", "u"], states: { backlog: 10000, consumers: 30 }, inputs: { u: 30 } },
        sampleTime: null as number | null,
      } as Record<string, unknown>,
    },
  ],
  variants: [
    {
      id: "v",
      plant: "queue",
      stateFeedback: { method: "lqr", Q: [[1e-6, 0], [0, 0.01]], R: [[1]] },
      integralAction: { outputs: ["y"], weights: [1e-8] },
      nonlinearCheck: { times: [0, 10, 20], scenario: { setpointSteps: [{ output: "y", size: 1 }] } } as Record<string, unknown>,
      robustness: { parameters: [{ name: "mu", percent: 20 }], sampling: { kind: "grid", pointsPerParameter: 3 } } as Record<string, unknown>,
    } as Record<string, unknown>,
  ],
});
type Project = ReturnType<typeof base>;
const model = (p: Project) => p.plants[1]!.model as Record<string, unknown>;

function problemsOf(project: unknown): { path: string; message: string }[] {
  try {
    loadProjectText(JSON.stringify(project));
  } catch (error) {
    expect(error).toBeInstanceOf(EngineError);
    expect((error as EngineError).kind).toBe("validation");
    return (error as EngineError).details.problems as { path: string; message: string }[];
  }
  return [];
}

function mutated(f: (p: Project) => void): Project {
  const p = base();
  f(p);
  return p;
}

describe("validation of nonlinear plants", () => {
  it("accepts the valid nonlinear project without problems", () => {
    expect(problemsOf(base())).toEqual([]);
  });

  const catalogue: [string, (p: Project) => void, string, RegExp][] = [
    ["an unknown name in a state equation", (p) => { (model(p).stateEquations as Record<string, string>).backlog = "lamda - consumers"; },
      "plants[1].model.stateEquations.backlog", /^at column 1: unknown name 'lamda' \(declared: backlog, consumers, u, lam, mu, K, tau\)/],
    ["a syntax error, with its column", (p) => { (model(p).stateEquations as Record<string, string>).backlog = "(lam - consumers"; },
      "plants[1].model.stateEquations.backlog", /^at column \d+: expected '\)'/],
    ["a missing state equation", (p) => { delete (model(p).stateEquations as Record<string, string>).consumers; },
      "plants[1].model.stateEquations.consumers", /is missing: every state needs an equation/],
    ["an equation for a name that is not a state", (p) => { (model(p).stateEquations as Record<string, string>).speed = "1"; },
      "plants[1].model.stateEquations.speed", /not a declared state/],
    ["an operating point outside the declared bounds", (p) => { (model(p).operatingPoint as { states: Record<string, number> }).states.backlog = -5; },
      "plants[1].model.operatingPoint.states.backlog", /-5 is outside the declared bounds \[0, ∞\]/],
    ["an input guess outside its bounds", (p) => { (model(p).operatingPoint as { inputs: Record<string, number> }).inputs.u = 500; },
      "plants[1].model.operatingPoint.inputs.u", /500 is outside the declared bounds \[1, 120\] of u \(as the initial guess\)/],
    ["an unknown that is a parameter", (p) => { (model(p).operatingPoint as { unknowns: string[] }).unknowns = ["consumers", "mu"]; },
      "plants[1].model.operatingPoint.unknowns[1]", /only declared states and inputs can be unknowns/],
    ["fewer unknowns than equations", (p) => { (model(p).operatingPoint as { unknowns: string[] }).unknowns = ["consumers"]; },
      "plants[1].model.operatingPoint.unknowns", /lists 1 unknowns but there are 2 equations/],
    ["a duplicate name across kinds", (p) => { (model(p).parameters as { name: string }[])[0]!.name = "lam"; },
      "plants[1].model.parameters[0].name", /already declared/],
    ["a name that is a built-in function", (p) => { (model(p).parameters as { name: string }[])[2]!.name = "exp"; },
      "plants[1].model.parameters[2].name", /built-in function name/],
    ["a sample time on a nonlinear plant", (p) => { model(p).sampleTime = 0.5; },
      "plants[1].model.sampleTime", /must be null/],
    ["a non-positive rate limit", (p) => { (model(p).inputs as { rateLimit: number }[])[0]!.rateLimit = 0; },
      "plants[1].model.inputs[0].rateLimit", /must be positive/],
    ["an output equation with an unknown name", (p) => { (model(p).outputs as { equation: string }[])[0]!.equation = "2*backlgo"; },
      "plants[1].model.outputs[0].equation", /^at column 3: unknown name 'backlgo'/],
    ["a nonlinear check on a linear plant", (p) => { p.variants[0]!.plant = "lin"; p.variants[0]!.stateFeedback = { method: "lqr", Q: [[1]], R: [[1]] }; delete p.variants[0]!.robustness; },
      "variants[0].nonlinearCheck", /applies only to a plant of type "nonlinear"/],
    ["a robustness sweep without state feedback", (p) => { delete p.variants[0]!.stateFeedback; delete p.variants[0]!.integralAction; delete p.variants[0]!.nonlinearCheck; },
      "variants[0].robustness", /needs a stateFeedback design/],
    ["a set-point step on an output without integral action", (p) => { delete p.variants[0]!.integralAction; },
      "variants[0].nonlinearCheck.scenario.setpointSteps[0].output", /has no integral action/],
    ["a disturbance step on an undeclared disturbance", (p) => { (p.variants[0]!.nonlinearCheck as Record<string, unknown>).scenario = { disturbanceChanges: [{ disturbance: "rain", kind: "step", size: 1 }] }; },
      "variants[0].nonlinearCheck.scenario.disturbanceChanges[0].disturbance", /not a declared disturbance/],
    ["times that do not increase", (p) => { (p.variants[0]!.nonlinearCheck as Record<string, unknown>).times = [0, 5, 5]; },
      "variants[0].nonlinearCheck.times[2]", /increase strictly/],
    ["a swept parameter that is not declared", (p) => { (p.variants[0]!.robustness as Record<string, unknown>).parameters = [{ name: "nu", percent: 10 }]; },
      "variants[0].robustness.parameters[0].name", /not a declared parameter/],
    ["a percentage of 100 or more", (p) => { (p.variants[0]!.robustness as Record<string, unknown>).parameters = [{ name: "mu", percent: 100 }]; },
      "variants[0].robustness.parameters[0].percent", /below 100/],
    ["a grid with one point", (p) => { (p.variants[0]!.robustness as Record<string, unknown>).sampling = { kind: "grid", pointsPerParameter: 1 }; },
      "variants[0].robustness.sampling.pointsPerParameter", /at least 2/],
    ["random sampling without an integer seed", (p) => { (p.variants[0]!.robustness as Record<string, unknown>).sampling = { kind: "random", samples: 10, seed: 1.5 }; },
      "variants[0].robustness.sampling.seed", /whole number/],
  ];

  it.each(catalogue)("rejects %s with a problem at its JSON path", (_title, change, path, message) => {
    const problems = problemsOf(mutated(change));
    const hit = problems.find((p) => p.path === path);
    expect(hit, JSON.stringify(problems)).toBeDefined();
    expect(hit!.message).toMatch(message);
  });

  it("reports a parse error in the validation message as path, column and what was expected", () => {
    try {
      loadProjectText(JSON.stringify(mutated((p) => { (model(p).stateEquations as Record<string, string>).backlog = "lam - (consumers"; })));
      expect.unreachable();
    } catch (error) {
      expect((error as Error).message).toMatch(/plants\[1\]\.model\.stateEquations\.backlog: at column \d+: expected '\)'/);
    }
  });
});
