/**
 * The sheet's print stylesheet, as text so it can be inlined into a self-contained HTML document
 * (the command line) and injected into the app's sheet view alike.
 *
 * Paged media: `@page` sets the paper (A4 or US Letter, portrait) and margins; the running header
 * (project, variant, revision, date) and "Page N of M" are page-margin boxes, which Chromium
 * prints since version 131. Every section avoids breaking inside figures and short tables.
 */
import type { PageSize } from "./sheetModel";

/** Paper sizes and margins (mm). Wider top/bottom margins hold the running header and footer. */
export const PAGE_GEOMETRY: Record<PageSize, { css: string; widthMm: number; heightMm: number; margin: { top: number; right: number; bottom: number; left: number } }> = {
  a4: { css: "A4 portrait", widthMm: 210, heightMm: 297, margin: { top: 20, right: 15, bottom: 18, left: 15 } },
  letter: { css: "letter portrait", widthMm: 215.9, heightMm: 279.4, margin: { top: 20, right: 15, bottom: 18, left: 15 } },
};

/** A CSS string literal: quotes and backslashes escaped, `<` escaped (so no `</style>` can close the sheet), control characters removed. */
export function cssString(text: string): string {
  return `"${text.replace(/[\u0000-\u001f\u007f]/g, " ").replace(/\\/g, "\\\\").replace(/"/g, '\\"').replace(/</g, "\\3c ")}"`;
}

export interface RunningHeader {
  project: string;
  variant: string;
  revision: string;
  date: string;
}

