/**
 * The end-to-end test hook: in browser mode, a page opened with `?e2e=1` exposes its engine
 * bridge as `window.__loopwrightBridge`, so tests can run the bridge contract cases through the
 * real Web Worker. Never exposed in the desktop app (IPC transport) or without the flag.
 */
import type { EngineBridge } from "../../shared-engine/api/contract";
import type { DisposableBridge } from "./workerClient";

declare global {
  interface Window {
    /** Browser mode with `?e2e=1` only: the page's bridge, for end-to-end contract tests. */
    __loopwrightBridge?: EngineBridge;
  }
}

/** Whether the hook should be exposed for this connection and page address. */
export function wantsE2eHook(transport: DisposableBridge["transport"], search: string): boolean {
  return transport === "worker" && new URLSearchParams(search).get("e2e") === "1";
}

/** Exposes the bridge when `wantsE2eHook` allows it; returns the disposer that removes it. */
export function exposeBridgeForTests(target: Window, connection: DisposableBridge, search: string): () => void {
  if (!wantsE2eHook(connection.transport, search)) return () => undefined;
  target.__loopwrightBridge = connection.bridge;
  return () => {
    delete target.__loopwrightBridge;
  };
}
