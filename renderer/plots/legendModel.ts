/** Legend layout: entries flow left to right and wrap; pure so tests check it without a DOM. */
import { seriesStyle, type SeriesStyle } from "./palette";

export interface LegendEntry {
  label: string;
  style: SeriesStyle;
  /** Overlay entries (e.g. a nonlinear simulation) draw their own dash. */
  dash?: string;
  /**
   * Pole maps show the × glyph instead of a line; `tagged` adds the series' marker tag.
   * "markers": the series' marker alone, no line (a sampled response drawn as markers only).
   */
  glyph?: "pole" | "markers";
  tagged?: boolean;
}

export interface PlacedLegendEntry extends LegendEntry {
  x: number;
  y: number;
}

/** Rough text width: 6.6 user units per character at the 11.5 px legend font. */
const CHAR_WIDTH = 6.6;
const SWATCH = 34;
const GAP = 16;
export const LEGEND_ROW_HEIGHT = 16;

/** Places entries in rows no wider than `width`; returns positions and the total height. */
export function layoutLegend(entries: readonly LegendEntry[], width: number): { entries: PlacedLegendEntry[]; height: number } {
  const placed: PlacedLegendEntry[] = [];
  let x = 0;
  let row = 0;
  for (const e of entries) {
    const w = SWATCH + e.label.length * CHAR_WIDTH;
    if (x > 0 && x + w > width) { x = 0; row += 1; }
    placed.push({ ...e, x, y: row * LEGEND_ROW_HEIGHT });
    x += w + GAP;
  }
  return { entries: placed, height: entries.length === 0 ? 0 : (row + 1) * LEGEND_ROW_HEIGHT };
}

/** Legend entries for named series in palette order (index i gets seriesStyle(styleIndex ?? i)). */
export function legendFor(series: readonly { name: string; styleIndex?: number }[]): LegendEntry[] {
  return series.map((s, i) => ({ label: s.name, style: seriesStyle(s.styleIndex ?? i) }));
}