export function sheetCss(pageSize: PageSize, header: RunningHeader): string {
  const g = PAGE_GEOMETRY[pageSize];
  const m = g.margin;
  const left = header.project.length > 70 ? `${header.project.slice(0, 69)}…` : header.project;
  const right = `variant ${header.variant} · revision ${header.revision} · ${header.date}`;
  return `
@page {
  size: ${g.css};
  margin: ${m.top}mm ${m.right}mm ${m.bottom}mm ${m.left}mm;
  @top-left { content: ${cssString(left)}; font: 8pt/1.2 "DejaVu Sans", Arial, sans-serif; color: #222; vertical-align: bottom; padding-bottom: 2.5mm; }
  @top-right { content: ${cssString(right)}; font: 8pt/1.2 "DejaVu Sans", Arial, sans-serif; color: #222; vertical-align: bottom; padding-bottom: 2.5mm; white-space: nowrap; }
  @bottom-left { content: "Loopwright design sheet — simulation is not validation"; font: 7.5pt/1.2 "DejaVu Sans", Arial, sans-serif; color: #444; vertical-align: top; padding-top: 2.5mm; }
  @bottom-right { content: "Page " counter(page) " of " counter(pages); font: 8pt/1.2 "DejaVu Sans", Arial, sans-serif; color: #222; vertical-align: top; padding-top: 2.5mm; }
}
html { background: #fff; }
body.lw-sheet-body { margin: 0; background: #fff; }
.lw-sheet {
  --font-ui: "DejaVu Sans", "Liberation Sans", Arial, sans-serif;
  --font-num: "DejaVu Sans Mono", "Liberation Mono", monospace;
  color: #000; background: #fff; font: 9pt/1.35 var(--font-ui);
  max-width: ${(g.widthMm - m.left - m.right).toFixed(1)}mm; margin: 0 auto;
  -webkit-print-color-adjust: exact; print-color-adjust: exact;
}
.lw-sheet h1 { font-size: 15pt; margin: 0 0 1mm; }
.lw-sheet h2 { font-size: 11pt; margin: 5mm 0 1.5mm; padding-bottom: 0.8mm; border-bottom: 1pt solid #000; break-after: avoid; page-break-after: avoid; }
.lw-sheet h3 { font-size: 9.5pt; margin: 3mm 0 1mm; break-after: avoid; }
.lw-sheet p { margin: 1mm 0; }
.lw-sheet .num, .lw-sheet td.num, .lw-sheet .mono { font-family: var(--font-num); font-variant-numeric: tabular-nums; }
.lw-sheet .muted { color: #444; }
.lw-sheet table { box-sizing: border-box; border-collapse: collapse; margin: 1mm 0 2mm; break-inside: avoid; page-break-inside: avoid; }
.lw-sheet th, .lw-sheet td { border: 0.5pt solid #666; padding: 0.6mm 1.6mm; text-align: left; vertical-align: top; }
.lw-sheet th { background: #eee; font-weight: 600; }
.lw-sheet td.num { text-align: right; white-space: nowrap; }
.lw-sheet table.lw-sheet-kv { table-layout: fixed; }
.lw-sheet table.lw-sheet-kv th { width: 52mm; background: #f4f4f4; }
.lw-sheet table.lw-sheet-kv td.num { text-align: left; white-space: normal; overflow-wrap: anywhere; }
.lw-sheet table.lw-sheet-wide { width: 100%; }
.lw-sheet .lw-sheet-title { display: flex; justify-content: space-between; align-items: flex-end; gap: 6mm; border-bottom: 2pt solid #000; padding-bottom: 2mm; }
.lw-sheet .lw-sheet-title > div:first-child { flex: 1 1 auto; min-width: 0; }
.lw-sheet .lw-sheet-ident { text-align: right; font-size: 8.5pt; flex: none; white-space: nowrap; }
.lw-sheet .lw-sheet-fingerprint { font-family: var(--font-num); font-size: 9.5pt; font-weight: 700; letter-spacing: 0.02em; }
.lw-sheet .lw-sheet-banner { border: 2.5pt solid #000; background: #ffe9a8; padding: 2.5mm 4mm; margin: 3mm 0; font-size: 13pt; font-weight: 800; text-align: center; break-inside: avoid; }
.lw-sheet .lw-sheet-banner small { display: block; font-size: 8.5pt; font-weight: 400; margin-top: 1mm; }
.lw-sheet .lw-sheet-error { border: 2pt solid #000; padding: 2mm 3mm; font-weight: 700; }
.lw-sheet .lw-sheet-matrix caption { caption-side: top; text-align: left; font-weight: 600; padding-bottom: 0.5mm; }
.lw-sheet .lw-sheet-matrix th[scope="row"] { background: #f4f4f4; }
.lw-sheet .lw-sheet-matrices { display: flex; flex-wrap: wrap; gap: 0 6mm; }
.lw-sheet table.lw-sheet-equations { table-layout: fixed; }
.lw-sheet table.lw-sheet-equations th:first-child { width: 40mm; }
.lw-sheet table.lw-sheet-equations th:nth-child(2) { width: 26mm; }
.lw-sheet td.lw-sheet-equation { white-space: pre-wrap; overflow-wrap: anywhere; }
.lw-sheet table.lw-sheet-requirements td.num:nth-child(4) { white-space: normal; }
.lw-sheet .lw-pass { font-weight: 700; }
.lw-sheet .lw-fail { font-weight: 800; text-decoration: underline; }
.lw-sheet .lw-sheet-figure { break-inside: avoid; page-break-inside: avoid; margin: 2mm 0; }
.lw-sheet .lw-sheet-figure svg { width: 100%; max-width: 100%; height: auto; }
.lw-sheet .lw-sheet-figure .lw-plot { display: block; width: 100%; }
.lw-sheet .lw-plot { display: block; }
.lw-sheet .lw-sheet-signoff td { height: 9mm; vertical-align: bottom; }
.lw-sheet table.lw-sheet-signoff { table-layout: fixed; }
.lw-sheet table.lw-sheet-signoff th:first-child { width: 22mm; }
.lw-sheet .lw-sheet-signoff .lw-sheet-line { display: block; width: 100%; border-bottom: 0.6pt solid #000; height: 6mm; }
.lw-sheet .lw-sheet-cautions { box-sizing: border-box; border: 1.5pt solid #000; padding: 2mm 4mm; break-inside: avoid; page-break-inside: avoid; }
.lw-sheet .lw-sheet-cautions li { margin: 0.8mm 0; }
.lw-sheet .lw-sheet-section { break-inside: auto; }
.lw-sheet .lw-sheet-keep { break-inside: avoid; page-break-inside: avoid; }
@media screen {
  body.lw-sheet-body { background: #d9dcdf; padding: 8mm 0; }
  body.lw-sheet-body .lw-sheet { padding: 12mm ${m.right}mm; box-shadow: 0 1px 4px rgba(0,0,0,0.3); max-width: ${g.widthMm}mm; box-sizing: border-box; }
}
`;
}
