import { describe, expect, it } from "vitest";
import type { EngineBridge, ProjectFile } from "../../../../shared-engine/api/contract";
import { dispatch } from "../../../../shared-engine/api/dispatcher";
import { EngineError } from "../../../../shared-engine/errors";
import { createMemoryDocumentStore } from "../../../../renderer/db/documentStore";
import {
  addVariantCommand,
  applyBrysonRule,
  cellKey,
  createWorkspaceStore,
  pasteMatrix,
  renameSignalCommand,
  resizeDimensions,
  setIntegralOutputs,
  setLqrWeight,
  setMatrixCell,
  setPlacedPole,
  setPolePart,
  type WorkspaceStore,
} from "../../../../renderer/state/workspace";

import { LINEAR_QUEUE_DOCUMENT } from "./linearQueueDocument";

const DEMO: ProjectFile = LINEAR_QUEUE_DOCUMENT;

interface FakeBridge extends EngineBridge {
  calls: { method: string; params: unknown; aborted: () => boolean }[];
  /** Delays (ms) for the next calls, used first-in first-out; then `delay` applies. */
  nextDelays: number[];
}

/** A bridge that runs the real engine in-process, after `delay(callIndex)` ms, ignoring aborts (as a busy worker would). */
function engineBridge(delay: (call: number) => number = () => 1): FakeBridge {
  const calls: FakeBridge["calls"] = [];
  const nextDelays: number[] = [];
  return {
    calls,
    nextDelays,
    request(method, params, options) {
      const index = calls.length;
      calls.push({ method, params, aborted: () => options?.signal?.aborted ?? false });
      return new Promise((resolve, reject) => {
        setTimeout(() => {
          dispatch(method, params).then(resolve as (v: unknown) => void, (e: unknown) => reject(e instanceof EngineError ? e : new EngineError("internal", String(e))));
        }, nextDelays.shift() ?? delay(index));
      });
    },
  };
}

const settle = async (store: WorkspaceStore, what: (s: ReturnType<WorkspaceStore["getState"]>) => boolean, ms = 5000): Promise<void> => {
  const end = Date.now() + ms;
  while (!what(store.getState())) {
    if (Date.now() > end) throw new Error(`timed out; state: ${JSON.stringify({ ev: store.getState().evaluation.status, save: store.getState().save })}`);
    await new Promise((r) => setTimeout(r, 5));
  }
};
const idle = (s: ReturnType<WorkspaceStore["getState"]>) => (s.evaluation.status === "done" || s.evaluation.status === "failed") && (s.save.status === "saved" || s.save.status === "conflict");

async function openDemo(bridge: FakeBridge = engineBridge()) {
  const documents = createMemoryDocumentStore(() => 1000);
  await documents.save("p1", DEMO, { baseRevision: 0, message: "demo" });
  const store = createWorkspaceStore({ documents, bridge, projectId: "p1", evaluateDelayMs: 5, saveDelayMs: 10 });
  await store.load();
  store.selectVariant("poles-continuous");
  await settle(store, idle);
  return { store, documents, bridge };
}

