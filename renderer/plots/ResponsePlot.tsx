/**
 * Time responses (step, disturbance, initial condition): outputs on top, the control input below
 * with its limits dashed, step metrics marked; overlays (e.g. a nonlinear simulation) dashed over
 * the linear prediction. Zoom and pan act on time; both panels follow.
 */
import { useId, useRef, useState } from "react";
import { Axis } from "./Axis";
import { niceDomain } from "./axisModel";
import { legendFor } from "./legendModel";
import { PlotFrame, frameHeaderHeight } from "./PlotFrame";
import { fullPrecision, type PlotVariant } from "./plotTypes";
import { OVERLAY_DASH, responseModel, type ResponseSeries } from "./responseModel";
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

/** CSV columns: per series time, each output and each control input. */
export function responseCsv(series: readonly ResponseSeries[]): CsvColumn[] {
  return series.flatMap((s) => [
    { quantity: `${s.name} time`, unit: "s", values: [...s.time] },
    ...s.output.map((o, i) => ({ quantity: `${s.name} ${s.outputNames?.[i] ?? `output ${i + 1}`}`, unit: "", values: [...o] })),
    ...(s.control ?? []).map((u, j) => ({ quantity: `${s.name} ${s.controlNames?.[j] ?? `control input ${j + 1}`}`, unit: "", values: [...u] })),
  ]);
}

/** Read-out at time t: nearest sample of each series, every value in full precision. */
export function responseReadout(series: readonly ResponseSeries[], t: number): { name: string; time: string; values: string[] }[] {
  return series.flatMap((s) => {
    if (s.time.length === 0) return [];
    let best = 0;
    for (let k = 1; k < s.time.length; k++) if (Math.abs(s.time[k]! - t) < Math.abs(s.time[best]! - t)) best = k;
    return [{
      name: s.name,
      time: fullPrecision(s.time[best]),
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
  const legend = legendFor(series).map((e, i) => ({ ...e, dash: series[i]!.overlay ? OVERLAY_DASH : undefined }));
  const top = frameHeaderHeight(legend, width) + 6;
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
      description={`Outputs${model.control ? " and control input" : ""} against time for ${series.length} series.`}
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
              <tr key={r.name}><th scope="row">{r.name}</th><td>t {r.time} s</td><td>{r.values.join("   ")}</td></tr>
            ))}
          </tbody>
        </table>
      }
    >
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
              <path key={i} className="lw-series-line" d={p.path} stroke={p.style.color} strokeDasharray={p.dash || undefined} fill="none" />
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
