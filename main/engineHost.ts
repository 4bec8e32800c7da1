/**
 * The engine host: runs the engine dispatcher on a worker thread so that heavy requests never
 * block the main process (window events, IPC, menus). Talks to the worker with the same message
 * protocol as the browser-mode Web Worker (`createMessageClient`), restarts the worker on the
 * next request after it dies, and fails the requests that were pending on a dead worker with a
 * typed error.
 *
 * The worker is made by an injected factory: production passes
 * `() => new Worker(pathToBundledEngineWorker)` from node:worker_threads; tests pass an
 * in-process fake or a real worker running a bundle they build.
 */
import { EngineError } from "../shared-engine/errors";
import { createMessageClient, type MessageClient } from "../shared-engine/api/client";
import type { EngineBridge, EngineMethod, EngineParams, EngineResult, RequestOptions } from "../shared-engine/api/contract";

/** The members of a node:worker_threads Worker that the host uses. */
export interface EngineWorkerLike {
  postMessage(message: unknown): void;
  on(event: "message", listener: (message: unknown) => void): unknown;
  on(event: "error", listener: (error: Error) => void): unknown;
  on(event: "exit", listener: (exitCode: number) => void): unknown;
  terminate(): Promise<number> | void;
}

export type EngineWorkerFactory = () => EngineWorkerLike;

/** Something worth a log line; the host itself never logs. */
export type EngineHostEvent =
  | { type: "started"; generation: number }
  | { type: "died"; generation: number; reason: string; failedRequests: number };

export interface EngineHostOptions {
  onEvent?: (event: EngineHostEvent) => void;
}

export interface EngineHost extends EngineBridge {
  /** Number of worker threads started so far (1 after the first request, +1 per restart). */
  workersStarted(): number;
  /** Requests sent to the current worker and not yet answered. */
  pendingCount(): number;
  /** Fails pending requests as `cancelled`, stops the worker; later requests are refused. */
  dispose(): Promise<void>;
}

interface Generation {
  worker: EngineWorkerLike;
  client: MessageClient;
  number: number;
  alive: boolean;
}

export function createEngineHost(createWorker: EngineWorkerFactory, options: EngineHostOptions = {}): EngineHost {
  let current: Generation | null = null;
  let started = 0;
  let disposed = false;

  function start(): Generation {
    const number = ++started;
    const worker = createWorker();
    const generation: Generation = {
      worker,
      number,
      alive: true,
      client: createMessageClient((message) => worker.postMessage(message)),
    };
    worker.on("message", (message) => generation.client.receive(message));
    worker.on("error", (error) => died(generation, `uncaught error in the engine worker: ${error?.message ?? String(error)}`));
    worker.on("exit", (exitCode) => died(generation, `the engine worker exited with code ${exitCode}`));
    current = generation;
    options.onEvent?.({ type: "started", generation: number });
    return generation;
  }

  // A worker that errs emits "error" and then "exit": act once, on whichever comes first.
  function died(generation: Generation, reason: string): void {
    if (!generation.alive) return;
    generation.alive = false;
    if (current === generation) current = null;
    const failedRequests = generation.client.pendingCount();
    generation.client.failAll(
      new EngineError("internal", `The engine stopped before answering (${reason}); it restarts on the next request`, {
        reason,
        workerGeneration: generation.number,
      }),
    );
    if (!disposed) options.onEvent?.({ type: "died", generation: generation.number, reason, failedRequests });
  }

  return {
    request<M extends EngineMethod>(method: M, params: EngineParams<M>, requestOptions?: RequestOptions): Promise<EngineResult<M>> {
      if (disposed) return Promise.reject(new EngineError("cancelled", `${method} was refused: the engine host is shut down`, { method }));
      let generation: Generation;
      try {
        generation = current ?? start();
      } catch (error) {
        const message = error instanceof Error ? error.message : String(error);
        return Promise.reject(new EngineError("internal", `The engine worker could not be started: ${message}`, { method }));
      }
      return generation.client.request(method, params, requestOptions);
    },
    workersStarted: () => started,
    pendingCount: () => current?.client.pendingCount() ?? 0,
    async dispose(): Promise<void> {
      if (disposed) return;
      disposed = true;
      const generation = current;
      current = null;
      if (!generation) return;
      generation.alive = false;
      generation.client.failAll(new EngineError("cancelled", "The engine host was shut down before the request finished", {}));
      await generation.worker.terminate();
    },
  };
}
