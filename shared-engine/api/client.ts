/**
 * A bridge client over the message protocol (contract.ts). Used by the browser-mode Web Worker
 * client and by the Electron main process to reach its engine worker thread.
 */
import { EngineError, fromErrorPayload } from "../errors";
import type {
  EngineBridge,
  EngineMethod,
  EngineParams,
  EngineResult,
  Progress,
  RequestMessage,
  RequestOptions,
  ServerMessage,
  CancelMessage,
} from "./contract";

interface Pending {
  resolve(value: unknown): void;
  reject(error: EngineError): void;
  onProgress?: (progress: Progress) => void;
  cleanup(): void;
}

export interface MessageClient extends EngineBridge {
  /** Feed every message from the engine side here. */
  receive(message: unknown): void;
  /** Rejects every pending request (the engine died or the page is closing). */
  failAll(error: EngineError): void;
  pendingCount(): number;
}

export function createMessageClient(send: (message: RequestMessage | CancelMessage) => void): MessageClient {
  let nextId = 1;
  const pending = new Map<number, Pending>();

  function settle(id: number): Pending | undefined {
    const entry = pending.get(id);
    if (entry) {
      pending.delete(id);
      entry.cleanup();
    }
    return entry;
  }

  return {
    request<M extends EngineMethod>(method: M, params: EngineParams<M>, options: RequestOptions = {}): Promise<EngineResult<M>> {
      const id = nextId++;
      return new Promise<EngineResult<M>>((resolve, reject) => {
        const { signal, onProgress } = options;
        if (signal?.aborted) {
          reject(new EngineError("cancelled", `${method} was cancelled before it started`, { method }));
          return;
        }
        const onAbort = (): void => {
          send({ type: "cancel", id });
          settle(id)?.reject(new EngineError("cancelled", `${method} was cancelled`, { method }));
        };
        signal?.addEventListener("abort", onAbort);
        pending.set(id, {
          resolve: resolve as (value: unknown) => void,
          reject,
          onProgress,
          cleanup: () => signal?.removeEventListener("abort", onAbort),
        });
        send({ type: "request", id, method, params });
      });
    },
    receive(message: unknown): void {
      const msg = message as Partial<ServerMessage> | null;
      if (!msg || typeof msg !== "object" || typeof msg.id !== "number") return;
      if (msg.type === "progress") {
        pending.get(msg.id)?.onProgress?.(msg.progress as Progress);
      } else if (msg.type === "result") {
        settle(msg.id)?.resolve((msg as { result: unknown }).result);
      } else if (msg.type === "error") {
        settle(msg.id)?.reject(fromErrorPayload((msg as { error: Parameters<typeof fromErrorPayload>[0] }).error));
      }
    },
    failAll(error: EngineError): void {
      for (const id of [...pending.keys()]) settle(id)?.reject(error);
    },
    pendingCount: () => pending.size,
  };
}
