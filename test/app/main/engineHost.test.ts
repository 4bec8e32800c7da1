import { mkdtemp, rm } from "node:fs/promises";
import os from "node:os";
import path from "node:path";
import { Worker } from "node:worker_threads";
import { build } from "esbuild";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { EngineError } from "../../../shared-engine/errors";
import { createEngineHost, type EngineHostEvent } from "../../../main/engineHost";
import { InProcessWorker } from "./inProcessWorker";

const settle = <T>(promise: Promise<T>) =>
  promise.then(
    (value) => ({ ok: true as const, value }),
    (error: unknown) => ({ ok: false as const, error: error as EngineError }),
  );

describe("engine host with an in-process worker", () => {
  it("starts no worker until the first request, then answers through the engine server", async () => {
    const workers: InProcessWorker[] = [];
    const host = createEngineHost(() => {
      const worker = new InProcessWorker();
      workers.push(worker);
      return worker;
    });
    expect(host.workersStarted()).toBe(0);
    const info = await host.request("engine.info", {});
    expect(info.name).toBe("loopwright-engine");
    // Diagonal matrix: its eigenvalues are its diagonal entries (definition).
    const { eigenvalues } = await host.request("linalg.eigenvalues", { matrix: [[3, 0], [0, -1]] });
    expect(eigenvalues.map((z) => z.re).sort((a, b) => a - b)).toEqual([-1, 3]);
    expect(host.workersStarted()).toBe(1);
    expect(workers).toHaveLength(1);
    await host.dispose();
  });

  it("rejects engine errors with their typed kind", async () => {
    const host = createEngineHost(() => new InProcessWorker());
    const failure = await settle(host.request("linalg.eigenvalues", { matrix: [[1, 2, 3]] }));
    expect(failure.ok).toBe(false);
    if (!failure.ok) {
      expect(failure.error).toBeInstanceOf(EngineError);
      expect(failure.error.kind).toBe("shape-mismatch");
    }
    await host.dispose();
  });

  it("fails pending requests with a typed error when the worker dies, then restarts on the next request", async () => {
    const workers: InProcessWorker[] = [];
    const events: EngineHostEvent[] = [];
    const host = createEngineHost(
      () => {
        const worker = new InProcessWorker();
        workers.push(worker);
        return worker;
      },
      { onEvent: (event) => events.push(event) },
    );
    await host.request("engine.info", {});
    workers[0]!.swallow = true;
    const a = settle(host.request("engine.info", {}));
    const b = settle(host.request("linalg.eigenvalues", { matrix: [[1]] }));
    expect(host.pendingCount()).toBe(2);
    workers[0]!.crash("out of memory");
    for (const outcome of [await a, await b]) {
      expect(outcome.ok).toBe(false);
      if (!outcome.ok) {
        expect(outcome.error.kind).toBe("internal");
        expect(outcome.error.message).toMatch(/out of memory/);
        expect(outcome.error.details.workerGeneration).toBe(1);
      }
    }
    expect(events).toEqual([
      { type: "started", generation: 1 },
      { type: "died", generation: 1, reason: "uncaught error in the engine worker: out of memory", failedRequests: 2 },
    ]);
    const again = await host.request("engine.info", {});
    expect(again.name).toBe("loopwright-engine");
    expect(host.workersStarted()).toBe(2);
    expect(workers[1]).not.toBe(workers[0]);
    await host.dispose();
  });

  it("treats an exit without an error as a death too, and reports it once", async () => {
    const workers: InProcessWorker[] = [];
    const events: EngineHostEvent[] = [];
    const host = createEngineHost(() => (workers.push(new InProcessWorker()), workers.at(-1)!), { onEvent: (e) => events.push(e) });
    const pending = settle(host.request("engine.info", {}));
    workers[0]!.swallow = true;
    await workers[0]!.terminate(); // emits exit(1) as an external kill would
    const outcome = await pending;
    expect(outcome.ok).toBe(false);
    if (!outcome.ok) expect(outcome.error.message).toMatch(/exited with code 1/);
    expect(events.filter((e) => e.type === "died")).toHaveLength(1);
    await host.dispose();
  });

  it("forwards cancellation: the request rejects as cancelled and the worker is told", async () => {
    const worker = new InProcessWorker();
    const host = createEngineHost(() => worker);
    worker.swallow = true;
    const controller = new AbortController();
    const outcome = settle(host.request("engine.info", {}, { signal: controller.signal }));
    controller.abort();
    const result = await outcome;
    expect(result.ok).toBe(false);
    if (!result.ok) expect(result.error.kind).toBe("cancelled");
    expect(worker.posted).toEqual([
      { type: "request", id: 1, method: "engine.info", params: {} },
      { type: "cancel", id: 1 },
    ]);
    await host.dispose();
  });

  it("reports a worker that cannot be constructed as a typed error", async () => {
    const host = createEngineHost(() => {
      throw new Error("ENOENT: engineWorker.js");
    });
    const outcome = await settle(host.request("engine.info", {}));
    expect(outcome.ok).toBe(false);
    if (!outcome.ok) expect(outcome.error).toMatchObject({ kind: "internal", message: expect.stringMatching(/could not be started.*ENOENT/) });
  });

  it("on dispose fails pending requests as cancelled, terminates the worker and refuses new requests", async () => {
    const worker = new InProcessWorker();
    const events: EngineHostEvent[] = [];
    const host = createEngineHost(() => worker, { onEvent: (e) => events.push(e) });
    worker.swallow = true;
    const pending = settle(host.request("engine.info", {}));
    await host.dispose();
    const outcome = await pending;
    expect(outcome.ok).toBe(false);
    if (!outcome.ok) expect(outcome.error.kind).toBe("cancelled");
    expect(worker.terminated).toBe(true);
    expect(events.some((e) => e.type === "died")).toBe(false);
    const late = await settle(host.request("engine.info", {}));
    expect(late.ok).toBe(false);
    if (!late.ok) expect(late.error.message).toMatch(/shut down/);
    await host.dispose(); // idempotent
  });
});

