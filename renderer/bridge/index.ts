export { createBridge, type BridgeEnvironment } from "./createBridge";
export { createIpcBridge } from "./ipcClient";
export { createWorkerBridge, startEngineWorker, type DisposableBridge, type WorkerLike } from "./workerClient";
export { exposeBridgeForTests, wantsE2eHook } from "./e2eHook";
