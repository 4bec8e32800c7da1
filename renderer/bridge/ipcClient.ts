/**
 * The engine bridge in the desktop app: requests go through the preload's `window.loopwright`
 * object (shared-engine/api/preloadApi.ts) to the main process' engine worker.
 */
import type { EngineBridge, EngineMethod, EngineParams, EngineResult, Envelope, RequestOptions } from "../../shared-engine/api/contract";
import type { LoopwrightPreloadApi } from "../../shared-engine/api/preloadApi";
import { EngineError, fromErrorPayload, type ErrorPayload } from "../../shared-engine/errors";
import type { DisposableBridge } from "./workerClient";

function isErrorPayload(value: unknown): value is ErrorPayload {
  const v = value as Partial<ErrorPayload> | null;
  return !!v && typeof v === "object" && typeof v.kind === "string" && typeof v.message === "string";
}

export function createIpcBridge(api: LoopwrightPreloadApi): DisposableBridge {
  let nextId = 1;
  let disposed = false;
  // Rejecters of requests in flight, so dispose can settle them.
  const inFlight = new Map<number, (error: EngineError) => void>();

  function request<M extends EngineMethod>(method: M, params: EngineParams<M>, options: RequestOptions = {}): Promise<EngineResult<M>> {
    if (disposed) return Promise.reject(new EngineError("cancelled", `${method}: the engine connection is closed`, { method }));
    const { signal, onProgress } = options;
    if (signal?.aborted) return Promise.reject(new EngineError("cancelled", `${method} was cancelled before it started`, { method }));
    const id = nextId++;
    return new Promise<EngineResult<M>>((resolve, reject) => {
      let settled = false;
      const finish = (action: () => void): void => {
        if (settled) return;
        settled = true;
        inFlight.delete(id);
        signal?.removeEventListener("abort", onAbort);
        action();
      };
      // Settle at once on abort; the preload's later `cancelled` envelope is then ignored.
      const onAbort = (): void => {
        api.cancel(id);
        finish(() => reject(new EngineError("cancelled", `${method} was cancelled`, { method })));
      };
      signal?.addEventListener("abort", onAbort);
      inFlight.set(id, (error) => finish(() => reject(error)));

      Promise.resolve()
        .then(() => api.request(method, params, { requestId: id, ...(onProgress ? { onProgress: (p) => !settled && onProgress(p) } : {}) }))
        .then(
          (envelope: Envelope<EngineResult<M>>) => {
            if (envelope && envelope.ok === true) finish(() => resolve(envelope.result));
            else if (envelope && envelope.ok === false && isErrorPayload(envelope.error)) finish(() => reject(fromErrorPayload(envelope.error)));
            else finish(() => reject(new EngineError("internal", `${method}: the desktop engine sent a reply of unknown shape`, { method })));
          },
          (error: unknown) => {
            const message = error instanceof Error ? error.message : String(error);
            finish(() => reject(new EngineError("internal", `${method}: the desktop engine could not be reached: ${message}`, { method })));
          },
        );
    });
  }

  const bridge: EngineBridge = { request };
  return {
    bridge,
    transport: "ipc",
    dispose() {
      if (disposed) return;
      disposed = true;
      for (const [id, rejectWith] of [...inFlight]) {
        api.cancel(id);
        rejectWith(new EngineError("cancelled", "The engine connection was closed", {}));
      }
    },
  };
}
