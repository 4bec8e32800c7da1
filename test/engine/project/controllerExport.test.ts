// The controller export on the example projects (assets/examples): each variant either exports
// with every check passed or fails with a specific error; plus a nonlinear plant that measures
// its states (made from the queue example) for the operating point, limits and anti-windup.
import { readFileSync } from "node:fs";
import { describe, expect, it } from "vitest";
import { controllerExport } from "../../../shared-engine/project/controllerExport";
import { fingerprint, type PlantSpec, type ProjectFile, type VariantSpec } from "../../../shared-engine/project";
import { ENGINE_VERSION } from "../../../shared-engine/version";

const load = (name: string): ProjectFile => JSON.parse(readFileSync(`assets/examples/${name}.loopwright.json`, "utf8")) as ProjectFile;
const pick = (p: ProjectFile, id: string): { plant: PlantSpec; variant: VariantSpec } => {
  const variant = p.variants.find((v) => v.id === id)!;
  return { variant, plant: p.plants.find((q) => q.id === variant.plant)! };
};

// Expected outcome per example variant: "export" or the error text (the plant's measured/total states).
const OUTCOMES: Record<string, Record<string, string>> = {
  "positioning-stage": { "robust-poles": "measures 2 of 4 states", "lqr-bryson": "measures 2 of 4 states", "axis-open-loop": "no state-feedback design" },
  "queue-backlog": { "lqr-integral-1s": "measures 1 of 2 states", "poles-continuous": "measures 1 of 2 states", "lqr-integral-robust": "measures 1 of 2 states", "lqr-kalman": "export" },
  "rack-temperature": { "lqr-integral": "measures 1 of 2 states", "observer-sampled": "export" },
};

describe("controllerExport on the example projects", () => {
  for (const [file, variants] of Object.entries(OUTCOMES)) {
    for (const [id, outcome] of Object.entries(variants)) {
      it(`${file}/${id} ${outcome === "export" ? "exports with every check passed" : `fails with "${outcome}"`}`, () => {
        const { plant, variant } = pick(load(file), id);
        const run = () => controllerExport(plant, variant, variant.discretize ? {} : { sampleTime: 0.5 });
        if (outcome !== "export") {
          expect(run).toThrow(outcome);
          return;
        }
        const out = run();
        for (const c of out.checks) expect(c.passed, `${c.name}: ${c.detail}`).toBe(true);
      });
    }
  }

  it("writes plain JSON in full precision with the design's fingerprint", () => {
    const p = load("rack-temperature");
    const { plant, variant } = pick(p, "observer-sampled");
    const out = controllerExport(plant, variant);
    expect(out.format).toBe("loopwright-controller");
    expect(out.version).toBe(1);
    expect(out.sampleTime).toBe(5);
    expect(out.fingerprint).toBe(fingerprint(plant, variant, ENGINE_VERSION));
    expect(JSON.parse(JSON.stringify(out))).toEqual(out); // plain data, every number survives exactly
    expect(out.signals.inputs).toEqual([{ name: "fan_speed", unit: "%" }]);
    expect(out.matrices.Ac.length).toBe(2);
    expect(out.executionOrder.length).toBeGreaterThanOrEqual(6);
    expect(out.operatingPoint).toBeUndefined();
  });

  it("asks for a period for a continuous design and warns that sampling costs margin", () => {
    const { plant, variant } = pick(load("queue-backlog"), "lqr-kalman");
    expect(() => controllerExport(plant, variant)).toThrow(/give the sample period/);
    const out = controllerExport(plant, variant, { sampleTime: 1 });
    expect(out.designedIn).toBe("continuous");
    expect(out.warnings.join(" ")).toMatch(/designing in discrete time/);
  });
});

describe("controllerExport on a nonlinear plant whose outputs are its states", () => {
  const p = load("queue-backlog");
  const base = pick(p, "lqr-integral-1s");
  const model = structuredClone(base.plant.model) as Extract<PlantSpec["model"], { type: "nonlinear" }>;
  model.outputs = [{ name: "backlog_out", unit: "msg", equation: "backlog" }, { name: "consumers_out", unit: "consumers", equation: "consumers" }];
  const plant: PlantSpec = { ...base.plant, model };
  const variant: VariantSpec = { ...base.variant, nonlinearCheck: undefined, margins: undefined };

  it("exports the operating point, the input limits and back-calculation, and passes its checks", () => {
    const out = controllerExport(plant, variant);
    for (const c of out.checks) expect(c.passed, `${c.name}: ${c.detail}`).toBe(true);
    // Operating point of the queue example: u0 = λ(K + q)/(μq) = 2000·12000/(60·10000) = 40 (hand-worked, as in buildPlant's doc).
    expect(out.operatingPoint!.inputs[0]).toBeCloseTo(40, 8);
    expect(out.operatingPoint!.references).toEqual([out.operatingPoint!.measurements[0]]);
    expect(out.limits).toEqual([{ input: "requested_consumers", min: 1, max: 120, rateLimit: 2 }]);
    expect(out.antiWindup.method).toBe("back-calculation");
    expect(out.antiWindup.trackingGain).toBeGreaterThan(0);
    expect(out.antiWindup.integratorStates).toEqual([0]);
    expect(out.executionOrder.join(" ")).toMatch(/rateLimit/);
    expect(out.signals.references).toEqual([{ name: "r_backlog_out", unit: "msg" }]);
  });
});
