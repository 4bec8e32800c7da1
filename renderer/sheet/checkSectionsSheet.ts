/**
 * The design sheet's content for the result parts added after the first sheet: the disturbance
 * step, the nonlinear closed-loop check, the robustness sweep over parameters and the per-input
 * margins of multi-input loops. Pure data: term/value rows and table rows; the components in
 * CheckSections.tsx lay them out.
 */
import type { PlantSpec, VariantResult, VariantSpec } from "../../shared-engine/api/contract";
import { fullDigits, optional, rounded } from "./sheetModel";

export interface TermValue {
  term: string;
  value: string;
}

type Check = VariantResult["checks"][number];

/** "PASS — detail" or "FAIL — detail" for a named check, or null when the result has none. */
export function checkVerdict(result: VariantResult, name: string): { passed: boolean; detail: string } | null {
  const c: Check | undefined = result.checks.find((x) => x.name === name);
  return c ? { passed: c.passed, detail: c.detail } : null;
}

const withUnit = (text: string, unit: string): string => (unit ? `${text} ${unit}` : text);

const DISTURBANCE_STATUS: Record<NonNullable<VariantResult["disturbanceStep"]>["status"], string> = {
  settled: "settled within the simulated horizon",
  "not-settled-within-horizon": "NOT settled within the simulated horizon",
  unstable: "UNSTABLE: the response grows without bound",
};

/** Metrics of the disturbance step (first output), with units from the plant's signal labels. */
export function disturbanceRows(result: VariantResult, outputUnit: string, disturbanceUnit: string): TermValue[] {
  const d = result.disturbanceStep;
  if (!d) return [];
  const first = d.outputNames[0] ?? "output 1";
  return [
    { term: "Disturbance step", value: `${d.disturbance} stepped by ${withUnit(fullDigits(d.size), disturbanceUnit)} at t = 0 (${d.loop === "closed-loop" ? "closed loop" : "open loop"})` },
    { term: "Peak deviation", value: `${withUnit(rounded(d.peakDeviation), outputUnit)} on ${first} at t = ${rounded(d.peakTime)} s` },
    { term: "Final value", value: d.steadyStateValue === null ? "none (unstable)" : Math.abs(d.steadyStateValue) < 1e-12 * Math.max(1, Math.abs(d.peakDeviation)) ? withUnit("≈ 0", outputUnit) : withUnit(rounded(d.steadyStateValue), outputUnit) },
    { term: "Settling time (2 % of the peak deviation)", value: optional(d.settlingTime, "s", 4, "does not settle") },
    { term: "Status", value: DISTURBANCE_STATUS[d.status] ?? d.status },
  ];
}

/** Metrics of the nonlinear check, with its pass/fail check when the engine made one. */
export function nonlinearCheckRows(result: VariantResult, variant: VariantSpec): TermValue[] {
  const n = result.nonlinear;
  if (!n) return [];
  const tolerance = variant.nonlinearCheck?.relativeTolerance ?? 0.1;
  const rows: TermValue[] = [
    { term: "Controller", value: n.controller === "continuous" ? "continuous state feedback, states measured" : `sampled every ${fullDigits(n.controller)} s (zero-order hold), states measured` },
    {
      term: "Largest divergence",
      value: n.largestDivergence ? `${rounded(n.largestDivergence.size)} on ${n.largestDivergence.output} at t = ${rounded(n.largestDivergence.time)} s` : "none (no outputs to compare)",
    },
    { term: "Predicted excursion", value: `${rounded(n.linearExcursion)} (largest |y_linear − y0|); allowed divergence ${rounded(tolerance)} × this = ${rounded(tolerance * n.linearExcursion)}` },
    { term: "Saturation", value: n.saturated ? "YES: an input reached its limit, so the linear prediction does not hold there" : "no: every input stayed within its limits" },
    { term: "Early stop", value: n.stoppedEarly ? `STOPPED at t = ${rounded(n.stoppedEarly.time)} s: ${n.stoppedEarly.reason}` : "no: simulated to the last time" },
  ];
  return rows;
}

export interface SweptParameterRow {
  name: string;
  nominal: string;
  percent: string;
  range: string;
  unit: string;
}

/** The varied parameters and their ranges, from the variant spec and the plant's nominal values. */
export function sweptParameterRows(plant: PlantSpec, variant: VariantSpec): SweptParameterRow[] {
  const spec = variant.robustness;
  if (!spec) return [];
  const declared = plant.model.type === "nonlinear" ? plant.model.parameters : [];
  return spec.parameters.map((p) => {
    const d = declared.find((x) => x.name === p.name);
    const nominal = d?.value;
    const ends = nominal === undefined ? null : [nominal * (1 - p.percent / 100), nominal * (1 + p.percent / 100)].sort((a, b) => a - b);
    return {
      name: p.name,
      nominal: nominal === undefined ? "—" : fullDigits(nominal),
      percent: `±${fullDigits(p.percent)} %`,
      range: ends ? `${rounded(ends[0]!, 6)} to ${rounded(ends[1]!, 6)}` : "—",
      unit: d?.unit ?? "",
    };
  });
}

/** Verdict and worst margins of the robustness sweep. */
export function robustnessRows(result: VariantResult, variant: VariantSpec): TermValue[] {
  const r = result.robustness;
  if (!r) return [];
  const sampling = variant.robustness?.sampling;
  const how = !sampling ? `${r.samples} samples` : sampling.kind === "grid" ? `grid of ${sampling.pointsPerParameter} points per parameter (${r.samples} samples, end points included)` : `${r.samples} random samples (seed ${sampling.seed})`;
  return [
    { term: "Sampling", value: how },
    { term: "Stable at every sample", value: r.allStable ? "yes" : "NO" },
    { term: "Failed samples", value: r.failedSamples === 0 ? "none" : `${r.failedSamples} of ${r.samples} (unstable, or no operating point)` },
    ...(r.sampleTime === null
      ? [{ term: "Largest real part of the pole cloud", value: r.largestRealPart === null ? "— (every sample failed)" : rounded(r.largestRealPart) }]
      : [
          { term: "Controller", value: `sampled at ${r.sampleTime} s; plant through a zero-order hold at each sample` },
          { term: "Largest pole magnitude |z| of the cloud", value: r.largestPoleMagnitude === null ? "— (every sample failed)" : rounded(r.largestPoleMagnitude) },
        ]),
    { term: "Worst gain margin", value: r.worstGainMarginDb === null ? "unbounded or not computed" : `${rounded(r.worstGainMarginDb)} dB` },
    { term: "Worst phase margin", value: r.worstPhaseMarginDeg === null ? "unbounded or not computed" : `${rounded(r.worstPhaseMarginDeg)}°` },
    { term: "Margins computed on", value: r.marginsNote },
  ];
}

export interface ChannelRow {
  input: string;
  gain: string;
  phase: string;
  delay: string;
  sensitivityPeak: string;
}

/** Per-input margins of a multi-input loop (each input broken in turn, the others closed). */
export function channelRows(result: VariantResult): ChannelRow[] {
  return (result.margins?.channels ?? []).map((c) => ({
    input: c.input,
    gain: c.gainDb === null ? "unbounded" : `${rounded(c.gainDb)} dB`,
    phase: c.phaseDeg === null ? "none (no crossing)" : `${rounded(c.phaseDeg)}°`,
    delay: optional(c.delayMargin, "s", 4, "unbounded"),
    sensitivityPeak: rounded(c.sensitivityPeak),
  }));
}
