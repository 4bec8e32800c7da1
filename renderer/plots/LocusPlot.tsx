/**
 * The drawing shared by RootLocusPlot and ParameterLocusPlot: branches, open-loop × and ○,
 * dashed asymptotes, boundary crossings with their parameter value, hover read-out of the
 * nearest locus point, click to pick its parameter value, zoom and pan.
 */
import { useId, useMemo, useRef, useState } from "react";
import { formatComplex, formatReal } from "../../shared-engine/format";
import { Axis } from "./Axis";
import type { LegendEntry } from "./legendModel";
import { locusDomain, locusModel, nearestLocusPoint, type LocusData, type NearestLocusPoint } from "./locusModel";
import { crossPath, markerPath, seriesStyle } from "./palette";
import { PlotFrame, frameHeaderHeight } from "./PlotFrame";
import { fullPrecision, type PlotVariant } from "./plotTypes";
import type { CsvColumn } from "./toCsv";
import { clientToSvg, useZoomPan } from "./useZoomPan";
import { equalAspect } from "./viewport";

export interface LocusPlotProps {
  data: LocusData;
  /** "Gain k" or the parameter's name; `symbol` prefixes crossing labels ("k = 2.5"). */
  parameterName: string;
  parameterUnit: string;
  symbol: string;
  sampleTime?: number | null;
  title: string;
  width: number;
  height: number;
  variant: PlotVariant;
  fileName: string;
  onPick?: (value: number) => void;
  /** Draw the poles at this parameter value (the current design), nearest computed point. */
  markedValue?: number | null;
  /** Mark where each branch starts and ends (parameter loci). */
  showEnds?: boolean;
}

const MARGINS = { top: 0, right: 16, bottom: 46, left: 58 };

/** CSV: the parameter, then real and imaginary parts of each branch. */
export function locusCsv(data: LocusData, parameterName: string, parameterUnit: string): CsvColumn[] {
  return [
    { quantity: parameterName, unit: parameterUnit, values: [...data.parameter] },
    ...data.branches.flatMap((b, i) => [
      { quantity: `branch ${i + 1} real part`, unit: "1/s", values: b.map((p) => p.re) },
      { quantity: `branch ${i + 1} imaginary part`, unit: "1/s", values: b.map((p) => p.im) },
    ]),
  ];
}

/** Index of the parameter value nearest to v. */
function nearestIndex(values: readonly number[], v: number): number {
  let best = -1;
  values.forEach((p, k) => { if (best < 0 || Math.abs(p - v) < Math.abs(values[best]! - v)) best = k; });
  return best;
}

