/**
 * The main-process end of "print the design sheet to PDF" (IPC_CHANNELS.printSheet,
 * "loopwright:print-sheet"). Every Electron and Node object is injected, so the whole path is
 * unit-tested with fakes (test/app/main/printIpc.test.ts).
 *
 * One request, step by step:
 * 1. The sender frame must be on the app origin (`isTrustedSender`, as for engine requests) and
 *    the one argument must be exactly `{ route: "#/sheet/<projectId>/<variantId>", pageSize:
 *    "A4" | "Letter" }` (ids as the project format allows them). Nothing else (no path, no HTML)
 *    is accepted from the page.
 * 2. A hidden window is created with the main window's options (`mainWindowOptions`: same
 *    hardened webPreferences; the app-wide guards and the protocol's CSP apply to it as to any
 *    window) and loads `app://loopwright/index.html?sheet-print=<A4|Letter>#/sheet/<p>/<v>`.
 * 3. Readiness handshake (no extra IPC channel, nothing new in the preload): in print mode the
 *    sheet view sets `document.title` to `loopwright-sheet-ready:<project name>` once the sheet
 *    is rendered, or `loopwright-sheet-failed:<reason>` when it cannot be; main listens to the
 *    web contents' `page-title-updated`. A load failure, a crashed renderer or the timeout
 *    (default 30 s) end the wait with an error.
 * 4. `printSheetToPdf` prints it; a save dialog offers "<project>-<variant>-sheet.pdf"; the bytes
 *    are written with the injected `writeFile`.
 * 5. The hidden window is destroyed in every path (finally). The answer is always an envelope:
 *    `{ ok: true, result: { savedTo } | { cancelled: true } }` or `{ ok: false, error }`.
 *
 * WARNING: SHEET_PRINT_QUERY_KEY and the two title prefixes are repeated in
 * renderer/sheet/sheetPrinting.ts (main and renderer never import each other); a test checks
 * that both copies agree.
 */
import { EngineError, toErrorPayload } from "../shared-engine/errors";
import { IPC_CHANNELS, type Envelope } from "../shared-engine/api/contract";
import type { PrintSheetResult, SheetPaperSize } from "../shared-engine/api/preloadApi";
import { APP_ENTRY_URL } from "./appOrigin";
import type { SenderFrameLike } from "./guards";
import type { IpcEventLike, IpcMainLike } from "./ipc";
import { printSheetToPdf, type PrintableContents } from "./print";
import { mainWindowOptions } from "./window";
import type { BrowserWindowConstructorOptions } from "electron";

/** Query parameter telling the sheet view to render print-only and report readiness. */
export const SHEET_PRINT_QUERY_KEY = "sheet-print";
/** Title the sheet view sets once the sheet is rendered (followed by the project name). */
export const SHEET_READY_TITLE_PREFIX = "loopwright-sheet-ready:";
/** Title the sheet view sets when the sheet cannot be rendered (followed by the reason). */
export const SHEET_FAILED_TITLE_PREFIX = "loopwright-sheet-failed:";
/** How long the hidden window may take to render the sheet (it designs the variant first). */
export const DEFAULT_SHEET_READY_TIMEOUT_MS = 30_000;

/** Ids as the project format allows them (shared-engine/project/validationParts.ts ID_PATTERN). */
const ROUTE_PATTERN = /^#\/sheet\/([A-Za-z0-9][A-Za-z0-9_.-]{0,63})\/([A-Za-z0-9][A-Za-z0-9_.-]{0,63})$/;

export interface PrintSheetRequest {
  route: string;
  pageSize: SheetPaperSize;
  projectId: string;
  variantId: string;
}

/** The web contents of the hidden window: printing plus the events the wait listens to. */
export interface HiddenSheetContents extends PrintableContents {
  on(event: "page-title-updated", listener: (event: unknown, title: string) => void): unknown;
  on(event: "did-fail-load", listener: (event: unknown, errorCode: number, errorDescription: string) => void): unknown;
  on(event: "render-process-gone", listener: (event: unknown, details: { reason: string }) => void): unknown;
}

/** The members of a BrowserWindow used for the hidden sheet window. */
export interface HiddenSheetWindow {
  readonly webContents: HiddenSheetContents;
  loadURL(url: string): Promise<void>;
  /** Closes without running the page's beforeunload (a hidden window must never linger). */
  destroy(): void;
  isDestroyed(): boolean;
}

