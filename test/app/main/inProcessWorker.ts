/**
 * An in-process stand-in for a node:worker_threads Worker that runs the real engine server
 * (shared-engine/api) on the same thread. Messages are structured-cloned and delivered on a
 * later task, like a real MessagePort. `swallow` makes it drop requests (a hung engine) and
 * `crash()` imitates a worker dying with an uncaught error.
 */
import { createEngineServer } from "../../../shared-engine/api/server";
import type { EngineWorkerLike } from "../../../main/engineHost";

type Listener = (value: never) => void;

export class InProcessWorker implements EngineWorkerLike {
  static created: InProcessWorker[] = [];
  readonly posted: unknown[] = [];
  swallow = false;
  terminated = false;
  private readonly listeners = new Map<string, Listener[]>();
  private readonly server = createEngineServer((message) => {
    const copy = structuredClone(message);
    setTimeout(() => this.emit("message", copy), 0);
  });

  constructor() {
    InProcessWorker.created.push(this);
  }

  postMessage(message: unknown): void {
    if (this.terminated) return;
    const copy = structuredClone(message);
    this.posted.push(copy);
    if (!this.swallow) setTimeout(() => this.server.receive(copy), 0);
  }

  on(event: string, listener: (value: never) => void): this {
    this.listeners.set(event, [...(this.listeners.get(event) ?? []), listener]);
    return this;
  }

  terminate(): Promise<number> {
    this.terminated = true;
    this.emit("exit", 1);
    return Promise.resolve(1);
  }

  crash(message = "worker crashed"): void {
    this.terminated = true;
    this.emit("error", new Error(message));
    this.emit("exit", 1);
  }

  private emit(event: string, value: unknown): void {
    for (const listener of this.listeners.get(event) ?? []) (listener as (v: unknown) => void)(value);
  }
}
