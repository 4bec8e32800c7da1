/**
 * The loops on the comparison's Bode plot: the loop broken at the plant input of every compared
 * variant that has one, on one shared frequency range. They come from a second, display-only
 * evaluation of the compared variants, planned here from the document and its own evaluation;
 * the comparison table never reads it, so no metric in the table can change.
 *
 * The display copy of a variant is the workspace's `variantForDisplay` (dense Bode grid, margins
 * at the plant input) with its range widened to the shared one and without what the plot does
 * not need: step and disturbance responses, the nonlinear check and the robustness sweep (the
 * last two are by far the slowest parts of an evaluation), and the requirements.
 */
import type { DesignRunResult, ProjectFile, VariantResult, VariantSpec } from "../../../shared-engine/api/contract";
import { bodeRange, nyquistLimit, variantForDisplay } from "../workspace/designHelpers";

/** A compared variant that has no loop on the plot, and why (shown in the plot's caption). */
export interface MissingLoop {
  variantId: string;
  reason: string;
}

export interface ComparisonLoopPlan {
  /** The project to evaluate for display, or null when no compared variant has a loop to draw. */
  project: ProjectFile | null;
  /** The shared frequency range (rad/s) covering every sent variant's own range, or null. */
  range: [number, number] | null;
  /** Ids of the variants sent, in document order. */
  sent: string[];
  /** Compared variants left out before evaluation, with the reason. */
  missing: MissingLoop[];
}

/** Sample period of the loop a variant designs: its discretization, else the (sampled) plant's. */
export function loopSampleTime(variant: VariantSpec, result: VariantResult | null): number | null {
  return variant.discretize?.sampleTime ?? result?.discrete?.sampleTime ?? result?.plant?.sampleTime ?? null;
}

function formatFrequency(value: number): string {
  return `${Number(value.toPrecision(3))} rad/s`;
}

/**
 * Plans the display evaluation for the compared variants `selected` of `document`, given the
 * document's own evaluation `results` (its closed-loop poles set each variant's automatic range).
 * A variant is left out, with its reason, when its design failed or it has no state feedback
 * (no loop to break at the plant input). Every sent variant asks for its Bode response on the
 * shared range [lo, hi] (the union of the variants' own ranges), a sampled one only up to its
 * own Nyquist limit.
 */
export function planComparisonLoops(document: ProjectFile, selected: readonly string[], results: Readonly<Record<string, VariantResult>>): ComparisonLoopPlan {
  const missing: MissingLoop[] = [];
  const candidates: { variant: VariantSpec; result: VariantResult; range: [number, number]; limit: number }[] = [];
  for (const variant of document.variants) {
    if (!selected.includes(variant.id)) continue;
    const result = results[variant.id] ?? null;
    if (!result) {
      missing.push({ variantId: variant.id, reason: "it has not been designed yet" });
    } else if (result.error) {
      missing.push({ variantId: variant.id, reason: `its design failed (${result.error.message})` });
    } else if (!variant.stateFeedback) {
      missing.push({ variantId: variant.id, reason: "it has no state-feedback design, so there is no loop to break at the plant input" });
    } else {
      candidates.push({ variant, result, range: bodeRange(variant, result), limit: nyquistLimit(loopSampleTime(variant, result)) });
    }
  }
  if (candidates.length === 0) return { project: null, range: null, sent: [], missing };
  const lo = Math.min(...candidates.map((c) => c.range[0]));
  const hi = Math.max(...candidates.map((c) => Math.min(c.range[1], c.limit)));
  const variants: VariantSpec[] = [];
  for (const { variant, result, limit } of candidates) {
    const top = Math.min(hi, limit);
    if (!(top > lo)) {
      missing.push({ variantId: variant.id, reason: `its Nyquist frequency (${formatFrequency(top)}) lies below the plotted range` });
      continue;
    }
    // variantForDisplay spreads its dense grid over the variant's own Bode range: hand it the
    // shared range (capped at this variant's Nyquist limit) as that range.
    const display = variantForDisplay({ ...variant, bode: { frequencies: [lo, top] } }, result);
    const { step: _step, disturbanceStep: _disturbance, nonlinearCheck: _nonlinear, robustness: _robustness, ...kept } = display;
    variants.push({ ...kept, margins: { at: "plant-input" } });
  }
  const { signOffs: _signOffs, ...rest } = document;
  const project: ProjectFile | null = variants.length > 0 ? { ...rest, variants, requirements: [] } : null;
  return { project, range: project ? [lo, hi] : null, sent: variants.map((v) => v.id), missing };
}

/**
 * Reads the display run: the loop of each sent variant whose evaluation gave a Bode response of
 * the loop at the plant input, and the plan's missing variants plus those whose display
 * evaluation failed (with the engine's message).
 */
export function loopsFromDisplayRun(plan: ComparisonLoopPlan, run: DesignRunResult): { loops: Record<string, VariantResult>; missing: MissingLoop[] } {
  const loops: Record<string, VariantResult> = {};
  const missing = [...plan.missing];
  for (const id of plan.sent) {
    const result = run.variants.find((r) => r.id === id);
    if (!result) missing.push({ variantId: id, reason: "the display evaluation returned nothing for it" });
    else if (result.error) missing.push({ variantId: id, reason: `its loop could not be evaluated (${result.error.message})` });
    else if (!result.bode || result.bode.loop !== "plant-input") missing.push({ variantId: id, reason: "its evaluation gave no loop at the plant input" });
    else loops[id] = result;
  }
  return { loops, missing };
}
