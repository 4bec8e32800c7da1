// The test and main tsconfigs compile this file without renderer/ in their include list, so the
// ambient `*.css?inline` declaration is referenced explicitly.
// eslint-disable-next-line @typescript-eslint/triple-slash-reference
/// <reference path="./cssInline.d.ts" />
/**
 * The design sheet as one self-contained HTML document: inline CSS (the sheet's paged-media
 * styles and the plot styles), inline SVG plots, no scripts and no external references. The
 * command line prints it with headless Chromium; any browser can print the .html file too.
 */
import { renderToStaticMarkup } from "react-dom/server";
import { ENGINE_VERSION } from "../../shared-engine/version";
import plotCss from "../plots/plots.css?inline";
import { DesignSheet } from "./DesignSheet";
import type { SheetInput } from "./sheetModel";
import { sheetCss } from "./sheetStyles";

export type RenderSheetInput = Omit<SheetInput, "engineVersion"> & { engineVersion?: string };

const escapeHtml = (text: string): string => text.replace(/&/g, "&amp;").replace(/</g, "&lt;").replace(/>/g, "&gt;").replace(/"/g, "&quot;");

/** Plot styles refer to app theme variables; on paper they are pinned (print variant). */
function safeCss(css: string): string {
  // Inline CSS must not close its <style> element, nor fetch anything (no @import, no url() to files).
  return css.replace(/<\/style/gi, "<\\/style").replace(/@import[^;]*;/g, "");
}

export function renderSheetHtml(input: RenderSheetInput): string {
  const full: SheetInput = { ...input, engineVersion: input.engineVersion ?? ENGINE_VERSION };
  const variant = input.project.variants.find((v) => v.id === input.variantId);
  const variantName = variant?.name ?? input.variantId;
  const body = renderToStaticMarkup(<DesignSheet {...full} />);
  const css = sheetCss(input.pageSize, { project: input.project.name, variant: input.variantId, revision: input.revision, date: input.date });
  return [
    "<!DOCTYPE html>",
    '<html lang="en">',
    "<head>",
    '<meta charset="utf-8">',
    // No scripts, no network: the document is complete on its own.
    "<meta http-equiv=\"Content-Security-Policy\" content=\"default-src 'none'; style-src 'unsafe-inline'; img-src data:\">",
    `<title>${escapeHtml(`Design sheet — ${input.project.name} — ${variantName} — revision ${input.revision}`)}</title>`,
    `<style>${safeCss(plotCss)}</style>`,
    `<style>${css}</style>`,
    "</head>",
    `<body class="lw-sheet-body">${body}</body>`,
    "</html>",
    "",
  ].join("\n");
}
