// The drag preview (previewVariant) against the full pipeline (evaluateVariant): the shared
// fields must agree to 1e-10 relative, since the workbench swaps one for the other when a drag
// ends. The reference here is the full pipeline itself (its own correctness is checked against
// scipy fixtures in examplesReference.test.ts and the analysis/design tests).
import { readFileSync } from "node:fs";
import { describe, expect, it } from "vitest";
import { dispatch } from "../../../shared-engine/api/dispatcher";
import { ENGINE_METHODS } from "../../../shared-engine/api/contract";
import { EngineError } from "../../../shared-engine/errors";
import { evaluateVariant, loadProjectText, previewCovers, previewVariant, type PlantSpec, type ProjectFile, type VariantResult, type VariantSpec } from "../../../shared-engine/project";
import { expectDeepClose } from "../../helpers/assertions";

const EXAMPLES = ["positioning-stage", "queue-backlog", "rack-temperature"];
const REL = 1e-10;

/** The variant with display grids as the workbench sends them: 500 step samples, 400 Bode points. */
function withDisplayGrids(variant: VariantSpec, sampleTime: number | null): VariantSpec {
  const horizon = variant.step?.times.at(-1) ?? 20;
  const times = sampleTime
    ? Array.from({ length: Math.min(500, Math.floor(horizon / sampleTime) + 1) }, (_, k) => k * sampleTime)
    : Array.from({ length: 500 }, (_, k) => (horizon * k) / 499);
  const top = sampleTime ? Math.log10((0.999 * Math.PI) / sampleTime) : 2;
  const frequencies = Array.from({ length: 400 }, (_, k) => 10 ** (-3 + ((top + 3) * k) / 399));
  return { ...variant, step: { times }, bode: { frequencies } };
}

/** The fields a drag shows, as plain data (the step samples are compared apart, see below). */
function shared(r: VariantResult) {
  const { output: _o, control: _c, ...stepRest } = r.step ?? { output: [], control: [] };
  return {
    gain: r.gain,
    closedLoopPoles: r.closedLoopPoles,
    closedLoop: r.closedLoop,
    step: stepRest,
    bode: r.bode,
    discrete: r.discrete,
    design: r.design,
  };
}

/**
 * Step samples agree to 1e-10 relative to each signal's largest magnitude: a sample that passes
 * near zero carries the rounding of the whole signal (the preview takes one exponential for the
 * uniform grid where the general simulator may take a second one for a step that differs in the
 * 13th digit), so its own relative difference is not meaningful.
 */
function expectStepSamplesClose(actual: VariantResult, expected: VariantResult): void {
  const signals = (r: VariantResult) => [...(r.step?.output ?? []), ...(r.step?.control ?? [])];
  const a = signals(actual);
  const e = signals(expected);
  expect(a.length).toBe(e.length);
  e.forEach((signal, i) => {
    const scale = Math.max(...signal.map((v) => Math.abs(v)));
    expectDeepClose(a[i], signal, REL, REL * scale, `step signal ${i}`);
  });
}

const cases: [string, PlantSpec, VariantSpec][] = [];
for (const name of EXAMPLES) {
  const project = loadProjectText(readFileSync(`assets/examples/${name}.loopwright.json`, "utf8")).project as ProjectFile;
  for (const v of project.variants) {
    const plant = project.plants.find((p) => p.id === v.plant)!;
    cases.push([`${name} / ${v.id}`, plant, withDisplayGrids(v, v.discretize?.sampleTime ?? plant.model.sampleTime ?? null)]);
  }
}

// The bench:ui plant: a 12-state chain x_i' = −0.2 x_i + x_{i+1}, x_12' = −0.2 x_12 + u, y = x_1,
// with the new pole-placement variant's poles −1 … −12 (scripts/bench-ui.mjs).
const N = 12;
const chain: PlantSpec = {
  id: "chain",
  model: {
    type: "state-space",
    A: Array.from({ length: N }, (_, i) => Array.from({ length: N }, (_, j) => (i === j ? -0.2 : j === i + 1 ? 1 : 0))),
    B: Array.from({ length: N }, (_, i) => [i === N - 1 ? 1 : 0]),
    C: [Array.from({ length: N }, (_, j) => (j === 0 ? 1 : 0))],
    sampleTime: null,
  },
};
const chainVariant: VariantSpec = withDisplayGrids(
  { id: "poles", plant: "chain", stateFeedback: { method: "poles", poles: Array.from({ length: N }, (_, i) => ({ re: -(i + 1), im: 0 })) }, margins: { at: "plant-input" }, step: { times: [0, 40] } },
  null,
);
cases.push(["12-state chain (bench:ui) / poles −1…−12", chain, chainVariant]);
// The same chain sampled (zero-order hold, T = 0.1 s) with a discrete LQR and reference feedforward.
const eye = (k: number) => Array.from({ length: k }, (_, i) => Array.from({ length: k }, (_, j) => (i === j ? 1 : 0)));
cases.push([
  "12-state chain sampled at 0.1 s / discrete LQR with feedforward",
  chain,
  withDisplayGrids({ id: "dlqr", plant: "chain", discretize: { sampleTime: 0.1, method: "zoh" }, stateFeedback: { method: "lqr", Q: eye(N), R: [[1]] }, referenceFeedforward: true, step: { times: [0, 30] } }, 0.1),
]);

