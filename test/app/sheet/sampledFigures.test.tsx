// The design sheet draws a sampled variant's responses as what they are: the demo's loop sampled
// at T = 1 s lists its step every 5–40 s, so its step figure shows markers only and says so; the
// nonlinear check keeps the continuous plant's outputs as curves and only the held input as
// markers. A continuous variant's figures are unchanged (curves, no markers, no caption).
import { readFileSync } from "node:fs";
import { fileURLToPath } from "node:url";
import { describe, expect, it } from "vitest";
import { evaluateProject, loadProjectText } from "../../../shared-engine/project";
import { renderSheetHtml } from "../../../renderer/sheet";

const queue = loadProjectText(readFileSync(fileURLToPath(new URL("../../../assets/examples/queue-backlog.loopwright.json", import.meta.url)), "utf8"));

function sheetHtml(variantId: string): string {
  const result = evaluateProject(queue, { variant: variantId }).variants[0]!;
  return renderSheetHtml({ project: queue.project, variantId, result, revision: "t", date: "2025-01-31", pageSize: "a4" });
}

/** The figures (<figure> … </figure>) of the sheet whose title contains `title`. */
function figure(html: string, title: string): string {
  const found = html.split("<figure").map((f) => f.slice(0, f.indexOf("</figure>"))).find((f) => f.includes(`>${title}`));
  if (!found) throw new Error(`no figure titled ${title}`);
  return found;
}

const count = (text: string, pattern: RegExp) => (text.match(pattern) ?? []).length;
/** Text as read: tags dropped (a wrapped caption's lines joined by a space). */
const words = (html: string) => html.replace(/<[^>]+>/g, " ").replace(/\s+/g, " ");

describe("sampled response figures on the design sheet", () => {
  it("draws the sampled variant's step as markers only, captioned, and the nonlinear check's held input as markers under continuous outputs", () => {
    const html = sheetHtml("lqr-integral-1s");
    const step = figure(html, "Step response");
    expect(words(step)).toContain("T = 1 s, data at the listed instants: markers only (the samples between are not listed)");
    // One output and one control input, 27 listed instants each (the example's step.times).
    expect(count(step, /class="lw-sample-markers" data-count="27"/g)).toBe(2);
    expect(count(step, /lw-series-line/g)).toBe(0);
    const nonlinear = figure(html, "Nonlinear plant (solid)");
    expect(words(nonlinear)).toContain("inputs as markers only");
    expect(count(nonlinear, /class="lw-sample-markers"/g)).toBe(1);
    expect(count(nonlinear, /class="lw-series-line"/g)).toBe(2); // nonlinear output and the linear prediction
  });

  it("keeps a continuous variant's step figure as curves without markers or caption", () => {
    const step = figure(sheetHtml("poles-continuous"), "Step response");
    expect(count(step, /lw-sample-markers|lw-sampled-caption|lw-series-stairs/g)).toBe(0);
    expect(count(step, /class="lw-series-line"/g)).toBe(2);
  });
});
