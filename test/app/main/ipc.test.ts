import { describe, expect, it } from "vitest";
import { EngineError } from "../../../shared-engine/errors";
import { IPC_CHANNELS, type EngineBridge, type RequestOptions } from "../../../shared-engine/api/contract";
import { IPC_LIMITS, registerEngineIpc, validateIpcRequest, type IpcEventLike } from "../../../main/ipc";
import { isTrustedSender } from "../../../main/guards";
import { createFakeIpcMain, createFakeSender } from "./fakeElectron";

/** A host whose requests wait until the test settles them. */
function scriptedHost() {
  const calls: Array<{ method: string; params: unknown; options: RequestOptions | undefined; resolve(v: unknown): void; reject(e: unknown): void }> = [];
  const host: EngineBridge = {
    request(method, params, options) {
      return new Promise((resolve, reject) => {
        calls.push({ method, params, options, resolve: resolve as (v: unknown) => void, reject });
        options?.signal?.addEventListener("abort", () => reject(new EngineError("cancelled", `${method} was cancelled`, { method })));
      });
    },
  };
  return { host, calls };
}

function setup() {
  const ipcMain = createFakeIpcMain();
  const { host, calls } = scriptedHost();
  const dispose = registerEngineIpc(ipcMain, host, isTrustedSender);
  const sender = createFakeSender(7);
  const event = (url = "app://loopwright/index.html", s = sender): IpcEventLike => ({ sender: s, senderFrame: { url } });
  const invoke = (arg: unknown, e = event()) => ipcMain.handlers.get(IPC_CHANNELS.request)!(e, arg) as Promise<unknown>;
  const cancel = (arg: unknown, e = event()) => ipcMain.listeners.get(IPC_CHANNELS.cancel)!.forEach((l) => l(e, arg));
  const tick = () => new Promise((resolve) => setTimeout(resolve, 0));
  return { ipcMain, calls, dispose, sender, event, invoke, cancel, tick };
}

