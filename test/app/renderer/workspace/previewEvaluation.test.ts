// Dragging a pole: the store asks for lean previews while the hand moves and for one full
// evaluation when the gesture settles; latest-wins and stale discard still hold.
import { describe, expect, it } from "vitest";
import type { EngineBridge, ProjectFile } from "../../../../shared-engine/api/contract";
import { dispatch } from "../../../../shared-engine/api/dispatcher";
import { EngineError } from "../../../../shared-engine/errors";
import { createMemoryDocumentStore } from "../../../../renderer/db/documentStore";
import { createWorkspaceStore, setMatrixCell, setPlacedPole, type WorkspaceStore } from "../../../../renderer/state/workspace";
import { LINEAR_QUEUE_DOCUMENT } from "./linearQueueDocument";

interface FakeBridge extends EngineBridge {
  calls: { method: string; aborted: () => boolean }[];
  nextDelays: number[];
}

/** Runs the real engine in-process after a delay (first-in first-out from `nextDelays`, else `delay`), ignoring aborts like a busy worker. */
function engineBridge(delay = 1): FakeBridge {
  const calls: FakeBridge["calls"] = [];
  const nextDelays: number[] = [];
  return {
    calls,
    nextDelays,
    request(method, params, options) {
      calls.push({ method, aborted: () => options?.signal?.aborted ?? false });
      return new Promise((resolve, reject) => {
        setTimeout(() => {
          dispatch(method, params).then(resolve as (v: unknown) => void, (e: unknown) => reject(e instanceof EngineError ? e : new EngineError("internal", String(e))));
        }, nextDelays.shift() ?? delay);
      });
    },
  };
}

type State = ReturnType<WorkspaceStore["getState"]>;
const settle = async (store: WorkspaceStore, what: (s: State) => boolean, ms = 5000): Promise<void> => {
  const end = Date.now() + ms;
  while (!what(store.getState())) {
    if (Date.now() > end) throw new Error(`timed out; evaluation: ${JSON.stringify({ ...store.getState().evaluation, result: undefined })}`);
    await new Promise((r) => setTimeout(r, 5));
  }
};
const done = (s: State) => s.evaluation.status === "done";

async function openDemo(bridge: FakeBridge, settleDelayMs = 60) {
  const documents = createMemoryDocumentStore(() => 1000);
  await documents.save("p1", LINEAR_QUEUE_DOCUMENT as ProjectFile, { baseRevision: 0, message: "demo" });
  const kinds: string[] = [];
  const store = createWorkspaceStore({ documents, bridge, projectId: "p1", evaluateDelayMs: 5, saveDelayMs: 10, settleDelayMs, onResult: (_r, _ms, kind) => kinds.push(kind) });
  await store.load();
  store.selectVariant("poles-continuous");
  await settle(store, (s) => done(s) && s.evaluation.variantId === "poles-continuous" && !s.evaluation.preview);
  return { store, kinds };
}

describe("drag previews in the workspace store", () => {
  it("shows previews over the last full plant report while dragging, then one full evaluation with margins", async () => {
    const bridge = engineBridge(5);
    const { store, kinds } = await openDemo(bridge);
    const fullResult = store.getState().evaluation.result!;
    expect(fullResult.margins).toBeDefined();
    const first = bridge.calls.length;

    setPlacedPole(store, "poles-continuous", 0, { re: -0.1, im: 0.06 }, { live: true, gesture: "g" });
    await settle(store, (s) => done(s) && s.evaluation.preview === true);
    const shown = store.getState().evaluation.result!;
    expect(bridge.calls[first]!.method).toBe("project.previewVariant");
    expect(shown.plant).toBe(fullResult.plant); // the same report, not recomputed
    expect(shown.margins).toBeUndefined(); // never stale margins under a moved curve
    for (const p of shown.closedLoopPoles!) expect(Math.abs(p.re + 0.1)).toBeLessThan(1e-8);
    expect(shown.step!.time).toHaveLength(500);
    expect(shown.bode!.frequency).toHaveLength(400);

    await settle(store, (s) => done(s) && s.evaluation.preview === false);
    const after = store.getState().evaluation.result!;
    expect(bridge.calls.slice(first).map((c) => c.method)).toEqual(["project.previewVariant", "project.evaluateVariant"]);
    expect(after.margins).toBeDefined();
    expect(after.gain!.K).toEqual(shown.gain!.K);
    expect(kinds.slice(-2)).toEqual(["preview", "full"]);
    store.dispose();
  });

  it("runs the full evaluation at once when the gesture ends", async () => {
    const bridge = engineBridge(5);
    const { store } = await openDemo(bridge, 60_000); // the quiet-time fallback never fires here
    setPlacedPole(store, "poles-continuous", 0, { re: -0.12, im: 0.05 }, { live: true, gesture: "g" });
    await settle(store, (s) => done(s) && s.evaluation.preview === true);
    store.settleLiveEdits();
    await settle(store, (s) => done(s) && s.evaluation.preview === false);
    expect(bridge.calls.at(-1)!.method).toBe("project.evaluateVariant");
    expect(store.getState().evaluation.result!.margins).toBeDefined();
    // Nothing to settle any more: no further request.
    const count = bridge.calls.length;
    store.settleLiveEdits();
    expect(bridge.calls.length).toBe(count);
    store.dispose();
  });

  it("discards a preview that answers after a newer edit, and shows the newer full result", async () => {
    const bridge = engineBridge(1);
    const { store } = await openDemo(bridge, 60_000);
    const discarded = store.getState().evaluation.discarded;
    bridge.nextDelays.push(250); // the drag's preview is slow
    setPlacedPole(store, "poles-continuous", 0, { re: -0.1, im: 0.06 }, { live: true, gesture: "g" });
    const previewCall = bridge.calls.at(-1)!;
    expect(previewCall.method).toBe("project.previewVariant");
    setPlacedPole(store, "poles-continuous", 0, { re: -0.3, im: 0.1 }); // a typed value: debounced full run
    await settle(store, (s) => done(s) && s.evaluation.discarded > discarded);
    await new Promise((r) => setTimeout(r, 300)); // the late preview has certainly answered by now
    const s = store.getState();
    expect(previewCall.aborted()).toBe(true);
    expect(s.evaluation.preview).toBe(false);
    for (const p of s.evaluation.result!.closedLoopPoles!) expect(Math.abs(p.re + 0.3)).toBeLessThan(1e-8);
    store.dispose();
  });

  it("asks for a full evaluation, not a preview, when the plant changed since the last full result", async () => {
    const bridge = engineBridge(1);
    const { store } = await openDemo(bridge, 60_000);
    // Edit the plant, then drag before the debounced full evaluation has answered.
    expect(setMatrixCell(store, "queue", "A", 0, 1, "-40")).toBe(true);
    setPlacedPole(store, "poles-continuous", 0, { re: -0.1, im: 0.06 }, { live: true, gesture: "g" });
    expect(bridge.calls.at(-1)!.method).toBe("project.evaluateVariant");
    await settle(store, done);
    expect(store.getState().evaluation.result!.margins).toBeDefined();
    store.dispose();
  });
});
