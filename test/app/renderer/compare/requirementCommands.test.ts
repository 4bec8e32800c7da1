import { describe, expect, it } from "vitest";
import { REQUIREMENT_METRICS } from "../../../../shared-engine/project/requirements";
import {
  REQUIREMENT_METRIC_CHOICES,
  addRequirement,
  describeRequirement,
  draftOf,
  parseRequirementDraft,
  removeRequirement,
  requirementOutcome,
  updateRequirement,
} from "../../../../renderer/state/compare/requirementCommands";
import type { VariantResult } from "../../../../shared-engine/api/contract";
import { sampleProject } from "../../db/sampleProject";

describe("requirement commands", () => {
  it("offer exactly the engine's metric names, labels and units", () => {
    expect(REQUIREMENT_METRIC_CHOICES.map((c) => c.metric).sort()).toEqual(Object.keys(REQUIREMENT_METRICS).sort());
    for (const choice of REQUIREMENT_METRIC_CHOICES) {
      expect(choice.label).toBe(REQUIREMENT_METRICS[choice.metric]!.label);
      expect(choice.unit).toBe(REQUIREMENT_METRICS[choice.metric]!.unit);
    }
  });

  it("adds a requirement with a fresh id, edits it and removes it without touching the input", () => {
    const doc = sampleProject();
    const before = structuredClone(doc);
    const added = addRequirement(doc, { metric: "peakInput", min: "", max: "8" });
    expect(added.requirementId).toBe("req-1");
    expect(added.document.requirements!.at(-1)).toEqual({ id: "req-1", metric: "peakInput", max: 8 });
    const edited = updateRequirement(added.document, "req-1", { metric: "peakInput", min: "", max: "6.5" });
    expect(edited.requirements!.at(-1)).toEqual({ id: "req-1", metric: "peakInput", max: 6.5 });
    const removed = removeRequirement(edited, "req-1");
    expect(removed.requirements).toEqual(doc.requirements);
    expect(doc).toEqual(before);
  });

  it("removes the requirements list when its last row is removed", () => {
    let doc = sampleProject();
    for (const id of ["os", "ts", "pm"]) doc = removeRequirement(doc, id);
    expect(doc.requirements).toBeUndefined();
  });

  it.each([
    [{ metric: "speed", min: "", max: "1" }, "metric"],
    [{ metric: "overshootPct", min: "", max: "" }, "max"],
    [{ metric: "overshootPct", min: "", max: "five" }, "max"],
    [{ metric: "phaseMarginDeg", min: "60", max: "30" }, "min"],
  ])("rejects the draft %o naming the field %s", (draft, field) => {
    expect(() => parseRequirementDraft(draft)).toThrow(expect.objectContaining({ kind: "validation", details: { field } }));
  });

  it("reads a typed minus sign and round-trips a requirement through its draft", () => {
    expect(parseRequirementDraft({ metric: "slowestPoleRealPart", min: "", max: "−0.5" })).toEqual({ metric: "slowestPoleRealPart", max: -0.5 });
    const req = { id: "pm", metric: "phaseMarginDeg", min: 45, description: "robustness" };
    expect({ id: "pm", ...parseRequirementDraft(draftOf(req)) }).toEqual(req);
  });

  it("describes requirements in words with their units", () => {
    expect(describeRequirement({ id: "a", metric: "overshootPct", max: 5 })).toBe("step overshoot ≤ 5 %");
    expect(describeRequirement({ id: "b", metric: "phaseMarginDeg", min: 45 })).toBe("phase margin ≥ 45 °");
  });

  it("reads pass, fail and not-checked from the variant's checks", () => {
    const result = {
      id: "v",
      name: "v",
      checks: [
        { name: "requirement:os", passed: true, detail: "step overshoot ≤ 5 %: 1.5 %", value: 1.5, limit: 5 },
        { name: "requirement:pm", passed: false, detail: "phase margin ≥ 45 °: 30 °", value: 30, limit: 45 },
      ],
      warnings: [],
    } satisfies VariantResult;
    expect(requirementOutcome(result, "os")).toMatchObject({ status: "pass", value: 1.5 });
    expect(requirementOutcome(result, "pm")).toMatchObject({ status: "fail" });
    expect(requirementOutcome(result, "ts").status).toBe("not-checked");
    expect(requirementOutcome(null, "os").status).toBe("not-checked");
    expect(requirementOutcome({ ...result, error: { kind: "singular", message: "boom", details: {} } }, "os")).toMatchObject({ status: "fail" });
  });
});
