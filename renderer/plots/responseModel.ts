/**
 * Time-response model: an outputs panel and (when any series has one) a control-input panel on a
 * shared time axis, input limits as dashed lines, step metrics as marks (rise-time band,
 * ±2 % settling band, overshoot peak), overlays dashed over their primary series. A series with
 * `sampled: { period }` is drawn by sampledDrawing.ts's rule (control inputs as stairs, outputs
 * as markers at the sample instants; markers only when the data skip samples). Pure.
 */
import { scaleLinear, type ScaleLinear } from "d3";
import { linearTicks, niceDomain, tickLabel, type AxisModel } from "./axisModel";
import { placeLabels, textSize, type Box, type LabelRequest } from "./labelPlacement";
import { seriesStyle, type SeriesStyle } from "./palette";
import { polylinePath, toHundredths } from "./polylinePath";
import { isDrawable, type Domain } from "./plotTypes";
import { markerRadius, markersPath, panelDrawing, smallestSpacing, stairsPath, type SampledOption } from "./sampledDrawing";

export interface ResponseMetrics {
  riseTime?: number | null;
  settlingTime?: number | null;
  overshootPct?: number | null;
  peak?: number | null;
  peakTime?: number | null;
  steadyStateValue?: number | null;
  /** Which output the metrics describe (default 0). */
  outputIndex?: number;
}

/** One time response, shaped like VariantResult.step (output[i][k], control[j][k]) plus a name. */
export interface ResponseSeries {
  name: string;
  time: readonly number[];
  output: readonly (readonly (number | null)[])[];
  outputNames?: readonly string[];
  control?: readonly (readonly (number | null)[])[];
  controlNames?: readonly string[];
  metrics?: ResponseMetrics | null;
  /** Limits of the control input(s), drawn dashed in the control panel. */
  controlLimits?: { lower?: number | null; upper?: number | null } | null;
  /** An overlay (e.g. the nonlinear simulation) is drawn dashed in the colour of `styleIndex`. */
  overlay?: boolean;
  styleIndex?: number;
  /**
   * Sampled every `period` seconds (a discrete model, or a sampled controller's held input);
   * null or absent: a continuous response, its samples joined by straight lines.
   */
  sampled?: SampledOption | null;
}

export const OVERLAY_DASH = "6 3";
/** Settling band half-width: ±2 % of the final value (common practice). */
export const SETTLING_BAND = 0.02;

export interface MetricMarks {
  seriesIndex: number;
  /** Rise-time band [t10, t90] in x, when both crossings exist. */
  rise: { x1: number; x2: number; label: string } | null;
  /** Settling band ±2 % around the final value, and the settling time line. */
  settling: { y1: number; y2: number; x: number | null; label: string } | null;
  peak: { x: number; y: number; label: string } | null;
}

/** Font size (px) of the metric annotations (plots.css .lw-metric-label). */
export const METRIC_FONT = 10.5;

/** A metric annotation placed by the layout pass: its text box and the text's start and baseline. */
export interface MetricLabel {
  seriesIndex: number;
  kind: "settling" | "peak" | "rise";
  text: string;
  box: Box;
  x: number;
  y: number;
}

/**
 * One drawn channel. `drawing` says what `path` is: "curve" (samples joined, continuous),
 * "stairs" (a held input), "join-and-markers" (a thin guide between consecutive samples, the
 * data in `markers`) or "markers" (path empty, markers only). `markers` is the marker path and
 * the number of markers drawn (samples in view), null for curves and stairs.
 */
export interface ResponsePath {
  seriesIndex: number;
  channel: number;
  path: string;
  style: SeriesStyle;
  dash: string;
  drawing: "curve" | "stairs" | "join-and-markers" | "markers";
  markers: { path: string; count: number } | null;
}

export interface ResponsePanel {
  y: ScaleLinear<number, number>;
  axis: AxisModel;
  top: number;
  height: number;
  paths: ResponsePath[];
}

