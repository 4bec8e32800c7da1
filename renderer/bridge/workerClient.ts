/**
 * The engine bridge over a Web Worker (browser mode and end-to-end tests). Requests and replies
 * follow the message protocol of shared-engine/api/contract.ts.
 */
import { createMessageClient } from "../../shared-engine/api/client";
import type { EngineBridge } from "../../shared-engine/api/contract";
import { EngineError } from "../../shared-engine/errors";

/** The part of `Worker` the client uses, so tests can pass an in-process stand-in. */
export interface WorkerLike {
  postMessage(message: unknown): void;
  addEventListener(type: "message" | "messageerror" | "error", listener: (event: Event) => void): void;
  removeEventListener(type: "message" | "messageerror" | "error", listener: (event: Event) => void): void;
  terminate(): void;
}

export interface DisposableBridge {
  bridge: EngineBridge;
  /** Which transport carries requests. */
  transport: "worker" | "ipc";
  /** Stops the transport and rejects pending requests with kind "cancelled". Idempotent. */
  dispose(): void;
}

/** Starts the bundled engine worker. Vite recognises this `new URL(..., import.meta.url)` form. */
export function startEngineWorker(): WorkerLike {
  return new Worker(new URL("./engine.worker.ts", import.meta.url), { type: "module", name: "loopwright-engine" });
}

export function createWorkerBridge(startWorker: () => WorkerLike = startEngineWorker): DisposableBridge {
  const worker = startWorker();
  let disposed = false;
  const client = createMessageClient((message) => {
    if (disposed) throw new EngineError("cancelled", "The engine connection is closed; reload the page to start it again", {});
    worker.postMessage(message);
  });

  const onMessage = (event: Event): void => client.receive((event as MessageEvent).data);
  // A worker that fails to load or throws outside a request cannot answer anything pending.
  const onError = (event: Event): void => {
    const detail = (event as ErrorEvent).message || "the engine worker stopped";
    client.failAll(new EngineError("internal", `The engine worker failed: ${detail}`, {}));
  };
  const onMessageError = (): void => {
    client.failAll(new EngineError("internal", "A reply from the engine worker could not be read (structured clone failed)", {}));
  };
  worker.addEventListener("message", onMessage);
  worker.addEventListener("error", onError);
  worker.addEventListener("messageerror", onMessageError);

  const bridge: EngineBridge = {
    request(method, params, options) {
      if (disposed) return Promise.reject(new EngineError("cancelled", `${method}: the engine connection is closed`, { method }));
      return client.request(method, params, options);
    },
  };

  return {
    bridge,
    transport: "worker",
    dispose() {
      if (disposed) return;
      disposed = true;
      worker.removeEventListener("message", onMessage);
      worker.removeEventListener("error", onError);
      worker.removeEventListener("messageerror", onMessageError);
      worker.terminate();
      client.failAll(new EngineError("cancelled", "The engine connection was closed", {}));
    },
  };
}
