import { describe, expect, it } from "vitest";
import { IPC_CHANNELS } from "../../../shared-engine/api/contract";
import { createPreloadApi, type IpcRendererLike } from "../../../main/createPreloadApi";

/** A fake ipcRenderer whose invokes wait until the test answers them. */
function fakeIpcRenderer() {
  const invokes: Array<{ channel: string; args: unknown[]; answer(value: unknown): void; fail(error: unknown): void }> = [];
  const sends: Array<{ channel: string; args: unknown[] }> = [];
  const listeners = new Map<string, (event: unknown, ...args: unknown[]) => void>();
  const ipcRenderer: IpcRendererLike = {
    invoke: (channel, ...args) => new Promise((answer, fail) => invokes.push({ channel, args, answer, fail })),
    send: (channel, ...args) => void sends.push({ channel, args }),
    on: (channel, listener) => listeners.set(channel, listener),
  };
  const progress = (payload: unknown) => listeners.get(IPC_CHANNELS.progress)!({}, payload);
  return { ipcRenderer, invokes, sends, listeners, progress };
}

const tick = () => new Promise((resolve) => setTimeout(resolve, 0));

describe("createPreloadApi", () => {
  it("exposes only apiVersion, request, cancel and printSheet, frozen", () => {
    const api = createPreloadApi(fakeIpcRenderer().ipcRenderer);
    expect(Object.keys(api).sort()).toEqual(["apiVersion", "cancel", "printSheet", "request"]);
    expect(api.apiVersion).toBe(1);
    expect(Object.isFrozen(api)).toBe(true);
  });

  it("listens only on the progress channel", () => {
    const fake = fakeIpcRenderer();
    createPreloadApi(fake.ipcRenderer);
    expect([...fake.listeners.keys()]).toEqual([IPC_CHANNELS.progress]);
  });

  it("invokes the request channel with the caller's id and resolves with main's envelope", async () => {
    const fake = fakeIpcRenderer();
    const api = createPreloadApi(fake.ipcRenderer);
    const answer = api.request("linalg.eigenvalues", { matrix: [[1]] }, { requestId: 4 });
    expect(fake.invokes[0]!.channel).toBe(IPC_CHANNELS.request);
    expect(fake.invokes[0]!.args).toEqual([{ requestId: 4, method: "linalg.eigenvalues", params: { matrix: [[1]] } }]);
    fake.invokes[0]!.answer({ ok: true, result: { eigenvalues: [{ re: 1, im: 0 }] } });
    expect(await answer).toEqual({ ok: true, result: { eigenvalues: [{ re: 1, im: 0 }] } });
  });

  it("picks negative ids of its own when the caller gives none", () => {
    const fake = fakeIpcRenderer();
    const api = createPreloadApi(fake.ipcRenderer);
    void api.request("engine.info", {});
    void api.request("engine.info", {});
    expect(fake.invokes.map((i) => (i.args[0] as { requestId: number }).requestId)).toEqual([-1, -2]);
  });

  it("resolves, never rejects, when invoke fails or main answers something that is not an envelope", async () => {
    const fake = fakeIpcRenderer();
    const api = createPreloadApi(fake.ipcRenderer);
    const a = api.request("engine.info", {});
    const b = api.request("engine.info", {});
    fake.invokes[0]!.fail(new Error("An object could not be cloned."));
    fake.invokes[1]!.answer("surprise");
    expect(await a).toMatchObject({ ok: false, error: { kind: "invalid-argument", message: expect.stringMatching(/could not be cloned/) } });
    expect(await b).toMatchObject({ ok: false, error: { kind: "internal" } });
  });

  it("refuses bad or duplicate caller ids without calling main", async () => {
    const fake = fakeIpcRenderer();
    const api = createPreloadApi(fake.ipcRenderer);
    for (const requestId of [0, -1, 1.5, Number.NaN, 2 ** 60]) {
      expect(await api.request("engine.info", {}, { requestId })).toMatchObject({ ok: false, error: { kind: "invalid-argument" } });
    }
    void api.request("engine.info", {}, { requestId: 9 });
    expect(await api.request("engine.info", {}, { requestId: 9 })).toMatchObject({ ok: false, error: { message: expect.stringMatching(/already in flight/) } });
    expect(fake.invokes).toHaveLength(1);
  });

  it("sends cancel for an id in flight only", async () => {
    const fake = fakeIpcRenderer();
    const api = createPreloadApi(fake.ipcRenderer);
    api.cancel(3);
    const pending = api.request("engine.info", {}, { requestId: 3 });
    api.cancel(3);
    expect(fake.sends).toEqual([{ channel: IPC_CHANNELS.cancel, args: [{ requestId: 3 }] }]);
    fake.invokes[0]!.answer({ ok: false, error: { kind: "cancelled", message: "cancelled", details: {} } });
    await pending;
    api.cancel(3);
    expect(fake.sends).toHaveLength(1);
  });

  it("routes progress to the listener of its request until the request settles, ignoring junk", async () => {
    const fake = fakeIpcRenderer();
    const api = createPreloadApi(fake.ipcRenderer);
    const seenA: unknown[] = [];
    const seenB: unknown[] = [];
    const a = api.request("engine.info", {}, { requestId: 1, onProgress: (p) => seenA.push(p) });
    void api.request("engine.info", {}, { requestId: 2, onProgress: (p) => seenB.push(p) });
    fake.progress({ requestId: 1, progress: { fraction: 0.25, label: "one" } });
    fake.progress({ requestId: 2, progress: { fraction: 1.5, label: "clamped" } });
    fake.progress({ requestId: 1, progress: { fraction: "x", label: "junk" } });
    fake.progress(null);
    fake.progress({ requestId: 77, progress: { fraction: 0.1, label: "nobody" } });
    fake.invokes[0]!.answer({ ok: true, result: {} });
    await a;
    await tick();
    fake.progress({ requestId: 1, progress: { fraction: 0.9, label: "after" } });
    expect(seenA).toEqual([{ fraction: 0.25, label: "one" }]);
    expect(seenB).toEqual([{ fraction: 1, label: "clamped" }]);
  });

  it("survives a progress listener that throws", async () => {
    const fake = fakeIpcRenderer();
    const api = createPreloadApi(fake.ipcRenderer);
    const pending = api.request("engine.info", {}, {
      requestId: 1,
      onProgress: () => {
        throw new Error("listener bug");
      },
    });
    expect(() => fake.progress({ requestId: 1, progress: { fraction: 0.5, label: "x" } })).not.toThrow();
    fake.invokes[0]!.answer({ ok: true, result: 1 });
    expect(await pending).toEqual({ ok: true, result: 1 });
  });

  it("sends printSheet as one { route, pageSize } invoke on the print channel and resolves with main's envelope", async () => {
    const fake = fakeIpcRenderer();
    const api = createPreloadApi(fake.ipcRenderer);
    const answer = api.printSheet!("#/sheet/p/v", "Letter");
    expect(fake.invokes).toHaveLength(1);
    expect(fake.invokes[0]!.channel).toBe(IPC_CHANNELS.printSheet);
    expect(fake.invokes[0]!.args).toEqual([{ route: "#/sheet/p/v", pageSize: "Letter" }]);
    fake.invokes[0]!.answer({ ok: true, result: { savedTo: "/tmp/s.pdf" } });
    expect(await answer).toEqual({ ok: true, result: { savedTo: "/tmp/s.pdf" } });
  });

  it("resolves printSheet with an error envelope, never a rejection, for bad arguments, a failed invoke or a strange answer", async () => {
    const fake = fakeIpcRenderer();
    const api = createPreloadApi(fake.ipcRenderer);
    expect(await api.printSheet!("#/sheet/p/v", "A3" as never)).toMatchObject({ ok: false, error: { kind: "invalid-argument", details: { field: "pageSize" } } });
    expect(await api.printSheet!(42 as never, "A4")).toMatchObject({ ok: false, error: { kind: "invalid-argument", details: { field: "route" } } });
    expect(fake.invokes).toHaveLength(0);
    const failed = api.printSheet!("#/sheet/p/v", "A4");
    const strange = api.printSheet!("#/sheet/p/v", "A4");
    fake.invokes[0]!.fail(new Error("No handler registered for 'loopwright:print-sheet'"));
    fake.invokes[1]!.answer(undefined);
    expect(await failed).toMatchObject({ ok: false, error: { kind: "internal", message: expect.stringMatching(/could not be sent: No handler/) } });
    expect(await strange).toMatchObject({ ok: false, error: { kind: "internal", message: expect.stringMatching(/not an envelope/) } });
  });
});
