// How the sheet's Print button prints (desktop PDF or browser dialog) and the print-only mode
// of the hidden desktop window, checked headlessly.
import { describe, expect, it } from "vitest";
import { renderToString } from "react-dom/server";
import type { Envelope } from "../../../shared-engine/api/contract";
import type { PrintSheetResult, SheetPaperSize } from "../../../shared-engine/api/preloadApi";
import { createMemoryDocumentStore } from "../../../renderer/db/documentStore";
import { DesignSheetView } from "../../../renderer/sheet/DesignSheetView";
import * as renderer from "../../../renderer/sheet/sheetPrinting";
import * as main from "../../../main/printIpc";

const { chooseSheetPrinter, describePrintOutcome, readSheetPrintMode, sheetStatusTitle } = renderer;

function desktopHost(reply: Envelope<PrintSheetResult> | Error) {
  const calls: Array<[string, SheetPaperSize]> = [];
  let printed = 0;
  const host = {
    loopwright: {
      printSheet: async (route: string, pageSize: SheetPaperSize) => {
        calls.push([route, pageSize]);
        if (reply instanceof Error) throw reply;
        return reply;
      },
    },
    print: () => void printed++,
  };
  return { host, calls, printed: () => printed };
}

describe("choosing how the design sheet prints", () => {
  it("uses the browser's print dialog when the page has no desktop preload", async () => {
    let printed = 0;
    const outcome = await chooseSheetPrinter({ print: () => void printed++ })("#/sheet/p/v", "a4");
    expect(printed).toBe(1);
    expect(outcome).toEqual({ kind: "browser-dialog" });
    expect(describePrintOutcome(outcome)).toBeNull();
  });

  it("uses the browser's print dialog when the preload has no printSheet (an older preload)", async () => {
    let printed = 0;
    await chooseSheetPrinter({ loopwright: {}, print: () => void printed++ })("#/sheet/p/v", "a4");
    expect(printed).toBe(1);
  });

  it("prints through the desktop app with the route and Electron's page-size name, and shows the saved path", async () => {
    const desktop = desktopHost({ ok: true, result: { savedTo: "/home/u/x-sheet.pdf" } });
    const outcome = await chooseSheetPrinter(desktop.host)("#/sheet/p/v", "letter");
    expect(desktop.calls).toEqual([["#/sheet/p/v", "Letter"]]);
    expect(desktop.printed()).toBe(0);
    expect(outcome).toEqual({ kind: "saved", path: "/home/u/x-sheet.pdf" });
    expect(describePrintOutcome(outcome)).toBe("Saved the design sheet to /home/u/x-sheet.pdf");
  });

  it("reports a cancelled save dialog", async () => {
    const outcome = await chooseSheetPrinter(desktopHost({ ok: true, result: { cancelled: true } }).host)("#/sheet/p/v", "a4");
    expect(outcome).toEqual({ kind: "cancelled" });
    expect(describePrintOutcome(outcome)).toMatch(/cancelled; nothing was saved/);
  });

  it("shows the error message of a failed desktop print, and never rejects", async () => {
    const failed = await chooseSheetPrinter(desktopHost({ ok: false, error: { kind: "no-convergence", message: "not ready within 30000 ms", details: {} } }).host)("#/sheet/p/v", "a4");
    expect(describePrintOutcome(failed)).toBe("The design sheet was not printed: not ready within 30000 ms");
    const thrown = await chooseSheetPrinter(desktopHost(new Error("bridge gone")).host)("#/sheet/p/v", "a4");
    expect(thrown).toEqual({ kind: "failed", message: "bridge gone" });
  });
});

describe("print-only mode of the sheet view", () => {
  it("is on only for ?sheet-print=A4 or Letter", () => {
    expect(readSheetPrintMode("?sheet-print=A4")).toEqual({ pageSize: "a4" });
    expect(readSheetPrintMode("?x=1&sheet-print=Letter")).toEqual({ pageSize: "letter" });
    expect(readSheetPrintMode("?sheet-print=a4")).toBeNull();
    expect(readSheetPrintMode("")).toBeNull();
  });

  it("titles the page ready with the project name or failed with the reason, and not while loading", () => {
    expect(sheetStatusTitle("ready", "Queue\n demo")).toBe("loopwright-sheet-ready:Queue demo");
    expect(sheetStatusTitle("failed", "No project")).toBe("loopwright-sheet-failed:No project");
    expect(sheetStatusTitle("loading", "x")).toBeNull();
    expect(sheetStatusTitle("idle", "x")).toBeNull();
  });

  it("uses the same query key and title prefixes as the main process", () => {
    expect(renderer.SHEET_PRINT_QUERY_KEY).toBe(main.SHEET_PRINT_QUERY_KEY);
    expect(renderer.SHEET_READY_TITLE_PREFIX).toBe(main.SHEET_READY_TITLE_PREFIX);
    expect(renderer.SHEET_FAILED_TITLE_PREFIX).toBe(main.SHEET_FAILED_TITLE_PREFIX);
    // The URL main loads turns on print mode at the page size it asked for.
    const url = new URL(main.sheetPrintUrl({ route: "#/sheet/p/v", pageSize: "Letter" }).replace("app://loopwright", "http://x"));
    expect(readSheetPrintMode(url.search)).toEqual({ pageSize: "letter" });
    expect(url.hash).toBe("#/sheet/p/v");
  });

  it("renders no controls in print-only mode, and the Print button otherwise", () => {
    const deps = { bridge: { request: () => new Promise<never>(() => undefined) }, documents: createMemoryDocumentStore(() => 0), today: () => "2025-01-01" };
    const normal = renderToString(<DesignSheetView deps={{ ...deps, locationSearch: "" }} projectId="p" variantId="v" />);
    const printOnly = renderToString(<DesignSheetView deps={{ ...deps, locationSearch: "?sheet-print=A4" }} projectId="p" variantId="v" />);
    expect(normal).toMatch(/>Print</);
    expect(normal).toMatch(/Sign off as/);
    expect(printOnly).not.toMatch(/>Print</);
    expect(printOnly).not.toMatch(/Sign off as|Design sheet</);
  });
});
