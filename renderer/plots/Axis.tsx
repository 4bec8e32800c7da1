/**
 * One axis drawn from an AxisModel: the baseline, ticks, labels, optional grid lines across the
 * plot area, and the axis title (quantity and unit). React renders; axisModel.ts computes.
 */
import type { AxisModel } from "./axisModel";
import { textSize } from "./labelPlacement";

/** Font size (px) of tick labels (plots.css .lw-tick-label). */
const TICK_FONT = 10.5;

/**
 * x of a left axis title's baseline (the text is rotated): clear of the widest tick label (tick
 * 5, gap 3, label, 5 more for the title's descenders), 44 left of the axis at least, and never
 * closer than 10 to the SVG's left edge.
 */
export function leftTitleX(model: AxisModel, offset: number, hideLabels = false): number {
  const widest = hideLabels ? 0 : Math.max(0, ...model.ticks.filter((t) => t.label).map((t) => textSize(t.label, TICK_FONT).width));
  return Math.max(10, offset - Math.max(44, 5 + 3 + widest + 5));
}

export interface AxisProps {
  model: AxisModel;
  orientation: "bottom" | "left";
  /** Where the axis line sits: y for a bottom axis, x for a left axis (SVG user units). */
  offset: number;
  /** Length of the grid lines across the plot area (0: none). Drawn toward the plot area. */
  gridLength?: number;
  /** Axis title, e.g. "Frequency (rad/s)"; "" for none. */
  title?: string;
  /** Hide tick labels (a top panel sharing its x axis with the panel below). */
  hideLabels?: boolean;
}

export function Axis({ model, orientation, offset, gridLength = 0, title = "", hideLabels = false }: AxisProps) {
  const [r0, r1] = model.range;
  const bottom = orientation === "bottom";
  return (
    <g className={`lw-axis lw-axis-${orientation}`} aria-hidden="true">
      {gridLength > 0 &&
        model.ticks.map((t) =>
          bottom ? (
            <line key={`g${t.value}`} className={t.major ? "lw-grid" : "lw-grid lw-grid-minor"} x1={t.position} x2={t.position} y1={offset} y2={offset - gridLength} />
          ) : (
            <line key={`g${t.value}`} className={t.major ? "lw-grid" : "lw-grid lw-grid-minor"} x1={offset} x2={offset + gridLength} y1={t.position} y2={t.position} />
          ),
        )}
      {bottom ? <line className="lw-axis-line" x1={r0} x2={r1} y1={offset} y2={offset} /> : <line className="lw-axis-line" x1={offset} x2={offset} y1={r0} y2={r1} />}
      {model.ticks.map((t) => {
        const len = t.major ? 5 : 3;
        return bottom ? (
          <g key={`t${t.value}`} transform={`translate(${t.position},${offset})`}>
            <line className="lw-tick" y2={len} />
            {!hideLabels && t.label && (
              <text className="lw-tick-label" y={len + 11} textAnchor="middle">
                {t.label}
              </text>
            )}
          </g>
        ) : (
          <g key={`t${t.value}`} transform={`translate(${offset},${t.position})`}>
            <line className="lw-tick" x2={-len} />
            {!hideLabels && t.label && (
              <text className="lw-tick-label" x={-len - 3} dy="0.32em" textAnchor="end">
                {t.label}
              </text>
            )}
          </g>
        );
      })}
      {title &&
        (bottom ? (
          <text className="lw-axis-title" x={(r0 + r1) / 2} y={offset + 32} textAnchor="middle">
            {title}
          </text>
        ) : (
          <text className="lw-axis-title" transform={`translate(${leftTitleX(model, offset, hideLabels)},${(r0 + r1) / 2}) rotate(-90)`} textAnchor="middle">
            {title}
          </text>
        ))}
    </g>
  );
}
