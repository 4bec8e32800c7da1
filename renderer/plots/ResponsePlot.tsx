/**
 * Time responses (step, disturbance, initial condition): outputs on top, the control input below
 * with its limits dashed, step metrics marked; overlays (e.g. a nonlinear simulation) dashed over
 * the linear prediction. Zoom and pan act on time; both panels follow. Sampled series (a discrete
 * model or a held controller input) are drawn by sampledDrawing.ts's rule: inputs as stairs,
 * outputs as markers at the sample instants, markers only when the data skip samples (a caption
 * under the legend says which, beside the series' marker); read-outs and CSV give the sample
 * values themselves, never interpolated ones.
 */
import { useId, useRef, useState } from "react";
import { Axis } from "./Axis";
import { niceDomain } from "./axisModel";
import { textSize } from "./labelPlacement";
import { legendFor } from "./legendModel";
import { PlotFrame, frameHeaderHeight } from "./PlotFrame";
import { fullPrecision, type PlotVariant } from "./plotTypes";
import { OVERLAY_DASH, responseModel, type ResponseSeries } from "./responseModel";
import { markerAt, readoutIndex, sampledCaption, sampledMode } from "./sampledDrawing";
import type { CsvColumn } from "./toCsv";
import { clientToSvg, useZoomPan } from "./useZoomPan";

export interface ResponsePlotProps {
  series: readonly ResponseSeries[];
  title?: string;
  /** Quantity and unit of the outputs panel's axis, e.g. "Output" / "m". */
  outputLabel?: string;
  controlLabel?: string;
  width?: number;
  height?: number;
  variant?: PlotVariant;
  fileName?: string;
}

const LEFT = 62, RIGHT = 16, GAP = 26, BOTTOM = 46;
/** Height of one caption row under the legend (one per sampled series). */
const CAPTION_ROW = 15;
/** Font size of the captions (plots.css .lw-sampled-caption). */
const CAPTION_FONT = 10.5;

/** Greedy word wrap to lines no wider than `maxWidth` by labelPlacement's text estimate (a longer word stays whole). */
export function wrapWords(text: string, maxWidth: number, fontSize: number): string[] {
  const lines: string[] = [];
  let line = "";
  for (const word of text.split(" ")) {
    const next = line ? `${line} ${word}` : word;
    if (line && textSize(next, fontSize).width > maxWidth) {
      lines.push(line);
      line = word;
    } else line = next;
  }
  if (line) lines.push(line);
  return lines;
}

/**
 * One caption per sampled series (sampledDrawing.ts sampledCaption): what its period is and how
 * it is drawn, printed beside its marker under the legend so exported and printed figures say it.
 * Overlays repeat the caption of their series only when it differs.
 */
export function sampledCaptions(series: readonly ResponseSeries[]): { seriesIndex: number; name: string; text: string }[] {
  const out: { seriesIndex: number; name: string; text: string }[] = [];
  series.forEach((s, i) => {
    const text = sampledCaption(s);
    if (text && !out.some((c) => c.text === text && (series[c.seriesIndex]!.styleIndex ?? c.seriesIndex) === (s.styleIndex ?? i))) out.push({ seriesIndex: i, name: s.name, text });
  });
  return out;
}

/**
 * CSV columns: per series time, each output and each control input, one row per listed sample
 * (a sampled series' time column is headed "sample time": its rows are the sample values, not
 * points of the drawn staircase).
 */
export function responseCsv(series: readonly ResponseSeries[]): CsvColumn[] {
  return series.flatMap((s) => [
    { quantity: `${s.name} ${sampledMode(s) === "curve" ? "time" : "sample time"}`, unit: "s", values: [...s.time] },
    ...s.output.map((o, i) => ({ quantity: `${s.name} ${s.outputNames?.[i] ?? `output ${i + 1}`}`, unit: "", values: [...o] })),
    ...(s.control ?? []).map((u, j) => ({ quantity: `${s.name} ${s.controlNames?.[j] ?? `control input ${j + 1}`}`, unit: "", values: [...u] })),
  ]);
}

/**
 * Read-out at time t, every value in full precision and never interpolated: for a continuous
 * series or one drawn as markers, the nearest sample; for a sampled series listing every sample
 * (drawn as stairs), the sample whose hold interval [t_k, t_{k+1}) contains t, i.e. the value
 * the staircase shows there. `sample` is k = t_k / T for a sampled series.
 */
