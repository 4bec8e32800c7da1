/**
 * The engine side of the message protocol (contract.ts): receives request and cancel messages,
 * runs the dispatcher, and sends result, error and progress messages. Transport-agnostic: the
 * Web Worker and the Node worker thread each wire `receive` and `send` to their own port.
 */
import { toErrorPayload, EngineError } from "../errors";
import type { ClientMessage, ServerMessage } from "./contract";
import { dispatch } from "./dispatcher";

export interface EngineServer {
  receive(message: unknown): void;
}

export function createEngineServer(send: (message: ServerMessage) => void): EngineServer {
  const cancelled = new Set<number>();
  return {
    receive(message: unknown): void {
      const msg = message as Partial<ClientMessage> | null;
      if (!msg || typeof msg !== "object" || typeof msg.id !== "number") return; // not ours: ignore
      if (msg.type === "cancel") {
        cancelled.add(msg.id);
        return;
      }
      if (msg.type !== "request") return;
      const id = msg.id;
      const context = {
        isCancelled: () => cancelled.has(id),
        reportProgress: (progress: { fraction: number; label: string }) => send({ type: "progress", id, progress }),
      };
      Promise.resolve()
        .then(() => dispatch(msg.method, msg.params, context))
        .then(
          (result) => {
            if (cancelled.has(id)) throw new EngineError("cancelled", "The request was cancelled", {});
            send({ type: "result", id, result });
          },
        )
        .catch((error: unknown) => send({ type: "error", id, error: toErrorPayload(error) }))
        .finally(() => cancelled.delete(id));
    },
  };
}
