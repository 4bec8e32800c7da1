// The design sheet's content, rendered to static HTML from a real pipeline result.
import { describe, expect, it } from "vitest";
import { evaluateVariant } from "../../../shared-engine/project";
import { fingerprint } from "../../../shared-engine/project/fingerprint";
import type { PlantSpec, ProjectFile, VariantSpec } from "../../../shared-engine/project/format";
import { ENGINE_VERSION } from "../../../shared-engine/version";
import { renderSheetHtml, SHEET_CAUTIONS } from "../../../renderer/sheet";
import { fullDigits, poleRows, rounded } from "../../../renderer/sheet/sheetModel";
import { cssString } from "../../../renderer/sheet/sheetStyles";

const plant: PlantSpec = {
  id: "queue",
  name: "Backlog and consumers",
  model: {
    type: "state-space",
    A: [[0, -50], [0, -0.05]],
    B: [[0], [0.05]],
    C: [[1, 0]],
    D: [[0]],
    sampleTime: null,
    names: { states: ["backlog", "consumers"], inputs: ["requested"], outputs: ["backlog"] },
    units: { states: ["msg", "consumers"], inputs: ["consumers"], outputs: ["msg"] },
  },
};
const variant: VariantSpec = {
  id: "placed",
  name: "Pole placement",
  plant: "queue",
  stateFeedback: { method: "poles", poles: [{ re: -0.08, im: 0.06 }, { re: -0.08, im: -0.06 }] },
  margins: { at: "plant-input" },
  step: { times: [0, 10, 20, 40, 80, 150] },
};
const project: ProjectFile = {
  format: "loopwright-project",
  version: 1,
  name: "Sheet test project",
  description: "Purpose: hold the backlog.",
  plants: [plant],
  variants: [variant],
  requirements: [{ id: "settle", metric: "settlingTime", max: 200, description: "settles within 200 s" }],
};
const result = evaluateVariant(plant, variant, { requirements: project.requirements });
const print = fingerprint(plant, variant, ENGINE_VERSION);
const render = (p: ProjectFile = project, pageSize: "a4" | "letter" = "a4") =>
  renderSheetHtml({ project: p, variantId: "placed", result, revision: "7", date: "2025-03-14", pageSize });