export interface PrintSheetDeps {
  BrowserWindow: new (options: BrowserWindowConstructorOptions) => HiddenSheetWindow;
  /** Absolute path of the bundled preload (the hidden window loads the full app page). */
  preloadPath: string;
  /** Electron's `dialog.showSaveDialog`, already bound to a parent window if wanted. */
  showSaveDialog(options: { title: string; defaultPath: string; filters: Array<{ name: string; extensions: string[] }> }): Promise<{ canceled: boolean; filePath?: string }>;
  writeFile(filePath: string, bytes: Uint8Array): Promise<void>;
  isTrustedSender(frame: SenderFrameLike | null | undefined): boolean;
  readyTimeoutMs?: number;
  /** Timers, injectable for tests. */
  setTimeout?: (callback: () => void, ms: number) => unknown;
  clearTimeout?: (handle: unknown) => void;
}

/** Checks the IPC arguments (exactly one `{ route, pageSize }`); throws EngineError "invalid-argument". */
export function validatePrintSheetArgs(args: readonly unknown[]): PrintSheetRequest {
  if (args.length !== 1) throw invalid(`the print request must be one argument { route, pageSize }; got ${args.length}`, "request");
  const raw = args[0];
  if (raw === null || typeof raw !== "object" || Array.isArray(raw) || ![Object.prototype, null].includes(Object.getPrototypeOf(raw))) {
    throw invalid("the print request must be a plain object { route, pageSize }", "request");
  }
  for (const key of Object.keys(raw)) {
    if (key !== "route" && key !== "pageSize") throw invalid(`the print request has an unexpected field ${JSON.stringify(key.slice(0, 40))}; allowed: route, pageSize`, key);
  }
  const { route, pageSize } = raw as Record<string, unknown>;
  const match = typeof route === "string" ? ROUTE_PATTERN.exec(route) : null;
  if (!match) {
    throw invalid(
      `route must be "#/sheet/<projectId>/<variantId>" with ids of letters, digits, "_", "." and "-" (at most 64 each); got ${typeof route === "string" ? JSON.stringify(route.slice(0, 120)) : typeof route}`,
      "route",
    );
  }
  if (pageSize !== "A4" && pageSize !== "Letter") throw invalid(`pageSize must be "A4" or "Letter"; got ${JSON.stringify(pageSize) ?? typeof pageSize}`, "pageSize");
  return { route: match[0], pageSize, projectId: match[1]!, variantId: match[2]! };
}

/** The URL the hidden window loads: the app entry with the print flag, then the sheet route. */
export function sheetPrintUrl(request: Pick<PrintSheetRequest, "route" | "pageSize">): string {
  return `${APP_ENTRY_URL}?${SHEET_PRINT_QUERY_KEY}=${request.pageSize}${request.route}`;
}

/**
 * A file name "<project>-<variant>-sheet.pdf": runs of characters other than letters, digits,
 * ".", "_" and "-" become one "-", so no separator, drive letter or control character survives.
 */
export function sheetPdfFileName(projectName: string, variantId: string): string {
  const clean = (text: string) => text.replace(/[^A-Za-z0-9._-]+/g, "-").replace(/^[-.]+|-+$/g, "").slice(0, 80);
  return `${clean(projectName) || "project"}-${clean(variantId) || "variant"}-sheet.pdf`;
}

/** Prints one validated request. Throws EngineError; the hidden window is destroyed in every path. */
export async function printSheetRequest(deps: PrintSheetDeps, request: PrintSheetRequest): Promise<PrintSheetResult> {
  const base = mainWindowOptions({ preloadPath: deps.preloadPath });
  // Same hardened webPreferences as the main window; background throttling off because a window
  // that is never shown would otherwise get its timers and frames throttled while it renders.
  const window = new deps.BrowserWindow({ ...base, show: false, webPreferences: { ...base.webPreferences, backgroundThrottling: false } });
  try {
    const projectName = await loadAndWaitForSheet(deps, window, request);
    const bytes = await printSheetToPdf(window.webContents, { pageSize: request.pageSize === "A4" ? "a4" : "letter" }).catch((error: unknown) => {
      throw new EngineError("internal", error instanceof Error ? error.message : String(error), { route: request.route });
    });
    const choice = await deps.showSaveDialog({
      title: "Save the design sheet",
      defaultPath: sheetPdfFileName(projectName || request.projectId, request.variantId),
      filters: [{ name: "PDF document", extensions: ["pdf"] }],
    });
    if (choice.canceled || !choice.filePath) return { cancelled: true };
    try {
      await deps.writeFile(choice.filePath, bytes);
    } catch (error) {
      throw new EngineError("storage", `The design sheet could not be written to ${choice.filePath}: ${error instanceof Error ? error.message : String(error)}`, { path: choice.filePath });
    }
    return { savedTo: choice.filePath };
  } finally {
    if (!window.isDestroyed()) window.destroy();
  }
}

