/**
 * Bode plot model: a shared logarithmic frequency axis, a magnitude panel (dB) and a phase panel
 * (degrees), paths with gaps where the response is unbounded (null), margin marks with their
 * labels laid out clear of each other, and the hover read-out. Pure; BodePlot.tsx draws it.
 */
import { scaleLinear, scaleLog, type ScaleLinear, type ScaleLogarithmic } from "d3";
import { decadeDomain, linearTicks, logTicks, niceDomain, phaseTicks, type AxisModel } from "./axisModel";
import { placeLabels, textSize, type Box, type LabelRequest } from "./labelPlacement";
import { seriesStyle, type SeriesStyle } from "./palette";
import { polylinePath, toHundredths } from "./polylinePath";
import { fullPrecision, isDrawable, type Domain } from "./plotTypes";

export interface BodeMargins {
  gainDb: number | null;
  phaseDeg: number | null;
  gainCrossover: number | null;
  phaseCrossover: number | null;
}

/** One frequency response, shaped like VariantResult.bode (plus its name and margins). */
export interface BodeSeries {
  name: string;
  frequency: readonly number[];
  magnitudeDb: readonly (number | null)[];
  phaseDeg: readonly (number | null)[];
  margins?: BodeMargins | null;
  styleIndex?: number;
}

export interface MarginMark {
  seriesIndex: number;
  kind: "gain" | "phase";
  /** Crossover frequency (rad/s) and its x position. */
  frequency: number;
  x: number;
  /** Vertical segment in the panel where the margin is read: [y at reference, y at curve]. */
  y1: number;
  y2: number;
  panel: "magnitude" | "phase";
  label: string;
}

/** Font size (px) of the margin annotations (plots.css .lw-margin-label). */
export const MARGIN_FONT = 10.5;

/** A margin annotation placed by `layoutMarginLabels`: its text box and the text's start and baseline. */
export interface MarginLabel {
  /** Index of its mark in `BodeModel.marks`. */
  markIndex: number;
  seriesIndex: number;
  panel: "magnitude" | "phase";
  text: string;
  box: Box;
  x: number;
  y: number;
}

export interface BodePanel {
  y: ScaleLinear<number, number>;
  axis: AxisModel;
  top: number;
  height: number;
}

export interface BodeModel {
  x: ScaleLogarithmic<number, number>;
  xAxis: AxisModel;
  left: number;
  width: number;
  magnitude: BodePanel;
  phase: BodePanel;
  series: { name: string; style: SeriesStyle; magnitudePath: string; phasePath: string }[];
  marks: MarginMark[];
  /** Labels of the marks in view, inside their panel and clear of each other (see layoutMarginLabels). */
  labels: MarginLabel[];
  /** y of the 0 dB line and of the −180° (+k·360°) reference nearest the data, when in view. */
  zeroDbY: number | null;
  phaseReferenceY: number | null;
}

export interface BodeModelInput {
  series: readonly BodeSeries[];
  width: number;
  /** Top of the magnitude panel, panel heights and the gap between them. */
  top: number;
  panelHeight: number;
  gap: number;
  left: number;
  right: number;
  /** Visible frequency range (zoom); default: the decades holding every frequency. */
  frequencyView?: Domain;
}

/**
 * Linear interpolation of `values` at frequency w in log-frequency (the plots' own metric);
 * null when w is outside the data or next to a gap.
 */
export function interpolateAtFrequency(frequency: readonly number[], values: readonly (number | null)[], w: number): number | null {
  const n = frequency.length;
  if (n === 0 || !(w > 0)) return null;
  for (let k = 0; k + 1 < n; k++) {
    const a = frequency[k]!, b = frequency[k + 1]!;
    if (w >= a && w <= b) {
      const va = values[k], vb = values[k + 1];
      if (!isDrawable(va) || !isDrawable(vb)) return w === a && isDrawable(va) ? va : w === b && isDrawable(vb) ? vb : null;
      if (b === a) return va;
      const t = (Math.log(w) - Math.log(a)) / (Math.log(b) - Math.log(a));
      return va + t * (vb - va);
    }
  }
  if (n === 1 && w === frequency[0]) return isDrawable(values[0]) ? values[0] : null;
  return null;
}

/** The odd multiple of 180° nearest to `phase` (the −180° line, shifted by whole turns when the phase is unwrapped). */
export function phaseReference(phase: number): number {
  return 180 * (2 * Math.round((phase - 180) / 360) + 1);
}

