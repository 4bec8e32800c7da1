// The desktop print path end to end without the Electron binary: preload → IPC → hidden window
// → printToPDF → save dialog → file, with fakes for every Electron and Node object.
import { describe, expect, it } from "vitest";
import { IPC_CHANNELS } from "../../../shared-engine/api/contract";
import { createPreloadApi } from "../../../main/createPreloadApi";
import { isTrustedSender } from "../../../main/guards";
import {
  registerPrintSheetIpc,
  sheetPdfFileName,
  sheetPrintUrl,
  validatePrintSheetArgs,
  SHEET_FAILED_TITLE_PREFIX,
  SHEET_READY_TITLE_PREFIX,
  type HiddenSheetWindow,
  type PrintSheetDeps,
} from "../../../main/printIpc";
import { mainWindowOptions } from "../../../main/window";
import { startApp } from "../../../main/startApp";
import { createFakeIpcMain, createIpcPair } from "./fakeElectron";
import { InProcessWorker } from "./inProcessWorker";

const pdfBytes = Uint8Array.from("%PDF-1.7\n%fake", (c) => c.charCodeAt(0));

type Behaviour = (window: FakeSheetWindow) => void;
type Listener = (event: unknown, ...args: unknown[]) => void;

class FakeSheetWindow implements HiddenSheetWindow {
  urls: string[] = [];
  destroyed = false;
  printCalls: unknown[] = [];
  listeners = new Map<string, Listener[]>();
  constructor(
    public options: Record<string, unknown>,
    private behaviour: Behaviour,
    public printReply: () => Promise<Uint8Array> = async () => pdfBytes,
  ) {}
  webContents = {
    on: (event: string, listener: Listener) => {
      this.listeners.set(event, [...(this.listeners.get(event) ?? []), listener]);
      return this.webContents;
    },
    printToPDF: (options: unknown) => {
      this.printCalls.push(options);
      return this.printReply();
    },
  } as unknown as HiddenSheetWindow["webContents"];
  emit(event: string, ...args: unknown[]) {
    for (const listener of this.listeners.get(event) ?? []) listener({}, ...args);
  }
  loadURL(url: string) {
    this.urls.push(url);
    // The page reports asynchronously, as the real sheet does after designing the variant.
    setTimeout(() => this.behaviour(this), 0);
    return Promise.resolve();
  }
  destroy() {
    this.destroyed = true;
  }
  isDestroyed() {
    return this.destroyed;
  }
}

const readySheet: Behaviour = (w) => {
  w.emit("page-title-updated", "Loopwright"); // the entry page's own title comes first
  w.emit("page-title-updated", `${SHEET_READY_TITLE_PREFIX}Queue demo: backlog`);
};

function setup(options: { behaviour?: Behaviour; dialog?: { canceled: boolean; filePath?: string }; frameUrl?: string; writeFails?: boolean; printReply?: () => Promise<Uint8Array> } = {}) {
  const windows: FakeSheetWindow[] = [];
  const dialogs: unknown[] = [];
  const writes: Array<{ path: string; bytes: Uint8Array }> = [];
  const behaviour = options.behaviour ?? readySheet;
  const deps: PrintSheetDeps = {
    BrowserWindow: class extends FakeSheetWindow {
      constructor(windowOptions: object) {
        super(windowOptions as Record<string, unknown>, behaviour, options.printReply);
        windows.push(this);
      }
    } as unknown as PrintSheetDeps["BrowserWindow"],
    preloadPath: "/app/dist/main/preload.cjs",
    showSaveDialog: async (dialogOptions) => {
      dialogs.push(dialogOptions);
      return options.dialog ?? { canceled: false, filePath: "/home/u/sheet.pdf" };
    },
    writeFile: async (path, bytes) => {
      if (options.writeFails) throw new Error("EACCES: permission denied");
      writes.push({ path, bytes });
    },
    isTrustedSender,
    readyTimeoutMs: 40,
  };
  const pair = createIpcPair(options.frameUrl ?? "app://loopwright/index.html");
  const dispose = registerPrintSheetIpc(pair.ipcMain, deps);
  const api = createPreloadApi(pair.ipcRenderer);
  return { api, pair, windows, dialogs, writes, dispose };
}

