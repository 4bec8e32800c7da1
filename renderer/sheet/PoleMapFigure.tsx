/**
 * A pole-zero figure of the design sheet: the full map, and below it, when the poles that matter
 * crowd into a speck of it (poleWindow.ts: their cluster spans under 10 % of the full view both
 * ways), a zoom panel fitted to them. The full map outlines the zoomed window; the zoom panel
 * keeps the series styles and says in its title and caption what it zooms on, how far the
 * nearest pole lies from the stability boundary, and whether that boundary is in the window.
 */
import { PoleZeroMap, poleZeroFullView, poleZeroPlotArea, wrapCaption } from "../plots/PoleZeroMap";
import { poleZoomWindow, type PoleWindow } from "../plots/poleWindow";
import type { PoleZeroSeries } from "../plots/poleZeroModel";
import type { PlotComplex } from "../plots/plotTypes";

export interface PoleMapFigureProps {
  series: readonly PoleZeroSeries[];
  sampleTime: number | null;
  title: string;
  width: number;
  height: number;
  /** Height of the zoom panel. */
  zoomHeight: number;
  /** The poles the zoom rule clusters, and those whose cluster is zoomed (default: all of `poles`). */
  focus: { poles: readonly PlotComplex[]; anchors?: readonly PlotComplex[] };
  /** What the zoom shows, for its title: "the pole cloud", "the closed-loop poles" … */
  subject: string;
}

/** 4 significant digits, "−" for minus (captions). */
const num = (v: number) => String(Number(v.toPrecision(4))).replace("-", "−");

/** The zoom panel's title and caption lines for window `w`. */
export function zoomPanelText(w: PoleWindow, sampled: boolean, subject: string): { title: string; caption: string[] } {
  const times = w.magnification >= 10 ? Math.round(w.magnification).toString() : w.magnification.toFixed(1);
  const title = `Zoom ×${times} on ${subject} (${w.count} of ${w.total} poles)`;
  const nearest = sampled
    ? `Pole nearest the unit circle: |z| = ${num(Math.hypot(w.nearest.re, w.nearest.im))}, 1 − |z| = ${num(w.margin)}.`
    : `Pole nearest the imaginary axis: Re s = ${num(w.nearest.re)} 1/s${w.margin < 0 ? " (unstable)" : ""}.`;
  const boundary = sampled ? "unit circle" : "imaginary axis";
  const where = w.boundaryInView ? `The ${boundary} crosses this window` : `The ${boundary} lies outside this window (arrow)`;
  return { title, caption: [nearest, `${where}; the dashed box above marks the window.`] };
}

export function PoleMapFigure(props: PoleMapFigureProps) {
  const { series, sampleTime, title, width, height, zoomHeight, focus, subject } = props;
  const sampled = sampleTime !== null && sampleTime > 0;
  const full = poleZeroFullView(series, sampleTime, width, height);
  const fit = (caption: readonly string[]) => {
    const area = poleZeroPlotArea(series, width, zoomHeight, caption);
    return poleZoomWindow({ poles: focus.poles, anchors: focus.anchors, sampled, full, aspect: area.width / area.height });
  };
  // The caption's length sets the plot's height, hence the window's aspect: fit with two lines,
  // then again should the words wrap to more.
  let w = fit(["", ""]);
  let text = w ? zoomPanelText(w, sampled, subject) : null;
  if (w && text && wrapCaption(text.caption, width).length !== 2) {
    w = fit(text.caption);
    text = w ? zoomPanelText(w, sampled, subject) : null;
  }
  return (
    <>
      <div className="lw-sheet-figure">
        <PoleZeroMap variant="print" width={width} height={height} sampleTime={sampleTime} title={title} series={series} outline={w ? { x: w.x, y: w.y, label: "zoomed in the next figure" } : null} />
      </div>
      {w && text && (
        <div className="lw-sheet-figure lw-sheet-zoom" data-testid="pole-zoom">
          <PoleZeroMap variant="print" width={width} height={zoomHeight} sampleTime={sampleTime} title={text.title} series={series} view={{ x: w.x, y: w.y }} caption={text.caption} />
        </div>
      )}
    </>
  );
}
