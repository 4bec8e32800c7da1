// The design sheet of a plant entered per (output, input) pair as zeros, poles and gains
// (test/cli/room-climate-zpk.loopwright.json, invented): the model section shows the grid, and
// the file's signal names and units label the results as they do for state-space plants.
import { readFileSync } from "node:fs";
import { describe, expect, it } from "vitest";
import { evaluateProject, loadProjectText } from "../../../shared-engine/project";
import { renderSheetHtml } from "../../../renderer/sheet";

describe("design sheet of a zero-pole-gain grid plant", () => {
  const loaded = loadProjectText(readFileSync(new URL("../../cli/room-climate-zpk.loopwright.json", import.meta.url), "utf8"));
  const result = evaluateProject(loaded, { variant: "lqr" }).variants[0]!;
  const html = renderSheetHtml({ project: loaded.project, variantId: "lqr", result, revision: "t", date: "2025-01-31", pageSize: "a4" });
  const text = html.replace(/<style>[\s\S]*?<\/style>/g, "").replace(/<[^>]+>/g, " ").replace(/&quot;/g, '"').replace(/\s+/g, " ");

  it("shows the gains, zeros and poles of every entry", () => {
    expect(result.error).toBeUndefined();
    expect(text).toContain("[[2,1.5],[0.5,-0.8]]");
    expect(text).toContain('[[[],[-3]],[[{"re":-0.5,"im":1},{"re":-0.5,"im":-1}],[]]]');
    expect(text).toMatch(/6 states, 2 inputs, 2 outputs/);
  });

  it("labels the rows of K with the file's input names, and its rounded entries with their units", () => {
    const gains = text.slice(text.indexOf("5 Resulting gains"), text.indexOf("6 Closed-loop poles"));
    expect(gains).toMatch(/ heater 0\.4129\d/);
    expect(gains).toMatch(/ fan [−-]?\d/);
    expect(gains).toMatch(/ heater 0\.4129 kW\/1 /);
  });
});