describe("registerEngineIpc", () => {
  it("answers a valid request with an ok envelope carrying the host's result", async () => {
    const { calls, invoke, tick } = setup();
    const answer = invoke({ requestId: 1, method: "linalg.eigenvalues", params: { matrix: [[2]] } });
    await tick();
    expect(calls[0]!.method).toBe("linalg.eigenvalues");
    expect(calls[0]!.params).toEqual({ matrix: [[2]] });
    calls[0]!.resolve({ eigenvalues: [{ re: 2, im: 0 }] });
    expect(await answer).toEqual({ ok: true, result: { eigenvalues: [{ re: 2, im: 0 }] } });
  });

  it("turns a host failure into an error envelope with the same kind, message and details", async () => {
    const { calls, invoke, tick } = setup();
    const answer = invoke({ requestId: 1, method: "engine.info", params: {} });
    await tick();
    calls[0]!.reject(new EngineError("no-convergence", "QR did not converge", { iterations: 30, residual: 1e-3 }));
    expect(await answer).toEqual({ ok: false, error: { kind: "no-convergence", message: "QR did not converge", details: { iterations: 30, residual: 1e-3 } } });
  });

  it("turns a non-engine throw into an internal error envelope instead of throwing across IPC", async () => {
    const { calls, invoke, tick } = setup();
    const answer = invoke({ requestId: 1, method: "engine.info", params: {} });
    await tick();
    calls[0]!.reject(new TypeError("boom"));
    expect(await answer).toMatchObject({ ok: false, error: { kind: "internal" } });
  });

  it("refuses a request from a frame outside the app origin without reaching the host", async () => {
    const { calls, invoke, event } = setup();
    for (const url of ["https://example.com/", "file:///tmp/x.html", "app://evil/index.html"]) {
      const answer = await invoke({ requestId: 1, method: "engine.info", params: {} }, event(url));
      expect(answer).toMatchObject({ ok: false, error: { kind: "forbidden", details: { reason: "untrusted-sender" } } });
    }
    const noFrame = await invoke({ requestId: 1, method: "engine.info", params: {} }, { sender: createFakeSender(1), senderFrame: null });
    expect(noFrame).toMatchObject({ ok: false, error: { kind: "forbidden" } });
    expect(calls).toHaveLength(0);
  });

  it("refuses malformed requests with a typed error naming the problem", async () => {
    const { calls, invoke } = setup();
    const cases: Array<[unknown, string, RegExp]> = [
      [null, "invalid-argument", /plain object/],
      [[1, 2], "invalid-argument", /plain object/],
      ["engine.info", "invalid-argument", /plain object/],
      [{ requestId: 1, method: "engine.info", params: {}, extra: 1 }, "invalid-argument", /unexpected field "extra"/],
      [{ requestId: 0, method: "engine.info", params: {} }, "invalid-argument", /requestId/],
      [{ requestId: 1.5, method: "engine.info", params: {} }, "invalid-argument", /requestId/],
      [{ requestId: "1", method: "engine.info", params: {} }, "invalid-argument", /requestId/],
      [{ requestId: 1, method: "fs.readFile", params: {} }, "unknown-method", /Unknown engine request "fs.readFile"/],
      [{ requestId: 1, method: 42, params: {} }, "unknown-method", /of type number/],
      [{ requestId: 1, method: "engine.info", params: [] }, "invalid-argument", /params must be a plain object/],
      [{ requestId: 1, method: "engine.info" }, "invalid-argument", /params must be a plain object/],
      [{ requestId: 1, method: "engine.info", params: { when: new Date(0) } }, "invalid-argument", /params.when is not a plain object/],
      [{ requestId: 1, method: "linalg.eigenvalues", params: { matrix: [new Float64Array(2)] } }, "invalid-argument", /params.matrix\[0\]/],
      [{ requestId: 1, method: "engine.info", params: { big: 1n } }, "invalid-argument", /bigint/],
    ];
    for (const [arg, kind, message] of cases) {
      const answer = (await invoke(arg)) as { ok: boolean; error: { kind: string; message: string } };
      expect(answer.ok, JSON.stringify(String(arg))).toBe(false);
      expect(answer.error.kind).toBe(kind);
      expect(answer.error.message).toMatch(message);
    }
    expect(calls).toHaveLength(0);
  });

  it("refuses prototype-polluting keys at any depth", async () => {
    const { calls, invoke } = setup();
    for (const json of ['{"__proto__":{"polluted":true}}', '{"a":[{"constructor":{"prototype":1}}]}', '{"prototype":1}']) {
      const params = JSON.parse(json) as unknown; // JSON.parse makes "__proto__" an own key, as structured clone can
      const answer = await invoke({ requestId: 1, method: "engine.info", params });
      expect(answer).toMatchObject({ ok: false, error: { kind: "invalid-argument", message: expect.stringMatching(/forbidden key/) } });
    }
    expect(({} as Record<string, unknown>).polluted).toBeUndefined();
    expect(calls).toHaveLength(0);
  });

  it("refuses cyclic and over-deep params before measuring them", async () => {
    const { invoke } = setup();
    const cyclic: Record<string, unknown> = { a: 1 };
    cyclic.self = cyclic;
    expect(await invoke({ requestId: 1, method: "engine.info", params: cyclic })).toMatchObject({ ok: false, error: { message: expect.stringMatching(/refers back to itself/) } });
    let deep: unknown = 0;
    for (let i = 0; i < IPC_LIMITS.maxDepth + 2; i++) deep = [deep];
    expect(await invoke({ requestId: 1, method: "engine.info", params: { deep } })).toMatchObject({ ok: false, error: { message: expect.stringMatching(/deeper than/) } });
  });

  it("refuses params larger than the payload limit and names size and limit", async () => {
    const { invoke } = setup();
    const row = Array.from({ length: 1000 }, () => 0.123456789);
    const matrix = Array.from({ length: 1000 }, () => row.slice()); // ~12 MB of JSON
    const answer = (await invoke({ requestId: 1, method: "linalg.eigenvalues", params: { matrix } })) as { ok: false; error: { details: { size: number; limit: number } } };
    expect(answer.ok).toBe(false);
    expect(answer.error.details.limit).toBe(IPC_LIMITS.maxPayloadChars);
    expect(answer.error.details.size).toBeGreaterThan(IPC_LIMITS.maxPayloadChars);
  });

  it("refuses a second request with an id that is still in flight for the same page", async () => {
    const { invoke, calls, tick } = setup();
    const first = invoke({ requestId: 5, method: "engine.info", params: {} });
    await tick();
    expect(await invoke({ requestId: 5, method: "engine.info", params: {} })).toMatchObject({ ok: false, error: { message: expect.stringMatching(/already in flight/) } });
    calls[0]!.resolve({ ok: 1 });
    expect(await first).toEqual({ ok: true, result: { ok: 1 } });
  });

  it("cancels a request in flight on a cancel message from the same page only", async () => {
    const { invoke, cancel, calls, event, tick } = setup();
    const answer = invoke({ requestId: 3, method: "engine.info", params: {} });
    await tick();
    cancel({ requestId: 3 }, event("app://loopwright/index.html", createFakeSender(99))); // another page: ignored
    cancel({ requestId: 3 }, event("https://example.com/")); // untrusted: ignored
    cancel({ requestId: 4 }); // unknown id: ignored
    cancel("junk");
    cancel(null);
    expect(calls[0]!.options?.signal?.aborted).toBe(false);
    cancel({ requestId: 3 });
    expect(calls[0]!.options?.signal?.aborted).toBe(true);
    expect(await answer).toMatchObject({ ok: false, error: { kind: "cancelled" } });
  });

  it("forwards progress to the requesting page with its request id, and not after it is destroyed", async () => {
    const { invoke, calls, sender, tick } = setup();
    const answer = invoke({ requestId: 11, method: "engine.info", params: {} });
    await tick();
    calls[0]!.options!.onProgress!({ fraction: 0.5, label: "sweep" });
    sender.destroyed = true;
    calls[0]!.options!.onProgress!({ fraction: 0.9, label: "late" });
    calls[0]!.resolve({});
    await answer;
    expect(sender.sent).toEqual([{ channel: IPC_CHANNELS.progress, payload: { requestId: 11, progress: { fraction: 0.5, label: "sweep" } } }]);
  });

  it("removes its handlers and cancels requests in flight when disposed", async () => {
    const { ipcMain, invoke, dispose, tick, calls } = setup();
    const answer = invoke({ requestId: 1, method: "engine.info", params: {} });
    await tick();
    dispose();
    expect(calls[0]!.options?.signal?.aborted).toBe(true);
    expect(await answer).toMatchObject({ ok: false, error: { kind: "cancelled" } });
    expect(ipcMain.handlers.has(IPC_CHANNELS.request)).toBe(false);
    expect(ipcMain.listeners.get(IPC_CHANNELS.cancel)).toEqual([]);
  });

  it("answers an untrusted-sender check that throws with a refusal instead of a throw", async () => {
    const ipcMain = createFakeIpcMain();
    registerEngineIpc(ipcMain, scriptedHost().host, () => {
      throw new Error("frame disposed");
    });
    const answer = await ipcMain.handlers.get(IPC_CHANNELS.request)!({ sender: createFakeSender(), senderFrame: { url: "app://loopwright/" } }, {});
    expect(answer).toMatchObject({ ok: false, error: { kind: "forbidden" } });
  });
});

describe("validateIpcRequest", () => {
  it("accepts a small well-formed request and returns it unchanged", () => {
    const request = { requestId: -3, method: "linalg.eigenvalues", params: { matrix: [[1, 2], [3, 4]] } };
    expect(validateIpcRequest(request)).toEqual(request);
  });

  it("accepts objects with a null prototype", () => {
    const params = Object.create(null) as Record<string, unknown>;
    params.matrix = [[1]];
    expect(validateIpcRequest({ requestId: 1, method: "linalg.eigenvalues", params }).params).toBe(params);
  });
});
