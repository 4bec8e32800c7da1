// The pipeline on nonlinear plants: operating point and linearization of the queue example
// against closed forms, the nonlinear check against the pipeline's own linear servo response
// (which pins the sign convention Ki_sim = −Ki_design), and the robustness sweep at zero spread.
import { readFileSync } from "node:fs";
import { describe, expect, it } from "vitest";
import { evaluateVariant, loadProjectText, type PlantSpec, type VariantSpec } from "../../../shared-engine/project";
import { expectAtMost, expectComplexSetsClose, expectMatrixClose, expectRelativeClose } from "../../helpers/assertions";

const loaded = loadProjectText(readFileSync("assets/examples/queue-backlog.loopwright.json", "utf8"));
const queue = loaded.project.plants.find((p) => p.id === "queue")!;

// eslint-disable-next-line @typescript-eslint/no-explicit-any -- test edits of plain JSON at known paths
type Loose = any;
function withPlant(change: (model: Loose) => void): PlantSpec {
  const copy = JSON.parse(JSON.stringify(queue)) as PlantSpec;
  change(copy.model as Loose);
  return copy;
}

const lqrIntegral = (extra: Partial<VariantSpec> = {}): VariantSpec => ({
  id: "t",
  plant: "queue",
  stateFeedback: { method: "lqr", Q: [[1e-6, 0], [0, 0.01]], R: [[1]] },
  integralAction: { outputs: ["backlog_out"], weights: [1e-8] },
  ...extra,
});