describe("print-sheet IPC", () => {
  it("prints the sheet in a hidden hardened window, saves the PDF where the user chose and closes the window", async () => {
    const t = setup();
    const answer = await t.api.printSheet!("#/sheet/p-1f/lqr.soft", "A4");
    expect(answer).toEqual({ ok: true, result: { savedTo: "/home/u/sheet.pdf" } });
    expect(t.windows).toHaveLength(1);
    const window = t.windows[0]!;
    const main = mainWindowOptions({ preloadPath: "/app/dist/main/preload.cjs" });
    expect(window.options.show).toBe(false);
    expect(window.options.webPreferences).toEqual({ ...main.webPreferences, backgroundThrottling: false });
    expect(window.urls).toEqual(["app://loopwright/index.html?sheet-print=A4#/sheet/p-1f/lqr.soft"]);
    expect(window.printCalls).toMatchObject([{ pageSize: "A4", preferCSSPageSize: true, displayHeaderFooter: false }]);
    expect(t.dialogs).toEqual([{ title: "Save the design sheet", defaultPath: "Queue-demo-backlog-lqr.soft-sheet.pdf", filters: [{ name: "PDF document", extensions: ["pdf"] }] }]);
    expect(t.writes).toHaveLength(1);
    expect(t.writes[0]!.path).toBe("/home/u/sheet.pdf");
    expect(Array.from(t.writes[0]!.bytes)).toEqual(Array.from(pdfBytes));
    expect(window.destroyed).toBe(true);
  });

  it("prints Letter when asked for Letter", async () => {
    const t = setup();
    await t.api.printSheet!("#/sheet/p/v", "Letter");
    expect(t.windows[0]!.urls[0]).toBe("app://loopwright/index.html?sheet-print=Letter#/sheet/p/v");
    expect(t.windows[0]!.printCalls).toMatchObject([{ pageSize: "Letter" }]);
  });

  it("answers cancelled and writes nothing when the user cancels the save dialog", async () => {
    const t = setup({ dialog: { canceled: true } });
    expect(await t.api.printSheet!("#/sheet/p/v", "A4")).toEqual({ ok: true, result: { cancelled: true } });
    expect(t.writes).toEqual([]);
    expect(t.windows[0]!.destroyed).toBe(true);
  });

  it("fails with no-convergence after the timeout when the sheet never reports ready, and closes the window", async () => {
    const t = setup({ behaviour: (w) => w.emit("page-title-updated", "Loopwright") });
    const answer = await t.api.printSheet!("#/sheet/p/v", "A4");
    expect(answer).toMatchObject({ ok: false, error: { kind: "timeout", message: expect.stringMatching(/not ready within 40 ms/), details: { reason: "timeout", limitMs: 40 } } });
    expect(t.dialogs).toEqual([]);
    expect(t.windows[0]!.destroyed).toBe(true);
  });

  it.each([
    ["no variant", "#/sheet/p"],
    ["a full URL", "https://evil.example/#/sheet/p/v"],
    ["a dot-dot id", "#/sheet/p/.."],
    ["an extra segment", "#/sheet/p/v/x"],
    ["a query", "#/sheet/p/v?x=1"],
    ["an encoded slash", "#/sheet/p/a%2Fb"],
    ["another route", "#/compare/p/v"],
    ["an id over 64 characters", `#/sheet/${"a".repeat(65)}/v`],
  ])("refuses a bad route (%s) with invalid-argument and opens no window", async (_what, route) => {
    const t = setup();
    const answer = await t.api.printSheet!(route, "A4");
    expect(answer).toMatchObject({ ok: false, error: { kind: "invalid-argument", details: { field: "route" } } });
    expect(t.windows).toHaveLength(0);
  });

  it("refuses malformed arguments sent around the preload", async () => {
    const t = setup();
    const invoke = (...args: unknown[]) => t.pair.ipcRenderer.invoke(IPC_CHANNELS.printSheet, ...args);
    expect(await invoke({ route: "#/sheet/p/v", pageSize: "a4" })).toMatchObject({ ok: false, error: { kind: "invalid-argument", details: { field: "pageSize" } } });
    expect(await invoke({ route: "#/sheet/p/v", pageSize: "A4", path: "/etc/x" })).toMatchObject({ ok: false, error: { kind: "invalid-argument", details: { field: "path" } } });
    expect(await invoke("#/sheet/p/v", "A4")).toMatchObject({ ok: false, error: { kind: "invalid-argument", details: { field: "request" } } });
    expect(await invoke(null)).toMatchObject({ ok: false, error: { kind: "invalid-argument" } });
    expect(t.windows).toHaveLength(0);
  });

  it("refuses a request from a frame outside the app origin and opens no window", async () => {
    const t = setup({ frameUrl: "https://example.com/" });
    const answer = await t.api.printSheet!("#/sheet/p/v", "A4");
    expect(answer).toMatchObject({ ok: false, error: { kind: "forbidden", details: { reason: "untrusted-sender" } } });
    expect(t.windows).toHaveLength(0);
  });

  it("reports the sheet's own failure (unknown project) and closes the window", async () => {
    const t = setup({ behaviour: (w) => w.emit("page-title-updated", `${SHEET_FAILED_TITLE_PREFIX}No project with id "p"`) });
    const answer = await t.api.printSheet!("#/sheet/p/v", "A4");
    expect(answer).toMatchObject({ ok: false, error: { kind: "invalid-argument", message: expect.stringMatching(/could not be rendered: No project with id "p"/) } });
    expect(t.windows[0]!.destroyed).toBe(true);
  });

  it("reports a page that fails to load or a renderer that stops, and closes the window each time", async () => {
    const failLoad = setup({ behaviour: (w) => w.emit("did-fail-load", -6, "ERR_FILE_NOT_FOUND") });
    expect(await failLoad.api.printSheet!("#/sheet/p/v", "A4")).toMatchObject({ ok: false, error: { kind: "internal", message: expect.stringMatching(/-6 ERR_FILE_NOT_FOUND/) } });
    expect(failLoad.windows[0]!.destroyed).toBe(true);
    const gone = setup({ behaviour: (w) => w.emit("render-process-gone", { reason: "crashed" }) });
    expect(await gone.api.printSheet!("#/sheet/p/v", "A4")).toMatchObject({ ok: false, error: { kind: "internal", message: expect.stringMatching(/crashed/) } });
    expect(gone.windows[0]!.destroyed).toBe(true);
  });

  it("reports a failed print without opening the dialog, and closes the window", async () => {
    const t = setup({ printReply: async () => new Uint8Array(0) });
    expect(await t.api.printSheet!("#/sheet/p/v", "A4")).toMatchObject({ ok: false, error: { kind: "internal", message: expect.stringMatching(/produced no PDF/) } });
    expect(t.dialogs).toEqual([]);
    expect(t.windows[0]!.destroyed).toBe(true);
  });

  it("reports a file that cannot be written as a storage error naming the path, and closes the window", async () => {
    const t = setup({ writeFails: true });
    expect(await t.api.printSheet!("#/sheet/p/v", "A4")).toMatchObject({
      ok: false,
      error: { kind: "storage", message: expect.stringMatching(/could not be written to \/home\/u\/sheet\.pdf: EACCES/), details: { path: "/home/u/sheet.pdf" } },
    });
    expect(t.windows[0]!.destroyed).toBe(true);
  });

  it("refuses a second print while one is in progress", async () => {
    const t = setup();
    const first = t.api.printSheet!("#/sheet/p/v", "A4");
    const second = await t.api.printSheet!("#/sheet/p/w", "A4");
    expect(second).toMatchObject({ ok: false, error: { kind: "conflict" } });
    expect(await first).toMatchObject({ ok: true });
    expect(await t.api.printSheet!("#/sheet/p/w", "A4")).toMatchObject({ ok: true });
  });

  it("removes its handler when disposed", () => {
    const t = setup();
    expect(t.pair.ipcMain.handlers.has(IPC_CHANNELS.printSheet)).toBe(true);
    t.dispose();
    expect(t.pair.ipcMain.handlers.has(IPC_CHANNELS.printSheet)).toBe(false);
  });
});

