/**
 * How the design sheet's Print button prints, and the sheet view's print-only mode. Pure
 * functions over injected window members, so the choice is tested headlessly
 * (test/app/sheet/sheetPrinting.test.ts).
 *
 * - Desktop app: `window.loopwright.printSheet(route, pageSize)` exists. Main renders the sheet
 *   in a hidden window, prints it to PDF and asks where to save it.
 * - Browser mode: no preload object, so `window.print()` opens the browser's print dialog; the
 *   sheet's @page rules set paper and margins.
 *
 * Print-only mode is the hidden window's side of the desktop path: main loads the app with
 * `?sheet-print=A4|Letter` before the sheet route. The view then renders only the sheet at that
 * paper size and reports through `document.title` (see `sheetStatusTitle`).
 *
 * WARNING: the query key and the title prefixes are repeated in main/printIpc.ts (main and the
 * renderer never import each other); test/app/sheet/sheetPrinting.test.ts checks they agree.
 */
import type { Envelope } from "../../shared-engine/api/contract";
import type { PrintSheetResult, SheetPaperSize } from "../../shared-engine/api/preloadApi";
import type { PageSize } from "./sheetModel";

export const SHEET_PRINT_QUERY_KEY = "sheet-print";
export const SHEET_READY_TITLE_PREFIX = "loopwright-sheet-ready:";
export const SHEET_FAILED_TITLE_PREFIX = "loopwright-sheet-failed:";

/** What the Print button led to, for the line under the controls. */
export type SheetPrintOutcome =
  | { kind: "browser-dialog" }
  | { kind: "saved"; path: string }
  | { kind: "cancelled" }
  | { kind: "failed"; message: string };

/** The window members the choice reads (the real `window`, or a fake in tests). */
export interface SheetPrintHost {
  loopwright?: { printSheet?: (route: string, pageSize: SheetPaperSize) => Promise<Envelope<PrintSheetResult>> };
  print(): void;
}

/** The sheet's paper size as the desktop print channel names it. */
export const paperSizeName = (pageSize: PageSize): SheetPaperSize => (pageSize === "letter" ? "Letter" : "A4");

/**
 * Returns the print action for this host: the desktop app's PDF path when the preload offers
 * `printSheet`, the browser's print dialog otherwise. The action never rejects.
 */
export function chooseSheetPrinter(host: SheetPrintHost): (route: string, pageSize: PageSize) => Promise<SheetPrintOutcome> {
  const printSheet = host.loopwright?.printSheet;
  if (typeof printSheet !== "function") {
    return async () => {
      host.print();
      return { kind: "browser-dialog" };
    };
  }
  return async (route, pageSize) => {
    try {
      const envelope = await printSheet.call(host.loopwright, route, paperSizeName(pageSize));
      if (!envelope || typeof envelope !== "object") return { kind: "failed", message: "The desktop app gave no answer to the print request" };
      if (!envelope.ok) return { kind: "failed", message: envelope.error?.message ?? "The design sheet could not be printed" };
      if ("savedTo" in envelope.result && typeof envelope.result.savedTo === "string") return { kind: "saved", path: envelope.result.savedTo };
      return { kind: "cancelled" };
    } catch (error) {
      return { kind: "failed", message: error instanceof Error ? error.message : String(error) };
    }
  };
}

/** The line shown after printing (null when the browser's own dialog took over). */
export function describePrintOutcome(outcome: SheetPrintOutcome): string | null {
  switch (outcome.kind) {
    case "browser-dialog":
      return null;
    case "saved":
      return `Saved the design sheet to ${outcome.path}`;
    case "cancelled":
      return "Printing cancelled; nothing was saved.";
    case "failed":
      return `The design sheet was not printed: ${outcome.message}`;
  }
}

/** Reads `?sheet-print=A4|Letter` from a location's search string; null when absent or invalid. */
export function readSheetPrintMode(search: string): { pageSize: PageSize } | null {
  const value = new URLSearchParams(search).get(SHEET_PRINT_QUERY_KEY);
  if (value === "A4") return { pageSize: "a4" };
  if (value === "Letter") return { pageSize: "letter" };
  return null;
}

/**
 * The document title that tells main the sheet's state in print-only mode: ready (with the
 * project name, for the suggested file name), failed (with the reason), or null while loading.
 */
export function sheetStatusTitle(phase: "idle" | "loading" | "ready" | "failed", detail: string): string | null {
  // Titles are single-line; keep them short so no platform truncates the prefix away.
  const text = detail.replace(/\s+/g, " ").trim().slice(0, 200);
  if (phase === "ready") return SHEET_READY_TITLE_PREFIX + text;
  if (phase === "failed") return SHEET_FAILED_TITLE_PREFIX + text;
  return null;
}