export interface ResponseModel {
  x: ScaleLinear<number, number>;
  xAxis: AxisModel;
  left: number;
  width: number;
  outputs: ResponsePanel;
  control: ResponsePanel | null;
  /** labelY keeps the label inside the panel: beside its line, on the side with room. */
  limits: { y: number; labelY: number; value: number; kind: "lower" | "upper"; seriesIndex: number }[];
  metrics: MetricMarks[];
  /** Metric annotations laid out inside the outputs panel without overlapping each other. */
  labels: MetricLabel[];
  styles: SeriesStyle[];
}

export interface ResponseModelInput {
  series: readonly ResponseSeries[];
  width: number;
  top: number;
  height: number;
  left: number;
  right: number;
  gap: number;
  timeView?: Domain;
}

/**
 * First time the response reaches `level` (linear interpolation between samples), scanning
 * from the start; null if it never does. Works for rising and falling responses.
 */
export function firstCrossing(time: readonly number[], values: readonly (number | null)[], level: number): number | null {
  for (let k = 0; k < time.length; k++) {
    const v = values[k];
    if (!isDrawable(v)) continue;
    const prev = k > 0 ? values[k - 1] : null;
    if (v === level) return time[k]!;
    if (k > 0 && isDrawable(prev) && (prev - level) * (v - level) < 0) {
      return time[k - 1]! + ((level - prev) / (v - prev)) * (time[k]! - time[k - 1]!);
    }
  }
  return null;
}

const dashOf = (s: ResponseSeries, style: SeriesStyle) => (s.overlay ? OVERLAY_DASH : style.dash);

