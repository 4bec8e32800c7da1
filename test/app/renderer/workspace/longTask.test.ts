import { afterEach, describe, expect, it } from "vitest";
import type { EngineBridge } from "../../../../shared-engine/api/contract";
import { createLongTask, nonlinearSimulateParams, robustnessParams, type WorkspaceStore } from "../../../../renderer/state/workspace";
import { inProcessBridge, openDemoStore } from "./nonlinearTestSupport";

let store: WorkspaceStore | null = null;
afterEach(() => {
  store?.dispose();
  store = null;
});

describe("long engine tasks", () => {
  it("runs the demo's nonlinear check with monotonic progress and the nonlinear output beside the linear prediction", async () => {
    const bridge = inProcessBridge();
    store = await openDemoStore(bridge, "lqr-integral-1s");
    const s = store.getState();
    const variant = s.document!.variants.find((v) => v.id === "lqr-integral-1s")!;
    const task = createLongTask(bridge, "nonlinear.simulate");
    const seen: number[] = [];
    task.subscribe(() => seen.push(task.getState().progress));
    await task.run(nonlinearSimulateParams(s.document!, variant, s.evaluation.result));
    const t = task.getState();
    expect(t.status).toBe("done");
    expect(seen.length).toBeGreaterThan(2);
    for (let k = 1; k < seen.length; k++) expect(seen[k]!).toBeGreaterThanOrEqual(seen[k - 1]!);
    expect(t.result!.time.length).toBe(variant.nonlinearCheck!.times.length);
    expect(t.result!.linear.outputs.length).toBe(t.result!.outputs.length);
    // The simulation is the same one the pipeline runs: its divergence matches the variant result's.
    expect(t.result!.largestDivergence!.size).toBeCloseTo(s.evaluation.result!.nonlinear!.largestDivergence!.size, 6);
  });

  it("cancelling the robustness sweep leaves no run in flight, keeps the earlier result, and drops nothing late into the state", async () => {
    const bridge = inProcessBridge();
    store = await openDemoStore(bridge, "lqr-integral-robust");
    const s = store.getState();
    const variant = s.document!.variants.find((v) => v.id === "lqr-integral-robust")!;
    const task = createLongTask(bridge, "nonlinear.robustness");
    const params = robustnessParams(s.document!, variant, s.evaluation.result);
    await task.run(params);
    const first = task.getState().result!;
    expect(first.allStable).toBe(true);
    const running = task.run(params);
    expect(task.getState().status).toBe("running");
    task.cancel();
    await running;
    const after = task.getState();
    expect(after.status).toBe("cancelled");
    expect(after.result).toBe(first);
    expect(after.error).toBeNull();
    expect(bridge.calls.at(-1)!.aborted()).toBe(true);
    // A new run after the cancel works normally.
    await task.run(params);
    expect(task.getState().status).toBe("done");
  });

  it("a newer run supersedes the older one: the older answer is dropped and progress restarts at zero", async () => {
    let release: (() => void)[] = [];
    const answers = [{ tag: "old" }, { tag: "new" }];
    const progress: ((f: number) => void)[] = [];
    const slow: EngineBridge = {
      request(_m, _p, options) {
        const index = release.length;
        progress.push((f) => options?.onProgress?.({ fraction: f, label: "step" }));
        return new Promise((resolve) => release.push(() => resolve(answers[index] as never)));
      },
    };
    const task = createLongTask(slow, "nonlinear.robustness");
    const a = task.run({} as never);
    progress[0]!(0.6);
    expect(task.getState().progress).toBe(0.6);
    const b = task.run({} as never);
    expect(task.getState().progress).toBe(0);
    progress[0]!(0.9); // the superseded run's progress is ignored
    progress[1]!(0.3);
    progress[1]!(0.2); // out of order: the bar does not go back
    expect(task.getState().progress).toBe(0.3);
    release[0]!();
    await a;
    expect(task.getState().result).toBeNull();
    expect(task.getState().dropped).toBe(1);
    release[1]!();
    await b;
    expect(task.getState().result).toEqual({ tag: "new" });
    release = [];
  });

  it("reports a failed request's message and keeps the previous result", async () => {
    let fail = false;
    const bridge: EngineBridge = { request: () => (fail ? Promise.reject(new Error("operating point did not converge")) : Promise.resolve({ ok: 1 } as never)) };
    const task = createLongTask(bridge, "nonlinear.simulate");
    await task.run({} as never);
    fail = true;
    await task.run({} as never);
    expect(task.getState().status).toBe("failed");
    expect(task.getState().error).toBe("operating point did not converge");
    expect(task.getState().result).toEqual({ ok: 1 });
  });
});