export function responseReadout(series: readonly ResponseSeries[], t: number): { name: string; time: string; sample?: number; values: string[] }[] {
  return series.flatMap((s) => {
    const mode = sampledMode(s);
    const best = readoutIndex(s.time, t, mode === "stairs");
    if (best < 0) return [];
    return [{
      name: s.name,
      time: fullPrecision(s.time[best]),
      ...(mode === "curve" ? {} : { sample: Math.round(s.time[best]! / s.sampled!.period) }),
      values: [
        ...s.output.map((o, i) => `${s.outputNames?.[i] ?? `y${i + 1}`} ${fullPrecision(o[best])}`),
        ...(s.control ?? []).map((u, j) => `${s.controlNames?.[j] ?? `u${j + 1}`} ${fullPrecision(u[best])}`),
      ],
    }];
  });
}

export function ResponsePlot(props: ResponsePlotProps) {
  const { series, title = "Time response", outputLabel = "Output", controlLabel = "Control input", width = 640, height = 500, variant = "screen", fileName = "time-response" } = props;
  const svgRef = useRef<SVGSVGElement>(null);
  const screen = variant === "screen";
  const [hover, setHover] = useState<number | null>(null);
  // A series drawn as markers only shows its marker alone in the legend.
  const legend = legendFor(series).map((e, i) => ({ ...e, dash: series[i]!.overlay ? OVERLAY_DASH : undefined, ...(sampledMode(series[i]!) === "markers" && series[i]!.sampled?.outputs !== "continuous" ? { glyph: "markers" as const } : {}) }));
  const captions = sampledCaptions(series);
  // Caption lines wrapped to the figure's width (text starts 44 units in, like legend labels).
  const captionLines = captions.map((c) => wrapWords(c.text, width - 44 - 8, CAPTION_FONT));
  const captionTop = frameHeaderHeight(legend, width);
  const rowsBefore = captionLines.map((_, i) => captionLines.slice(0, i).reduce((n, l) => n + l.length, 0));
  const top = captionTop + captionLines.reduce((n, l) => n + l.length, 0) * CAPTION_ROW + 6;
  const base = niceDomain(series.flatMap((s) => s.time), 0, [0]);
  const zoom = useZoomPan({ kind: "linear", base, range: [LEFT, width - RIGHT] }, { kind: "linear", base: [0, 1], range: [height - BOTTOM, top] }, { lockY: true, enabled: screen, svgRef });
  const model = responseModel({ series, width, top, height: height - top - BOTTOM, left: LEFT, right: RIGHT, gap: GAP, timeView: zoom.x });
  const clip = `lw-resp-${useId().replace(/[^A-Za-z0-9]/g, "")}`;
  const right = LEFT + model.width;
  const readout = hover === null ? [] : responseReadout(series, hover);
  const panels = [{ key: "outputs", panel: model.outputs, title: outputLabel }, ...(model.control ? [{ key: "control", panel: model.control, title: controlLabel }] : [])];
  const lastKey = panels[panels.length - 1]!.key;
  return (
    <PlotFrame
      title={title}
      width={width}
      height={height}
      legend={legend}
      variant={variant}
      description={`Outputs${model.control ? " and control input" : ""} against time for ${series.length} series.${captions.map((c) => ` ${c.name}: ${c.text}.`).join("")}`}
      zoomed={zoom.zoomed}
      onReset={zoom.reset}
      csv={() => responseCsv(series)}
      fileName={fileName}
      svgRef={svgRef}
      svgProps={screen ? {
        ...zoom.handlers,
        onPointerMove: (e) => {
          zoom.handlers.onPointerMove(e);
          const p = clientToSvg(e.currentTarget, e.clientX, e.clientY);
          setHover(p.x >= LEFT && p.x <= right ? model.x.invert(p.x) : null);
        },
        onPointerLeave: () => setHover(null),
      } : undefined}
      footer={
        <table className="lw-readout-table num" aria-live="polite">
          <tbody>
            {readout.length === 0 ? (
              <tr><td className="hint">Point at the plot to read values; wheel zooms time, drag pans, double-click resets.</td></tr>
            ) : readout.map((r) => (
              <tr key={r.name}><th scope="row">{r.name}</th><td>t {r.time} s{r.sample !== undefined ? ` (sample ${r.sample})` : ""}</td><td>{r.values.join("   ")}</td></tr>
            ))}
          </tbody>
        </table>
      }
    >
      {captions.length > 0 && (
        <g className="lw-sampled-captions">
          {captions.map((c, i) => (
            <g key={i} transform={`translate(12,${captionTop + rowsBefore[i]! * CAPTION_ROW + CAPTION_ROW / 2})`}>
              <path d={markerAt(model.styles[c.seriesIndex]!.marker, 3.5, 13, 0)} fill={model.styles[c.seriesIndex]!.color} stroke={model.styles[c.seriesIndex]!.color} />
              {captionLines[i]!.map((line, j) => (
                <text key={j} className="lw-sampled-caption" x={32} y={j * CAPTION_ROW} dy="0.32em">{line}</text>
              ))}
            </g>
          ))}
        </g>
      )}
      {panels.map(({ key, panel, title: axisTitle }) => (
        <g key={key} className={`lw-panel lw-panel-${key}`}>
          <defs><clipPath id={`${clip}-${key}`}><rect x={LEFT} y={panel.top} width={model.width} height={panel.height} /></clipPath></defs>
          <Axis model={model.xAxis} orientation="bottom" offset={panel.top + panel.height} gridLength={panel.height} hideLabels={key !== lastKey} title={key === lastKey ? "Time (s)" : ""} />
          <Axis model={panel.axis} orientation="left" offset={LEFT} gridLength={model.width} title={axisTitle} />
          <g clipPath={`url(#${clip}-${key})`}>
            {key === "outputs" && model.metrics.map((m) => (
              <g key={`m${m.seriesIndex}`} className="lw-metrics">
                {m.settling && <rect className="lw-settling-band" x={LEFT} width={model.width} y={Math.min(m.settling.y1, m.settling.y2)} height={Math.abs(m.settling.y2 - m.settling.y1)} fill={model.styles[m.seriesIndex]!.color} />}
                {m.rise && <rect className="lw-rise-band" x={m.rise.x1} width={Math.max(1, m.rise.x2 - m.rise.x1)} y={panel.top} height={panel.height} fill={model.styles[m.seriesIndex]!.color} />}
              </g>
            ))}
            {panel.paths.map((p, i) => (
              <g key={i}>
                {p.path && <path className={p.drawing === "join-and-markers" ? "lw-series-line lw-sample-join" : p.drawing === "stairs" ? "lw-series-line lw-series-stairs" : "lw-series-line"} d={p.path} stroke={p.style.color} strokeDasharray={p.dash || undefined} fill="none" />}
                {p.markers && p.markers.count > 0 && <path className="lw-sample-markers" data-count={p.markers.count} d={p.markers.path} fill={p.style.color} stroke={p.style.color} />}
              </g>
            ))}
            {key === "control" && model.limits.map((l, i) => (
              <g key={i} className="lw-limit">
                <line className="lw-limit-line" x1={LEFT} x2={right} y1={l.y} y2={l.y} stroke={model.styles[l.seriesIndex]!.color} />
                <text className="lw-limit-label" x={right - 4} y={l.labelY} textAnchor="end">{`${l.kind} limit ${fullPrecision(l.value)}`}</text>
              </g>
            ))}
            {key === "outputs" && model.metrics.map((m) => (
              <g key={`l${m.seriesIndex}`} className="lw-metric-marks">
                {m.settling?.x != null && <line className="lw-settling-line" x1={m.settling.x} x2={m.settling.x} y1={panel.top} y2={panel.top + panel.height} stroke={model.styles[m.seriesIndex]!.color} />}
                {m.peak && <path className="lw-peak-mark" transform={`translate(${m.peak.x},${m.peak.y})`} d="M0,-7L-4,-13H4Z" fill={model.styles[m.seriesIndex]!.color} />}
              </g>
            ))}
            {key === "outputs" && (
              <g className="lw-metric-labels">
                {model.labels.map((l) => (
                  <text key={`${l.seriesIndex}-${l.kind}`} className={`lw-metric-label lw-metric-${l.kind}`} x={l.x} y={l.y}>{l.text}</text>
                ))}
              </g>
            )}
            {screen && hover !== null && <line className="lw-hover-line" data-export="omit" x1={model.x(hover)} x2={model.x(hover)} y1={panel.top} y2={panel.top + panel.height} />}
          </g>
        </g>
      ))}
    </PlotFrame>
  );
}
