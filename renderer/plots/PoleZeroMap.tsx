/**
 * Pole-zero map: × poles, ○ zeros, one colour + tag marker per series, damping and
 * natural-frequency guides (s-plane) or the unit circle with constant-ζ/ωn curves (z-plane).
 * Optional direct manipulation: drag a pole (a pair moves together, a real pole stays real) or
 * focus it and use the arrow keys (Shift: 10 × step).
 * An explicit `view` window shows part of the plane (the design sheet's zoom panel, see
 * poleWindow.ts); the stability boundary is then marked at the frame edge when it lies outside,
 * and sampled guides are drawn exactly for the window (zoomGuides.ts). `outline` marks such a
 * window on the full map; `caption` prints lines of text under the plot, inside the figure.
 */
import { useId, useMemo, useRef, useState } from "react";
import { formatComplex } from "../../shared-engine/format";
import { Axis } from "./Axis";
import { legendFor } from "./legendModel";
import { arrowKeyDelta, constrainPoleTarget, movePole, niceStep } from "./poleDrag";
import { boxesOverlap, textSize, type Box } from "./labelPlacement";
import { GUIDE_FONT, glyphBox, poleZeroDomain, poleZeroModel, type GuideCurve, type PoleMark, type PoleZeroSeries } from "./poleZeroModel";
import { boundaryInWindow, nearestBoundaryPoint } from "./poleWindow";
import { PlotFrame, frameHeaderHeight } from "./PlotFrame";
import { PoleGlyph, ZeroGlyph } from "./PoleZeroMark";
import { fullPrecision, type Domain, type PlotComplex, type PlotVariant } from "./plotTypes";
import { clientToSvg, useZoomPan } from "./useZoomPan";
import { equalAspect } from "./viewport";
import { sampledWindowGuides } from "./zoomGuides";
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
  /**
   * Explicit view window (data units) instead of the one that holds every pole and zero; widened
   * to equal scales. Zoom and pan (screen) start from it and "Reset view" returns to it.
   */
  view?: { x: Domain; y: Domain } | null;
  /** A window to outline on this map (where a zoom panel looks), with a short label. */
  outline?: { x: Domain; y: Domain; label: string } | null;
  /** Lines printed under the axes inside the figure (kept in exports). */
  caption?: readonly string[];
}

const MARGINS = { top: 0, right: 16, bottom: 46, left: 58 };
/** Height of one caption line (11.5 px text). */
export const CAPTION_LINE = 15;
/** Width of a caption character (11.5 px sans-serif; generous, as the legend's estimate), for wrapping. */
const CAPTION_CHAR = 6.6;

/** Caption lines wrapped at spaces to fit `width` (12 px margins); a word longer than a line stays whole. */
export function wrapCaption(lines: readonly string[], width: number): string[] {
  const max = Math.max(20, Math.floor((width - 24) / CAPTION_CHAR));
  const out: string[] = [];
  for (const line of lines) {
    let current = "";
    for (const word of line.split(" ")) {
      if (current && current.length + 1 + word.length > max) { out.push(current); current = word; } else current = current ? `${current} ${word}` : word;
    }
    out.push(current);
  }
  return out;
}
/** Least size (px) of an outlined window, so a speck of a window still shows as a box. */
const OUTLINE_MIN = 10;

/** The plot area (px) of a PoleZeroMap of this size and series (title and legend above, axes below). */
export function poleZeroPlotArea(series: readonly PoleZeroSeries[], width: number, height: number, caption: readonly string[] = []): { width: number; height: number } {
  const legend = legendFor(series);
  const top = frameHeaderHeight(legend, width) + 4;
  return { width: width - MARGINS.left - MARGINS.right, height: height - top - MARGINS.bottom - wrapCaption(caption, width).length * CAPTION_LINE };
}