describe("engine host with a real worker thread", () => {
  let dir = "";
  let bundle = "";
  beforeAll(async () => {
    dir = await mkdtemp(path.join(os.tmpdir(), "loopwright-worker-"));
    bundle = path.join(dir, "engineWorker.mjs");
    await build({ entryPoints: ["main/engineWorker.ts"], bundle: true, platform: "node", format: "esm", outfile: bundle, logLevel: "silent" });
  });
  afterAll(async () => {
    await rm(dir, { recursive: true, force: true });
  });

  it("answers requests from a bundled worker thread while the main thread keeps running timers", async () => {
    const host = createEngineHost(() => new Worker(bundle));
    expect((await host.request("engine.info", {})).name).toBe("loopwright-engine");

    // A dense nonsymmetric 300×300 matrix from a fixed linear congruential sequence.
    const n = 300;
    let state = 20240611;
    const next = () => ((state = (state * 1103515245 + 12345) % 2147483648) / 2147483648) - 0.5;
    const matrix = Array.from({ length: n }, () => Array.from({ length: n }, next));
    const trace = matrix.reduce((sum, row, i) => sum + row[i]!, 0);

    const ticks: number[] = [];
    const timer = setInterval(() => ticks.push(performance.now()), 5);
    const started = performance.now();
    const { eigenvalues } = await host.request("linalg.eigenvalues", { matrix });
    const finished = performance.now();
    clearInterval(timer);

    // Sum of eigenvalues equals the trace; non-real ones come in conjugate pairs (linear algebra identities).
    expect(eigenvalues).toHaveLength(n);
    const sumRe = eigenvalues.reduce((s, z) => s + z.re, 0);
    const sumIm = eigenvalues.reduce((s, z) => s + z.im, 0);
    const scale = eigenvalues.reduce((s, z) => s + Math.hypot(z.re, z.im), 0);
    expect(Math.abs(sumRe - trace)).toBeLessThanOrEqual(1e-10 * scale);
    expect(Math.abs(sumIm)).toBeLessThanOrEqual(1e-10 * scale);

    // The request took long enough to matter, and timers kept firing throughout it. Had the
    // eigenvalues been computed on this thread, no tick would fall inside the request and the
    // single gap would equal its whole duration; the bounds leave room for a loaded CI machine.
    const duration = finished - started;
    expect(duration).toBeGreaterThan(100);
    const during = ticks.filter((t) => t >= started && t <= finished);
    const points = [started, ...during, finished];
    const gaps = points.slice(1).map((t, i) => t - points[i]!);
    expect(during.length).toBeGreaterThanOrEqual(3);
    expect(Math.max(...gaps)).toBeLessThan(duration / 2);
    await host.dispose();
  });

  it("restarts a real worker thread after it is terminated underneath the host", async () => {
    const workers: Worker[] = [];
    const host = createEngineHost(() => {
      const worker = new Worker(bundle);
      workers.push(worker);
      return worker;
    });
    await host.request("engine.info", {});
    await workers[0]!.terminate();
    await new Promise((resolve) => setTimeout(resolve, 20));
    expect((await host.request("engine.info", {})).name).toBe("loopwright-engine");
    expect(host.workersStarted()).toBe(2);
    await host.dispose();
  });
});
