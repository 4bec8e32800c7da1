// The design sheet of the shipped examples, rendered from the real pipeline (shared-engine/project):
// nonlinear plant (equations, operating point, linearization, limits), nonlinear check,
// robustness sweep, disturbance rejection and per-input margins.
import { readFileSync } from "node:fs";
import path from "node:path";
import { fileURLToPath } from "node:url";
import { describe, expect, it } from "vitest";
import { evaluateProject, loadProjectText, type LoadedProject, type VariantResult } from "../../../shared-engine/project";
import { renderSheetHtml } from "../../../renderer/sheet";
import { fullDigits, rounded } from "../../../renderer/sheet/sheetModel";
import { limitRows, limitSentences } from "../../../renderer/sheet/nonlinearPlantSheet";
import { sweptParameterRows } from "../../../renderer/sheet/checkSectionsSheet";

const EXAMPLES = fileURLToPath(new URL("../../../assets/examples/", import.meta.url));

function example(file: string): LoadedProject {
  return loadProjectText(readFileSync(path.join(EXAMPLES, file), "utf8"));
}

function sheet(loaded: LoadedProject, variantId: string): { html: string; text: string; result: VariantResult } {
  const result = evaluateProject(loaded, { variant: variantId }).variants[0]!;
  const html = renderSheetHtml({ project: loaded.project, variantId, result, revision: "t", date: "2025-01-31", pageSize: "a4" });
  // Text as a reader sees it: tags dropped, entities for quotes and ampersands restored.
  const text = html.replace(/<style>[\s\S]*?<\/style>/g, "").replace(/<[^>]+>/g, " ").replace(/&#x27;|&apos;/g, "'").replace(/&amp;/g, "&").replace(/\s+/g, " ");
  return { html, text, result };
}

/** The section text between a heading and the next h2. */
function section(html: string, heading: RegExp): string {
  const parts = html.split(/<h2>/);
  const found = parts.find((p) => heading.test(p.slice(0, p.indexOf("</h2>"))));
  if (!found) throw new Error(`no section ${heading}`);
  return found.replace(/<[^>]+>/g, " ").replace(/\s+/g, " ");
}

describe("design sheet of the nonlinear queue example (lqr-integral-1s)", () => {
  const queue = example("queue-backlog.loopwright.json");
  const { html, text, result } = sheet(queue, "lqr-integral-1s");

  it("prints the state and output equations as typed in a monospaced table", () => {
    expect(html).toContain('class="lw-sheet-wide lw-sheet-equations"');
    expect(text).toContain("d(backlog)/dt msg/s arrival_rate - consumers*mu*backlog/(K + backlog)");
    expect(text).toContain("d(consumers)/dt consumers/s (requested_consumers - consumers)/tau");
    expect(text).toContain("backlog_out msg backlog");
    expect(html).toMatch(/<td class="mono lw-sheet-equation">arrival_rate - consumers\*mu\*backlog\/\(K \+ backlog\)<\/td>/);
  });

  it("lists the parameters with value and unit", () => {
    // Values from the example file's parameter list.
    expect(text).toContain("mu 60 msg/s per consumer");
    expect(text).toContain("K 2000 msg");
    expect(text).toContain("tau 20 s");
  });

  it("shows the solved operating point: 40 consumers, the hand-derived equilibrium", () => {
    // Hand derivation: q' = 0 ⇒ c = λ(K + q)/(μ q) = 2000·12000/(60·10000) = 40; c' = 0 ⇒ u = c = 40.
    const c = (2000 * (2000 + 10000)) / (60 * 10000);
    expect(c).toBe(40);
    expect(result.plant!.operatingPoint!.states.consumers).toBeCloseTo(c, 9);
    expect(text).toContain("consumers state 40 consumers solved");
    expect(text).toContain("requested_consumers input 40 consumers solved");
    expect(text).toContain("backlog state 10000 msg given");
    expect(text).toContain("arrival_rate disturbance 2000 msg/s given");
    expect(text).toMatch(/Solved by Newton iteration in \d+ iterations?; residual max \|f\| and max \|y − set-point\| = (0|[\d.]+e−\d+)\./);
  });

  it("prints the linearization with named rows and columns and the hand-derived Jacobian entries", () => {
    // Hand-derived Jacobian at q = 10000, c = 40: ∂q'/∂q = −cμK/(K+q)² = −1/30, ∂q'/∂c = −μq/(K+q) = −50,
    // ∂c'/∂c = −1/τ = −0.05, ∂c'/∂u = 1/τ = 0.05, ∂q'/∂λ = 1.
    const lin = result.plant!.linearization!;
    expect(lin.A[0]![0]).toBeCloseTo(-1 / 30, 14);
    expect(lin.A[0]![1]).toBeCloseTo(-50, 12);
    const linear = section(html, /Plant:/);
    expect(linear).toContain("Linearization at the operating point");
    expect(linear).toContain(`backlog (msg) ${fullDigits(lin.A[0]![0]!)} ${fullDigits(lin.A[0]![1]!)}`);
    expect(fullDigits(lin.A[0]![0]!)).toMatch(/^−0\.0333333333333333/);
    expect(linear).toContain("consumers (consumers) 0 −0.05");
    expect(linear).toMatch(/B — input to state[\s\S]*requested_consumers \(consumers\) backlog \(msg\) 0 consumers \(consumers\) 0\.05/);
    expect(linear).toMatch(/F — disturbance to state[\s\S]*arrival_rate \(msg\/s\) backlog \(msg\) 1 consumers \(consumers\) 0/);
  });

  it("states the actuator limits and state bounds in the assumptions", () => {
    const limits = section(html, /Assumptions and limits/);
    // Limits from the example file: 1 ≤ requested_consumers ≤ 120, at most 2 consumers/s; backlog, consumers ≥ 0.
    expect(limits).toContain("actuator requested_consumers 1 120 2 consumers/s consumers");
    expect(limits).toContain("state bound backlog 0 none — msg");
    expect(limits).toContain("the nonlinear check applies them");
  });

  it("has a nonlinear check section: solid nonlinear output over the dashed linear prediction, input with limits, verdict", () => {
    const nl = section(html, /Nonlinear check/);
    expect(nl).toContain("Nonlinear plant (solid) and linear prediction (dashed)");
    const d = result.nonlinear!.largestDivergence!;
    expect(nl).toContain(`Largest divergence ${rounded(d.size)} on backlog_out at t = ${rounded(d.time)} s`);
    expect(nl).toContain("Saturation no: every input stayed within its limits");
    expect(nl).toContain("Early stop no: simulated to the last time");
    expect(nl).toMatch(/nonlinear-agrees[\s\S]*PASS/);
    const part = html.slice(html.indexOf("Nonlinear check</h2>"), html.indexOf("Requirements checklist</h2>"));
    expect(part).toContain('stroke-dasharray="6 3"'); // the linear prediction overlay
    expect(part).toMatch(/upper limit 120/);
    expect(part).toMatch(/lower limit 1\b/);
  });
});

describe("design sheet of the queue robustness variant (lqr-integral-robust)", () => {
  const queue = example("queue-backlog.loopwright.json");
  const { html, result } = sheet(queue, "lqr-integral-robust");

  it("lists the varied parameters with their ranges, the verdict, worst margins and the pole cloud", () => {
    const rob = section(html, /Robustness sweep/);
    // μ = 60 ± 20 % is 48 to 72; K = 2000 ± 20 % is 1600 to 2400 (hand arithmetic).
    expect(rob).toContain("mu 60 ±20 % 48 to 72 msg/s per consumer");
    expect(rob).toContain("K 2000 ±20 % 1600 to 2400 msg");
    expect(rob).toContain("Stable at every sample yes");
    expect(rob).toContain("Failed samples none");
    expect(rob).toContain(`Worst phase margin ${rounded(result.robustness!.worstPhaseMarginDeg!)}°`);
    expect(rob).toMatch(/robust-stability[\s\S]*PASS/);
    expect(rob).toContain("Closed-loop poles over the 25 parameter samples");
    expect(rob).toContain("Swept closed loop (pole cloud)");
    expect(result.robustness!.poleCloud.length).toBe(25 * 3); // 2 plant states + 1 integrator per sample
  });

  it("numbers the sections without gaps when only some optional sections are present", () => {
    const numbers = [...html.matchAll(/<h2>(\d+) /g)].map((m) => Number(m[1]));
    expect(numbers).toEqual(numbers.map((_, i) => i + 1));
    expect(html).toContain("<h2>9 Robustness sweep");
    expect(html).not.toContain("Nonlinear check</h2>");
    expect(html).not.toContain("Disturbance rejection</h2>");
  });
});

describe("design sheet of the rack example (lqr-integral): disturbance rejection", () => {
  const { html, result } = sheet(example("rack-temperature.loopwright.json"), "lqr-integral");

  it("plots the disturbance step (output and control) and prints its metrics", () => {
    const d = result.disturbanceStep!;
    const part = section(html, /Disturbance rejection/);
    expect(part).toContain("Response to a step of 1 in heat_load");
    expect(part).toContain(`Peak deviation ${rounded(d.peakDeviation)} K on air_temperature at t = ${rounded(d.peakTime)} s`);
    // Integral action on air temperature removes a constant disturbance's offset (final value theorem).
    expect(Math.abs(d.steadyStateValue!)).toBeLessThan(1e-12);
    expect(part).toContain("Final value ≈ 0 K");
    expect(part).toContain(`Settling time (2 % of the peak deviation) ${rounded(d.settlingTime!)} s`);
    expect(part).toContain("Status settled within the simulated horizon");
    const svg = html.slice(html.indexOf("Disturbance rejection</h2>"), html.indexOf("Requirements checklist</h2>"));
    expect(svg).toContain("<svg");
    expect(svg).toContain("Control input (%)");
  });

  it("says that a linear plant declares no actuator limits or state bounds", () => {
    expect(section(html, /Assumptions and limits/)).toContain("No actuator limits or state bounds are declared");
  });
});

describe("design sheet of the positioning stage (robust-poles): per-input margins", () => {
  const { html, result } = sheet(example("positioning-stage.loopwright.json"), "robust-poles");

  it("prints one margin row per input from margins.channels", () => {
    const part = section(html, /Margins at the plant input/);
    expect(part).toContain("Margins per input");
    for (const c of result.margins!.channels!) {
      expect(part).toContain(`${c.input} ${c.gainDb === null ? "unbounded" : `${rounded(c.gainDb)} dB`} ${rounded(c.phaseDeg!)}° ${rounded(c.delayMargin!)} s ${rounded(c.sensitivityPeak)}`);
    }
    expect(result.margins!.channels!.map((c) => c.input)).toEqual(["force_x", "force_y"]);
  });
});

describe("nonlinear plant sheet helpers", () => {
  const model = {
    type: "nonlinear" as const,
    states: [{ name: "x" }],
    inputs: [{ name: "u", unit: "V" }],
    disturbances: [],
    parameters: [{ name: "a", value: 2 }],
    stateEquations: { x: "-a*x + u" },
    outputs: [{ name: "y", equation: "x" }],
    operatingPoint: { unknowns: ["u"] },
    sampleTime: null,
  };
  const plant = { id: "p", model };

  it("says when no actuator limits and no state bounds are declared", () => {
    expect(limitRows(model)).toEqual([{ kind: "actuator", name: "u", min: "none", max: "none", rate: "none", unit: "V" }]);
    const sentences = limitSentences(plant, false);
    expect(sentences[0]).toMatch(/No actuator limits are declared for any input/);
    expect(sentences[1]).toBe("No state bounds are declared.");
  });

  it("computes swept ranges from the nominal value, negative nominals included", () => {
    const withNegative = { ...plant, model: { ...model, parameters: [{ name: "a", value: -5, unit: "1/s" }] } };
    const rows = sweptParameterRows(withNegative, { id: "v", plant: "p", robustness: { parameters: [{ name: "a", percent: 10 }], sampling: { kind: "grid", pointsPerParameter: 3 } } });
    // −5 ± 10 % spans −5.5 to −4.5 (hand arithmetic), printed low to high.
    expect(rows).toEqual([{ name: "a", nominal: "−5", percent: "±10 %", range: "−5.5 to −4.5", unit: "1/s" }]);
  });
});