export function responseModel(input: ResponseModelInput): ResponseModel {
  const { series, width, top, height, left, right, gap } = input;
  const hasControl = series.some((s) => s.control && s.control.length > 0);
  const plotWidth = width - left - right;
  const tDomain: Domain = input.timeView ?? niceDomain(series.flatMap((s) => s.time), 0, [0]);
  const x = scaleLinear().domain(tDomain).range([left, left + plotWidth]);
  const styles = series.map((s, i) => seriesStyle(s.styleIndex ?? i));
  const outH = hasControl ? (height - gap) * 0.62 : height;
  const ctlH = hasControl ? height - gap - outH : 0;
  const visible = (s: ResponseSeries, vals: readonly (number | null)[]) => vals.filter((_, k) => s.time[k]! >= tDomain[0] && s.time[k]! <= tDomain[1]);

  const bandValues: number[] = [];
  for (const s of series) {
    const ss = s.metrics?.steadyStateValue;
    if (isDrawable(ss)) bandValues.push(ss * (1 + SETTLING_BAND), ss * (1 - SETTLING_BAND));
  }
  const outDomain = niceDomain(series.flatMap((s) => s.output.flatMap((o) => visible(s, o))), 0.05, [0, ...bandValues]);
  const outY = scaleLinear().domain(outDomain).range([top + outH, top]);
  const pathOf = (s: ResponseSeries, vals: readonly (number | null)[], y: ScaleLinear<number, number>) =>
    polylinePath(
      s.time.length,
      (k) => isDrawable(vals[k]) && isDrawable(s.time[k]),
      (k) => toHundredths(x(s.time[k]!)),
      (k) => toHundredths(y(vals[k] as number)),
    );
  // Marker size from the spacing of a series' samples on screen.
  const pxPerSecond = plotWidth / Math.max(tDomain[1] - tDomain[0], Number.MIN_VALUE);
  const channelOf = (s: ResponseSeries, si: number, c: number, vals: readonly (number | null)[], y: ScaleLinear<number, number>, panel: "outputs" | "control"): ResponsePath => {
    const style = styles[si]!;
    const base = { seriesIndex: si, channel: c, style, dash: dashOf(s, style) };
    const drawing = panelDrawing(s, panel);
    if (drawing === "curve") return { ...base, drawing, path: pathOf(s, vals, y), markers: null };
    if (drawing === "stairs") return { ...base, drawing, path: stairsPath(s.time, vals, s.sampled!.period, x, y), markers: null };
    const radius = markerRadius(smallestSpacing(s.time) * pxPerSecond);
    const markers = markersPath(s.time, vals, tDomain, style.marker, radius, x, y);
    return { ...base, drawing, path: drawing === "join-and-markers" ? pathOf(s, vals, y) : "", markers };
  };

  const outputs: ResponsePanel = {
    y: outY, top, height: outH,
    axis: linearTicks(outDomain, [top + outH, top], Math.max(3, Math.round(outH / 45))),
    paths: series.flatMap((s, si) => s.output.map((o, c) => channelOf(s, si, c, o, outY, "outputs"))),
  };

  let control: ResponsePanel | null = null;
  const limits: ResponseModel["limits"] = [];
  if (hasControl) {
    const cTop = top + outH + gap;
    const limitValues: number[] = [];
    for (const s of series) {
      if (isDrawable(s.controlLimits?.lower)) limitValues.push(s.controlLimits!.lower as number);
      if (isDrawable(s.controlLimits?.upper)) limitValues.push(s.controlLimits!.upper as number);
    }
    const cDomain = niceDomain(series.flatMap((s) => (s.control ?? []).flatMap((u) => visible(s, u))), 0.08, [0, ...limitValues]);
    const cY = scaleLinear().domain(cDomain).range([cTop + ctlH, cTop]);
    control = {
      y: cY, top: cTop, height: ctlH,
      axis: linearTicks(cDomain, [cTop + ctlH, cTop], Math.max(3, Math.round(ctlH / 40))),
      paths: series.flatMap((s, si) => (s.control ?? []).map((u, c) => channelOf(s, si, c, u, cY, "control"))),
    };
    // Label text sits 4 px above its line (or 12 px below, to its baseline); a label that would
    // leave the panel goes to the other side of its line.
    const LABEL_HEIGHT = 10;
    const labelY = (y: number, kind: "lower" | "upper"): number => {
      const above = y - 4;
      const below = y + 12;
      const preferAbove = kind === "upper";
      if (preferAbove) return above - LABEL_HEIGHT >= cTop ? above : below;
      return below <= cTop + ctlH ? below : above;
    };
    series.forEach((s, si) => {
      const l = s.controlLimits;
      if (isDrawable(l?.lower)) { const y = cY(l!.lower as number); limits.push({ y, labelY: labelY(y, "lower"), value: l!.lower as number, kind: "lower", seriesIndex: si }); }
      if (isDrawable(l?.upper)) { const y = cY(l!.upper as number); limits.push({ y, labelY: labelY(y, "upper"), value: l!.upper as number, kind: "upper", seriesIndex: si }); }
    });
  }

  const metrics: MetricMarks[] = [];
  series.forEach((s, si) => {
    const m = s.metrics;
    if (!m || s.overlay) return;
    const out = s.output[m.outputIndex ?? 0];
    if (!out) return;
    const ss = m.steadyStateValue;
    let rise: MetricMarks["rise"] = null;
    if (isDrawable(ss) && ss !== 0) {
      // 10 %–90 % rise (common practice), located on the drawn samples.
      const t10 = firstCrossing(s.time, out, 0.1 * ss);
      const t90 = firstCrossing(s.time, out, 0.9 * ss);
      if (t10 !== null && t90 !== null) {
        const tr = isDrawable(m.riseTime) ? m.riseTime : t90 - t10;
        rise = { x1: x(t10), x2: x(t90), label: `rise ${tickLabel(tr)} s` };
      }
    }
    const settling = isDrawable(ss)
      ? {
          y1: outY(ss * (1 + SETTLING_BAND)), y2: outY(ss * (1 - SETTLING_BAND)),
          x: isDrawable(m.settlingTime) ? x(m.settlingTime) : null,
          label: isDrawable(m.settlingTime) ? `settled (±2 %) ${tickLabel(m.settlingTime)} s` : "not settled (±2 %)",
        }
      : null;
    const peak = isDrawable(m.peak) && isDrawable(m.peakTime)
      ? { x: x(m.peakTime), y: outY(m.peak), label: `peak ${tickLabel(m.peak)}${isDrawable(m.overshootPct) ? `, overshoot ${tickLabel(m.overshootPct)} %` : ""}` }
      : null;
    metrics.push({ seriesIndex: si, rise, settling, peak });
  });

  const frame: Box = { x: left, y: top, width: plotWidth, height: outH };
  const curves = series.flatMap((s) => s.output.map((o) => {
    const pts: [number, number][] = [];
    s.time.forEach((t, k) => { const v = o[k]; if (isDrawable(v) && isDrawable(t)) pts.push([x(t), outY(v)]); });
    return pts;
  }));
  return {
    x, xAxis: linearTicks(tDomain, [left, left + plotWidth], Math.max(3, Math.round(plotWidth / 80))),
    left, width: plotWidth, outputs, control, limits, metrics, styles,
    labels: layoutMetricLabels(metrics, frame, curves),
  };
}

