/**
 * Picks the engine transport: the desktop app's preload object when `window.loopwright`
 * exists, otherwise a Web Worker (browser mode).
 */
import type { LoopwrightPreloadApi } from "../../shared-engine/api/preloadApi";
import { createIpcBridge } from "./ipcClient";
import { createWorkerBridge, startEngineWorker, type DisposableBridge, type WorkerLike } from "./workerClient";

export interface BridgeEnvironment {
  loopwright?: LoopwrightPreloadApi;
}

export function createBridge(
  environment: BridgeEnvironment = globalThis as BridgeEnvironment,
  startWorker: () => WorkerLike = startEngineWorker,
): DisposableBridge {
  const api = environment.loopwright;
  if (api && typeof api === "object" && typeof api.request === "function" && typeof api.cancel === "function") {
    return createIpcBridge(api);
  }
  return createWorkerBridge(startWorker);
}
