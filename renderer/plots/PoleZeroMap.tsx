/**
 * Pole-zero map: × poles, ○ zeros, one colour + tag marker per series, damping and
 * natural-frequency guides (s-plane) or the unit circle with constant-ζ/ωn curves (z-plane).
 * Optional direct manipulation: drag a pole (a pair moves together, a real pole stays real) or
 * focus it and use the arrow keys (Shift: 10 × step).
 */
import { useId, useMemo, useRef, useState } from "react";
import { formatComplex } from "../../shared-engine/format";
import { Axis } from "./Axis";
import { legendFor } from "./legendModel";
import { arrowKeyDelta, constrainPoleTarget, movePole, niceStep } from "./poleDrag";
import { poleZeroDomain, poleZeroModel, type PoleMark, type PoleZeroSeries } from "./poleZeroModel";
import { PlotFrame, frameHeaderHeight } from "./PlotFrame";
import { PoleGlyph, ZeroGlyph } from "./PoleZeroMark";
import { fullPrecision, type Domain, type PlotComplex, type PlotVariant } from "./plotTypes";
import { clientToSvg, useZoomPan } from "./useZoomPan";
import { equalAspect } from "./viewport";
import type { CsvColumn } from "./toCsv";

export interface PoleZeroMapProps {
  series: readonly PoleZeroSeries[];
  /** Sample period (s) of a sampled system; null/absent: continuous time. */
  sampleTime?: number | null;
  title?: string;
  width?: number;
  height?: number;
  variant?: PlotVariant;
  /** Called while a pole is dragged or moved by key, with its constrained new location. */
  onDragPole?: (seriesIndex: number, poleIndex: number, newLocation: PlotComplex) => void;
  /** Called when a pointer drag of a pole ends (the pointer is released). */
  onDragEnd?: () => void;
  /** Arrow-key step in the plane's units; default about 1 % of the visible width. */
  keyboardStep?: number;
  fileName?: string;
}

const MARGINS = { top: 0, right: 16, bottom: 46, left: 58 };

/** ζ and ωn of a continuous pole (ζ = −Re/|s|); text for the read-out. */
export function describePole(p: PlotComplex, sampleTime: number | null | undefined): string {
  if (typeof sampleTime === "number" && sampleTime > 0) {
    return `${formatComplex(p, 17)} (|z| ${fullPrecision(Math.hypot(p.re, p.im))})`;
  }
  const wn = Math.hypot(p.re, p.im);
  const zeta = wn > 0 ? -p.re / wn : 1;
  return `${formatComplex(p, 17)} (ζ ${fullPrecision(zeta)}, ωn ${fullPrecision(wn)} rad/s)`;
}

/** CSV columns: per series, real and imaginary parts of poles, then of zeros. */
export function poleZeroCsv(series: readonly PoleZeroSeries[]): CsvColumn[] {
  return series.flatMap((s) => [
    { quantity: `${s.name} pole real part`, unit: "1/s", values: s.poles.map((p) => p.re) },
    { quantity: `${s.name} pole imaginary part`, unit: "1/s", values: s.poles.map((p) => p.im) },
    { quantity: `${s.name} zero real part`, unit: "1/s", values: (s.zeros ?? []).map((p) => p.re) },
    { quantity: `${s.name} zero imaginary part`, unit: "1/s", values: (s.zeros ?? []).map((p) => p.im) },
  ]);
}

