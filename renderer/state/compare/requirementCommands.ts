/**
 * Project requirements: the metrics a requirement may name, pure add/edit/remove commands on the
 * document, and pass/fail per variant read from the engine's checks (`requirement:<id>`).
 */
import { EngineError } from "../../../shared-engine/errors";
import type { ProjectFile, RequirementSpec, VariantResult } from "../../../shared-engine/api/contract";

/**
 * The metric names the engine checks, with label and unit. WARNING: a copy of the keys of
 * REQUIREMENT_METRICS in shared-engine/project/requirements.ts (the renderer may not import the
 * engine); test/app/renderer/compare/requirementCommands.test.ts fails when the two drift.
 */
export const REQUIREMENT_METRIC_CHOICES: readonly { metric: string; label: string; unit: string; usualBound: "max" | "min" }[] = [
  { metric: "overshootPct", label: "step overshoot", unit: "%", usualBound: "max" },
  { metric: "settlingTime", label: "2 % settling time", unit: "s", usualBound: "max" },
  { metric: "riseTime", label: "10–90 % rise time", unit: "s", usualBound: "max" },
  { metric: "steadyStateError", label: "|steady-state error|", unit: "", usualBound: "max" },
  { metric: "peakInput", label: "peak control input (unit step)", unit: "", usualBound: "max" },
  { metric: "phaseMarginDeg", label: "phase margin", unit: "°", usualBound: "min" },
  { metric: "gainMarginDb", label: "gain margin", unit: "dB", usualBound: "min" },
  { metric: "delayMargin", label: "delay margin", unit: "s", usualBound: "min" },
  { metric: "sensitivityPeak", label: "sensitivity peak Ms", unit: "", usualBound: "max" },
  { metric: "gainNorm", label: "gain norm ‖K‖_F", unit: "", usualBound: "max" },
  { metric: "disturbancePeak", label: "|peak deviation| after the disturbance step", unit: "", usualBound: "max" },
  { metric: "disturbanceSettlingTime", label: "settling time after the disturbance step", unit: "s", usualBound: "max" },
  { metric: "disturbanceFinalValue", label: "|final value| after the disturbance step", unit: "", usualBound: "max" },
  { metric: "nonlinearDivergence", label: "largest |nonlinear − linear| output difference", unit: "", usualBound: "max" },
  { metric: "robustWorstPhaseMarginDeg", label: "worst phase margin over the robustness sweep", unit: "°", usualBound: "min" },
  { metric: "slowestPoleRealPart", label: "largest real part of the closed-loop poles", unit: "1/s", usualBound: "max" },
];

export function metricChoice(metric: string) {
  return REQUIREMENT_METRIC_CHOICES.find((c) => c.metric === metric);
}

/** "step overshoot ≤ 5 %", "phase margin ≥ 45 °". */
export function describeRequirement(requirement: RequirementSpec): string {
  const choice = metricChoice(requirement.metric);
  const unit = choice?.unit ? ` ${choice.unit}` : "";
  const parts = [requirement.min !== undefined ? `≥ ${requirement.min}${unit}` : "", requirement.max !== undefined ? `≤ ${requirement.max}${unit}` : ""].filter(Boolean);
  return `${choice?.label ?? requirement.metric} ${parts.join(" and ") || "(no bound)"}`;
}

export interface RequirementDraft {
  metric: string;
  /** Text as typed; empty = no bound. */
  min: string;
  max: string;
  description?: string;
}

/** Parses a draft into a requirement (without id), or throws kind "validation" naming the field. */
export function parseRequirementDraft(draft: RequirementDraft): Omit<RequirementSpec, "id"> {
  if (!metricChoice(draft.metric)) {
    throw new EngineError("validation", `metric "${draft.metric}" is not one the engine checks (choose one of ${REQUIREMENT_METRIC_CHOICES.map((c) => c.metric).join(", ")})`, {
      field: "metric",
    });
  }
  const bound = (field: "min" | "max"): number | undefined => {
    const text = draft[field].trim();
    if (text === "") return undefined;
    const value = Number(text.replace("−", "-"));
    if (!Number.isFinite(value)) throw new EngineError("validation", `${field === "min" ? "The lower bound" : "The upper bound"} "${text}" is not a finite number`, { field });
    return value;
  };
  const min = bound("min");
  const max = bound("max");
  if (min === undefined && max === undefined) throw new EngineError("validation", "Give a lower bound, an upper bound or both", { field: "max" });
  if (min !== undefined && max !== undefined && min > max) throw new EngineError("validation", `The lower bound ${min} exceeds the upper bound ${max}`, { field: "min" });
  const description = draft.description?.trim();
  return { metric: draft.metric, ...(min !== undefined ? { min } : {}), ...(max !== undefined ? { max } : {}), ...(description ? { description } : {}) };
}

function freshRequirementId(document: ProjectFile): string {
  const taken = new Set((document.requirements ?? []).map((r) => r.id));
  for (let k = 1; ; k++) if (!taken.has(`req-${k}`)) return `req-${k}`;
}

export function addRequirement(document: ProjectFile, draft: RequirementDraft): { document: ProjectFile; requirementId: string } {
  const parsed = parseRequirementDraft(draft);
  const next = structuredClone(document);
  const id = freshRequirementId(next);
  next.requirements = [...(next.requirements ?? []), { id, ...parsed }];
  return { document: next, requirementId: id };
}

function requireIndex(document: ProjectFile, requirementId: string): number {
  const index = (document.requirements ?? []).findIndex((r) => r.id === requirementId);
  if (index < 0) throw new EngineError("invalid-argument", `requirementId "${requirementId}" names no requirement of this project`, { field: "requirementId" });
  return index;
}

export function updateRequirement(document: ProjectFile, requirementId: string, draft: RequirementDraft): ProjectFile {
  const index = requireIndex(document, requirementId);
  const parsed = parseRequirementDraft(draft);
  const next = structuredClone(document);
  next.requirements![index] = { id: requirementId, ...parsed };
  return next;
}

export function removeRequirement(document: ProjectFile, requirementId: string): ProjectFile {
  const index = requireIndex(document, requirementId);
  const next = structuredClone(document);
  next.requirements!.splice(index, 1);
  if (next.requirements!.length === 0) delete next.requirements;
  return next;
}

/** A requirement turned back into editable text. */
export function draftOf(requirement: RequirementSpec): RequirementDraft {
  return {
    metric: requirement.metric,
    min: requirement.min !== undefined ? String(requirement.min) : "",
    max: requirement.max !== undefined ? String(requirement.max) : "",
    description: requirement.description ?? "",
  };
}

export type RequirementOutcome = { status: "pass" | "fail"; detail: string; value?: number } | { status: "not-checked"; detail: string };

/** The outcome of one requirement for one evaluated variant, from its `requirement:<id>` check. */
export function requirementOutcome(result: VariantResult | null | undefined, requirementId: string): RequirementOutcome {
  if (!result) return { status: "not-checked", detail: "not evaluated yet" };
  if (result.error) return { status: "fail", detail: `the variant could not be designed: ${result.error.message}` };
  const check = result.checks.find((c) => c.name === `requirement:${requirementId}`);
  if (!check) return { status: "not-checked", detail: "the engine did not check this requirement (evaluate again)" };
  return { status: check.passed ? "pass" : "fail", detail: check.detail, ...(check.value !== undefined ? { value: check.value } : {}) };
}