describe("renderSheetHtml", () => {
  const html = render();

  it("shows the gain in full precision and rounded, close to the hand-computed K = [−0.004, 2.2]", () => {
    // Hand calculation: det(sI − A + BK) = s² + (0.05 + 0.05 k2) s − 2.5 k1 must equal
    // (s + 0.08)² + 0.06² = s² + 0.16 s + 0.01, so k1 = −0.004 and k2 = 2.2.
    const K = result.gain!.K[0]!;
    expect(K[0]).toBeCloseTo(-0.004, 12);
    expect(K[1]).toBeCloseTo(2.2, 10);
    expect(html).toContain(`>${fullDigits(K[0]!)}<`);
    expect(html).toContain(`>${fullDigits(K[1]!)}<`);
    expect(html).toContain(">2.2<"); // rounded to 4 significant digits
    expect(html).toContain("consumers/msg"); // unit of K[0][0]: input unit per state unit
  });

  it("lists the closed-loop poles with damping ratio, natural frequency and time constant", () => {
    // s = −0.08 ± 0.06j: ωn = |s| = 0.1 rad/s, ζ = 0.08/0.1 = 0.8, τ = 1/0.08 = 12.5 s (hand calculation).
    expect(html).toMatch(/-0\.08 \+ 0\.06j/);
    expect(html).toMatch(/-0\.08 − 0\.06j/);
    expect(html).toContain(">0.8<");
    expect(html).toContain(">0.1<");
    expect(html).toContain(">12.5<");
  });

  it("prints the design fingerprint, the cautions and the requirement result", () => {
    expect(html).toContain(print);
    for (const caution of SHEET_CAUTIONS) expect(html).toContain(caution);
    expect(html).toMatch(/Simulation is not validation/);
    expect(html).toMatch(/independent safety interlocks/);
    expect(html).toMatch(/codes and standards and licensed engineering practice/);
    expect(html).toMatch(/settles within 200 s[\s\S]*PASS/);
  });

  it("contains inline plots and styles but no scripts or external references", () => {
    expect(html.match(/<svg/g)?.length).toBeGreaterThanOrEqual(2); // step response and pole-zero map
    expect(html).not.toMatch(/<script/i);
    expect(html).not.toMatch(/\ssrc=/i);
    expect(html).not.toMatch(/<link/i);
    expect(html).not.toMatch(/url\((?!#)/); // only in-document references such as url(#clip)
    expect(html).not.toMatch(/NaN/);
  });

  it("sets the paper size and the running header with project, variant, revision and date", () => {
    expect(html).toMatch(/size: A4 portrait/);
    expect(render(project, "letter")).toMatch(/size: letter portrait/);
    expect(html).toMatch(/@top-left \{ content: "Sheet test project"/);
    expect(html).toMatch(/@top-right \{ content: "variant placed · revision 7 · 2025-03-14"/);
    expect(html).toMatch(/counter\(page\) " of " counter\(pages\)/);
  });

  it("shows no banner when there is no sign-off, and empty signature lines for every role", () => {
    expect(html).not.toContain("NOT THE SIGNED DESIGN");
    for (const role of ["Prepared", "Reviewed", "Approved"]) expect(html).toContain(`>${role}<`);
  });

  it("shows a matching sign-off with its name and date, without the banner", () => {
    const signed = render({ ...project, signOffs: [{ variant: "placed", role: "reviewed", name: "R. Reviewer", date: "2025-03-15", fingerprint: print }] });
    expect(signed).toContain("R. Reviewer");
    expect(signed).toContain("2025-03-15");
    expect(signed).not.toContain("NOT THE SIGNED DESIGN");
  });

  it("shows the NOT THE SIGNED DESIGN banner when the variant was signed with another fingerprint", () => {
    const stale = "lw1-00000000000000000000000000000000";
    const changed = render({ ...project, signOffs: [{ variant: "placed", role: "approved", name: "A. Approver", date: "2025-01-02", fingerprint: stale }] });
    expect(changed).toContain("NOT THE SIGNED DESIGN — changed since sign-off");
    expect(changed).toContain(stale);
    // The stale sign-off is listed as not applying, never as a signature of this design.
    expect(changed).toMatch(/do not apply to this sheet/);
  });

  it("escapes project text so it cannot close the style element or inject markup", () => {
    const evil = render({ ...project, name: 'Evil </style><script>alert(1)</script> "q"', description: "<b>bold</b>" });
    expect(evil).not.toMatch(/<script/i);
    expect(evil).toContain("&lt;b&gt;bold&lt;/b&gt;");
    expect(cssString('a"b\\c</style>')).toBe('"a\\"b\\\\c\\3c /style>"');
  });

  it("says NOT DESIGNED when the variant failed, and still prints the fingerprint and cautions", () => {
    const failing = { ...variant, stateFeedback: { method: "poles" as const, poles: [-1] } };
    const failed = evaluateVariant(plant, failing);
    expect(failed.error).toBeDefined();
    const sheet = renderSheetHtml({ project: { ...project, variants: [failing] }, variantId: "placed", result: failed, revision: "1", date: "d", pageSize: "a4" });
    expect(sheet).toContain("NOT DESIGNED");
    expect(sheet).toContain(fingerprint(plant, failing, ENGINE_VERSION));
    expect(sheet).toContain(SHEET_CAUTIONS[0]);
  });

  it("names the missing variant when asked for one that is not in the project", () => {
    expect(() => renderSheetHtml({ project, variantId: "nope", result, revision: "1", date: "d", pageSize: "a4" })).toThrow(/No variant "nope".*placed/);
  });
});

describe("pole table rows", () => {
  it("maps sampled poles through s = ln(z)/T before reading ζ, ωn and τ", () => {
    // z = exp(sT) for s = −0.5 ± 1j, T = 0.1 s; the row must recover s: ωn = √1.25, ζ = 0.5/√1.25, τ = 2 s.
    const T = 0.1;
    const z = { re: Math.exp(-0.05) * Math.cos(0.1), im: Math.exp(-0.05) * Math.sin(0.1) };
    const [row] = poleRows([z], T);
    expect(row!.equivalent).toBe("-0.5 + 1j");
    expect(row!.naturalFrequency).toBe(rounded(Math.sqrt(1.25)));
    expect(row!.dampingRatio).toBe(rounded(0.5 / Math.sqrt(1.25)));
    expect(row!.timeConstant).toBe("2");
  });

  it("reports z = 0 as deadbeat and unstable or marginal continuous poles without a time constant", () => {
    expect(poleRows([{ re: 0, im: 0 }], 1)[0]!.equivalent).toMatch(/deadbeat/);
    expect(poleRows([{ re: 0.3, im: 0 }], null)[0]!.timeConstant).toBe("none (unstable)");
    expect(poleRows([{ re: 0, im: 2 }], null)[0]!.timeConstant).toBe("none (marginal)");
  });
});
