// Project file loading: hostile content, migrations and validation with JSON paths.
import { describe, expect, it } from "vitest";
import { EngineError } from "../../../shared-engine/errors";
import { loadProjectText } from "../../../shared-engine/project/loadProject";
import { migrateProject } from "../../../shared-engine/project/migrations";
import { PROJECT_LIMITS, parseProjectJson } from "../../../shared-engine/project/safeJson";

const base = () => ({
  format: "loopwright-project",
  version: 1,
  name: "Test project",
  plants: [
    {
      id: "p",
      model: {
        type: "state-space",
        A: [[0, 1], [-2, -3]],
        B: [[0], [1]],
        C: [[1, 0]],
        sampleTime: null,
        names: { states: ["position", "speed"], inputs: ["force"], outputs: ["position"] },
      },
    },
  ],
  variants: [{ id: "v1", plant: "p", stateFeedback: { method: "lqr", Q: [[1, 0], [0, 1]], R: [[1]] } }],
});

function problemsOf(project: unknown): { path: string; message: string }[] {
  try {
    loadProjectText(JSON.stringify(project));
  } catch (error) {
    expect(error).toBeInstanceOf(EngineError);
    expect((error as EngineError).kind).toBe("validation");
    return ((error as EngineError).details.problems as { path: string; message: string }[]) ?? [{ path: String((error as EngineError).details.path), message: (error as Error).message }];
  }
  return [];
}

function mutate(f: (p: ReturnType<typeof base>) => void): unknown {
  const p = base();
  f(p);
  return p;
}

describe("project file loading", () => {
  it("accepts a valid project and warns about unknown keys without failing", () => {
    const text = JSON.stringify({ ...base(), colourScheme: "teal" });
    const loaded = loadProjectText(text);
    expect(loaded.project.plants[0]!.id).toBe("p");
    expect(loaded.warnings).toEqual([{ path: "colourScheme", message: 'unknown key "colourScheme" is ignored' }]);
  });

  it.each([
    ["B with the wrong row count", (p: ReturnType<typeof base>) => { (p.plants[0]!.model as { B: number[][] }).B = [[0], [1], [2]]; }, "plants[0].model.B", /must have 2 rows like A, has 3/],
    ["non-square A", (p: ReturnType<typeof base>) => { (p.plants[0]!.model as { A: number[][] }).A = [[0, 1, 2], [1, 2, 3]]; }, "plants[0].model.A", /must be square, is 2×3/],
    ["ragged A", (p: ReturnType<typeof base>) => { (p.plants[0]!.model as { A: number[][] }).A = [[0, 1], [1]]; }, "plants[0].model.A[1]", /has 1 entries but row 0 has 2/],
    ["a text entry in A", (p: ReturnType<typeof base>) => { (p.plants[0]!.model as { A: unknown[][] }).A[1]![0] = "x"; }, "plants[0].model.A[1][0]", /must be a finite number/],
    ["C with the wrong column count", (p: ReturnType<typeof base>) => { (p.plants[0]!.model as { C: number[][] }).C = [[1]]; }, "plants[0].model.C", /must have 2 columns/],
    ["D of the wrong shape", (p: ReturnType<typeof base>) => { (p.plants[0]!.model as { D?: number[][] }).D = [[0, 0]]; }, "plants[0].model.D", /must be 1×1/],
    ["a missing sample time", (p: ReturnType<typeof base>) => { delete (p.plants[0]!.model as { sampleTime?: unknown }).sampleTime; }, "plants[0].model.sampleTime", /is required: null for a continuous-time plant/],
    ["a negative sample time", (p: ReturnType<typeof base>) => { (p.plants[0]!.model as { sampleTime: unknown }).sampleTime = -0.1; }, "plants[0].model.sampleTime", /must be positive/],
    ["duplicate state names", (p: ReturnType<typeof base>) => { p.plants[0]!.model.names!.states = ["x", "x"]; }, "plants[0].model.names.states[1]", /duplicate name "x"/],
    ["too few state names", (p: ReturnType<typeof base>) => { p.plants[0]!.model.names!.states = ["x"]; }, "plants[0].model.names.states", /has 1 entries; the model has 2 states/],
    ["an unknown model type", (p: ReturnType<typeof base>) => { (p.plants[0]!.model as { type: string }).type = "ladder"; }, "plants[0].model.type", /must be "state-space"/],
    ["a variant naming no plant", (p: ReturnType<typeof base>) => { p.variants[0]!.plant = "nope"; }, "variants[0].plant", /names no plant \("nope"\)/],
    ["Q of the wrong size", (p: ReturnType<typeof base>) => { (p.variants[0]!.stateFeedback as { Q: number[][] }).Q = [[1]]; }, "variants[0].stateFeedback.Q", /must be 2×2/],
    ["an asymmetric Q", (p: ReturnType<typeof base>) => { (p.variants[0]!.stateFeedback as { Q: number[][] }).Q = [[1, 2], [0, 1]]; }, "variants[0].stateFeedback.Q[1][0]", /symmetric/],
    ["an unknown design method", (p: ReturnType<typeof base>) => { (p.variants[0]!.stateFeedback as { method: string }).method = "magic"; }, "variants[0].stateFeedback.method", /must be one of "lqr", "poles"/],
    ["too few poles", (p: ReturnType<typeof base>) => { (p.variants[0] as { stateFeedback: unknown }).stateFeedback = { method: "poles", poles: [-1] }; }, "variants[0].stateFeedback.poles", /needs 2 poles/],
    ["a zero sample period for discretize", (p: ReturnType<typeof base>) => { (p.variants[0] as { discretize?: unknown }).discretize = { sampleTime: 0, method: "zoh" }; }, "variants[0].discretize.sampleTime", /must be positive/],
    ["an unknown discretization", (p: ReturnType<typeof base>) => { (p.variants[0] as { discretize?: unknown }).discretize = { sampleTime: 0.1, method: "euler" }; }, "variants[0].discretize.method", /must be one of "zoh", "tustin", "bilinear"/],
    ["integral action on an unknown output", (p: ReturnType<typeof base>) => { (p.variants[0] as { integralAction?: unknown }).integralAction = { outputs: ["speed"] }; }, "variants[0].integralAction.outputs[0]", /names no output \("speed"\)/],
    ["decreasing step times", (p: ReturnType<typeof base>) => { (p.variants[0] as { step?: unknown }).step = { times: [0, 1, 0.5] }; }, "variants[0].step.times[2]", /increase strictly/],
    ["duplicate variant ids", (p: ReturnType<typeof base>) => { p.variants.push({ ...p.variants[0]! }); }, "variants[1].id", /duplicate variant id "v1"/],
    ["a zero leading denominator coefficient", (p: ReturnType<typeof base>) => { (p.plants[0] as { model: unknown }).model = { type: "transfer-function", numerator: [1], denominator: [0, 1, 2], sampleTime: null }; }, "plants[0].model.denominator[0]", /leading denominator coefficient must not be zero/],
    ["an improper transfer function", (p: ReturnType<typeof base>) => { (p.plants[0] as { model: unknown }).model = { type: "transfer-function", numerator: [1, 2, 3], denominator: [1, 2], sampleTime: null }; }, "plants[0].model.numerator", /improper transfer function: numerator degree 2 is above denominator degree 1/],
    ["a wrong format name", (p: ReturnType<typeof base>) => { (p as { format: string }).format = "something-else"; }, "format", /not a Loopwright project/],
    ["a newer version", (p: ReturnType<typeof base>) => { (p as { version: number }).version = 7; }, "version", /newer than this Loopwright reads/],
  ])("rejects %s, naming the path", (_title, change, path, message) => {
    const problems = problemsOf(mutate(change));
    const match = problems.find((p) => p.path === path);
    expect(match, `expected a problem at ${path}; got ${JSON.stringify(problems)}`).toBeDefined();
    expect(match!.message).toMatch(message);
  });

  it("reports every problem, not only the first", () => {
    const problems = problemsOf(mutate((p) => {
      (p.plants[0]!.model as { B: number[][] }).B = [[0]];
      p.variants[0]!.plant = "nope";
    }));
    expect(problems.map((p) => p.path).sort()).toEqual(["plants[0].model.B", "variants[0].plant"]);
  });
});