describe("workspace store", () => {
  it("opens the stored document and evaluates the selected variant through the bridge", async () => {
    const { store } = await openDemo();
    const s = store.getState();
    expect(s.phase).toBe("ready");
    expect(s.save.revision).toBe(1);
    expect(s.evaluation.variantId).toBe("poles-continuous");
    // Requested closed-loop poles −0.08 ± 0.06j (the demo document's own design).
    const poles = s.evaluation.result!.closedLoopPoles!;
    expect(poles.map((p) => p.re).every((re) => Math.abs(re + 0.08) < 1e-8)).toBe(true);
    // The view asks for dense grids: 500 step samples and 400 Bode points.
    expect(s.evaluation.result!.step!.time).toHaveLength(500);
    expect(s.evaluation.result!.bode!.frequency).toHaveLength(400);
  });

  it("keeps the raw text of a cell that does not parse and leaves the document unchanged", async () => {
    const { store, documents } = await openDemo();
    const before = store.getState().document;
    expect(setMatrixCell(store, "queue", "A", 0, 1, "-5O")).toBe(false);
    expect(store.getState().document).toBe(before);
    expect(store.getState().drafts[cellKey("queue", "A", 0, 1)]).toMatchObject({ text: "-5O" });
    expect(store.getState().drafts[cellKey("queue", "A", 0, 1)]!.error).toContain("“-5O” is not a number");

    expect(setMatrixCell(store, "queue", "A", 0, 1, "-60")).toBe(true);
    expect(store.getState().drafts[cellKey("queue", "A", 0, 1)]).toBeUndefined();
    await settle(store, (s) => idle(s) && s.save.revision === 2);
    const stored = await documents.load("p1");
    expect((stored.document.plants[0]!.model as { A: number[][] }).A[0]).toEqual([0, -60]);
    expect((await documents.history("p1"))[0]!.message).toBe("edited A[1][2] of plant queue");
  });

  it("moves a placed pole, changes the gain, and undo and redo restore both", async () => {
    const { store } = await openDemo();
    const k0 = store.getState().evaluation.result!.gain!.K;
    setPlacedPole(store, "poles-continuous", 0, { re: -0.2, im: 0.1 });
    await settle(store, idle);
    const moved = store.getState();
    const placed = (moved.document!.variants[1]!.stateFeedback as { poles: unknown[] }).poles;
    expect(placed).toEqual([{ re: -0.2, im: 0.1 }, { re: -0.2, im: -0.1 }]); // conjugate followed
    expect(moved.evaluation.result!.gain!.K[0]![0]).not.toBeCloseTo(k0[0]![0]!, 6);
    for (const p of moved.evaluation.result!.closedLoopPoles!) expect(Math.abs(p.re + 0.2)).toBeLessThan(1e-8);
    expect(moved.undoLabel).toBe("moved pole 1 of variant poles-continuous");

    expect(store.undo()).toBe(true);
    await settle(store, idle);
    expect(store.getState().document!.variants[1]).toEqual(DEMO.variants[1]);
    expect(store.getState().evaluation.result!.gain!.K[0]![0]).toBeCloseTo(k0[0]![0]!, 10);
    expect(store.getState().redoLabel).toBe("moved pole 1 of variant poles-continuous");
    expect(store.redo()).toBe(true);
    await settle(store, idle);
    expect(store.getState().document!.variants[1]).toEqual(moved.document!.variants[1]);
  });

  it("merges the moves of one drag into one undo step, with one request in flight and the last position shown", async () => {
    const { store, bridge } = await openDemo(engineBridge(() => 20));
    const first = bridge.calls.length;
    for (const re of [-0.1, -0.12, -0.14, -0.16]) setPlacedPole(store, "poles-continuous", 1, { re, im: -0.06 }, { live: true, gesture: "g1" });
    await settle(store, (s) => idle(s) && s.evaluation.sent >= 2);
    // Throttled: the first move is sent at once, the three during its flight collapse into one.
    expect(bridge.calls.length - first).toBe(2);
    for (const p of store.getState().evaluation.result!.closedLoopPoles!) expect(Math.abs(p.re + 0.16)).toBeLessThan(1e-8);
    expect(store.undo()).toBe(true);
    expect(store.getState().document!.variants[1]).toEqual(DEMO.variants[1]);
    expect(store.getState().undoLabel).toBeNull();
  });

  it("discards a result that arrives after a newer request was sent", async () => {
    const bridge = engineBridge();
    const { store } = await openDemo(bridge);
    const first = bridge.calls.length;
    const discardedBefore = store.getState().evaluation.discarded;
    bridge.nextDelays.push(300, 1); // the first edit's request answers after the second's
    setPolePart(store, "poles-continuous", 0, "re", "-0.3");
    await settle(store, () => bridge.calls.length === first + 1);
    setPolePart(store, "poles-continuous", 0, "re", "-0.5");
    await settle(store, (s) => bridge.calls.length === first + 2 && s.evaluation.status === "done");
    await new Promise((r) => setTimeout(r, 350));
    const s = store.getState();
    expect(bridge.calls[first]!.aborted()).toBe(true);
    expect(s.evaluation.discarded - discardedBefore).toBe(1);
    for (const p of s.evaluation.result!.closedLoopPoles!) expect(Math.abs(p.re + 0.5)).toBeLessThan(1e-8);
  });

  it("refuses a pasted matrix of the wrong shape, keeping the pasted text and saying what is needed", async () => {
    const { store } = await openDemo();
    const before = store.getState().document;
    expect(pasteMatrix(store, "queue", "B", "1\t2")).toBe(false);
    expect(store.getState().document).toBe(before);
    const draft = store.getState().drafts["queue:B:paste"]!;
    expect(draft.text).toBe("1\t2");
    expect(draft.error).toContain("B must be 2×1");
    expect(pasteMatrix(store, "queue", "B", "0\n0.1")).toBe(true);
    expect((store.getState().document!.plants[0]!.model as { B: number[][] }).B).toEqual([[0], [0.1]]);
  });

  it("resizes the plant keeping names, units and every variant consistent", async () => {
    const { store } = await openDemo();
    resizeDimensions(store, "queue", { states: 3, inputs: 1, outputs: 1, disturbances: 1 });
    const doc = store.getState().document!;
    const model = doc.plants[0]!.model as { A: number[][]; names: { states: string[] }; units: { states: string[] } };
    expect(model.A).toEqual([[0, -50, 0], [0, -0.05, 0], [0, 0, 0]]);
    expect(model.names.states).toEqual(["backlog", "consumers", "x3"]);
    expect(model.units.states).toEqual(["msg", "consumers", ""]);
    expect((doc.variants[0]!.stateFeedback as { Q: number[][] }).Q).toEqual([[1e-6, 0, 0], [0, 0.01, 0], [0, 0, 1]]);
    expect((doc.variants[1]!.stateFeedback as { poles: unknown[] }).poles).toHaveLength(3);
  });

  it("renames an output and integral action follows the new name; a duplicate name is refused", async () => {
    const { store } = await openDemo();
    expect(renameSignalCommand(store, "queue", "outputs", 0, "queue_length")).toBe(true);
    expect(store.getState().document!.variants[0]!.integralAction!.outputs).toEqual(["queue_length"]);
    expect(renameSignalCommand(store, "queue", "states", 1, "backlog")).toBe(false);
    expect(store.getState().drafts["queue:name:states:1"]!.text).toBe("backlog");
  });

  it("a larger LQR weight on the backlog settles the step response faster", async () => {
    const { store } = await openDemo();
    const id = addVariantCommand(store, "queue", "lqr", { states: 2, inputs: 1, outputs: 1, disturbances: 1 })!;
    applyBrysonRule(store, id, [1000, 10], [10]);
    await settle(store, (s) => idle(s) && s.evaluation.variantId === id);
    const slow = store.getState().evaluation.result!.step!.settlingTime!;
    expect((store.getState().document!.variants.at(-1)!.stateFeedback as { Q: number[][] }).Q).toEqual([[1e-6, 0], [0, 0.01]]); // 1/1000², 1/10²
    setLqrWeight(store, id, "Q", 0, 1e-4);
    await settle(store, (s) => idle(s) && s.evaluation.status === "done");
    const fast = store.getState().evaluation.result!.step!.settlingTime!;
    expect(fast).toBeLessThan(slow);
  });

  it("adds integral action with one weight per integrated output", async () => {
    const { store } = await openDemo();
    setIntegralOutputs(store, "lqr-kalman", ["backlog"], { states: 2, inputs: 1, outputs: 1, disturbances: 1 });
    expect(store.getState().document!.variants[2]!.integralAction).toEqual({ outputs: ["backlog"], weights: [1] });
    expect(setIntegralOutputs(store, "lqr-kalman", ["backlog", "other"], { states: 2, inputs: 1, outputs: 1, disturbances: 1 })).toBe(false);
    expect(store.getState().editError).toContain("At most 1 output");
  });

  it("reports a conflict when another window saved first, and keeps this window's version on request", async () => {
    const { store, documents } = await openDemo();
    setMatrixCell(store, "queue", "A", 1, 1, "-0.1");
    await documents.save("p1", { ...DEMO, name: "changed elsewhere" }, { baseRevision: 1, message: "other window" });
    await settle(store, (s) => s.save.status === "conflict");
    expect(store.getState().save.error).toContain("changed in another window");
    await store.keepMineAfterConflict();
    expect(store.getState().save).toMatchObject({ status: "saved", revision: 3 });
    expect(((await documents.load("p1")).document.plants[0]!.model as { A: number[][] }).A[1]).toEqual([0, -0.1]);
  });
});
