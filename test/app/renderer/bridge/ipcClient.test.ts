import { describe, expect, it } from "vitest";
import type { Envelope, Progress } from "../../../../shared-engine/api/contract";
import type { LoopwrightPreloadApi, PreloadRequestOptions } from "../../../../shared-engine/api/preloadApi";
import { createBridge, createIpcBridge, type WorkerLike } from "../../../../renderer/bridge";

interface Call {
  method: string;
  params: unknown;
  options: PreloadRequestOptions | undefined;
  answer(envelope: unknown): void;
}

/** A preload stand-in: each request waits until the test answers it. */
function fakePreload() {
  const calls: Call[] = [];
  const cancelled: number[] = [];
  const api: LoopwrightPreloadApi = {
    apiVersion: 1,
    request(method, params, options) {
      return new Promise<Envelope<never>>((resolve) => {
        calls.push({ method, params, options, answer: (e) => resolve(e as Envelope<never>) });
      });
    },
    cancel: (id) => void cancelled.push(id),
  };
  return { api, calls, cancelled };
}

const tick = () => new Promise((r) => setTimeout(r, 0));

describe("desktop (IPC) bridge client", () => {
  it("passes a positive request id and resolves with an ok envelope's result", async () => {
    const fake = fakePreload();
    const { bridge, transport } = createIpcBridge(fake.api);
    expect(transport).toBe("ipc");
    const pending = bridge.request("engine.info", {});
    await tick();
    expect(fake.calls[0]).toMatchObject({ method: "engine.info", params: {}, options: { requestId: 1 } });
    fake.calls[0]!.answer({ ok: true, result: { name: "loopwright-engine", version: "0.0.1", methods: [] } });
    await expect(pending).resolves.toMatchObject({ version: "0.0.1" });
  });

  it("rejects with the envelope's error as an EngineError", async () => {
    const fake = fakePreload();
    const { bridge } = createIpcBridge(fake.api);
    const pending = bridge.request("linalg.eigenvalues", { matrix: [] });
    await tick();
    fake.calls[0]!.answer({ ok: false, error: { kind: "empty", message: "matrix is empty", details: { field: "matrix" } } });
    await expect(pending).rejects.toMatchObject({ name: "EngineError", kind: "empty", message: "matrix is empty" });
  });

  it("treats a reply of unknown shape as an internal error, never as a result", async () => {
    const fake = fakePreload();
    const { bridge } = createIpcBridge(fake.api);
    const pending = bridge.request("engine.info", {});
    await tick();
    fake.calls[0]!.answer({ result: 1 });
    await expect(pending).rejects.toMatchObject({ kind: "internal" });
  });

  it("forwards progress and cancels by request id when the signal aborts", async () => {
    const fake = fakePreload();
    const { bridge } = createIpcBridge(fake.api);
    const seen: Progress[] = [];
    const controller = new AbortController();
    const first = bridge.request("engine.info", {});
    const second = bridge.request("engine.info", {}, { signal: controller.signal, onProgress: (p) => seen.push(p) });
    await tick();
    fake.calls[1]!.options!.onProgress!({ fraction: 0.5, label: "half" });
    controller.abort();
    await expect(second).rejects.toMatchObject({ kind: "cancelled" });
    expect(fake.cancelled).toEqual([2]);
    expect(seen).toEqual([{ fraction: 0.5, label: "half" }]);
    fake.calls[1]!.options!.onProgress!({ fraction: 0.9, label: "late" });
    expect(seen).toHaveLength(1);
    fake.calls[0]!.answer({ ok: true, result: { name: "loopwright-engine", version: "1", methods: [] } });
    await expect(first).resolves.toMatchObject({ version: "1" });
  });

  it("dispose cancels requests in flight and refuses new ones", async () => {
    const fake = fakePreload();
    const connection = createIpcBridge(fake.api);
    const pending = connection.bridge.request("engine.info", {});
    await tick();
    connection.dispose();
    await expect(pending).rejects.toMatchObject({ kind: "cancelled" });
    expect(fake.cancelled).toEqual([1]);
    await expect(connection.bridge.request("engine.info", {})).rejects.toMatchObject({ kind: "cancelled" });
  });
});

describe("bridge selection", () => {
  const noWorker = (): WorkerLike => {
    throw new Error("no worker expected");
  };

  it("uses IPC when the preload object exists", () => {
    expect(createBridge({ loopwright: fakePreload().api }, noWorker).transport).toBe("ipc");
  });

  it("uses the Web Worker when there is no preload object", () => {
    let started = 0;
    const worker: WorkerLike = { postMessage() {}, addEventListener() {}, removeEventListener() {}, terminate() {} };
    const connection = createBridge({}, () => {
      started++;
      return worker;
    });
    expect(connection.transport).toBe("worker");
    expect(started).toBe(1);
    connection.dispose();
  });
});

describe("end-to-end test hook", () => {
  it("is wanted only in browser mode with e2e=1 in the query", async () => {
    const { wantsE2eHook } = await import("../../../../renderer/bridge");
    expect(wantsE2eHook("worker", "?e2e=1")).toBe(true);
    expect(wantsE2eHook("worker", "?e2e=0")).toBe(false);
    expect(wantsE2eHook("worker", "")).toBe(false);
    expect(wantsE2eHook("ipc", "?e2e=1")).toBe(false);
  });
});