describe("previewVariant", () => {
  it.each(cases)("agrees with the full evaluation on gain, poles, step and Bode for %s", (_title, plant, variant) => {
    const full = evaluateVariant(plant, variant);
    const preview = previewVariant(plant, variant);
    expect(preview.error).toEqual(full.error);
    expect(preview.preview).toBe(previewCovers(plant, variant));
    if (!preview.preview) {
      // Not covered (observer or nonlinear plant): the full pipeline ran, so the result is the full one.
      const { preview: _flag, ...rest } = preview;
      expectDeepClose(rest, full, 0);
      return;
    }
    expect(full.error).toBeUndefined();
    expect(preview.step?.time.length).toBeGreaterThan(1);
    expect(preview.bode?.frequency.length).toBe(400);
    expectDeepClose(shared(preview), shared(full), REL);
    expectStepSamplesClose(preview, full);
    expect(preview.checks.find((c) => c.name === "closed-loop-stable")).toEqual(full.checks.find((c) => c.name === "closed-loop-stable"));
  });

  it("covers at least one continuous, one sampled, one integral-action and one LQR example", () => {
    const covered = cases.filter(([, p, v]) => previewCovers(p, v)).map(([, , v]) => v);
    expect(covered.some((v) => !v.discretize)).toBe(true);
    expect(covered.some((v) => v.discretize)).toBe(true);
    expect(covered.some((v) => v.integralAction)).toBe(true);
    expect(covered.some((v) => v.stateFeedback?.method === "lqr")).toBe(true);
  });

  it("leaves out the plant report, margins and requirement checks that only the full evaluation computes", () => {
    const preview = previewVariant(chain, chainVariant);
    expect(preview.preview).toBe(true);
    expect(preview.plant).toBeUndefined();
    expect(preview.margins).toBeUndefined();
    expect(preview.checks.map((c) => c.name)).toEqual(["closed-loop-stable"]);
    expect(evaluateVariant(chain, chainVariant).margins).toBeDefined();
  });

  it("carries a design failure as an error, like the full evaluation, instead of throwing", () => {
    // One requested pole for a 2-state plant: pole placement must refuse (evaluateVariant is
    // called directly here, past the loader's own count check).
    const stuck: PlantSpec = { id: "stuck", model: { type: "state-space", A: [[0, 1], [-2, -3]], B: [[0], [1]], C: [[1, 0]], sampleTime: null } };
    const variant = withDisplayGrids({ id: "v", plant: "stuck", stateFeedback: { method: "poles", poles: [-1] } }, null);
    const preview = previewVariant(stuck, variant);
    const full = evaluateVariant(stuck, variant);
    expect(full.error).toBeDefined();
    expect(preview.error?.kind).toBe(full.error!.kind);
    expect(preview.gain).toBeUndefined();
  });

  it("places the pole of a first-order plant exactly (K = 2 moves s = 0 to s = −2)", () => {
    // Hand computation (common practice): x' = u, u = −Kx gives the pole −K.
    const plant: PlantSpec = { id: "p", model: { type: "state-space", A: [[0]], B: [[1]], C: [[1]], sampleTime: null } };
    const preview = previewVariant(plant, withDisplayGrids({ id: "v", plant: "p", stateFeedback: { method: "poles", poles: [-2] } }, null));
    expect(preview.gain!.K[0]![0]).toBeCloseTo(2, 12);
    expect(preview.closedLoopPoles![0]!.re).toBeCloseTo(-2, 12);
  });
});

describe("project.previewVariant over the bridge", () => {
  it("is a listed engine method", () => {
    expect(ENGINE_METHODS).toContain("project.previewVariant");
  });

  it("returns the same shared fields as project.evaluateVariant", async () => {
    const preview = (await dispatch("project.previewVariant", { plant: chain, variant: chainVariant })) as VariantResult & { preview: boolean };
    const full = (await dispatch("project.evaluateVariant", { plant: chain, variant: chainVariant })) as VariantResult;
    expect(preview.preview).toBe(true);
    expectDeepClose(shared(preview), shared(full), REL);
    expectStepSamplesClose(preview, full);
  });

  it("refuses an invalid variant with the field path, as a full evaluation does", async () => {
    const bad = { ...chainVariant, stateFeedback: { method: "poles", poles: "fast" } };
    const error = await dispatch("project.previewVariant", { plant: chain, variant: bad }).catch((e: unknown) => e);
    expect(error).toBeInstanceOf(EngineError);
    expect((error as EngineError).message).toMatch(/variants\[0\]\.stateFeedback\.poles/);
  });
});
