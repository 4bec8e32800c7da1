/**
 * The comparison table of 2–4 evaluated design variants: one row per metric read from
 * VariantResult, each with its "better" rule stated in words, the best cell(s) marked, and the
 * project requirement the row is checked against with pass/fail per variant. Pure data; the
 * view draws it.
 */
import type { RequirementSpec, VariantResult } from "../../../shared-engine/api/contract";
import { describeRequirement, requirementOutcome, type RequirementOutcome } from "./requirementCommands";

/** How the better value of a row is chosen. "none": informational, nothing is marked. */
export type BetterRule = "lower" | "higher" | "closer-to-zero" | "none";

export interface CompareCell {
  text: string;
  /** The number the rule compares; null when the metric is absent or unbounded (see `unbounded`). */
  value: number | null;
  /** A margin reported as null by the engine means "no crossing": unbounded, the best possible. */
  unbounded?: boolean;
  /** The metric is undefined in the worst way (a step that never settles): ranks last. */
  worst?: boolean;
  best: boolean;
}

export interface CompareRow {
  key: string;
  label: string;
  unit: string;
  rule: BetterRule;
  /** The rule in words, shown beside the row: "lower is better (less overshoot)". */
  ruleText: string;
  cells: CompareCell[];
  /** Requirements on this row's metric, with the outcome per variant. */
  requirements: { id: string; text: string; outcomes: RequirementOutcome[] }[];
}

export interface CompareColumn {
  variantId: string;
  name: string;
  styleIndex: number;
  error: string | null;
}

export interface ComparisonTable {
  columns: CompareColumn[];
  rows: CompareRow[];
}

interface Complex {
  re: number;
  im: number;
}

/** Shortest text that keeps 4 significant digits, with a true minus sign. */
export function formatNumber(value: number | null | undefined, digits = 4): string {
  if (value === null || value === undefined) return "—";
  if (!Number.isFinite(value)) return value > 0 ? "∞" : "−∞";
  if (value === 0) return "0";
  const abs = Math.abs(value);
  const text = abs >= 1e-3 && abs < 1e6 ? String(Number(value.toPrecision(digits))) : value.toExponential(digits - 1);
  return text.replace("-", "−");
}

/** Damping ratio and natural frequency of a pole; a sampled pole z is mapped by s = ln(z)/T. */
export function poleDamping(pole: Complex, sampleTime: number | null): { zeta: number; wn: number } {
  let s = pole;
  if (sampleTime !== null && sampleTime > 0) {
    const magnitude = Math.hypot(pole.re, pole.im);
    // z = 0 (deadbeat) has no finite s; treat it as infinitely fast and fully damped.
    if (magnitude === 0) return { zeta: 1, wn: Number.POSITIVE_INFINITY };
    s = { re: Math.log(magnitude) / sampleTime, im: Math.atan2(pole.im, pole.re) / sampleTime };
  }
  const wn = Math.hypot(s.re, s.im);
  return { zeta: wn > 0 ? -s.re / wn : 1, wn };
}

function describePoles(poles: readonly Complex[], sampleTime: number | null): string {
  // One entry per conjugate pair (the member with im ≥ 0) to keep the cell short.
  return poles
    .filter((p) => p.im >= 0)
    .map((p) => {
      const { zeta, wn } = poleDamping(p, sampleTime);
      const value = p.im > 0 ? `${formatNumber(p.re)} ± ${formatNumber(p.im)}j` : formatNumber(p.re);
      return `${value} (ζ ${formatNumber(zeta, 3)}, ωn ${formatNumber(wn, 3)})`;
    })
    .join("; ");
}

function formatMatrix(matrix: readonly (readonly number[])[] | undefined): string {
  if (!matrix) return "—";
  return matrix.map((row) => `[${row.map((x) => formatNumber(x)).join(", ")}]`).join(" ");
}

function sampleTimeOf(result: VariantResult): number | null {
  return result.discrete?.sampleTime ?? result.plant?.sampleTime ?? null;
}

