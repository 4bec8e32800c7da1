import { renderToStaticMarkup } from "react-dom/server";
import { describe, expect, it, vi } from "vitest";
import type { EngineBridge, ProjectFile, RequestOptions } from "../../../../shared-engine/api/contract";
import { createMemoryDocumentStore } from "../../../../renderer/db";
import { createProjectToolsStore } from "../../../../renderer/state/compare/projectToolsStore";
import { CompareView } from "../../../../renderer/views/compare/CompareView";
import { sampleProject } from "../../db/sampleProject";
import { inProcessBridge } from "../io/inProcessBridge";

interface Call {
  project: ProjectFile;
  signal: RequestOptions["signal"];
  /** Resolves a held call (see `hold`). */
  release?: () => void;
}

/**
 * The in-process bridge, recording every project.evaluate with its project and cancel signal.
 * A full evaluation of a project named in `hold` is kept waiting until released (as a slow
 * engine would); the display-only loop evaluation (its variants ask for margins only) is not.
 */
function recordingBridge(hold: Set<string>) {
  const calls: Call[] = [];
  const bridge: EngineBridge = {
    request: (async (method: string, params: { project: ProjectFile }, options?: RequestOptions) => {
      if (method !== "project.evaluate") return inProcessBridge.request(method as never, params as never, options);
      const call: Call = { project: params.project, signal: options?.signal };
      calls.push(call);
      if (hold.has(params.project.name) && params.project.variants.some((v) => v.step)) {
        await new Promise<void>((resolve) => (call.release = resolve));
      }
      return inProcessBridge.request("project.evaluate", params, options);
    }) as EngineBridge["request"],
  };
  /** Full evaluations (the stored document as it is, not the display copy of the loops). */
  const full = () => calls.filter((c) => c.project.variants.some((v) => v.step));
  return { bridge, calls, full };
}

async function setup(hold = new Set<string>(), refreshDelayMs = 40) {
  const documents = createMemoryDocumentStore();
  await documents.save("p1", sampleProject(), { baseRevision: 0, message: "created" });
  const recorder = recordingBridge(hold);
  const store = createProjectToolsStore({ projectId: "p1", documents, bridge: recorder.bridge, refreshDelayMs });
  await store.start();
  await vi.waitFor(() => expect(store.getState().loops.status).toBe("done"));
  return { documents, store, ...recorder };
}

describe("comparison results after a save in another window", () => {
  it("redesigns once, the newest revision, after a burst of saves, and says the results are out of date until then", async () => {
    const { documents, store, full } = await setup(new Set(), 300);
    expect(full().map((c) => c.project.name)).toEqual(["Spring table"]);
    for (let r = 2; r <= 4; r++) await documents.save("p1", sampleProject(`Other window ${r}`), { baseRevision: r - 1, message: `other ${r}` });
    await vi.waitFor(() => expect(store.getState().stored!.revision).toBe(4));
    // Shown at once, still with the results of revision 1: the comparison says so.
    expect(store.getState().evaluation).toMatchObject({ status: "done", revision: 1 });
    const html = renderToStaticMarkup(<CompareView state={store.getState()} store={store} />);
    expect(html).toMatch(/data-testid="evaluation-status" data-stale="true">Designed from revision 1; revision 4 was saved in another window since, so these results are out of date/);
    expect(html).toContain(">Redesign now</button>");

    await vi.waitFor(() => expect(store.getState().evaluation).toMatchObject({ status: "done", revision: 4 }));
    await vi.waitFor(() => expect(store.getState().loops).toMatchObject({ status: "done", revision: 4 }));
    // One evaluation for the three saves, of the newest document.
    expect(full().map((c) => c.project.name)).toEqual(["Spring table", "Other window 4"]);
    const after = renderToStaticMarkup(<CompareView state={store.getState()} store={store} />);
    expect(after).toContain('data-testid="evaluation-status">Designed from revision 4</span>');
    expect(after).not.toContain("Redesign now");
    store.dispose();
  });

  it("cancels the evaluation of an older revision still running when a newer one arrives, and ignores its late answer", async () => {
    const { documents, store, full } = await setup(new Set(["Other window 2"]));
    await documents.save("p1", sampleProject("Other window 2"), { baseRevision: 1, message: "other 2" });
    await vi.waitFor(() => expect(full().at(-1)?.project.name).toBe("Other window 2"));
    const held = full().at(-1)!;
    expect(store.getState().evaluation.status).toBe("running");
    expect(held.signal?.aborted).toBe(false);
    expect(renderToStaticMarkup(<CompareView state={store.getState()} store={store} />)).toContain(
      'data-testid="evaluation-status">Designing revision 2… (the results below are from revision 1 until then)</span>',
    );

    await documents.save("p1", sampleProject("Other window 3"), { baseRevision: 2, message: "other 3" });
    await vi.waitFor(() => expect(store.getState().evaluation).toMatchObject({ status: "done", revision: 3 }));
    expect(held.signal?.aborted).toBe(true);
    held.release!();
    await new Promise((resolve) => setTimeout(resolve, 30));
    expect(store.getState().evaluation).toMatchObject({ status: "done", revision: 3 });
    expect(full().map((c) => c.project.name)).toEqual(["Spring table", "Other window 2", "Other window 3"]);
    store.dispose();
  });

  it("redesigns at once with the button's command, and a disposed screen starts no evaluation", async () => {
    const { documents, store, full } = await setup(new Set(), 60_000);
    await documents.save("p1", sampleProject("Other window"), { baseRevision: 1, message: "other" });
    await vi.waitFor(() => expect(store.getState().stored!.revision).toBe(2));
    // The quiet period is a minute here: the button's command does not wait for it.
    await store.evaluate();
    expect(store.getState().evaluation).toMatchObject({ status: "done", revision: 2 });
    expect(full()).toHaveLength(2);

    const second = await setup(new Set(), 20);
    await second.documents.save("p1", sampleProject("Other window"), { baseRevision: 1, message: "other" });
    await vi.waitFor(() => expect(second.store.getState().stored!.revision).toBe(2));
    second.store.dispose();
    await new Promise((resolve) => setTimeout(resolve, 60));
    expect(second.full()).toHaveLength(1);
    store.dispose();
  });
});
