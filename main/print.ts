/**
 * Print-to-PDF of the design sheet from the desktop app. The sheet view (renderer/sheet, route
 * "#/sheet/...") carries its own @page rules (paper size, margins, running header and page
 * numbers as page-margin boxes), so Chromium's own header and footer are switched off and CSS
 * page size wins (`preferCSSPageSize`).
 *
 * Who calls it: main/printIpc.ts, the handler of IPC_CHANNELS.printSheet
 * ("loopwright:print-sheet"). The renderer sends only `{ route: "#/sheet/<project>/<variant>",
 * pageSize: "A4" | "Letter" }` (validated; never a path or HTML). Main opens the sheet in a
 * hidden window built from `mainWindowOptions` (same hardening), loads
 * `app://loopwright/index.html?sheet-print=<size>#/sheet/<project>/<variant>`, waits until the
 * sheet view sets its "ready" title (or a timeout), calls `printSheetToPdf(window.webContents,
 * { pageSize })`, writes the bytes where the user chose in a save dialog, and destroys the
 * window in every path.
 *
 * The three ways a sheet is produced (DEVELOPERS.md, "Printing the design sheet"): the desktop
 * app (this path), browser mode (the Print button opens the browser's print dialog), and the
 * command line (`loopwright sheet`).
 */

/** The slice of Electron's WebContents used here (injected so tests need no Electron). */
export interface PrintableContents {
  printToPDF(options: {
    pageSize: "A4" | "Letter";
    printBackground: boolean;
    landscape: boolean;
    /** Inches (Electron 21+ takes numbers only; the older `marginType` is ignored). */
    margins: { top: number; bottom: number; left: number; right: number };
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
    // Zero: the sheet's @page margins (which hold the running header) are the only margins.
    // (`{ marginType: "none" }` is ignored by current Electron, which then adds 1 cm.)
    margins: { top: 0, bottom: 0, left: 0, right: 0 },
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