interface RowDefinition {
  key: string;
  label: string;
  unit: string;
  rule: BetterRule;
  ruleText: string;
  /** Requirement metric names checked against this row. */
  metrics: string[];
  read: (r: VariantResult) => { value: number | null; text?: string; unbounded?: boolean; worst?: boolean } | undefined;
}

const number = (value: number | null | undefined, unboundedWhenNull = false) =>
  value === undefined ? undefined : value === null ? { value: null, unbounded: unboundedWhenNull, text: unboundedWhenNull ? "∞ (no crossing)" : "—" } : { value };

/** The rows, in display order. Each rule is the usual engineering reading (common practice). */
export const COMPARE_ROWS: readonly RowDefinition[] = [
  {
    key: "closedLoopPoles",
    label: "Closed-loop poles",
    unit: "",
    rule: "lower",
    ruleText: "lower is better: the slowest pole's real part (sampled: largest |z|), i.e. faster decay",
    metrics: ["slowestPoleRealPart"],
    read: (r) => {
      if (!r.closedLoopPoles || r.closedLoopPoles.length === 0) return undefined;
      const T = sampleTimeOf(r);
      const slowest = T !== null ? Math.max(...r.closedLoopPoles.map((p) => Math.hypot(p.re, p.im))) : Math.max(...r.closedLoopPoles.map((p) => p.re));
      return { value: slowest, text: describePoles(r.closedLoopPoles, T) };
    },
  },
  {
    key: "minimumDamping",
    label: "Smallest damping ratio ζ",
    unit: "",
    rule: "higher",
    ruleText: "higher is better: less oscillatory worst mode",
    metrics: [],
    read: (r) =>
      r.closedLoopPoles && r.closedLoopPoles.length > 0 ? { value: Math.min(...r.closedLoopPoles.map((p) => poleDamping(p, sampleTimeOf(r)).zeta)) } : undefined,
  },
  { key: "gain", label: "State-feedback gain K", unit: "", rule: "none", ruleText: "no ranking: compare by hand", metrics: [], read: (r) => (r.gain ? { value: null, text: formatMatrix(r.gain.K) } : undefined) },
  {
    key: "gainNorm",
    label: "Gain norm ‖K‖_F",
    unit: "",
    rule: "lower",
    ruleText: "lower is better: gentler actuation and less noise amplification",
    metrics: ["gainNorm"],
    read: (r) => number(r.design?.gainNorm),
  },
  {
    key: "gainMarginDb",
    label: "Gain margin at the plant input",
    unit: "dB",
    rule: "higher",
    ruleText: "higher is better (no phase crossing counts as unbounded)",
    metrics: ["gainMarginDb"],
    read: (r) => number(r.margins?.gainDb, true),
  },
  {
    key: "phaseMarginDeg",
    label: "Phase margin at the plant input",
    unit: "°",
    rule: "higher",
    ruleText: "higher is better (no gain crossing counts as unbounded)",
    metrics: ["phaseMarginDeg"],
    read: (r) => number(r.margins?.phaseDeg, true),
  },
  {
    key: "delayMargin",
    label: "Delay margin",
    unit: "s",
    rule: "higher",
    ruleText: "higher is better: more tolerated loop delay",
    metrics: ["delayMargin"],
    read: (r) => number(r.margins?.delayMargin, true),
  },
  {
    key: "sensitivityPeak",
    label: "Sensitivity peak Ms",
    unit: "",
    rule: "lower",
    ruleText: "lower is better: 1/Ms is the distance of the loop to −1",
    metrics: ["sensitivityPeak"],
    read: (r) => number(r.margins?.sensitivityPeak),
  },
  {
    key: "overshootPct",
    label: "Step overshoot",
    unit: "%",
    rule: "lower",
    ruleText: "lower is better",
    metrics: ["overshootPct"],
    read: (r) => number(r.step?.overshootPct),
  },
  { key: "riseTime", label: "Step rise time (10–90 %)", unit: "s", rule: "lower", ruleText: "lower is better: faster response", metrics: ["riseTime"], read: (r) => number(r.step?.riseTime) },
  {
    key: "settlingTime",
    label: "Step settling time (2 %)",
    unit: "s",
    rule: "lower",
    ruleText: "lower is better (never settling ranks last)",
    metrics: ["settlingTime"],
    read: (r) => (r.step ? (r.step.settlingTime === null ? { value: null, text: "does not settle", worst: true } : { value: r.step.settlingTime }) : undefined),
  },
  {
    key: "steadyStateError",
    label: "Steady-state error",
    unit: "",
    rule: "closer-to-zero",
    ruleText: "closer to zero is better",
    metrics: ["steadyStateError"],
    read: (r) => number(r.step?.steadyStateError),
  },
  {
    key: "peakInput",
    label: "Peak control effort (unit step)",
    unit: "",
    rule: "lower",
    ruleText: "lower is better: less actuator demand",
    metrics: ["peakInput"],
    read: (r) => number(r.step?.peakInput),
  },
  {
    key: "disturbancePeakDeviation",
    label: "Disturbance step: peak deviation",
    unit: "",
    rule: "closer-to-zero",
    ruleText: "lower |·| is better: the disturbance moves the output less",
    metrics: [],
    read: (r) => number(r.disturbanceStep?.peakDeviation),
  },
  {
    key: "disturbanceSettlingTime",
    label: "Disturbance step: settling time",
    unit: "s",
    rule: "lower",
    ruleText: "lower is better: faster recovery (never settling ranks last)",
    metrics: [],
    read: (r) => (r.disturbanceStep ? (r.disturbanceStep.settlingTime === null ? { value: null, text: "does not settle", worst: true } : { value: r.disturbanceStep.settlingTime }) : undefined),
  },
  {
    key: "disturbanceFinalValue",
    label: "Disturbance step: final value",
    unit: "",
    rule: "closer-to-zero",
    ruleText: "|·| closer to 0 is better: no lasting offset (unstable ranks last)",
    metrics: [],
    read: (r) => (r.disturbanceStep ? (r.disturbanceStep.steadyStateValue === null ? { value: null, text: "unstable", worst: true } : { value: r.disturbanceStep.steadyStateValue }) : undefined),
  },
  {
    key: "robustAllStable",
    label: "Robustness sweep: stable at every sample",
    unit: "",
    rule: "higher",
    ruleText: "yes is better: the fixed gain keeps every parameter sample stable",
    metrics: [],
    read: (r) => (r.robustness ? { value: r.robustness.allStable ? 1 : 0, text: r.robustness.allStable ? `yes (${r.robustness.samples} samples)` : `no (${r.robustness.failedSamples} of ${r.robustness.samples} failed)` } : undefined),
  },
  {
    key: "robustWorstPhaseMarginDeg",
    label: "Robustness sweep: worst phase margin",
    unit: "°",
    rule: "higher",
    ruleText: "higher is better: the smallest phase margin over the parameter samples (no crossing counts as unbounded)",
    metrics: [],
    read: (r) => {
      const rob = r.robustness;
      if (!rob) return undefined;
      if (rob.worstPhaseMarginDeg !== null) return { value: rob.worstPhaseMarginDeg };
      // null: no gain crossing at any sample (unbounded) for a single-input loop with samples left;
      // otherwise the sweep computed no margins (several inputs, or every sample failed).
      const singleInput = (r.gain?.K.length ?? 0) === 1;
      return singleInput && rob.failedSamples < rob.samples ? { value: null, unbounded: true, text: "∞ (no crossing)" } : { value: null, text: "not computed" };
    },
  },
  {
    key: "nonlinearLargestDivergence",
    label: "Nonlinear check: largest divergence",
    unit: "",
    rule: "lower",
    ruleText: "lower is better: the nonlinear plant stays closer to the linear prediction",
    metrics: [],
    read: (r) => (r.nonlinear ? (r.nonlinear.largestDivergence ? { value: r.nonlinear.largestDivergence.size, text: `${formatNumber(r.nonlinear.largestDivergence.size)} (${r.nonlinear.largestDivergence.output} at ${formatNumber(r.nonlinear.largestDivergence.time)} s)` } : { value: null, text: "no outputs" }) : undefined),
  },
  {
    key: "riccatiResidual",
    label: "Riccati relative residual",
    unit: "",
    rule: "lower",
    ruleText: "lower is better: a more accurate solution",
    metrics: [],
    read: (r) => (r.riccati ? { value: r.riccati.residual, text: r.riccati.residual.toExponential(2).replace("-", "−") } : undefined),
  },
  {
    key: "riccatiConditioning",
    label: "Riccati conditioning (reciprocal condition)",
    unit: "",
    rule: "higher",
    ruleText: "higher is better: closer to 1 means a better-conditioned equation",
    metrics: [],
    read: (r) => number(r.riccati?.conditionIndicator),
  },
];

