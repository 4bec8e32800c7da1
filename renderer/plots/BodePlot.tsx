/**
 * Bode plot: magnitude (dB) over phase (deg) on one logarithmic frequency axis (rad/s), gaps where
 * the response is unbounded, gain and phase margins marked at their crossovers (labels laid out
 * by bodeModel's layoutMarginLabels, clear of each other inside their panel), a hover read-out
 * with every digit. Zoom and pan act on frequency; both panels follow.
 */
import { useId, useRef, useState } from "react";
import { Axis } from "./Axis";
import { bodeModel, bodeReadout, type BodeSeries } from "./bodeModel";
import { legendFor } from "./legendModel";
import { PlotFrame, frameHeaderHeight } from "./PlotFrame";
import { decadeDomain } from "./axisModel";
import type { PlotVariant } from "./plotTypes";
import type { CsvColumn } from "./toCsv";
import { clientToSvg, useZoomPan } from "./useZoomPan";

export interface BodePlotProps {
  series: readonly BodeSeries[];
  title?: string;
  width?: number;
  height?: number;
  variant?: PlotVariant;
  fileName?: string;
}

const LEFT = 62;
const RIGHT = 16;
const GAP = 18;
const BOTTOM = 46;

/** CSV columns: per series frequency, magnitude and phase (nulls become empty cells). */
export function bodeCsv(series: readonly BodeSeries[]): CsvColumn[] {
  return series.flatMap((s) => [
    { quantity: `${s.name} frequency`, unit: "rad/s", values: [...s.frequency] },
    { quantity: `${s.name} magnitude`, unit: "dB", values: [...s.magnitudeDb] },
    { quantity: `${s.name} phase`, unit: "deg", values: [...s.phaseDeg] },
  ]);
}

export function BodePlot({ series, title = "Bode plot", width = 640, height = 520, variant = "screen", fileName = "bode-plot" }: BodePlotProps) {
  const svgRef = useRef<SVGSVGElement>(null);
  const screen = variant === "screen";
  const [hover, setHover] = useState<number | null>(null);
  const legend = legendFor(series);
  const top = frameHeaderHeight(legend, width) + 6;
  const panelHeight = Math.max(60, (height - top - GAP - BOTTOM) / 2);
  const base = decadeDomain(series.flatMap((s) => s.frequency));
  const zoom = useZoomPan(
    { kind: "log", base, range: [LEFT, width - RIGHT] },
    { kind: "linear", base: [0, 1], range: [top + 2 * panelHeight + GAP, top] },
    { lockY: true, enabled: screen, svgRef },
  );
  const model = bodeModel({ series, width, top, panelHeight, gap: GAP, left: LEFT, right: RIGHT, frequencyView: zoom.x });
  const clip = `lw-bode-${useId().replace(/[^A-Za-z0-9]/g, "")}`;
  const right = LEFT + model.width;
  const readout = hover === null ? [] : bodeReadout(series, hover);
  const onMove = (e: React.PointerEvent<SVGSVGElement>) => {
    zoom.handlers.onPointerMove(e);
    const p = clientToSvg(e.currentTarget, e.clientX, e.clientY);
    setHover(p.x >= LEFT && p.x <= right ? model.x.invert(p.x) : null);
  };
  const panels = [
    { key: "magnitude" as const, panel: model.magnitude, title: "Magnitude (dB)", ref: model.zeroDbY },
    { key: "phase" as const, panel: model.phase, title: "Phase (deg)", ref: model.phaseReferenceY },
  ];
  return (
    <PlotFrame
      title={title}
      width={width}
      height={height}
      legend={legend}
      variant={variant}
      description={`Magnitude and phase against frequency for ${series.length} series, with gain and phase margins marked.`}
      zoomed={zoom.zoomed}
      onReset={zoom.reset}
      csv={() => bodeCsv(series)}
      fileName={fileName}
      svgRef={svgRef}
      svgProps={screen ? { ...zoom.handlers, onPointerMove: onMove, onPointerLeave: () => setHover(null) } : undefined}
      footer={
        <table className="lw-readout-table num" aria-live="polite">
          <tbody>
            {readout.length === 0 ? (
              <tr><td className="hint">Point at the plot to read values; wheel zooms frequency, drag pans, double-click resets.</td></tr>
            ) : (
              readout.map((r) => (
                <tr key={r.name}>
                  <th scope="row">{r.name}</th>
                  <td>ω {r.frequency} rad/s</td>
                  <td>|G| {r.magnitudeDb} dB</td>
                  <td>∠G {r.phaseDeg}°</td>
                </tr>
              ))
            )}
          </tbody>
        </table>
      }
    >
      {panels.map(({ key, panel, title: axisTitle, ref }) => (
        <g key={key} className={`lw-panel lw-panel-${key}`}>
          <defs>
            <clipPath id={`${clip}-${key}`}>
              <rect x={LEFT} y={panel.top} width={model.width} height={panel.height} />
            </clipPath>
          </defs>
          <Axis model={model.xAxis} orientation="bottom" offset={panel.top + panel.height} gridLength={panel.height} hideLabels={key === "magnitude"} title={key === "phase" ? "Frequency (rad/s)" : ""} />
          <Axis model={panel.axis} orientation="left" offset={LEFT} gridLength={model.width} title={axisTitle} />
          <g clipPath={`url(#${clip}-${key})`}>
            {ref !== null && <line className="lw-reference-line" x1={LEFT} x2={right} y1={ref} y2={ref} />}
            {model.series.map((s, i) => (
              <path key={i} className="lw-series-line" d={key === "magnitude" ? s.magnitudePath : s.phasePath} stroke={s.style.color} strokeDasharray={s.style.dash || undefined} fill="none" />
            ))}
            {model.marks.filter((m) => m.panel === key).map((m, i) => (
              <g key={i} className={`lw-margin lw-margin-${m.kind}`}>
                <line className="lw-crossover-line" x1={m.x} x2={m.x} y1={panel.top} y2={panel.top + panel.height} stroke={model.series[m.seriesIndex]!.style.color} />
                <line className="lw-margin-bar" x1={m.x} x2={m.x} y1={m.y1} y2={m.y2} stroke={model.series[m.seriesIndex]!.style.color} />
              </g>
            ))}
            {/* Labels after every mark, so no later crossover line is drawn over a label; placed clear of each other by bodeModel. */}
            {model.labels.filter((l) => l.panel === key).map((l) => (
              <text key={`l${l.markIndex}`} className={`lw-margin-label lw-margin-label-${model.marks[l.markIndex]!.kind}`} x={l.x} y={l.y} data-series={l.seriesIndex}>{l.text}</text>
            ))}
            {screen && hover !== null && (
              <line className="lw-hover-line" data-export="omit" x1={model.x(hover)} x2={model.x(hover)} y1={panel.top} y2={panel.top + panel.height} />
            )}
          </g>
        </g>
      ))}
    </PlotFrame>
  );
}
