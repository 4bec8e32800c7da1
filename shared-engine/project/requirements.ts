/**
 * Requirement checks: each project requirement names a metric of a variant's result and a
 * bound; the check passes when the metric exists and lies within [min, max].
 */
import type { RequirementSpec } from "./format";
import type { Check, VariantResult } from "./result";

/** The metrics a requirement may name, with how to read them from a result and their unit. */
export interface RequirementMetric {
  read: (r: VariantResult) => number | null | undefined;
  unit: string;
  label: string;
  /** What a null value means: "infinite" (a margin with no crossover) or "undefined" (never settles, unstable). */
  nullMeans?: "infinite";
}

export const REQUIREMENT_METRICS: Record<string, RequirementMetric> = {
  overshootPct: { read: (r) => r.step?.overshootPct, unit: "%", label: "step overshoot" },
  settlingTime: { read: (r) => r.step?.settlingTime, unit: "s", label: "2 % settling time" },
  riseTime: { read: (r) => r.step?.riseTime, unit: "s", label: "10–90 % rise time" },
  steadyStateError: { read: (r) => (r.step?.steadyStateError == null ? r.step?.steadyStateError : Math.abs(r.step.steadyStateError)), unit: "", label: "|steady-state error|" },
  peakInput: { read: (r) => r.step?.peakInput, unit: "", label: "peak control input (unit step)" },
  phaseMarginDeg: { read: (r) => r.margins?.phaseDeg, unit: "°", label: "phase margin", nullMeans: "infinite" },
  gainMarginDb: { read: (r) => r.margins?.gainDb, unit: "dB", label: "gain margin", nullMeans: "infinite" },
  delayMargin: { read: (r) => r.margins?.delayMargin, unit: "s", label: "delay margin", nullMeans: "infinite" },
  sensitivityPeak: { read: (r) => r.margins?.sensitivityPeak, unit: "", label: "sensitivity peak Ms" },
  gainNorm: { read: (r) => r.design?.gainNorm, unit: "", label: "gain norm ‖K‖_F" },
  disturbancePeak: { read: (r) => (r.disturbanceStep ? Math.abs(r.disturbanceStep.peakDeviation) : undefined), unit: "", label: "|peak deviation| after the disturbance step" },
  disturbanceSettlingTime: { read: (r) => r.disturbanceStep?.settlingTime, unit: "s", label: "settling time after the disturbance step" },
  disturbanceFinalValue: {
    read: (r) => (r.disturbanceStep ? (r.disturbanceStep.steadyStateValue === null ? null : Math.abs(r.disturbanceStep.steadyStateValue)) : undefined),
    unit: "",
    label: "|final value| after the disturbance step",
  },
  nonlinearDivergence: {
    read: (r) => (r.nonlinear ? (r.nonlinear.largestDivergence?.size ?? null) : undefined),
    unit: "",
    label: "largest |nonlinear − linear| output difference",
  },
  robustWorstPhaseMarginDeg: { read: (r) => (r.robustness ? r.robustness.worstPhaseMarginDeg : undefined), unit: "°", label: "worst phase margin over the robustness sweep", nullMeans: "infinite" },
  slowestPoleRealPart: {
    read: (r) => (r.closedLoopPoles && r.closedLoopPoles.length > 0 ? Math.max(...r.closedLoopPoles.map((p) => p.re)) : undefined),
    unit: "1/s",
    label: "largest real part of the closed-loop poles",
  },
};

export function checkRequirements(requirements: readonly RequirementSpec[], result: VariantResult): Check[] {
  return requirements.map((req) => {
    const metric = REQUIREMENT_METRICS[req.metric];
    const name = `requirement:${req.id}`;
    const bound = [req.min !== undefined ? `≥ ${req.min}` : "", req.max !== undefined ? `≤ ${req.max}` : ""].filter(Boolean).join(" and ");
    if (!metric) {
      return { name, passed: false, detail: `unknown metric "${req.metric}"; known: ${Object.keys(REQUIREMENT_METRICS).join(", ")}` };
    }
    const value = metric.read(result);
    if (value === undefined) {
      return { name, passed: false, detail: `${metric.label} ${bound}: not computed for this variant (request the analysis that gives it)` };
    }
    if (value === null && metric.nullMeans === "infinite") {
      // No crossover: the margin is unbounded, which meets any lower bound and no upper bound.
      const passed = req.max === undefined;
      return { name, passed, detail: `${metric.label} ${bound}${metric.unit ? ` ${metric.unit}` : ""}: unbounded (no crossover)` };
    }
    if (value === null) {
      return { name, passed: false, detail: `${metric.label} ${bound}: undefined for this variant (e.g. no crossover, never settles, or unstable)` };
    }
    const passed = (req.min === undefined || value >= req.min) && (req.max === undefined || value <= req.max);
    const unit = metric.unit ? ` ${metric.unit}` : "";
    return {
      name,
      passed,
      detail: `${metric.label} ${bound}${unit}: ${Number(value.toPrecision(6))}${unit}`,
      value,
      ...(req.max !== undefined ? { limit: req.max } : req.min !== undefined ? { limit: req.min } : {}),
    };
  });
}
