/**
 * What the comparison's pole-zero maps and step plot draw, grouped by time domain. Pure, so the
 * tests check which variant lands on which map without rendering.
 *
 * Poles of a continuous loop are points of the s-plane; poles of a loop sampled every T seconds
 * are points of the z-plane, read against the unit circle. The comparison draws one map per
 * domain actually present among the compared variants: one s-plane map for the continuous ones,
 * one z-plane map per distinct sample period, each titled with its domain. We chose this over
 * mapping sampled poles onto the s-plane by s = ln(z)/T because that map has no value at z = 0
 * (the deadbeat poles a sampled design often places there), is ambiguous on the negative real
 * axis (ln z is only defined up to 2πj/T, so a pole at z < 0 has no single equivalent), and has
 * no counterpart for the zeros that sampling itself creates (a zero-order-hold plant's zero near
 * z = −1); the z-plane with its unit circle is also what an engineer expects to read a sampled
 * loop on. Variants keep their palette slot (`styleIndex`) on every map, so colours still follow
 * a variant across maps. A map whose poles crowd into a speck of it (a slow sampled loop near
 * z = 1, as in the demo) gets a zoom map beside it, by the design sheet's rule (poleWindow.ts).
 */
import type { VariantResult } from "../../../shared-engine/api/contract";
import { poleZeroFullView, poleZeroPlotArea } from "../../plots/PoleZeroMap";
import type { PoleZeroSeries } from "../../plots/poleZeroModel";
import { poleZoomWindow, type PoleWindow } from "../../plots/poleWindow";
import type { ResponseSeries } from "../../plots/responseModel";
import { sampledMode } from "../../plots/sampledDrawing";
import { formatNumber, type ComparedVariant } from "../../state/compare/compareTable";

/**
 * Sample period (s) of the loop whose poles a result reports, or null for a continuous loop:
 * the closed loop's own, else the discretization's, else the (sampled) plant's.
 */
export function resultSampleTime(result: VariantResult | null | undefined): number | null {
  const t = result?.closedLoop?.sampleTime ?? result?.discrete?.sampleTime ?? result?.plant?.sampleTime ?? null;
  return typeof t === "number" && t > 0 ? t : null;
}

/** Two sample periods are the same domain when they agree to 1e-9 relative (JSON round trips, 0.1 vs 0.1000000000000001). */
function samePeriod(a: number, b: number): boolean {
  return Math.abs(a - b) <= 1e-9 * Math.max(Math.abs(a), Math.abs(b));
}

/** "1 s", "0.05 s": a sample period as printed in titles and captions. */
export function periodText(sampleTime: number): string {
  return `${formatNumber(sampleTime, 6)} s`;
}

/** One pole-zero map of the comparison: the variants of one domain. */
export interface PoleMapGroup {
  /** "s" for the continuous map, "z-<T>" for a sampled one (stable key and file-name part). */
  key: string;
  /** null: the s-plane; else the sample period of every series on this z-plane map. */
  sampleTime: number | null;
  /** The domain in words: "s-plane (continuous)", "z-plane (sampled, T = 1 s)". */
  domain: string;
  /** Plot title naming the domain. */
  title: string;
  series: PoleZeroSeries[];
  /** Ids of the variants drawn, in the order of `series`. */
  variantIds: string[];
}

/**
 * Groups the compared variants that have closed-loop poles by the domain of their loop: the
 * s-plane map first (continuous variants), then one z-plane map per distinct sample period in
 * increasing order. Within a map, variants keep the comparison's order. Variants without poles
 * (not designed, or failed) are on no map.
 */
export function poleMapsByDomain(compared: readonly ComparedVariant[]): PoleMapGroup[] {
  const groups: PoleMapGroup[] = [];
  for (const c of compared) {
    const poles = c.result?.closedLoopPoles;
    if (!poles) continue;
    const T = resultSampleTime(c.result);
    let group = groups.find((g) => (g.sampleTime === null ? T === null : T !== null && samePeriod(g.sampleTime, T)));
    if (!group) {
      const domain = T === null ? "s-plane (continuous)" : `z-plane (sampled, T = ${periodText(T)})`;
      group = { key: T === null ? "s" : `z-${T}`, sampleTime: T, domain, title: `Closed-loop poles × and zeros ○, ${domain}`, series: [], variantIds: [] };
      groups.push(group);
    }
    group.series.push({ name: c.name, poles, zeros: c.result?.plant?.zeros ?? [], styleIndex: c.styleIndex });
    group.variantIds.push(c.variantId);
  }
  return groups.sort((a, b) => (a.sampleTime ?? 0) - (b.sampleTime ?? 0));
}