/** Index of the sample nearest to w in log-frequency (binary search; frequency increasing). */
export function nearestFrequencyIndex(frequency: readonly number[], w: number): number {
  const n = frequency.length;
  if (n === 0) return -1;
  let lo = 0, hi = n - 1;
  while (hi - lo > 1) {
    const mid = (lo + hi) >> 1;
    if (frequency[mid]! <= w) lo = mid; else hi = mid;
  }
  return Math.abs(Math.log(w / frequency[lo]!)) <= Math.abs(Math.log(frequency[hi]! / w)) ? lo : hi;
}

export function bodeModel(input: BodeModelInput): BodeModel {
  const { series, width, top, panelHeight, gap, left, right } = input;
  const allFreq = series.flatMap((s) => s.frequency);
  const xDomain = input.frequencyView ?? decadeDomain(allFreq);
  const plotWidth = width - left - right;
  const x = scaleLog().domain(xDomain).range([left, left + plotWidth]);
  const inView = (s: BodeSeries, values: readonly (number | null)[]) => values.filter((_, k) => s.frequency[k]! >= xDomain[0] && s.frequency[k]! <= xDomain[1]);
  const magValues = series.flatMap((s) => inView(s, s.magnitudeDb));
  const phaseValues = series.flatMap((s) => inView(s, s.phaseDeg));
  const magTop = top;
  const phaseTop = top + panelHeight + gap;
  const magDomain = niceDomain(magValues, 0.05, [0]);
  const phaseDomain = niceDomain(phaseValues, 0.05);
  const magY = scaleLinear().domain(magDomain).range([magTop + panelHeight, magTop]);
  const phaseY = scaleLinear().domain(phaseDomain).range([phaseTop + panelHeight, phaseTop]);
  const path = (s: BodeSeries, values: readonly (number | null)[], y: ScaleLinear<number, number>) =>
    polylinePath(
      s.frequency.length,
      // A null (unbounded) or non-finite sample ends the current piece: the curve shows a gap.
      (k) => isDrawable(values[k]) && s.frequency[k]! > 0,
      (k) => toHundredths(x(s.frequency[k]!)),
      (k) => toHundredths(y(values[k] as number)),
    );

  const marks: MarginMark[] = [];
  series.forEach((s, si) => {
    const m = s.margins;
    if (!m) return;
    if (isDrawable(m.gainCrossover) && m.gainCrossover > 0) {
      const ph = interpolateAtFrequency(s.frequency, s.phaseDeg, m.gainCrossover);
      const ref = ph === null ? -180 : phaseReference(ph);
      const pm = isDrawable(m.phaseDeg) ? m.phaseDeg : ph === null ? null : ph - ref;
      marks.push({
        seriesIndex: si, kind: "phase", frequency: m.gainCrossover, x: x(m.gainCrossover), panel: "phase",
        y1: phaseY(ref), y2: phaseY(ph ?? ref + (pm ?? 0)),
        label: `PM ${pm === null ? "unbounded" : `${Number(pm.toFixed(1))}°`} at ${Number(m.gainCrossover.toPrecision(3))} rad/s`,
      });
    }
    if (isDrawable(m.phaseCrossover) && m.phaseCrossover > 0) {
      const mag = interpolateAtFrequency(s.frequency, s.magnitudeDb, m.phaseCrossover);
      const gm = isDrawable(m.gainDb) ? m.gainDb : mag === null ? null : -mag;
      marks.push({
        seriesIndex: si, kind: "gain", frequency: m.phaseCrossover, x: x(m.phaseCrossover), panel: "magnitude",
        y1: magY(0), y2: magY(mag ?? -(gm ?? 0)),
        label: `GM ${gm === null ? "unbounded" : `${Number(gm.toFixed(1))} dB`} at ${Number(m.phaseCrossover.toPrecision(3))} rad/s`,
      });
    }
  });

  const visiblePoints = (s: BodeSeries, values: readonly (number | null)[], y: ScaleLinear<number, number>) => {
    const pts: [number, number][] = [];
    s.frequency.forEach((w, k) => {
      const v = values[k];
      if (w >= xDomain[0] && w <= xDomain[1] && isDrawable(v)) pts.push([x(w), y(v)]);
    });
    return pts;
  };
  const panelBox = (panelTop: number): Box => ({ x: left, y: panelTop, width: plotWidth, height: panelHeight });
  const labels = layoutMarginLabels(marks, {
    magnitude: { frame: panelBox(magTop), curves: series.map((s) => visiblePoints(s, s.magnitudeDb, magY)) },
    phase: { frame: panelBox(phaseTop), curves: series.map((s) => visiblePoints(s, s.phaseDeg, phaseY)) },
  });

  const firstPhase = phaseValues.find(isDrawable);
  const ref = firstPhase === undefined ? null : phaseReference(series.length && series[0]!.margins?.gainCrossover ? (interpolateAtFrequency(series[0]!.frequency, series[0]!.phaseDeg, series[0]!.margins.gainCrossover) ?? firstPhase) : firstPhase);
  const within = (v: number, d: Domain) => v >= Math.min(d[0], d[1]) && v <= Math.max(d[0], d[1]);
  return {
    x,
    xAxis: logTicks(xDomain, [left, left + plotWidth]),
    left, width: plotWidth,
    magnitude: { y: magY, axis: linearTicks(magDomain, [magTop + panelHeight, magTop], 5), top: magTop, height: panelHeight },
    phase: { y: phaseY, axis: phaseTicks(phaseDomain, [phaseTop + panelHeight, phaseTop], 3, Math.max(3, Math.min(7, Math.floor(panelHeight / 24)))), top: phaseTop, height: panelHeight },
    series: series.map((s, si) => ({ name: s.name, style: seriesStyle(s.styleIndex ?? si), magnitudePath: path(s, s.magnitudeDb, magY), phasePath: path(s, s.phaseDeg, phaseY) })),
    marks,
    labels,
    zeroDbY: within(0, magDomain) ? magY(0) : null,
    phaseReferenceY: ref !== null && within(ref, phaseDomain) ? phaseY(ref) : null,
  };
}

