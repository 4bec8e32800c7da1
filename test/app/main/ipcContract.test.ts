import { describe, expect, it } from "vitest";
import { dispatch } from "../../../shared-engine/api/dispatcher";
import { toErrorPayload, type ErrorPayload } from "../../../shared-engine/errors";
import type { ComplexNumber, EngineMethod, Envelope } from "../../../shared-engine/api/contract";
import { createPreloadApi } from "../../../main/createPreloadApi";
import { registerEngineIpc } from "../../../main/ipc";
import { isTrustedSender } from "../../../main/guards";
import { createEngineHost } from "../../../main/engineHost";
import { CONTRACT_CASES, sortedEigenvalues } from "../../contract/cases";
import { createIpcPair } from "./fakeElectron";
import { InProcessWorker } from "./inProcessWorker";

async function direct(method: string, params: unknown): Promise<Envelope<unknown>> {
  try {
    return { ok: true, result: await dispatch(method, params) };
  } catch (error) {
    return { ok: false, error: toErrorPayload(error) };
  }
}

function electronPath() {
  const pair = createIpcPair();
  const host = createEngineHost(() => new InProcessWorker());
  registerEngineIpc(pair.ipcMain, host, isTrustedSender);
  const api = createPreloadApi(pair.ipcRenderer);
  return { api, host };
}

describe("bridge contract: preload → IPC → engine host gives what dispatch() gives", () => {
  const { api } = electronPath();
  let nextId = 1;

  it.each(CONTRACT_CASES.map((c) => [c.name, c] as const))("%s", async (_name, contractCase) => {
    const viaIpc = await api.request(contractCase.method as EngineMethod, contractCase.params as never, { requestId: nextId++ });
    const viaDispatch = await direct(contractCase.method, contractCase.params);
    expect(viaIpc.ok).toBe(contractCase.expected.ok);
    expect(viaDispatch.ok).toBe(contractCase.expected.ok);
    if (viaIpc.ok && viaDispatch.ok) {
      expect(viaIpc.result).toEqual(viaDispatch.result);
      if (contractCase.expectedEigenvalues) {
        const got = sortedEigenvalues((viaIpc.result as { eigenvalues: ComplexNumber[] }).eigenvalues);
        const want = contractCase.expectedEigenvalues;
        expect(got).toHaveLength(want.length);
        got.forEach((z, i) => {
          expect(Math.abs(z.re - want[i]!.re)).toBeLessThanOrEqual(1e-12 * Math.max(1, Math.abs(want[i]!.re)));
          expect(Math.abs(z.im - want[i]!.im)).toBeLessThanOrEqual(1e-12 * Math.max(1, Math.abs(want[i]!.im)));
        });
      }
    } else if (!viaIpc.ok && !viaDispatch.ok) {
      const expectedKind = (contractCase.expected as { kind: ErrorPayload["kind"] }).kind;
      expect(viaIpc.error.kind).toBe(expectedKind);
      expect(viaDispatch.error.kind).toBe(expectedKind);
      expect(typeof viaIpc.error.message).toBe("string");
      expect(viaIpc.error.message.length).toBeGreaterThan(0);
    }
  });

  it("refuses every case when the page is not on the app origin", async () => {
    const pair = createIpcPair("https://example.com/");
    registerEngineIpc(pair.ipcMain, createEngineHost(() => new InProcessWorker()), isTrustedSender);
    const api = createPreloadApi(pair.ipcRenderer);
    for (const contractCase of CONTRACT_CASES) {
      const answer = await api.request(contractCase.method as EngineMethod, contractCase.params as never);
      expect(answer).toMatchObject({ ok: false, error: { kind: "forbidden", details: { reason: "untrusted-sender" } } });
    }
  });

  it("delivers cancellation end to end: the page's request resolves as cancelled", async () => {
    const pair = createIpcPair();
    const worker = new InProcessWorker();
    worker.swallow = true; // the engine never answers: only cancellation can settle the request
    registerEngineIpc(pair.ipcMain, createEngineHost(() => worker), isTrustedSender);
    const page = createPreloadApi(pair.ipcRenderer);
    const pending = page.request("engine.info", {}, { requestId: 42 });
    await new Promise((resolve) => setTimeout(resolve, 5));
    page.cancel(42);
    expect(await pending).toMatchObject({ ok: false, error: { kind: "cancelled" } });
    expect(worker.posted).toContainEqual({ type: "cancel", id: 1 });
  });
});