function markBest(cells: CompareCell[], rule: BetterRule): void {
  if (rule === "none") return;
  const score = (c: CompareCell): number | null => {
    if (c.unbounded) return rule === "higher" ? Number.POSITIVE_INFINITY : null;
    if (c.worst) return Number.NEGATIVE_INFINITY;
    if (c.value === null) return null;
    if (rule === "closer-to-zero") return -Math.abs(c.value);
    return rule === "higher" ? c.value : -c.value;
  };
  const scores = cells.map(score);
  const finite = scores.filter((s): s is number => s !== null);
  if (finite.length < 2) return; // nothing to compare against
  const best = Math.max(...finite);
  // All equal: no variant is better, so none is marked.
  if (finite.every((s) => s === best)) return;
  // Ties within a relative 1e-9 count as equal (the same design computed twice).
  const tolerance = Number.isFinite(best) ? 1e-9 * Math.max(1, Math.abs(best)) : 0;
  scores.forEach((s, i) => {
    if (s !== null && (s === best || best - s <= tolerance)) cells[i]!.best = true;
  });
}

export interface ComparedVariant {
  variantId: string;
  name: string;
  /** Palette slot, fixed per variant (its position in the project). */
  styleIndex: number;
  result: VariantResult | null;
}

/** Builds the table for 2–4 variants (fewer or more are accepted; the view limits the choice). */
export function buildComparisonTable(variants: readonly ComparedVariant[], requirements: readonly RequirementSpec[] = []): ComparisonTable {
  const columns: CompareColumn[] = variants.map((v) => ({
    variantId: v.variantId,
    name: v.name,
    styleIndex: v.styleIndex,
    error: v.result?.error ? v.result.error.message : null,
  }));
  const rows: CompareRow[] = [];
  for (const definition of COMPARE_ROWS) {
    const readings = variants.map((v) => (v.result && !v.result.error ? definition.read(v.result) : undefined));
    const checked = requirements.filter((req) => definition.metrics.includes(req.metric));
    if (readings.every((r) => r === undefined) && checked.length === 0) continue;
    const cells: CompareCell[] = readings.map((r) =>
      r === undefined
        ? { text: "—", value: null, best: false }
        : { text: r.text ?? formatNumber(r.value), value: r.value, best: false, ...(r.unbounded ? { unbounded: true } : {}), ...(r.worst ? { worst: true } : {}) },
    );
    markBest(cells, definition.rule);
    rows.push({
      key: definition.key,
      label: definition.label,
      unit: definition.unit,
      rule: definition.rule,
      ruleText: definition.ruleText,
      cells,
      requirements: checked.map((req) => ({ id: req.id, text: describeRequirement(req), outcomes: variants.map((v) => requirementOutcome(v.result, req.id)) })),
    });
  }
  return { columns, rows };
}
