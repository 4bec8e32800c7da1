/** The trade's marks: × for a pole, ○ for a zero; series after the first carry a small tag in their own marker shape. */
import { crossPath, markerPath, type SeriesStyle } from "./palette";

export function PoleGlyph({ x, y, style, tagged, size = 5 }: { x: number; y: number; style: SeriesStyle; tagged: boolean; size?: number }) {
  return (
    <g className="lw-pole" transform={`translate(${x},${y})`}>
      <path d={crossPath(size)} stroke={style.color} className="lw-mark-stroke" fill="none" />
      {tagged && <path d={markerPath(style.marker, 2.2)} transform={`translate(${size + 3},${-size - 3})`} fill={style.color} stroke="none" />}
    </g>
  );
}

export function ZeroGlyph({ x, y, style, tagged, size = 5 }: { x: number; y: number; style: SeriesStyle; tagged: boolean; size?: number }) {
  return (
    <g className="lw-zero" transform={`translate(${x},${y})`}>
      <circle r={size} stroke={style.color} className="lw-mark-stroke" fill="none" strokeDasharray={tagged && style.dash ? "3 1.5" : undefined} />
      {tagged && <path d={markerPath(style.marker, 2.2)} transform={`translate(${size + 3},${-size - 3})`} fill={style.color} stroke="none" />}
    </g>
  );
}
