/**
 * Series styles: colour, marker and dash for the n-th series (variant). Colour is never the only
 * carrier: each slot also has its own marker shape and dash pattern, so prints in grey and readers
 * with any colour-vision deficiency still tell series apart.
 *
 * Colours: the eight-colour set of M. Okabe and K. Ito, "Color Universal Design (CUD): how to make
 * figures and presentations that are friendly to colorblind people" (J*Fly, 2002/2008). Black is
 * left out because it is the axis/text colour; our order starts with the darker hues so the first
 * series reads well on white and on the dark surface alike.
 * WARNING: the assignment index → style is what lets a variant keep its look in tables, legends
 * and the design sheet; reordering these arrays changes every saved figure.
 */

export type MarkerShape = "circle" | "square" | "diamond" | "triangle" | "triangle-down" | "plus" | "star";

export interface SeriesStyle {
  /** Stroke/fill colour as a CSS colour. */
  color: string;
  /** Marker used in the legend and for data marks that are not poles or zeros. */
  marker: MarkerShape;
  /** SVG stroke-dasharray ("" for a solid line). */
  dash: string;
  /** Human-readable name of the dash pattern for legends read by screen readers. */
  dashName: string;
}

/** Okabe–Ito hues (without black), in our fixed assignment order. */
export const OKABE_ITO = [
  "#0072B2", // blue
  "#D55E00", // vermillion
  "#009E73", // bluish green
  "#CC79A7", // reddish purple
  "#E69F00", // orange
  "#56B4E9", // sky blue
  "#F0E442", // yellow
] as const;

const MARKERS: readonly MarkerShape[] = ["circle", "square", "diamond", "triangle", "triangle-down", "plus", "star"];
const DASHES: readonly { dash: string; name: string }[] = [
  { dash: "", name: "solid" },
  { dash: "7 4", name: "dashed" },
  { dash: "2 3", name: "dotted" },
  { dash: "9 3 2 3", name: "dash-dot" },
  { dash: "12 4", name: "long dash" },
  { dash: "4 2 1 2 1 2", name: "dash-dot-dot" },
  { dash: "1 4", name: "sparse dots" },
];

/**
 * Style of series `index` (0-based). Colours cycle every 7; markers and dashes cycle with the same
 * period but shift by one per lap, so series 7 differs from series 0 in marker and dash.
 */
export function seriesStyle(index: number): SeriesStyle {
  const i = Math.max(0, Math.floor(index));
  const lap = Math.floor(i / OKABE_ITO.length);
  const slot = i % OKABE_ITO.length;
  const dash = DASHES[(slot + lap) % DASHES.length]!;
  return {
    color: OKABE_ITO[slot]!,
    marker: MARKERS[(slot + lap) % MARKERS.length]!,
    dash: dash.dash,
    dashName: dash.name,
  };
}

/** SVG path (centred on 0,0) of a legend/data marker of half-size `r`. */
export function markerPath(shape: MarkerShape, r: number): string {
  const f = (v: number) => Number(v.toFixed(3));
  switch (shape) {
    case "circle":
      return `M${f(-r)},0A${f(r)},${f(r)} 0 1,0 ${f(r)},0A${f(r)},${f(r)} 0 1,0 ${f(-r)},0Z`;
    case "square":
      return `M${f(-r)},${f(-r)}H${f(r)}V${f(r)}H${f(-r)}Z`;
    case "diamond":
      return `M0,${f(-r * 1.25)}L${f(r)},0L0,${f(r * 1.25)}L${f(-r)},0Z`;
    case "triangle":
      return `M0,${f(-r * 1.15)}L${f(r * 1.1)},${f(r * 0.8)}L${f(-r * 1.1)},${f(r * 0.8)}Z`;
    case "triangle-down":
      return `M0,${f(r * 1.15)}L${f(r * 1.1)},${f(-r * 0.8)}L${f(-r * 1.1)},${f(-r * 0.8)}Z`;
    case "plus":
      return `M${f(-r)},0H${f(r)}M0,${f(-r)}V${f(r)}`;
    case "star": {
      let d = "";
      for (let k = 0; k < 10; k++) {
        const rad = k % 2 === 0 ? r * 1.2 : r * 0.5;
        const a = -Math.PI / 2 + (k * Math.PI) / 5;
        d += `${k === 0 ? "M" : "L"}${f(rad * Math.cos(a))},${f(rad * Math.sin(a))}`;
      }
      return d + "Z";
    }
  }
}

/** The trade's pole mark: a × of half-size r. */
export function crossPath(r: number): string {
  return `M${-r},${-r}L${r},${r}M${-r},${r}L${r},${-r}`;
}