/** Loads the sheet in the hidden window and resolves with the project name the sheet reports. */
function loadAndWaitForSheet(deps: PrintSheetDeps, window: HiddenSheetWindow, request: PrintSheetRequest): Promise<string> {
  const limitMs = deps.readyTimeoutMs ?? DEFAULT_SHEET_READY_TIMEOUT_MS;
  const setTimer = deps.setTimeout ?? ((callback: () => void, ms: number) => globalThis.setTimeout(callback, ms));
  const clearTimer = deps.clearTimeout ?? ((handle: unknown) => globalThis.clearTimeout(handle as ReturnType<typeof globalThis.setTimeout>));
  const started = Date.now();
  return new Promise<string>((resolve, reject) => {
    let settled = false;
    const finish = (action: () => void) => {
      if (settled) return;
      settled = true;
      clearTimer(timer);
      action();
    };
    const fail = (kind: "invalid-argument" | "internal" | "timeout", message: string, details: Record<string, unknown> = {}) =>
      finish(() => reject(new EngineError(kind, message, { route: request.route, ...details })));
    const timer = setTimer(
      () => fail("timeout", `The design sheet ${request.route} was not ready within ${limitMs} ms`, { reason: "timeout", limitMs, waitedMs: Date.now() - started }),
      limitMs,
    );
    window.webContents.on("page-title-updated", (_event, title) => {
      if (typeof title !== "string") return;
      if (title.startsWith(SHEET_READY_TITLE_PREFIX)) finish(() => resolve(title.slice(SHEET_READY_TITLE_PREFIX.length)));
      // The sheet could not be built, most often because the project or variant does not exist.
      else if (title.startsWith(SHEET_FAILED_TITLE_PREFIX)) fail("invalid-argument", `The design sheet ${request.route} could not be rendered: ${title.slice(SHEET_FAILED_TITLE_PREFIX.length)}`);
    });
    window.webContents.on("did-fail-load", (_event, errorCode, errorDescription) =>
      fail("internal", `The design sheet page did not load (${errorCode} ${errorDescription})`, { errorCode }),
    );
    window.webContents.on("render-process-gone", (_event, details) =>
      fail("internal", `The design sheet's renderer stopped (${details?.reason ?? "unknown reason"})`),
    );
    window.loadURL(sheetPrintUrl(request)).catch((error: unknown) =>
      fail("internal", `The design sheet page did not load: ${error instanceof Error ? error.message : String(error)}`),
    );
  });
}

/**
 * Registers the print handler on IPC_CHANNELS.printSheet and returns a disposer. One print runs
 * at a time (a second request while the first waits in its dialog is refused with "conflict").
 */
export function registerPrintSheetIpc(ipcMain: Pick<IpcMainLike, "handle" | "removeHandler">, deps: PrintSheetDeps): () => void {
  let busy = false;
  const onPrint = async (event: IpcEventLike, ...args: unknown[]): Promise<Envelope<PrintSheetResult>> => {
    try {
      let trusted = false;
      try {
        trusted = deps.isTrustedSender(event?.senderFrame);
      } catch {
        trusted = false;
      }
      if (!trusted) throw new EngineError("forbidden", "the print request came from a frame outside the app origin and was refused", { reason: "untrusted-sender" });
      const request = validatePrintSheetArgs(args);
      if (busy) throw new EngineError("conflict", "A design sheet is already being printed; wait until it is saved or cancelled", { route: request.route });
      busy = true;
      try {
        return { ok: true, result: await printSheetRequest(deps, request) };
      } finally {
        busy = false;
      }
    } catch (error) {
      return { ok: false, error: toErrorPayload(error) };
    }
  };
  ipcMain.handle(IPC_CHANNELS.printSheet, onPrint);
  return () => ipcMain.removeHandler(IPC_CHANNELS.printSheet);
}

function invalid(message: string, field: string): EngineError {
  return new EngineError("invalid-argument", message, { field });
}