export function LocusPlot(props: LocusPlotProps) {
  const { data, parameterName, parameterUnit, symbol, sampleTime, title, width, height, variant, fileName, onPick, markedValue, showEnds } = props;
  const svgRef = useRef<SVGSVGElement>(null);
  const screen = variant === "screen";
  const [hover, setHover] = useState<NearestLocusPoint | null>(null);
  // A click that ends a pan is not a pick.
  const downAt = useRef<{ x: number; y: number } | null>(null);
  const style = seriesStyle(0);
  const legend: LegendEntry[] = [
    { label: "branches", style },
    ...(showEnds && data.parameter.length ? [
      { label: `start (${symbol} = ${formatReal(data.parameter[0]!)})`, style: { ...seriesStyle(1), dash: "", marker: "square" as const } },
      { label: `end (${symbol} = ${formatReal(data.parameter[data.parameter.length - 1]!)})`, style: { ...seriesStyle(2), dash: "", marker: "triangle" as const } },
    ] : []),
  ];
  const top = frameHeaderHeight(legend, width) + 4;
  const margins = { ...MARGINS, top };
  const plotW = width - margins.left - margins.right, plotH = height - top - margins.bottom;
  const sampled = typeof sampleTime === "number" && sampleTime > 0;
  const base = useMemo(() => { const d = locusDomain(data, sampled); return equalAspect(d.x, d.y, plotW, plotH); }, [data, sampled, plotW, plotH]);
  const zoom = useZoomPan({ kind: "linear", base: base.x, range: [margins.left, margins.left + plotW] }, { kind: "linear", base: base.y, range: [top + plotH, top] }, { enabled: screen, svgRef });
  const model = locusModel({ data, sampleTime, width, height, margins, view: { x: zoom.x, y: zoom.y }, parameterSymbol: symbol });
  const clip = `lw-locus-${useId().replace(/[^A-Za-z0-9]/g, "")}`;
  const { plot } = model;
  const marked = typeof markedValue === "number" ? nearestIndex(data.parameter, markedValue) : -1;
  const toData = (e: React.PointerEvent<SVGSVGElement> | React.MouseEvent<SVGSVGElement>) => {
    const p = clientToSvg(e.currentTarget, e.clientX, e.clientY);
    return { re: model.x.invert(p.x), im: model.y.invert(p.y) };
  };
  return (
    <PlotFrame
      title={title}
      width={width}
      height={height}
      legend={legend}
      variant={variant}
      description={`${data.branches.length} branches of the closed-loop poles as ${parameterName} varies; crosses are open-loop poles, circles open-loop zeros.`}
      zoomed={zoom.zoomed}
      onReset={zoom.reset}
      csv={() => locusCsv(data, parameterName, parameterUnit)}
      fileName={fileName}
      svgRef={svgRef}
      svgProps={screen ? {
        ...zoom.handlers,
        onPointerDown: (e) => { downAt.current = { x: e.clientX, y: e.clientY }; zoom.handlers.onPointerDown(e); },
        onPointerMove: (e) => { zoom.handlers.onPointerMove(e); setHover(nearestLocusPoint(data, toData(e))); },
        onPointerLeave: () => setHover(null),
        onClick: (e) => {
          const d = downAt.current;
          if (d && Math.hypot(e.clientX - d.x, e.clientY - d.y) > 3) return;
          const n = nearestLocusPoint(data, toData(e)); if (n && onPick) onPick(n.value); },
      } : undefined}
      footer={
        <p className="lw-readout num" aria-live="polite">
          {hover ? `${parameterName} ${fullPrecision(hover.value)}${parameterUnit ? ` ${parameterUnit}` : ""} at ${formatComplex(hover.point, 17)} (branch ${hover.branch + 1})${onPick ? "; click to use this value" : ""}` : "Point at a branch to read its value; wheel zooms, drag pans, double-click resets."}
        </p>
      }
    >
      <defs><clipPath id={clip}><rect x={plot.left} y={plot.top} width={plot.width} height={plot.height} /></clipPath></defs>
      <Axis model={model.xAxis} orientation="bottom" offset={plot.top + plot.height} gridLength={plot.height} title={sampled ? "Real part of z" : "Real part (1/s)"} />
      <Axis model={model.yAxis} orientation="left" offset={plot.left} gridLength={plot.width} title={sampled ? "Imaginary part of z" : "Imaginary part (rad/s)"} />
      <g clipPath={`url(#${clip})`}>
        <line className="lw-zero-line" x1={plot.left} x2={plot.left + plot.width} y1={model.y(0)} y2={model.y(0)} />
        <line className="lw-zero-line" y1={plot.top} y2={plot.top + plot.height} x1={model.x(0)} x2={model.x(0)} />
        {model.unitCircle && <path className="lw-guide lw-guide-unit" d={model.unitCircle} fill="none" />}
        {model.asymptotes.map((a, i) => <line key={i} className="lw-asymptote" x1={a.x1} y1={a.y1} x2={a.x2} y2={a.y2} />)}
        {model.branchPaths.map((d, i) => <path key={i} className="lw-series-line" d={d} stroke={style.color} fill="none" />)}
        {showEnds && data.branches.map((b, i) => {
          const s = b[0], e = b[b.length - 1];
          return (
            <g key={`e${i}`}>
              {s && <path d={markerPath("square", 3)} transform={`translate(${model.x(s.re)},${model.y(s.im)})`} fill={seriesStyle(1).color} />}
              {e && <path d={markerPath("triangle", 3.5)} transform={`translate(${model.x(e.re)},${model.y(e.im)})`} fill={seriesStyle(2).color} />}
            </g>
          );
        })}
        {model.zeros.map((z, i) => <circle key={`z${i}`} className="lw-mark-stroke" cx={z.x} cy={z.y} r={5} fill="none" stroke="currentColor" />)}
        {model.poles.map((p, i) => <path key={`p${i}`} className="lw-mark-stroke" d={crossPath(5)} transform={`translate(${p.x},${p.y})`} stroke="currentColor" fill="none" />)}
        {marked >= 0 && data.branches.map((b, i) => {
          const p = b[marked];
          return p && Number.isFinite(p.re) && Number.isFinite(p.im) ? <path key={`m${i}`} className="lw-current-pole" d={markerPath("diamond", 4.5)} transform={`translate(${model.x(p.re)},${model.y(p.im)})`} fill={style.color} /> : null;
        })}
        {model.crossings.map((c, i) => (
          <g key={`c${i}`} className="lw-crossing" transform={`translate(${c.x},${c.y})`}>
            <circle r={3.5} />
            <text x={6} y={c.y < plot.top + 14 ? 12 : -6}>{c.label}</text>
          </g>
        ))}
        {screen && hover && (
          <circle className="lw-hover-point" data-export="omit" cx={model.x(hover.point.re)} cy={model.y(hover.point.im)} r={6} fill="none" />
        )}
      </g>
    </PlotFrame>
  );
}