describe("print-sheet helpers", () => {
  it("keeps only the checked route and page size from a valid request", () => {
    expect(validatePrintSheetArgs([{ route: "#/sheet/p-0a/v_1", pageSize: "Letter" }])).toEqual({ route: "#/sheet/p-0a/v_1", pageSize: "Letter", projectId: "p-0a", variantId: "v_1" });
    expect(() => validatePrintSheetArgs([])).toThrow(/one argument/);
  });

  it("builds the hidden window's URL from the app entry, the print flag and the route", () => {
    expect(sheetPrintUrl({ route: "#/sheet/a/b", pageSize: "A4" })).toBe("app://loopwright/index.html?sheet-print=A4#/sheet/a/b");
  });

  it("suggests a file name without separators, drive letters or leading dots", () => {
    expect(sheetPdfFileName("Demo — invented scenario: message-queue backlog regulator", "lqr")).toBe("Demo-invented-scenario-message-queue-backlog-regulator-lqr-sheet.pdf");
    expect(sheetPdfFileName("../../etc/passwd", "v")).toBe("etc-passwd-v-sheet.pdf");
    expect(sheetPdfFileName("C:\\x", "v")).toBe("C-x-v-sheet.pdf");
    expect(sheetPdfFileName("", "")).toBe("project-variant-sheet.pdf");
  });
});

