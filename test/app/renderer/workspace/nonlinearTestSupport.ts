/**
 * Support for the nonlinear-editor, locus and long-task tests: a bridge that runs the real
 * engine dispatcher in-process (progress and cancellation wired as the worker does), and a
 * workspace store opened on the shipped demo document.
 */
import type { EngineBridge, ProjectFile } from "../../../../shared-engine/api/contract";
import { dispatch } from "../../../../shared-engine/api/dispatcher";
import { EngineError } from "../../../../shared-engine/errors";
import { createMemoryDocumentStore } from "../../../../renderer/db/documentStore";
import { DEMO_DOCUMENT } from "../../../../renderer/db/demoProject";
import { createWorkspaceStore, type WorkspaceState, type WorkspaceStore } from "../../../../renderer/state/workspace";

export interface RecordingBridge extends EngineBridge {
  calls: { method: string; params: unknown; aborted: () => boolean }[];
}

/** Runs each request after `delayMs` through the real dispatcher; an aborted request rejects with "cancelled" as the worker does. */
export function inProcessBridge(delayMs = 1): RecordingBridge {
  const calls: RecordingBridge["calls"] = [];
  return {
    calls,
    request(method, params, options) {
      const signal = options?.signal;
      calls.push({ method, params, aborted: () => signal?.aborted ?? false });
      return new Promise((resolve, reject) => {
        let settled = false;
        const onAbort = () => {
          if (settled) return;
          settled = true;
          reject(new EngineError("cancelled", `${method} was cancelled`, { method }));
        };
        signal?.addEventListener("abort", onAbort);
        setTimeout(() => {
          if (settled) return;
          dispatch(method, params, { isCancelled: () => signal?.aborted ?? false, reportProgress: (p) => options?.onProgress?.(p) }).then(
            (r) => {
              if (settled) return;
              settled = true;
              signal?.removeEventListener("abort", onAbort);
              resolve(r as never);
            },
            (e: unknown) => {
              if (settled) return;
              settled = true;
              signal?.removeEventListener("abort", onAbort);
              reject(e instanceof EngineError ? e : new EngineError("internal", String(e)));
            },
          );
        }, delayMs);
      });
    },
  };
}

export async function waitFor(what: () => boolean, ms = 10_000, describe: () => string = () => ""): Promise<void> {
  const end = Date.now() + ms;
  while (!what()) {
    if (Date.now() > end) throw new Error(`timed out waiting; ${describe()}`);
    await new Promise((r) => setTimeout(r, 5));
  }
}

export const evaluated = (s: WorkspaceState) => s.evaluation.status === "done" || s.evaluation.status === "failed";

/** A store on a copy of the shipped demo document, with `variantId` selected and evaluated. */
export async function openDemoStore(bridge: EngineBridge, variantId = "lqr-integral-robust"): Promise<WorkspaceStore> {
  const documents = createMemoryDocumentStore(() => 1000);
  await documents.save("demo", structuredClone(DEMO_DOCUMENT) as ProjectFile, { baseRevision: 0, message: "demo" });
  const store = createWorkspaceStore({ documents, bridge, projectId: "demo", evaluateDelayMs: 5, saveDelayMs: 10 });
  await store.load();
  store.selectVariant(variantId);
  await waitFor(() => evaluated(store.getState()) && store.getState().evaluation.variantId === variantId, 20_000, () => store.getState().evaluation.status);
  return store;
}
