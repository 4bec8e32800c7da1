// Property: for random valid and invalid mutations of the example projects' plants and variants
// (nonlinear queue plant above all), validation either rejects the file with a typed error, or
// evaluateVariant returns a result that holds no NaN/Infinity and whose error, if any, is typed
// (never kind "internal"). evaluateVariant itself never throws, even on unvalidated input, and
// on the nonlinear plant even unvalidated input gives typed errors only.
import { readFileSync } from "node:fs";
import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { EngineError } from "../../../shared-engine/errors";
import { evaluateVariant, loadProjectValue, type PlantSpec, type VariantSpec } from "../../../shared-engine/project";

const queueProject = JSON.parse(readFileSync("assets/examples/queue-backlog.loopwright.json", "utf8")) as { plants: PlantSpec[]; variants: VariantSpec[] };
const others = ["positioning-stage", "rack-temperature"].map((n) => JSON.parse(readFileSync(`assets/examples/${n}.loopwright.json`, "utf8")) as { plants: PlantSpec[]; variants: VariantSpec[] });
const nonlinearVariants = queueProject.variants.filter((v) => v.plant === "queue");

/** Equations that parse or not, are defined at the operating point or not (bounded catalogue). */
const EQUATIONS = [
  "arrival_rate - consumers*mu*backlog/(K + backlog)", "(requested_consumers - consumers)/tau",
  "arrival_rate - consumers*mu", "backlog/(consumers - 40)", "sqrt(backlog - 20000)", "log(consumers)",
  "1/0", "backlog^1000", "exp(backlog)", "(", "arrival_rate - ", "lamda", "0", "-backlog + requested_consumers",
  "min(requested_consumers, 50) - consumers", "abs(consumers - 40)",
];

// Mutations poke arbitrary paths of untyped test JSON (that is the point: invalid shapes too).
// eslint-disable-next-line @typescript-eslint/no-explicit-any -- deliberately untyped test data
type Loose = any;
type Mutation = (plant: Loose, variant: Loose) => void;

const scaled = (lo: number, hi: number, scale: number) => fc.integer({ min: lo, max: hi }).map((k) => k * scale);
const powerOfTen = fc.integer({ min: -10, max: 4 }).map((k) => Math.pow(10, k));

const mutation: fc.Arbitrary<Mutation> = fc.oneof(
  fc.tuple(fc.integer({ min: 0, max: 2 }), scaled(-3, 300, 1)).map(([i, v]): Mutation => (p) => { if (p.model.parameters?.[i]) p.model.parameters[i].value = v; }),
  fc.tuple(fc.constantFrom("backlog", "consumers"), fc.constantFrom(...EQUATIONS)).map(([s, e]): Mutation => (p) => { if (p.model.stateEquations) p.model.stateEquations[s] = e; }),
  fc.constantFrom(...EQUATIONS).map((e): Mutation => (p) => { if (p.model.outputs?.[0]) p.model.outputs[0].equation = e; }),
  scaled(-10, 60, 500).map((q): Mutation => (p) => { if (p.model.operatingPoint) p.model.operatingPoint.states = { ...p.model.operatingPoint.states, backlog: q }; }),
  scaled(-2, 40, 250).map((l): Mutation => (p) => { if (p.model.operatingPoint) p.model.operatingPoint.disturbances = { arrival_rate: l }; }),
  fc.constantFrom([], ["consumers"], ["requested_consumers", "consumers"], ["backlog", "consumers"], ["mu", "consumers"]).map((u): Mutation => (p) => { if (p.model.operatingPoint) p.model.operatingPoint.unknowns = u; }),
  scaled(0, 30, 5).map((mx): Mutation => (p) => { if (p.model.inputs?.[0]) p.model.inputs[0].max = mx; }),
  fc.constantFrom("states", "inputs", "outputs", "stateEquations", "operatingPoint", "sampleTime", "parameters").map((k): Mutation => (p) => { delete p.model[k]; }),
  fc.tuple(powerOfTen, powerOfTen).map(([a, b]): Mutation => (_p, v) => { if (v.stateFeedback?.method === "lqr") v.stateFeedback.Q = [[a, 0], [0, b]]; }),
  fc.constantFrom(1, 0, -1, 1e-12, 1e6).map((r): Mutation => (_p, v) => { if (v.stateFeedback?.method === "lqr") v.stateFeedback.R = [[r]]; }),
  fc.option(fc.constantFrom(0.1, 1, 5, 50), { nil: undefined }).map((T): Mutation => (_p, v) => { if (T === undefined) delete v.discretize; else v.discretize = { sampleTime: T, method: "zoh" }; }),
  fc.tuple(scaled(-40, 40, 250), fc.integer({ min: 0, max: 50 }), scaled(-20, 20, 500), fc.integer({ min: 0, max: 3 })).map(([d, t, s, which]): Mutation => (_p, v) => {
    const scenario = [
      { disturbanceChanges: [{ disturbance: "arrival_rate", kind: "step", size: d, time: t }] },
      { setpointSteps: [{ output: "backlog_out", size: s, time: t }] },
      { initialOffset: { backlog: s, consumers: d / 100 } },
      { disturbanceChanges: [{ disturbance: "arrival_rate", kind: "ramp", size: d / 10, time: t }] },
    ][which];
    v.nonlinearCheck = { times: [0, 10, 20, 40, 80, 120], scenario };
  }),
  fc.tuple(scaled(0, 30, 5), fc.integer({ min: 0, max: 4 }), fc.boolean()).map(([pct, g, random]): Mutation => (_p, v) => {
    v.robustness = { parameters: [{ name: "mu", percent: pct }, { name: "tau", percent: pct }], sampling: random ? { kind: "random", samples: g + 1, seed: 7 } : { kind: "grid", pointsPerParameter: g } };
  }),
  fc.constantFrom("stateFeedback", "integralAction", "nonlinearCheck", "robustness", "step", "margins").map((k): Mutation => (_p, v) => { delete v[k]; }),
);