/** Hover read-out at frequency w: for each series the nearest sample, every value in full precision. */
export function bodeReadout(series: readonly BodeSeries[], w: number): { name: string; frequency: string; magnitudeDb: string; phaseDeg: string }[] {
  return series.flatMap((s) => {
    const k = nearestFrequencyIndex(s.frequency, w);
    if (k < 0) return [];
    return [{ name: s.name, frequency: fullPrecision(s.frequency[k]), magnitudeDb: fullPrecision(s.magnitudeDb[k]), phaseDeg: fullPrecision(s.phaseDeg[k]) }];
  });
}

/**
 * Lays out the margin labels of each panel inside that panel (`frame`), in mark order, by the
 * greedy pass of labelPlacement.ts: a label goes right of its crossover line just above the
 * margin bar, else just below it, else left of the line above or below, else stacked by whole
 * rows from those spots; never over a placed label (2 px clearance) and, when any spot allows
 * it, not across a curve of the panel (`curves`, in px) or a margin bar. So the labels of up to
 * four series with the same crossover frequency stack instead of printing over each other (the
 * comparison shows 2–4 variants). Marks outside the visible frequency range get no label; a
 * label that fits nowhere in a tiny panel is left out rather than drawn off the plot.
 */
export function layoutMarginLabels(
  marks: readonly MarginMark[],
  panels: Record<"magnitude" | "phase", { frame: Box; curves: readonly (readonly (readonly [number, number])[])[] }>,
): MarginLabel[] {
  const out: MarginLabel[] = [];
  for (const key of ["magnitude", "phase"] as const) {
    const { frame, curves } = panels[key];
    const inPanel = marks.map((m, markIndex) => ({ m, markIndex })).filter(({ m }) => m.panel === key && m.x >= frame.x && m.x <= frame.x + frame.width);
    const bars: (readonly (readonly [number, number])[])[] = inPanel.map(({ m }) => [[m.x, m.y1], [m.x, m.y2]]);
    const requests: LabelRequest[] = inPanel.map(({ m }) => {
      const { width, height } = textSize(m.label, MARGIN_FONT);
      const barTop = Math.min(m.y1, m.y2), barBottom = Math.max(m.y1, m.y2);
      return {
        text: m.label, width, height,
        candidates: [
          { x: m.x + 4, y: barTop - 4 - height }, { x: m.x + 4, y: barBottom + 4 },
          { x: m.x - 4 - width, y: barTop - 4 - height }, { x: m.x - 4 - width, y: barBottom + 4 },
        ],
      };
    });
    const boxes = placeLabels(requests, frame, { lines: [...curves, ...bars] });
    inPanel.forEach(({ m, markIndex }, i) => {
      const b = boxes[i];
      if (b) out.push({ markIndex, seriesIndex: m.seriesIndex, panel: key, text: m.label, box: b, x: b.x + 1, y: b.y + MARGIN_FONT * 0.9 });
    });
  }
  return out;
}