describe("hostile project content is rejected before anything is computed", () => {
  it("rejects prototype keys", () => {
    expect(() => parseProjectJson('{"format":"loopwright-project","__proto__":{"polluted":1}}')).toThrow(/"__proto__" is not allowed/);
    expect(({} as Record<string, unknown>).polluted).toBeUndefined();
    expect(() => parseProjectJson('{"a":{"constructor":{"prototype":{}}}}')).toThrow(/a\.constructor: the key "constructor" is not allowed/);
  });

  it("rejects deep nesting without overflowing the stack", () => {
    const depth = 100_000;
    const text = "[".repeat(depth) + "]".repeat(depth);
    expect(() => parseProjectJson(text)).toThrow(/nested more than 32 levels/);
  });

  it("rejects files over the size limit before parsing", () => {
    const text = " ".repeat(PROJECT_LIMITS.maxTextLength + 1);
    expect(() => parseProjectJson(text)).toThrow(/projects are limited to/);
  });

  it("rejects non-finite numbers that JSON can spell (1e999)", () => {
    expect(() => parseProjectJson('{"x":[1e999]}')).toThrow(/x\[0\]: Infinity is not a finite number/);
  });

  it("rejects text that is not JSON with the parser's reason", () => {
    expect(() => parseProjectJson("{format: 1}")).toThrow(/not valid JSON/);
  });
});

describe("project migrations", () => {
  it("runs each step in order from an older version and records where it started", () => {
    const steps = {
      1: (p: Record<string, unknown>) => ({ ...p, addedIn2: true }),
      2: (p: Record<string, unknown>) => ({ ...p, addedIn3: (p.addedIn2 as boolean) && true }),
    };
    const result = migrateProject({ format: "loopwright-project", version: 1, name: "x" }, steps, 3);
    expect(result).toEqual({ project: { format: "loopwright-project", version: 3, name: "x", addedIn2: true, addedIn3: true }, fromVersion: 1, migrated: true });
  });

  it("refuses versions below 1 and non-integers", () => {
    expect(() => migrateProject({ format: "loopwright-project", version: 0 })).toThrow(/must be a whole number from 1/);
    expect(() => migrateProject({ format: "loopwright-project", version: 1.5 })).toThrow(/must be a whole number from 1/);
  });
});