function finiteEverywhere(value: unknown, path = "result"): string | null {
  if (typeof value === "number") return Number.isFinite(value) ? null : path;
  if (Array.isArray(value)) {
    for (let i = 0; i < value.length; i++) { const bad = finiteEverywhere(value[i], `${path}[${i}]`); if (bad) return bad; }
  } else if (value !== null && typeof value === "object") {
    for (const [k, v] of Object.entries(value)) { const bad = finiteEverywhere(v, `${path}.${k}`); if (bad) return bad; }
  }
  return null;
}

function checkCase(plant: PlantSpec, variant: VariantSpec, typedEvenUnvalidated: boolean): void {
  // Unvalidated: must not throw, must hold no NaN.
  const raw = evaluateVariant(plant, variant);
  expect(finiteEverywhere(raw)).toBeNull();
  if (typedEvenUnvalidated) expect(raw.error?.kind, raw.error?.message).not.toBe("internal");
  let validated = true;
  try {
    loadProjectValue({ format: "loopwright-project", version: 1, name: "property", plants: [plant], variants: [variant] });
  } catch (error) {
    expect(error).toBeInstanceOf(EngineError);
    expect((error as EngineError).kind).toBe("validation");
    validated = false;
  }
  if (validated) {
    expect(raw.error?.kind, raw.error?.message).not.toBe("internal");
  }
}

describe("evaluateVariant on mutated example projects", () => {
  it("never throws, never returns NaN, and reports only typed errors for validated nonlinear variants", () => {
    fc.assert(
      fc.property(fc.integer({ min: 0, max: nonlinearVariants.length - 1 }), fc.array(mutation, { minLength: 1, maxLength: 3 }), (vi, mutations) => {
        const plant = JSON.parse(JSON.stringify(queueProject.plants[0]));
        const variant = JSON.parse(JSON.stringify(nonlinearVariants[vi]));
        for (const m of mutations) m(plant, variant);
        checkCase(plant, variant, true);
      }),
      { seed: 20240611, numRuns: 120 },
    );
  });

  it("never throws and never returns NaN for linear example variants carrying nonlinear-only keys or mutated gains", () => {
    const pairs = others.flatMap((p) => p.variants.map((v) => [p.plants.find((x) => x.id === v.plant)!, v] as const));
    fc.assert(
      fc.property(fc.integer({ min: 0, max: pairs.length - 1 }), fc.array(mutation, { minLength: 1, maxLength: 2 }), (i, mutations) => {
        const plant = JSON.parse(JSON.stringify(pairs[i]![0]));
        const variant = JSON.parse(JSON.stringify(pairs[i]![1]));
        for (const m of mutations) m(plant, variant);
        checkCase(plant, variant, false);
      }),
      { seed: 777, numRuns: 60 },
    );
  });
});
