// The desktop print path, with a fake webContents (no Electron binary needed).
import { describe, expect, it } from "vitest";
import { printSheetToPdf, sheetPdfOptions, type PrintableContents } from "../../../main/print";

function fakeContents(reply: () => Promise<Uint8Array>): PrintableContents & { calls: unknown[] } {
  const calls: unknown[] = [];
  return {
    calls,
    printToPDF(options) {
      calls.push(options);
      return reply();
    },
  };
}

const pdfBytes = Uint8Array.from("%PDF-1.7\n...", (c) => c.charCodeAt(0));

describe("printSheetToPdf", () => {
  it("prints A4 portrait with backgrounds, CSS page size and no browser header or footer", async () => {
    const contents = fakeContents(async () => pdfBytes);
    const bytes = await printSheetToPdf(contents, { pageSize: "a4" });
    expect(bytes).toBe(pdfBytes);
    expect(contents.calls).toEqual([
      { pageSize: "A4", printBackground: true, landscape: false, margins: { top: 0, bottom: 0, left: 0, right: 0 }, displayHeaderFooter: false, preferCSSPageSize: true },
    ]);
  });

  it("maps letter to Electron's Letter page size", async () => {
    const contents = fakeContents(async () => pdfBytes);
    await printSheetToPdf(contents, { pageSize: "letter" });
    expect((contents.calls[0] as { pageSize: string }).pageSize).toBe("Letter");
  });

  it("refuses a page size other than a4 or letter", () => {
    expect(() => sheetPdfOptions("a3" as never)).toThrow(/pageSize must be "a4" or "letter"/);
  });

  it("reports a failed print with the page size and the cause", async () => {
    const contents = fakeContents(async () => { throw new Error("renderer gone"); });
    await expect(printSheetToPdf(contents, { pageSize: "a4" })).rejects.toThrow(/design sheet \(A4\) failed: renderer gone/);
  });

  it("rejects output that is not a PDF", async () => {
    const contents = fakeContents(async () => new Uint8Array(0));
    await expect(printSheetToPdf(contents, { pageSize: "letter" })).rejects.toThrow(/produced no PDF \(0 bytes\)/);
  });
});
