/**
 * The object the Electron preload exposes on `window.loopwright` (types only). The renderer's
 * IPC client implements `EngineBridge` on top of it:
 *
 *   request(method, params, { signal, onProgress }):
 *     id = next positive integer
 *     signal → on abort: api.cancel(id) (the pending call then resolves with a `cancelled` envelope)
 *     envelope = await api.request(method, params, { requestId: id, onProgress })
 *     envelope.ok ? envelope.result : throw fromErrorPayload(envelope.error)
 *
 * Only plain data and functions cross contextBridge (an AbortSignal would arrive as an empty
 * object), which is why cancellation is a separate call keyed by a request id.
 */
import type { EngineMethod, EngineParams, EngineResult, Envelope, Progress } from "./contract";

export interface PreloadRequestOptions {
  /**
   * The caller's id for this request, needed to cancel it: a positive safe integer, unique among
   * this page's requests in flight (a duplicate resolves with an `invalid-argument` envelope).
   * When omitted the preload picks a negative id of its own, so the two never collide.
   */
  requestId?: number;
  /** Called with each progress report of this request, until it settles. */
  onProgress?: (progress: Progress) => void;
}

export interface LoopwrightPreloadApi {
  /** Version of this exposed shape; bumped on any incompatible change. */
  readonly apiVersion: 1;
  /**
   * Runs one engine request in the main process' engine worker. Never rejects: failures
   * (invalid request, engine error, cancellation, a dead worker) resolve as `{ ok: false, error }`.
   */
  request<M extends EngineMethod>(
    method: M,
    params: EngineParams<M>,
    options?: PreloadRequestOptions,
  ): Promise<Envelope<EngineResult<M>>>;
  /** Cancels the request with this id, if it is still in flight; otherwise does nothing. */
  cancel(requestId: number): void;
  /**
   * Desktop app only (absent in browser mode): prints the sheet at `route`
   * ("#/sheet/<projectId>/<variantId>") to a PDF file the user picks in a save dialog. Never
   * rejects: `{ ok: true, result: { savedTo } | { cancelled: true } }` or `{ ok: false, error }`.
   */
  printSheet?(route: string, pageSize: SheetPaperSize): Promise<Envelope<PrintSheetResult>>;
}

/** Paper sizes the desktop print accepts (Electron's page-size names). */
export type SheetPaperSize = "A4" | "Letter";
/** Where the printed sheet went: a file path, or nowhere because the user cancelled the dialog. */
export type PrintSheetResult = { savedTo: string } | { cancelled: true };
/** Argument of `ipcRenderer.invoke(IPC_CHANNELS.printSheet, ...)`. */
export interface IpcPrintSheetPayload {
  route: string;
  pageSize: SheetPaperSize;
}

// ---- What travels on IPC_CHANNELS (preload ⇄ main); not visible to the page ---------------

/** Argument of `ipcRenderer.invoke(IPC_CHANNELS.request, ...)`. */
export interface IpcRequestPayload {
  requestId: number;
  method: string;
  params: unknown;
}
/** Argument of `ipcRenderer.send(IPC_CHANNELS.cancel, ...)`. */
export interface IpcCancelPayload {
  requestId: number;
}
/** What main sends on IPC_CHANNELS.progress to the requesting web contents. */
export interface IpcProgressPayload {
  requestId: number;
  progress: Progress;
}
