// The design sheet's pole-zero figures with their zoom panel (renderer/sheet/PoleMapFigure.tsx):
// a slow sampled loop with a robustness sweep gets a zoom on its pole cloud and on its
// closed-loop poles; a continuous sweep that fills its map gets none.
import { readFileSync } from "node:fs";
import { describe, expect, it } from "vitest";
import { evaluateProject, loadProjectText, type VariantResult } from "../../../shared-engine/project";
import { renderSheetHtml } from "../../../renderer/sheet";
import { zoomPanelText } from "../../../renderer/sheet/PoleMapFigure";

const EXAMPLE = new URL("../../../assets/examples/queue-backlog.loopwright.json", import.meta.url);

/** The queue example with a variant "sampled-robust": lqr-integral-1s sampled at `T`, with lqr-integral-robust's sweep (μ, K ±20 %). */
function queueWithSampledSweep(T: number): string {
  const project = JSON.parse(readFileSync(EXAMPLE, "utf8")) as { variants: Record<string, unknown>[] };
  const base = project.variants.find((v) => v.id === "lqr-integral-1s")!;
  const robust = project.variants.find((v) => v.id === "lqr-integral-robust")!;
  const variant: Record<string, unknown> = { ...structuredClone(base), id: "sampled-robust", name: `Sampled at ${T} s, μ and K swept`, baseline: false, discretize: { sampleTime: T, method: "zoh" }, robustness: robust.robustness };
  delete variant.nonlinearCheck;
  project.variants.push(variant);
  return JSON.stringify(project);
}

function sheet(text: string, variantId: string): { html: string; result: VariantResult } {
  const loaded = loadProjectText(text);
  const result = evaluateProject(loaded, { variant: variantId }).variants[0]!;
  return { html: renderSheetHtml({ project: loaded.project, variantId, result, revision: "t", date: "2025-01-31", pageSize: "a4" }), result };
}

/** The HTML of the section whose h2 matches. */
const section = (html: string, heading: RegExp) => html.split(/<h2>/).find((p) => heading.test(p.slice(0, p.indexOf("</h2>")))) ?? "";
const num = (v: number) => String(Number(v.toPrecision(4))).replace("-", "−");

describe("design sheet pole-zero figures of a slow sampled loop (queue, T = 0.1 s)", () => {
  const { html, result } = sheet(queueWithSampledSweep(0.1), "sampled-robust");
  const robustness = section(html, /Robustness sweep/);
  const poles = section(html, /Closed-loop poles/);

  it("adds a zoom panel on the pole cloud below the full map, which outlines the window", () => {
    expect(result.robustness!.sampleTime).toBe(0.1);
    expect(robustness).toContain('data-testid="pole-zoom"');
    expect(robustness).toMatch(/Zoom ×\d+ on the pole cloud \(\d+ of \d+ poles\)/);
    expect(robustness).toContain('data-testid="zoom-outline"');
    // Both panels keep the series (legend entries) of the full map.
    expect(robustness.match(/>Swept closed loop \(pole cloud\)<\/text>/g)?.length).toBe(2);
    expect(robustness.match(/>Nominal design<\/text>/g)?.length).toBe(2);
  });

  it("writes the cloud's distance to the unit circle in the caption, from the sweep's own largest |z|", () => {
    const largest = result.robustness!.largestPoleMagnitude!;
    expect(largest).toBeGreaterThan(0.99);
    expect(robustness).toContain(`|z| = ${num(largest)}, 1 − |z| = ${num(1 - largest)}.`);
    expect(robustness).toContain("The unit circle crosses this window");
  });

  it("zooms on the closed-loop poles of section 6 too", () => {
    expect(poles).toContain('data-testid="pole-zoom"');
    expect(poles).toMatch(/Zoom ×\d+ on the closed-loop poles/);
  });

  it("prints no NaN and no unfinished number", () => {
    expect(html).not.toMatch(/NaN|Infinity/);
  });
});

describe("design sheet pole-zero figures that need no zoom", () => {
  it("draws no zoom for the continuous sweep of the queue (the cloud fills its map)", () => {
    const { html } = sheet(readFileSync(EXAMPLE, "utf8"), "lqr-integral-robust");
    expect(section(html, /Robustness sweep/)).not.toContain("pole-zoom");
    expect(section(html, /Robustness sweep/)).not.toContain("zoom-outline");
  });
});

describe("zoom panel wording", () => {
  const base = { x: [0, 1] as [number, number], y: [0, 1] as [number, number], count: 3, total: 4, magnification: 42.4 };
  it("names the zoom, its subject and the distance to the boundary", () => {
    const inside = zoomPanelText({ ...base, nearest: { re: 0.6, im: 0.8 * 0.99 }, margin: 1 - Math.hypot(0.6, 0.792), boundaryInView: true }, true, "the pole cloud");
    expect(inside.title).toBe("Zoom ×42 on the pole cloud (3 of 4 poles)");
    expect(inside.caption[1]).toBe("The unit circle crosses this window; the dashed box above marks the window.");
    const outside = zoomPanelText({ ...base, magnification: 7.25, nearest: { re: -2, im: 0 }, margin: 2, boundaryInView: false }, false, "the closed-loop poles");
    expect(outside.title).toBe("Zoom ×7.3 on the closed-loop poles (3 of 4 poles)");
    expect(outside.caption).toEqual(["Pole nearest the imaginary axis: Re s = −2 1/s.", "The imaginary axis lies outside this window (arrow); the dashed box above marks the window."]);
    const unstable = zoomPanelText({ ...base, nearest: { re: 0.5, im: 0 }, margin: -0.5, boundaryInView: true }, false, "the pole cloud");
    expect(unstable.caption[0]).toBe("Pole nearest the imaginary axis: Re s = 0.5 1/s (unstable).");
  });
});
