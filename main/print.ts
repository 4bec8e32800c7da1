/**
 * Print-to-PDF of the design sheet from the desktop app. The sheet view (renderer/sheet, route
 * "#/sheet/...") carries its own @page rules (paper size, margins, running header and page
 * numbers as page-margin boxes), so Chromium's own header and footer are switched off and CSS
 * page size wins (`preferCSSPageSize`).
 *
 * How the app will call it (no IPC channel this round): main opens the sheet in a hidden
 * BrowserWindow created with `mainWindowOptions` (same hardening), loads
 * `app://loopwright/index.html#/sheet/<project>/<variant>`, waits for `did-finish-load`, calls
 * `printSheetToPdf(window.webContents, { pageSize })`, writes the bytes where the user chose in a
 * save dialog, and closes the window. A future IPC channel "loopwright:print-sheet" will take
 * only { projectId, variantId, pageSize } from the renderer (validated), never a path or HTML.
 */

/** The slice of Electron's WebContents used here (injected so tests need no Electron). */
export interface PrintableContents {
  printToPDF(options: {
    pageSize: "A4" | "Letter";
    printBackground: boolean;
    landscape: boolean;
    margins: { marginType: "default" | "none" | "printableArea" | "custom"; top?: number; bottom?: number; left?: number; right?: number };
    displayHeaderFooter: boolean;
    preferCSSPageSize: boolean;
  }): Promise<Uint8Array>;
}

export type SheetPageSize = "a4" | "letter";

/** printToPDF options for the sheet: portrait, backgrounds printed, margins from the sheet's CSS. */
export function sheetPdfOptions(pageSize: SheetPageSize): Parameters<PrintableContents["printToPDF"]>[0] {
  if (pageSize !== "a4" && pageSize !== "letter") throw new TypeError(`pageSize must be "a4" or "letter" (got ${JSON.stringify(pageSize)})`);
  return {
    pageSize: pageSize === "a4" ? "A4" : "Letter",
    printBackground: true,
    landscape: false,
    // "none": the sheet's @page margins (which hold the running header) are the only margins.
    margins: { marginType: "none" },
    displayHeaderFooter: false,
    preferCSSPageSize: true,
  };
}

/** Prints the loaded sheet to PDF bytes. Rejects with a message naming the page size on failure. */
export async function printSheetToPdf(webContents: PrintableContents, { pageSize }: { pageSize: SheetPageSize }): Promise<Uint8Array> {
  const options = sheetPdfOptions(pageSize);
  let bytes: Uint8Array;
  try {
    bytes = await webContents.printToPDF(options);
  } catch (error) {
    throw new Error(`Printing the design sheet (${options.pageSize}) failed: ${error instanceof Error ? error.message : String(error)}`);
  }
  // A PDF starts with "%PDF-"; anything else (an empty buffer) is a failed print, not a sheet.
  const head = String.fromCharCode(...bytes.subarray(0, 5));
  if (bytes.length === 0 || head !== "%PDF-") throw new Error(`Printing the design sheet (${options.pageSize}) produced no PDF (${bytes.length} bytes)`);
  return bytes;
}
