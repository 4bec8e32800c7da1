/**
 * The frame every plot shares: a <figure> with a tool row (reset view, export), and one SVG that
 * holds the title, the legend (colour + marker + dash) and the plot's panels, so an exported SVG
 * or PNG is complete on its own. In print variant the tool row is absent.
 */
import type { ReactNode, Ref } from "react";
import { ExportMenu } from "./ExportMenu";
import { LEGEND_ROW_HEIGHT, layoutLegend, type LegendEntry } from "./legendModel";
import { crossPath, markerPath } from "./palette";
import type { PlotVariant } from "./plotTypes";
import type { CsvColumn } from "./toCsv";
import "./plots.css";

export interface PlotFrameProps {
  title: string;
  width: number;
  height: number;
  legend: readonly LegendEntry[];
  variant: PlotVariant;
  /** Accessible description of the figure (what is drawn, for screen readers). */
  description: string;
  /** Whether the view differs from the data's own (enables the reset button). */
  zoomed: boolean;
  onReset: () => void;
  /** Columns for the CSV export; absent: no CSV button. */
  csv?: () => CsvColumn[];
  /** File stem for exports. */
  fileName: string;
  svgRef: Ref<SVGSVGElement>;
  svgProps?: React.SVGProps<SVGSVGElement>;
  /** Height taken by the title and legend; plots place their panels below it (see frameHeader). */
  children: ReactNode;
  /** Extra HTML under the SVG (hover read-out). */
  footer?: ReactNode;
}

export const TITLE_HEIGHT = 22;

/** Vertical space used by the title and the legend: panels start at this y. */
export function frameHeaderHeight(legend: readonly LegendEntry[], width: number): number {
  return TITLE_HEIGHT + layoutLegend(legend, width - 24).height + 8;
}

export function PlotFrame(props: PlotFrameProps) {
  const { title, width, height, legend, variant, description, zoomed, onReset, csv, fileName, svgRef, svgProps, children, footer } = props;
  const placed = layoutLegend(legend, width - 24);
  const screen = variant === "screen";
  return (
    <figure className={`lw-plot lw-plot-${variant}`}>
      {screen && (
        <div className="lw-plot-tools">
          <button type="button" className="button-quiet lw-plot-reset" onClick={onReset} disabled={!zoomed} title="Show all data again (also: double-click, or the 0 key on the plot)">
            Reset view
          </button>
          <ExportMenu svgRef={svgRef} fileName={fileName} csv={csv} />
        </div>
      )}
      <svg
        ref={svgRef}
        className="lw-plot-svg"
        viewBox={`0 0 ${width} ${height}`}
        width={width}
        height={height}
        role="img"
        aria-label={`${title}. ${description}`}
        tabIndex={screen ? 0 : undefined}
        {...svgProps}
      >
        <rect className="lw-plot-background" x={0} y={0} width={width} height={height} />
        <text className="lw-plot-title" x={12} y={16}>
          {title}
        </text>
        <g className="lw-legend" transform={`translate(12,${TITLE_HEIGHT + 4})`}>
          {placed.entries.map((e, i) => (
            <g key={i} transform={`translate(${e.x},${e.y})`}>
              {e.glyph === "pole" ? (
                <g className="lw-legend-pole" transform={`translate(10,${LEGEND_ROW_HEIGHT / 2 - 4})`}>
                  <path d={crossPath(4.5)} stroke={e.style.color} className="lw-mark-stroke" fill="none" />
                  {e.tagged && <path d={markerPath(e.style.marker, 2.2)} transform="translate(8,-6)" fill={e.style.color} stroke="none" />}
                </g>
              ) : e.glyph === "markers" ? (
                <path className="lw-legend-markers" d={markerPath(e.style.marker, 3.5)} transform={`translate(13,${LEGEND_ROW_HEIGHT / 2 - 4})`} fill={e.style.color} stroke={e.style.color} />
              ) : (<>
              <line className="lw-legend-line" x1={0} x2={26} y1={LEGEND_ROW_HEIGHT / 2 - 4} y2={LEGEND_ROW_HEIGHT / 2 - 4} stroke={e.style.color} strokeDasharray={(e.dash ?? e.style.dash) || undefined} />
              <path d={markerPath(e.style.marker, 3.5)} transform={`translate(13,${LEGEND_ROW_HEIGHT / 2 - 4})`} fill={e.style.color} stroke={e.style.color} />
              </>)}
              <text className="lw-legend-label" x={32} y={LEGEND_ROW_HEIGHT / 2 - 4} dy="0.32em">
                {e.label}
              </text>
            </g>
          ))}
        </g>
        {children}
      </svg>
      {screen && footer}
    </figure>
  );
}
