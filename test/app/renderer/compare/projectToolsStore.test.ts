import { describe, expect, it, vi } from "vitest";
import { createMemoryDocumentStore } from "../../../../renderer/db";
import { createProjectToolsStore } from "../../../../renderer/state/compare/projectToolsStore";
import { duplicateVariant, setBaseline } from "../../../../renderer/state/compare/variantCommands";
import { sampleProject } from "../../db/sampleProject";
import { inProcessBridge } from "../io/inProcessBridge";

async function setup() {
  const documents = createMemoryDocumentStore();
  await documents.save("p1", sampleProject(), { baseRevision: 0, message: "created" });
  const store = createProjectToolsStore({ projectId: "p1", documents, bridge: inProcessBridge });
  await store.start();
  await vi.waitFor(() => expect(store.getState().evaluation.status).toBe("done"));
  return { documents, store };
}

describe("project tools store", () => {
  it("opens the latest revision, selects the variants and evaluates them through the bridge", async () => {
    const { store } = await setup();
    const s = store.getState();
    expect(s.stored!.revision).toBe(1);
    expect(s.selected).toEqual(["lqr-soft", "poles-fast"]);
    expect(Object.keys(s.evaluation.results).sort()).toEqual(["lqr-soft", "poles-fast"]);
    store.dispose();
  });

  it("saves a variant command as a new revision and keeps at least two and at most four selected", async () => {
    const { store } = await setup();
    for (let i = 0; i < 3; i++) expect(await store.apply((d) => duplicateVariant(d, "poles-fast").document, "duplicated")).toBe(true);
    expect(store.getState().stored!.revision).toBe(4);
    expect(store.getState().history[0]!.message).toBe("duplicated");
    store.toggleSelected("poles-fast-copy");
    store.toggleSelected("poles-fast-copy-2");
    expect(store.getState().selected).toHaveLength(4);
    store.toggleSelected("poles-fast-copy-3");
    expect(store.getState().selected).toHaveLength(4);
    expect(store.getState().notice?.text).toMatch(/At most 4/);
    store.toggleSelected("poles-fast-copy");
    store.toggleSelected("poles-fast-copy-2");
    store.toggleSelected("lqr-soft");
    expect(store.getState().selected).toEqual(["lqr-soft", "poles-fast"]);
    store.dispose();
  });

  it("moves to a revision saved in another window when it hears about it", async () => {
    const { documents, store } = await setup();
    await documents.save("p1", setBaseline(sampleProject("Other window"), "poles-fast").document, { baseRevision: 1, message: "other" });
    await vi.waitFor(() => expect(store.getState().stored!.revision).toBe(2));
    expect(store.getState().notice?.text).toMatch(/saved in another window/);
    store.dispose();
  });

  it("shows a conflict, stores nothing of its own and keeps the other window's revision when its base is stale", async () => {
    const documents = createMemoryDocumentStore();
    await documents.save("p1", sampleProject(), { baseRevision: 0, message: "created" });
    // This window does not hear about the other save (as when the channel is unavailable).
    const deaf = { ...documents, subscribe: () => () => undefined };
    const store = createProjectToolsStore({ projectId: "p1", documents: deaf, bridge: inProcessBridge });
    await store.start();
    await documents.save("p1", sampleProject("Other window"), { baseRevision: 1, message: "other" });
    expect(await store.apply((d) => ({ ...d, name: "Mine" }), "mine")).toBe(false);
    expect(store.getState().notice).toMatchObject({ kind: "conflict", text: expect.stringMatching(/^Not saved: This project was changed elsewhere/) });
    expect((await documents.load("p1")).document.name).toBe("Other window");
    expect((await documents.history("p1")).map((h) => h.message)).toEqual(["other", "created"]);
    await store.reload();
    expect(store.getState().stored).toMatchObject({ revision: 2, document: { name: "Other window" } });
    store.dispose();
  });

  it("restores an old revision as a new one and lists every revision", async () => {
    const { store } = await setup();
    await store.apply((d) => ({ ...d, name: "Renamed" }), "renamed");
    expect(await store.restore(1)).toBe(true);
    const s = store.getState();
    expect(s.stored).toMatchObject({ revision: 3, document: { name: "Spring table" } });
    expect(s.history.map((h) => h.message)).toEqual(["Restored revision 1", "renamed", "created"]);
    await store.inspect(2);
    expect(store.getState().inspected!.document.name).toBe("Renamed");
    store.dispose();
  });
});

describe("project tools store with the Dexie store", () => {
  it("does not announce its own save or restore as coming from another window", async () => {
    const { openTestDatabase } = await import("../../db/dbTestSupport");
    const { createDexieDocumentStore } = await import("../../../../renderer/db");
    const db = openTestDatabase();
    const documents = createDexieDocumentStore(db, { openChannel: () => null });
    await documents.save("p1", sampleProject(), { baseRevision: 0, message: "created" });
    for (const memory of [false, true]) {
      const store = createProjectToolsStore({ projectId: "p1", documents: memory ? createMemoryDocumentStore() : documents, bridge: inProcessBridge });
      await store.start();
      if (memory) await store.apply(() => sampleProject(), "first");
      await store.apply((d) => duplicateVariant(d, "lqr-soft").document, "dup");
      await new Promise((resolve) => setTimeout(resolve, 30));
      expect(store.getState().notice).toBeNull();
      store.dispose();
    }
    documents.dispose();
    db.close();
  });
});

describe("project tools store conflict notice", () => {
  it("keeps saying the change was not saved when the other window's revision arrives after the conflict", async () => {
    const documents = createMemoryDocumentStore();
    await documents.save("p1", sampleProject(), { baseRevision: 0, message: "created" });
    let deliver: (() => void) | null = null;
    // Delay the cross-window event until after this window's save has failed.
    const delayed = {
      ...documents,
      subscribe: (id: string, listener: (latest: Awaited<ReturnType<typeof documents.load>>) => void) =>
        documents.subscribe(id, (latest) => {
          deliver = () => listener(latest);
        }),
    };
    const store = createProjectToolsStore({ projectId: "p1", documents: delayed, bridge: inProcessBridge });
    await store.start();
    await documents.save("p1", sampleProject("Other"), { baseRevision: 1, message: "other" });
    expect(await store.apply((d) => ({ ...d, name: "Mine" }), "mine")).toBe(false);
    deliver!();
    await vi.waitFor(() => expect(store.getState().stored!.revision).toBe(2));
    expect(store.getState().notice).toMatchObject({ kind: "conflict", text: expect.stringMatching(/^Not saved: .*Now showing revision 2 from the other window/) });
    store.dispose();
  });
});