describe("startApp wiring of the print channel", () => {
  function startWith(printing: boolean) {
    const ipcMain = createFakeIpcMain();
    let ready: () => void = () => undefined;
    const whenReady = new Promise<void>((resolve) => (ready = resolve));
    const app = { requestSingleInstanceLock: () => true, quit() {}, whenReady: () => whenReady, on: () => app };
    class Window {
      constructor(public options: unknown) {}
      static getAllWindows = () => [];
      loadURL = () => Promise.resolve();
      once() {}
      show() {}
      isMinimized = () => false;
      restore() {}
      focus() {}
    }
    startApp({
      app,
      protocol: { registerSchemesAsPrivileged: () => undefined, handle: () => undefined },
      session: () => ({ setPermissionRequestHandler: () => undefined, setPermissionCheckHandler: () => undefined }),
      ipcMain,
      BrowserWindow: Window,
      platform: "linux",
      files: { readFile: async () => new Uint8Array() },
      paths: { rendererRoot: "/r", preload: "/m/preload.cjs" },
      createWorker: () => new InProcessWorker(),
      ...(printing
        ? { printing: { BrowserWindow: Window as never, showSaveDialog: async () => ({ canceled: true }), writeFile: async () => undefined } }
        : {}),
    } as never);
    return { ipcMain, ready: async () => (ready(), await whenReady, await Promise.resolve()) };
  }

  it("registers the print channel after ready when printing is wired, and not otherwise", async () => {
    const wired = startWith(true);
    expect(wired.ipcMain.handlers.has(IPC_CHANNELS.printSheet)).toBe(false);
    await wired.ready();
    expect(wired.ipcMain.handlers.has(IPC_CHANNELS.printSheet)).toBe(true);
    const bare = startWith(false);
    await bare.ready();
    expect(bare.ipcMain.handlers.has(IPC_CHANNELS.request)).toBe(true);
    expect(bare.ipcMain.handlers.has(IPC_CHANNELS.printSheet)).toBe(false);
  });
});