/** Peak mark (a small triangle above the peak, drawn by ResponsePlot) as a box around (x, y). */
export function peakMarkBox(x: number, y: number): Box {
  return { x: x - 4, y: y - 13, width: 8, height: 6 };
}

/**
 * Places the metric texts of every series inside the outputs panel: each next to its mark when
 * there is room (settling time right of its line above or below the ±2 % band, peak beside its
 * triangle, rise time at the foot of its band, right of it or inside it), otherwise moved by whole rows (stacked) and kept
 * inside the frame; labels never overlap each other, the peak marks, and avoid the curves when
 * they can.
 */
export function layoutMetricLabels(metrics: readonly MetricMarks[], frame: Box, curves: readonly (readonly (readonly [number, number])[])[] = []): MetricLabel[] {
  const right = frame.x + frame.width, bottom = frame.y + frame.height;
  const requests: (LabelRequest & { seriesIndex: number; kind: MetricLabel["kind"] })[] = [];
  const markBoxes: Box[] = [];
  const lines: (readonly (readonly [number, number])[])[] = [...curves];
  for (const m of metrics) {
    if (m.peak) markBoxes.push(peakMarkBox(m.peak.x, m.peak.y));
    if (m.settling?.x != null) lines.push([[m.settling.x, frame.y], [m.settling.x, bottom]]);
  }
  for (const m of metrics) {
    const add = (kind: MetricLabel["kind"], text: string, candidates: (w: number, h: number) => { x: number; y: number }[]) => {
      const { width, height } = textSize(text, METRIC_FONT);
      requests.push({ seriesIndex: m.seriesIndex, kind, text, width, height, candidates: candidates(width, height) });
    };
    if (m.settling) {
      const s = m.settling;
      const bandTop = Math.min(s.y1, s.y2), bandBottom = Math.max(s.y1, s.y2);
      add("settling", s.label, (w, h) => {
        const sx = s.x ?? right - w - 7;
        return [
          { x: sx + 3, y: bandTop - 2 - h }, { x: sx + 3, y: bandBottom + 2 },
          { x: sx - 3 - w, y: bandBottom + 2 }, { x: sx - 3 - w, y: bandTop - 2 - h },
        ];
      });
    }
    if (m.peak) {
      const p = m.peak;
      add("peak", p.label, (w, h) => [
        { x: p.x + 6, y: p.y - 7 - h }, { x: p.x + 6, y: p.y + 4 },
        { x: p.x - 6 - w, y: p.y + 4 }, { x: p.x - w / 2, y: p.y - 15 - h },
      ]);
    }
    if (m.rise) {
      const r = m.rise;
      add("rise", r.label, (w, h) => [{ x: r.x2 + 3, y: bottom - 3 - h }, { x: r.x1 + 3, y: bottom - 3 - h }, { x: r.x1 - 3 - w, y: bottom - 3 - h }]);
    }
  }
  const boxes = placeLabels(requests, frame, { boxes: markBoxes, lines });
  const out: MetricLabel[] = [];
  requests.forEach((r, i) => {
    const b = boxes[i];
    if (b) out.push({ seriesIndex: r.seriesIndex, kind: r.kind, text: r.text, box: b, x: b.x + 1, y: b.y + METRIC_FONT * 0.9 });
  });
  return out;
}
