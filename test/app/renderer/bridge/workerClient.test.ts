import { describe, expect, it } from "vitest";
import type { ClientMessage, ServerMessage } from "../../../../shared-engine/api/contract";
import { createWorkerBridge, type WorkerLike } from "../../../../renderer/bridge";

type Listener = (event: Event) => void;

/** An in-process worker stand-in: records what the client posts and lets the test reply. */
function fakeWorker() {
  const listeners = new Map<string, Set<Listener>>();
  const posted: ClientMessage[] = [];
  let terminated = false;
  const worker: WorkerLike = {
    postMessage: (message) => posted.push(message as ClientMessage),
    addEventListener: (type, listener) => {
      if (!listeners.has(type)) listeners.set(type, new Set());
      listeners.get(type)!.add(listener);
    },
    removeEventListener: (type, listener) => listeners.get(type)?.delete(listener),
    terminate: () => {
      terminated = true;
    },
  };
  const emit = (type: string, event: object) => listeners.get(type)?.forEach((l) => l(event as Event));
  return {
    worker,
    posted,
    isTerminated: () => terminated,
    listenerCount: () => [...listeners.values()].reduce((n, s) => n + s.size, 0),
    reply: (message: ServerMessage) => emit("message", { data: message }),
    fail: (message: string) => emit("error", { message }),
  };
}

describe("Web Worker bridge client", () => {
  it("sends a request message and resolves with the worker's result", async () => {
    const fake = fakeWorker();
    const { bridge } = createWorkerBridge(() => fake.worker);
    const pending = bridge.request("engine.info", {});
    expect(fake.posted).toEqual([{ type: "request", id: 1, method: "engine.info", params: {} }]);
    fake.reply({ type: "result", id: 1, result: { name: "loopwright-engine", version: "1.2.3", methods: [] } });
    await expect(pending).resolves.toMatchObject({ version: "1.2.3" });
  });

  it("rebuilds an error reply as an EngineError with its kind, message and details", async () => {
    const fake = fakeWorker();
    const { bridge } = createWorkerBridge(() => fake.worker);
    const pending = bridge.request("linalg.eigenvalues", { matrix: [[1, 2]] });
    fake.reply({ type: "error", id: 1, error: { kind: "shape-mismatch", message: "matrix must be square (it is 1×2)", details: { field: "matrix" } } });
    await expect(pending).rejects.toMatchObject({ name: "EngineError", kind: "shape-mismatch", details: { field: "matrix" } });
  });

  it("rejects pending requests with kind internal when the worker fails", async () => {
    const fake = fakeWorker();
    const { bridge } = createWorkerBridge(() => fake.worker);
    const pending = bridge.request("engine.info", {});
    fake.fail("script failed to load");
    await expect(pending).rejects.toMatchObject({ kind: "internal", message: "The engine worker failed: script failed to load" });
  });

  it("cancels through the signal: sends a cancel message and rejects with kind cancelled", async () => {
    const fake = fakeWorker();
    const { bridge } = createWorkerBridge(() => fake.worker);
    const controller = new AbortController();
    const pending = bridge.request("engine.info", {}, { signal: controller.signal });
    controller.abort();
    await expect(pending).rejects.toMatchObject({ kind: "cancelled" });
    expect(fake.posted[1]).toEqual({ type: "cancel", id: 1 });
  });

  it("dispose terminates the worker, removes its listeners, rejects pending and later requests", async () => {
    const fake = fakeWorker();
    const connection = createWorkerBridge(() => fake.worker);
    const pending = connection.bridge.request("engine.info", {});
    connection.dispose();
    connection.dispose(); // idempotent
    expect(fake.isTerminated()).toBe(true);
    expect(fake.listenerCount()).toBe(0);
    await expect(pending).rejects.toMatchObject({ kind: "cancelled" });
    await expect(connection.bridge.request("engine.info", {})).rejects.toMatchObject({ kind: "cancelled" });
    expect(fake.posted).toHaveLength(1);
  });
});