/** 4 significant digits, "−" for minus (captions). */
const num = (v: number) => String(Number(v.toPrecision(4))).replace("-", "−");

/** A zoom map beside a domain's map: its window, title and caption. */
export interface PoleZoom {
  window: PoleWindow;
  title: string;
  caption: string[];
}

/**
 * The zoom map for a domain's map drawn `width`×`height`, or null when its poles do not crowd
 * into a speck of it: poleWindow.ts's rule (the design sheet's), applied to every pole on the
 * map. The caption says how far the pole nearest the stability boundary lies from it and whether
 * the boundary is in the window (an arrow points to it otherwise).
 */
export function poleZoomFor(group: PoleMapGroup, width: number, height: number): PoleZoom | null {
  const sampled = group.sampleTime !== null;
  const full = poleZeroFullView(group.series, group.sampleTime, width, height);
  const area = poleZeroPlotArea(group.series, width, height, ["", ""]);
  const w = poleZoomWindow({ poles: group.series.flatMap((s) => s.poles), sampled, full, aspect: area.width / area.height });
  if (!w) return null;
  const times = w.magnification >= 10 ? Math.round(w.magnification).toString() : w.magnification.toFixed(1);
  const nearest = sampled
    ? `Pole nearest the unit circle: |z| = ${num(Math.hypot(w.nearest.re, w.nearest.im))}, 1 − |z| = ${num(w.margin)}.`
    : `Pole nearest the imaginary axis: Re s = ${num(w.nearest.re)} 1/s${w.margin < 0 ? " (unstable)" : ""}.`;
  const boundary = sampled ? "unit circle" : "imaginary axis";
  const where = w.boundaryInView ? `The ${boundary} crosses this window` : `The ${boundary} lies outside this window (arrow)`;
  return {
    window: w,
    title: `Zoom ×${times}, ${group.domain}: ${w.count} of ${w.total} poles`,
    caption: [nearest, `${where}; the dashed box on the full map marks it.`],
  };
}

/**
 * The step responses of the compared variants on one time axis (seconds for every domain), and
 * a note naming the sampled ones. A sampled variant's series carries its period, so the plot
 * draws it as what it is (sampledDrawing.ts): the held control input as stairs and the outputs
 * as markers at the sample instants when its step lists every sample; markers only when its
 * step grid skips samples (the demo's 1 s loop listed every 5 s), since the held input changes
 * at instants the data do not list. The note says which, in words. Empty note when every
 * variant is continuous.
 */
export function comparisonSteps(compared: readonly ComparedVariant[]): { series: ResponseSeries[]; note: string } {
  const series: ResponseSeries[] = [];
  const stairs: string[] = [];
  const markers: string[] = [];
  for (const c of compared) {
    const step = c.result?.step;
    if (!step) continue;
    const T = resultSampleTime(c.result);
    const s: ResponseSeries = { name: c.name, time: step.time, output: step.output, outputNames: step.outputNames, ...(step.control ? { control: step.control } : {}), metrics: step, styleIndex: c.styleIndex, sampled: T !== null ? { period: T } : null };
    series.push(s);
    if (T === null) continue;
    (sampledMode(s) === "stairs" ? stairs : markers).push(`${c.name} (T = ${periodText(T)})`);
  }
  const sentences: string[] = [];
  if (stairs.length > 0) {
    sentences.push(`${stairs.join("; ")} ${stairs.length === 1 ? "lists" : "list"} every sample: the held control input is drawn as stairs, the outputs as markers at the sample instants.`);
  }
  if (markers.length > 0) {
    sentences.push(`${markers.join("; ")} ${markers.length === 1 ? "lists" : "list"} only some of the sample instants (the step grid skips samples): outputs and control input are drawn as markers at those instants, not joined, since the input changes at the samples between them.`);
  }
  const note = sentences.length === 0 ? "" : `Sampled: ${sentences.join(" Sampled: ")}`;
  return { series, note };
}