export function PoleZeroMap(props: PoleZeroMapProps) {
  const { series, sampleTime, title = "Pole-zero map", width = 560, height = 460, variant = "screen", onDragPole, onDragEnd, keyboardStep, fileName = "pole-zero-map" } = props;
  const svgRef = useRef<SVGSVGElement>(null);
  const screen = variant === "screen";
  const [preview, setPreview] = useState<{ seriesIndex: number; poles: PlotComplex[] } | null>(null);
  const [active, setActive] = useState<PoleMark | null>(null);
  const dragging = useRef<{ seriesIndex: number; index: number; pointerId: number } | null>(null);
  // New series from the parent replace the local drag preview. Reset during render (not in an
  // effect): an effect would cost a second render and commit on every drag move.
  const [previewOf, setPreviewOf] = useState(series);
  if (previewOf !== series) {
    setPreviewOf(series);
    if (preview !== null) setPreview(null);
  }

  const legend = legendFor(series).map((e, i) => ({ ...e, glyph: "pole" as const, tagged: i > 0 }));
  const top = frameHeaderHeight(legend, width) + 4;
  const margins = { ...MARGINS, top };
  const plotW = width - margins.left - margins.right;
  const plotH = height - margins.top - margins.bottom;
  const sampled = typeof sampleTime === "number" && sampleTime > 0;
  // While a pole is dragged the view stays where it was: refitting under the pointer would move
  // the plane away from the hand.
  const [frozen, setFrozen] = useState<{ x: Domain; y: Domain } | null>(null);
  const fitted = useMemo(() => {
    const d = poleZeroDomain(series, sampled);
    return equalAspect(d.x, d.y, plotW, plotH);
  }, [series, sampled, plotW, plotH]);
  const base = frozen ?? fitted;
  const zoom = useZoomPan(
    { kind: "linear", base: base.x, range: [margins.left, margins.left + plotW] },
    { kind: "linear", base: base.y, range: [margins.top + plotH, margins.top] },
    { enabled: screen, svgRef },
  );
  const shown = preview ? series.map((s, i) => (i === preview.seriesIndex ? { ...s, poles: preview.poles } : s)) : series;
  const model = poleZeroModel({ series: shown, sampleTime, width, height, margins, view: { x: zoom.x, y: zoom.y }, draggable: screen && !!onDragPole });
  const step = keyboardStep ?? niceStep(zoom.x[1] - zoom.x[0]);

  const move = (seriesIndex: number, index: number, target: PlotComplex) => {
    const poles = (preview?.seriesIndex === seriesIndex ? preview.poles : series[seriesIndex]!.poles) as PlotComplex[];
    const at = constrainPoleTarget(poles, index, target);
    setPreview({ seriesIndex, poles: movePole(poles, index, at) });
    setActive({ ...model.series[seriesIndex]!.poles.find((p) => p.index === index)!, re: at.re, im: at.im });
    onDragPole?.(seriesIndex, index, at);
  };
  const onHandleDown = (e: React.PointerEvent, p: PoleMark) => {
    e.stopPropagation();
    dragging.current = { seriesIndex: p.seriesIndex, index: p.index, pointerId: e.pointerId };
    setFrozen(base);
    (e.currentTarget as Element).setPointerCapture?.(e.pointerId);
  };
  const onHandleMove = (e: React.PointerEvent) => {
    const d = dragging.current;
    if (!d || d.pointerId !== e.pointerId || !svgRef.current) return;
    e.stopPropagation();
    const pt = clientToSvg(svgRef.current, e.clientX, e.clientY);
    move(d.seriesIndex, d.index, { re: model.x.invert(pt.x), im: model.y.invert(pt.y) });
  };
  const onHandleUp = (e: React.PointerEvent) => {
    if (dragging.current?.pointerId === e.pointerId) { dragging.current = null; setFrozen(null); e.stopPropagation(); onDragEnd?.(); }
  };
  const onHandleKey = (e: React.KeyboardEvent, p: PoleMark) => {
    const delta = arrowKeyDelta(e.key, step, e.shiftKey);
    if (!delta) return;
    e.preventDefault();
    e.stopPropagation();
    move(p.seriesIndex, p.index, { re: p.re + delta.re, im: p.im + delta.im });
  };

  const { plot } = model;
  const clipId = `lw-pz-clip-${useId().replace(/[^A-Za-z0-9]/g, "")}`;
  return (
    <PlotFrame
      title={title}
      width={width}
      height={height}
      legend={legend}
      variant={variant}
      description={`${sampled ? "z-plane" : "s-plane"} with ${series.length} series; crosses are poles, circles are zeros.`}
      zoomed={zoom.zoomed}
      onReset={zoom.reset}
      csv={() => poleZeroCsv(series)}
      fileName={fileName}
      svgRef={svgRef}
      svgProps={screen ? zoom.handlers : undefined}
      footer={
        <p className="lw-readout num" aria-live="polite">
          {active ? `${series[active.seriesIndex]?.name ?? ""} pole: ${describePole(active, sampleTime)}` : onDragPole ? "Drag a pole, or focus it (Tab) and use the arrow keys; Shift moves 10 × farther." : " "}
        </p>
      }
    >
      <defs>
        <clipPath id={clipId}>
          <rect x={plot.left} y={plot.top} width={plot.width} height={plot.height} />
        </clipPath>
      </defs>
      <Axis model={model.xAxis} orientation="bottom" offset={plot.top + plot.height} gridLength={0} title={sampled ? "Real part of z" : "Real part (1/s)"} />
      <Axis model={model.yAxis} orientation="left" offset={plot.left} gridLength={0} title={sampled ? "Imaginary part of z" : "Imaginary part (rad/s)"} />
      <g clipPath={`url(#${clipId})`}>
        <line className="lw-zero-line" x1={plot.left} x2={plot.left + plot.width} y1={model.y(0)} y2={model.y(0)} />
        <line className="lw-zero-line" y1={plot.top} y2={plot.top + plot.height} x1={model.x(0)} x2={model.x(0)} />
        {model.guides.map((g) => (
          <g key={`${g.kind}${g.value}`} className={`lw-guide lw-guide-${g.kind}`}>
            <path d={g.path} />
            {g.label && <text x={g.labelX} y={g.labelY} className="lw-guide-label">{g.label}</text>}
          </g>
        ))}
        {model.series.map((s, si) => (
          <g key={si} className="lw-series">
            {s.zeros.map((z) => <ZeroGlyph key={`z${z.index}`} x={z.x} y={z.y} style={s.style} tagged={si > 0} />)}
            {s.poles.map((p) => <PoleGlyph key={`p${p.index}`} x={p.x} y={p.y} style={s.style} tagged={si > 0} />)}
            {s.poles.filter((p) => p.draggable).map((p) => (
              <circle
                key={`h${p.index}`}
                className="lw-pole-handle"
                cx={p.x}
                cy={p.y}
                r={9}
                tabIndex={0}
                role="button"
                aria-label={`${s.name} pole ${p.index + 1} at ${formatComplex(p, 6)}; arrow keys move it`}
                data-export="omit"
                onPointerDown={(e) => onHandleDown(e, p)}
                onPointerMove={onHandleMove}
                onPointerUp={onHandleUp}
                onKeyDown={(e) => onHandleKey(e, p)}
                onFocus={() => setActive(p)}
                onPointerEnter={() => setActive(p)}
              />
            ))}
          </g>
        ))}
      </g>
    </PlotFrame>
  );
}
