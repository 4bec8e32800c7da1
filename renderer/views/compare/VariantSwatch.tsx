import { markerPath, seriesStyle } from "../../plots/palette";

/** The variant's fixed colour, marker and dash, as drawn in every plot legend. */
export function VariantSwatch({ styleIndex }: { styleIndex: number }) {
  const style = seriesStyle(styleIndex);
  return (
    <svg className="variant-swatch" width="30" height="14" viewBox="-15 -7 30 14" aria-hidden="true">
      <line x1="-14" x2="14" y1="0" y2="0" stroke={style.color} strokeWidth="2" strokeDasharray={style.dash} />
      <path d={markerPath(style.marker, 4)} fill={style.color} stroke={style.color} />
    </svg>
  );
}