/** The view (data units) a PoleZeroMap without `view` shows: every pole and zero, at equal scales. */
export function poleZeroFullView(series: readonly PoleZeroSeries[], sampleTime: number | null | undefined, width: number, height: number): { x: Domain; y: Domain } {
  const area = poleZeroPlotArea(series, width, height);
  const d = poleZeroDomain(series, typeof sampleTime === "number" && sampleTime > 0);
  return equalAspect(d.x, d.y, area.width, area.height);
}

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
  const { series, sampleTime, title = "Pole-zero map", width = 560, height = 460, variant = "screen", onDragPole, onDragEnd, keyboardStep, fileName = "pole-zero-map", view, outline } = props;
  const caption = wrapCaption(props.caption ?? [], width);
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
  const margins = { ...MARGINS, top, bottom: MARGINS.bottom + caption.length * CAPTION_LINE };
  const plotW = width - margins.left - margins.right;
  const plotH = height - margins.top - margins.bottom;
  const sampled = typeof sampleTime === "number" && sampleTime > 0;
  // While a pole is dragged the view stays where it was: refitting under the pointer would move
  // the plane away from the hand.
  const [frozen, setFrozen] = useState<{ x: Domain; y: Domain } | null>(null);
  const viewX0 = view?.x[0], viewX1 = view?.x[1], viewY0 = view?.y[0], viewY1 = view?.y[1];
  const fitted = useMemo(() => {
    const d = viewX0 !== undefined ? { x: [viewX0, viewX1!] as Domain, y: [viewY0!, viewY1!] as Domain } : poleZeroDomain(series, sampled);
    return equalAspect(d.x, d.y, plotW, plotH);
  }, [series, sampled, plotW, plotH, viewX0, viewX1, viewY0, viewY1]);
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
  // In an explicit window the sampled guides are drawn for the window (the full map's chords would show).
  const glyphs = view ? model.series.flatMap((s) => [...s.poles, ...s.zeros].map((p) => glyphBox(p.x, p.y))) : [];
  const guides: GuideCurve[] = view && sampled ? sampledWindowGuides(model.x, model.y, sampleTime as number, glyphs) : model.guides;
  const boundary = view ? boundaryMarker(model, sampled, glyphs) : null;
  const outlineBox = outline ? outlineRect(model, outline) : null;
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
        {guides.map((g) => (
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
        {outlineBox && (
          <g className="lw-zoom-outline" data-testid="zoom-outline">
            <rect x={outlineBox.x} y={outlineBox.y} width={outlineBox.width} height={outlineBox.height} fill="none" style={{ stroke: "var(--plot-text)", strokeWidth: 1.2 }} strokeDasharray="4 2" />
            <text x={outlineBox.labelX} y={outlineBox.labelY} textAnchor={outlineBox.anchor} className="lw-guide-label">{outlineBox.label}</text>
          </g>
        )}
      </g>
      {boundary && (
        <g className="lw-boundary-marker" data-testid="boundary-marker">
          <path d={boundary.arrow} style={{ fill: "var(--plot-text)", stroke: "none" }} />
          <text x={boundary.labelX} y={boundary.labelY} textAnchor={boundary.anchor} className="lw-guide-label">{boundary.label}</text>
        </g>
      )}
      {caption.map((line, i) => (
        <text key={i} className="lw-plot-caption" x={12} y={height - (caption.length - i) * CAPTION_LINE + 10}>{line}</text>
      ))}
    </PlotFrame>
  );
}

/**
 * Where the stability boundary lies when it is outside the window: an arrowhead just inside the
 * frame edge, pointing from the window centre toward the nearest boundary point, with the
 * boundary's name behind it. The arrow slides along that edge (centre first, then ±30 %, ±40 %
 * of the edge) to the first place where it and its name clear every pole and zero glyph. Null
 * when the boundary crosses the window.
 */
function boundaryMarker(model: ReturnType<typeof poleZeroModel>, sampled: boolean, glyphs: readonly Box[]): { arrow: string; label: string; labelX: number; labelY: number; anchor: "start" | "end" | "middle" } | null {
  const xd = model.x.domain() as Domain, yd = model.y.domain() as Domain;
  if (boundaryInWindow(xd, yd, sampled)) return null;
  const centre = { re: (xd[0] + xd[1]) / 2, im: (yd[0] + yd[1]) / 2 };
  const target = nearestBoundaryPoint(centre, sampled);
  const cx = model.x(centre.re), cy = model.y(centre.im);
  let dx = model.x(target.re) - cx, dy = model.y(target.im) - cy;
  const len = Math.hypot(dx, dy);
  if (!(len > 0)) return null;
  dx /= len; dy /= len;
  const { left, top, width, height } = model.plot;
  const inset = 12;
  // Distance from the centre to the frame (inset) along (dx, dy).
  const tx = Math.abs(dx) > 1e-12 ? (dx > 0 ? left + width - inset - cx : cx - left - inset) / Math.abs(dx) : Infinity;
  const ty = Math.abs(dy) > 1e-12 ? (dy > 0 ? top + height - inset - cy : cy - top - inset) / Math.abs(dy) : Infinity;
  const t = Math.min(tx, ty);
  const sideways = tx <= ty; // the arrow meets a left/right edge: slide it up and down
  const label = sampled ? "unit circle" : "imaginary axis";
  const labelSize = textSize(label, GUIDE_FONT);
  const anchor = dx > 0.5 ? "end" : dx < -0.5 ? "start" : "middle";
  const size = 9, half = 5;
  let fallback: ReturnType<typeof boundaryMarker> = null;
  for (const shift of [0, -0.3, 0.3, -0.4, 0.4]) {
    const tipX = sideways ? cx + t * dx : Math.min(left + width - inset, Math.max(left + inset, cx + t * dx + shift * width));
    const tipY = sideways ? Math.min(top + height - inset, Math.max(top + inset, cy + t * dy + shift * height)) : cy + t * dy;
    const bx = tipX - size * dx, by = tipY - size * dy;
    const arrow = `M${tipX.toFixed(2)},${tipY.toFixed(2)}L${(bx - half * dy).toFixed(2)},${(by + half * dx).toFixed(2)}L${(bx + half * dy).toFixed(2)},${(by - half * dx).toFixed(2)}Z`;
    // The label sits behind the arrowhead, on the side facing into the plot.
    const labelX = bx - 4 * dx + (anchor === "end" ? -2 : anchor === "start" ? 2 : 0);
    const labelY = by - 4 * dy + (Math.abs(dy) > 0.5 ? (dy > 0 ? -4 : 12) : -8);
    const marker = { arrow, label, labelX, labelY, anchor } as const;
    fallback ??= marker;
    const labelLeft = anchor === "end" ? labelX - labelSize.width : anchor === "start" ? labelX : labelX - labelSize.width / 2;
    const boxes: Box[] = [
      { x: Math.min(tipX, bx) - half, y: Math.min(tipY, by) - half, width: Math.abs(tipX - bx) + 2 * half, height: Math.abs(tipY - by) + 2 * half },
      { x: labelLeft, y: labelY - GUIDE_FONT, width: labelSize.width, height: labelSize.height },
    ];
    if (!boxes.some((b) => glyphs.some((g) => boxesOverlap(b, g, 2)))) return marker;
  }
  return fallback;
}

/** The outlined window in px (at least OUTLINE_MIN wide and tall) and its label above it (below when there is no room). */
function outlineRect(model: ReturnType<typeof poleZeroModel>, w: { x: Domain; y: Domain; label: string }): { x: number; y: number; width: number; height: number; label: string; labelX: number; labelY: number; anchor: "start" | "end" } {
  const x0 = model.x(w.x[0]), x1 = model.x(w.x[1]), y0 = model.y(w.y[1]), y1 = model.y(w.y[0]);
  const cx = (x0 + x1) / 2, cy = (y0 + y1) / 2;
  const width = Math.max(OUTLINE_MIN, x1 - x0), height = Math.max(OUTLINE_MIN, y1 - y0);
  const x = cx - width / 2, y = cy - height / 2;
  const { left, top, width: plotWidth } = model.plot;
  const anchor = cx > left + plotWidth / 2 ? "end" : "start";
  const labelX = anchor === "end" ? x + width : x;
  const labelY = y - 4 - 10 > top ? y - 4 : y + height + 12;
  return { x, y, width, height, label: w.label, labelX, labelY, anchor };
}
