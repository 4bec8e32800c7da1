/**
 * The page-facing half of the engine bridge, built over an injected `ipcRenderer`. The preload
 * (main/preload.ts) exposes the returned object on `window.loopwright` through contextBridge;
 * nothing else (no ipcRenderer, no channel names) reaches the page.
 */
import { IPC_CHANNELS, type Envelope, type Progress } from "../shared-engine/api/contract";
import type { ErrorPayload } from "../shared-engine/errors";
import type { IpcPrintSheetPayload, IpcProgressPayload, LoopwrightPreloadApi, PreloadRequestOptions, PrintSheetResult, SheetPaperSize } from "../shared-engine/api/preloadApi";

/** The members of Electron's `ipcRenderer` used here. */
export interface IpcRendererLike {
  invoke(channel: string, ...args: unknown[]): Promise<unknown>;
  send(channel: string, ...args: unknown[]): void;
  on(channel: string, listener: (event: unknown, ...args: unknown[]) => void): unknown;
}

export function createPreloadApi(ipcRenderer: IpcRendererLike): LoopwrightPreloadApi {
  const progressListeners = new Map<number, (progress: Progress) => void>();
  const inFlight = new Set<number>();
  let nextOwnId = -1; // ids the preload picks itself are negative; callers' ids are positive

  ipcRenderer.on(IPC_CHANNELS.progress, (_event, payload) => {
    const message = payload as Partial<IpcProgressPayload> | null;
    if (!message || typeof message !== "object" || typeof message.requestId !== "number") return;
    const progress = message.progress as Partial<Progress> | undefined;
    if (!progress || typeof progress.fraction !== "number" || typeof progress.label !== "string") return;
    const listener = progressListeners.get(message.requestId);
    if (!listener) return;
    try {
      listener({ fraction: Math.min(1, Math.max(0, progress.fraction)), label: progress.label });
    } catch {
      // A throwing progress listener must not break the bridge.
    }
  });

  async function request(method: string, params: unknown, options: PreloadRequestOptions = {}): Promise<Envelope<unknown>> {
    const given = options?.requestId;
    if (given !== undefined && !(typeof given === "number" && Number.isSafeInteger(given) && given > 0)) {
      return failure("invalid-argument", "requestId must be a positive safe integer", { field: "requestId" });
    }
    if (given !== undefined && inFlight.has(given)) {
      return failure("invalid-argument", `requestId ${given} is already in flight`, { field: "requestId", requestId: given });
    }
    const requestId = given ?? nextOwnId--;
    inFlight.add(requestId);
    if (typeof options?.onProgress === "function") progressListeners.set(requestId, options.onProgress);
    try {
      const envelope = await ipcRenderer.invoke(IPC_CHANNELS.request, { requestId, method, params });
      return isEnvelope(envelope)
        ? envelope
        : failure("internal", "The main process answered the engine request with something that is not an envelope", {});
    } catch (error) {
      // invoke rejects only when the arguments cannot be cloned or no handler is registered.
      const message = error instanceof Error ? error.message : String(error);
      return failure("invalid-argument", `The engine request could not be sent: ${message}`, { method: String(method) });
    } finally {
      inFlight.delete(requestId);
      progressListeners.delete(requestId);
    }
  }

  const api: LoopwrightPreloadApi = {
    apiVersion: 1,
    request: request as LoopwrightPreloadApi["request"],
    cancel(requestId: number): void {
      if (typeof requestId !== "number" || !inFlight.has(requestId)) return;
      ipcRenderer.send(IPC_CHANNELS.cancel, { requestId });
    },
    async printSheet(route: string, pageSize: SheetPaperSize): Promise<Envelope<PrintSheetResult>> {
      // Main validates again; this early check only spares a round trip for a wrong type.
      if (typeof route !== "string" || (pageSize !== "A4" && pageSize !== "Letter")) {
        return failure("invalid-argument", 'printSheet needs a route string and pageSize "A4" or "Letter"', { field: typeof route !== "string" ? "route" : "pageSize" });
      }
      const payload: IpcPrintSheetPayload = { route, pageSize };
      try {
        const envelope = await ipcRenderer.invoke(IPC_CHANNELS.printSheet, payload);
        return isEnvelope(envelope)
          ? (envelope as Envelope<PrintSheetResult>)
          : failure("internal", "The main process answered the print request with something that is not an envelope", {});
      } catch (error) {
        const message = error instanceof Error ? error.message : String(error);
        return failure("internal", `The print request could not be sent: ${message}`, { route });
      }
    },
  };
  return Object.freeze(api);
}

function failure(kind: ErrorPayload["kind"], message: string, details: Record<string, unknown>): Envelope<never> {
  return { ok: false, error: { kind, message, details } };
}

function isEnvelope(value: unknown): value is Envelope<unknown> {
  if (!value || typeof value !== "object") return false;
  const v = value as { ok?: unknown; error?: unknown };
  if (v.ok === true) return "result" in v;
  return v.ok === false && !!v.error && typeof v.error === "object";
}