describe("nonlinear plants in the pipeline", () => {
  it.each([
    [2000, 10000, 60, 2000],
    [1500, 8000, 50, 3000],
  ])("solves the queue operating point to the closed form c = λ(K+q)/(μq) (λ=%d, q=%d, μ=%d, K=%d)", (lam, q, mu, K) => {
    const plant = withPlant((m) => {
      m.operatingPoint.states.backlog = q;
      m.operatingPoint.disturbances.arrival_rate = lam;
      m.parameters[0].value = mu;
      m.parameters[1].value = K;
    });
    const r = evaluateVariant(plant, lqrIntegral());
    expect(r.error).toBeUndefined();
    const c = (lam * (K + q)) / (mu * q); // closed form: q' = 0 and c' = 0 (u = c)
    expectRelativeClose(r.plant!.operatingPoint!.states.consumers!, c, 1e-12, "consumers");
    expectRelativeClose(r.plant!.operatingPoint!.inputs.requested_consumers!, c, 1e-12, "requested consumers");
    expect(r.plant!.operatingPoint!.states.backlog).toBe(q);
    expectAtMost(r.plant!.operatingPoint!.residual, 1e-10, "operating-point residual");
    // Hand-derived Jacobian (same as test/fixtures/project/generate_examples.py):
    // A = [[−cμK/(K+q)², −μq/(K+q)], [0, −1/τ]], B = [[0], [1/τ]], F = [[1], [0]], C = [[1, 0]].
    const lin = r.plant!.linearization!;
    expectMatrixClose(lin.A, [[(-c * mu * K) / (K + q) ** 2, (-mu * q) / (K + q)], [0, -1 / 20]], 1e-13, "A");
    expectMatrixClose(lin.B, [[0], [1 / 20]], 1e-15, "B");
    expectMatrixClose(lin.F, [[1], [0]], 1e-15, "F");
    expectMatrixClose(lin.C, [[1, 0]], 1e-15, "C");
    expectMatrixClose(lin.D, [[0]], 1e-15, "D");
  });

  it("designs on the linearization: the linear plant entered by hand gives the same gain", () => {
    const hand = loaded.project.plants.find((p) => p.id === "queue-linear")!;
    const variant = lqrIntegral({ integralAction: { outputs: [0], weights: [1e-8] } });
    const a = evaluateVariant(queue, variant);
    const b = evaluateVariant(hand, variant);
    expectMatrixClose(a.gain!.K, b.gain!.K, 1e-12, "K");
    expectMatrixClose(a.gain!.Ki!, b.gain!.Ki!, 1e-12, "Ki");
  });

  it.each([
    ["continuous", undefined, [0, 5, 10, 20, 30, 40, 60, 80, 100, 150, 200, 300]],
    ["sampled at 1 s", { sampleTime: 1, method: "zoh" as const }, [0, 5, 10, 20, 30, 40, 60, 80, 100, 150, 200, 300]],
  ])("a tiny set-point step on the nonlinear plant (%s) follows the pipeline's linear servo step response", (_title, discretize, times) => {
    const size = 0.01; // msg: 1e-6 of the operating backlog, so the nonlinearity is invisible
    const r = evaluateVariant(queue, lqrIntegral({
      ...(discretize ? { discretize } : {}),
      step: { times },
      nonlinearCheck: { times, scenario: { setpointSteps: [{ output: "backlog_out", size, time: 0 }] } },
    }));
    expect(r.error).toBeUndefined();
    const y = r.nonlinear!.output[0]!.map((v) => (v - 10000) / size);
    const servo = r.step!.output[0]!;
    // With the wrong integral sign the simulated loop is unstable and this fails by orders of magnitude.
    for (let k = 0; k < times.length; k++) expect(Math.abs(y[k]! - servo[k]!), `t = ${times[k]}`).toBeLessThan(2e-4);
    expect(r.checks.find((c) => c.name === "nonlinear-agrees")!.passed).toBe(true);
    expect(r.nonlinear!.controller).toBe(discretize ? 1 : "continuous");
  });

  it("a small arrival-rate step agrees with the linear prediction and passes the nonlinear-agrees check", () => {
    const times = Array.from({ length: 41 }, (_, k) => 10 * k);
    const r = evaluateVariant(queue, lqrIntegral({ nonlinearCheck: { times, scenario: { disturbanceChanges: [{ disturbance: "arrival_rate", kind: "step", size: 2, time: 10 }] } } }));
    const nl = r.nonlinear!;
    expect(nl.saturated).toBe(false);
    expect(nl.stoppedEarly).toBeNull();
    // Second-order effects scale with the step: at 2 msg/s (0.1 % of λ) they stay below 1 % of the excursion.
    expectAtMost(nl.largestDivergence!.size, 0.01 * nl.linearExcursion, "divergence");
    expect(nl.linearExcursion).toBeGreaterThan(1);
    expect(r.checks.find((c) => c.name === "nonlinear-agrees")!.passed).toBe(true);
  });

  it("a large arrival-rate step drives the requested consumers into the upper limit and reports saturation", () => {
    const r = evaluateVariant(queue, lqrIntegral({ nonlinearCheck: { times: [0, 50, 100, 200, 400], scenario: { disturbanceChanges: [{ disturbance: "arrival_rate", kind: "step", size: 6000, time: 0 }] } } }));
    expect(r.error).toBeUndefined();
    expect(r.nonlinear!.saturated).toBe(true);
    expect(Math.max(...r.nonlinear!.input[0]!)).toBeLessThanOrEqual(120);
  });

  it("warns that the observer is not simulated when the variant has one", () => {
    const r = evaluateVariant(queue, lqrIntegral({
      observer: { method: "poles", poles: [-0.5, -0.6] },
      nonlinearCheck: { times: [0, 10], scenario: { initialOffset: { backlog: 10 } } },
    }));
    expect(r.error).toBeUndefined();
    expect(r.warnings.some((w) => /observer is not simulated/.test(w))).toBe(true);
  });

  it("the robustness sweep at zero spread reproduces the design's closed-loop poles", () => {
    const r = evaluateVariant(queue, lqrIntegral({ robustness: { parameters: [{ name: "mu", percent: 0 }], sampling: { kind: "grid", pointsPerParameter: 2 } } }));
    expect(r.error).toBeUndefined();
    const rb = r.robustness!;
    expect(rb.samples).toBe(2);
    expect(rb.allStable).toBe(true);
    expectComplexSetsClose(rb.poleCloud.slice(0, 3), r.closedLoopPoles!, 1e-9, "nominal sample poles");
    expect(r.checks.find((c) => c.name === "robust-stability")!.passed).toBe(true);
  });

  it("a sampled design's sweep at zero spread reproduces the design's z-plane poles and judges them by the unit circle", () => {
    // The design discretizes the linearization by zero-order hold and adds accumulators
    // xᵢ[k+1] = xᵢ[k] + T(r − y); the sweep rebuilds the same loop from the re-solved point.
    const r = evaluateVariant(queue, lqrIntegral({
      discretize: { sampleTime: 2, method: "zoh" },
      robustness: { parameters: [{ name: "mu", percent: 0 }], sampling: { kind: "grid", pointsPerParameter: 2 } },
    }));
    expect(r.error).toBeUndefined();
    const rb = r.robustness!;
    expect(rb.sampleTime).toBe(2);
    expect(rb.largestRealPart).toBeNull();
    expectComplexSetsClose(rb.poleCloud.slice(0, 3), r.closedLoopPoles!, 1e-9, "nominal sample poles (z-plane)");
    const largest = Math.max(...r.closedLoopPoles!.map((z) => Math.hypot(z.re, z.im)));
    expectRelativeClose(rb.largestPoleMagnitude!, largest, 1e-9, "largest |z|");
    const check = r.checks.find((c) => c.name === "robust-stability")!;
    expect(check).toMatchObject({ passed: true, limit: 1 });
    expect(check.detail).toMatch(/sampled at 2 s \(largest pole magnitude/);
  });

  it("a sweep wide enough to lose the operating point reports failed samples and fails robust-stability", () => {
    // μ down by 99 % cannot drain λ = 2000 msg/s with at most 120 consumers: no operating point inside the bounds.
    const r = evaluateVariant(queue, lqrIntegral({ robustness: { parameters: [{ name: "mu", percent: 99 }], sampling: { kind: "grid", pointsPerParameter: 3 } } }));
    expect(r.error).toBeUndefined();
    expect(r.robustness!.failedSamples).toBeGreaterThan(0);
    expect(r.checks.find((c) => c.name === "robust-stability")!.passed).toBe(false);
  });

  it("an operating point that cannot be solved becomes a variant error with the operating point's path", () => {
    const plant = withPlant((m) => { m.disturbances[0].nominal = 1e6; m.operatingPoint.disturbances.arrival_rate = 1e6; });
    const r = evaluateVariant(plant, lqrIntegral(), { plantIndex: 0 });
    expect(r.error?.kind).toBe("invalid-argument");
    expect(r.error?.message).toMatch(/^plants\[0\]\.model\.operatingPoint: /);
  });

  it("regression (property test): a nonlinear plant without an operatingPoint gives a typed validation error, not an internal one", () => {
    const plant = withPlant((m) => { delete m.operatingPoint; });
    const r = evaluateVariant(plant, lqrIntegral());
    expect(r.error?.kind).toBe("validation");
    expect(r.error?.message).toMatch(/operatingPoint: must be an object/);
  });
});
