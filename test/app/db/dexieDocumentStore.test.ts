import { describe, expect, it, vi } from "vitest";
import { createDexieDocumentStore, requestPersistentStorage, restoreRevision, type ChannelLike } from "../../../renderer/db";
import { freshFactory, openTestDatabase, steppingClock } from "./dbTestSupport";
import { sampleProject } from "./sampleProject";

function setup(factory = freshFactory(), openChannel: () => ChannelLike | null = () => null) {
  const db = openTestDatabase(factory);
  const store = createDexieDocumentStore(db, { now: steppingClock(), openChannel });
  return { db, store, close: () => (store.dispose(), db.close()) };
}

function quotaError(): Error {
  // What Chromium raises when the origin's quota is used up: a DOMException named QuotaExceededError.
  return new DOMException("The quota has been exceeded.", "QuotaExceededError");
}

describe("Dexie document store", () => {
  it("saves numbered revisions and loads the latest one", async () => {
    const { store, close } = setup();
    const first = await store.save("p1", sampleProject("One"), { baseRevision: 0, message: "created" });
    const second = await store.save("p1", sampleProject("Two"), { baseRevision: 1, message: "renamed" });
    expect([first.revision, second.revision]).toEqual([1, 2]);
    const latest = await store.load("p1");
    expect(latest).toMatchObject({ revision: 2, document: { name: "Two" } });
    expect((await store.revision("p1", 1)).document.name).toBe("One");
    close();
  });

  it("lists the history newest first with time and message", async () => {
    const { store, close } = setup();
    await store.save("p1", sampleProject(), { baseRevision: 0, message: "created" });
    await store.save("p1", sampleProject(), { baseRevision: 1, message: "edited Q of LQR soft" });
    const history = await store.history("p1");
    expect(history.map((h) => [h.revision, h.message])).toEqual([
      [2, "edited Q of LQR soft"],
      [1, "created"],
    ]);
    expect(history[0]!.savedAt).toBeGreaterThan(history[1]!.savedAt);
    close();
  });

  it("refuses a save based on a stale revision with kind conflict and stores nothing", async () => {
    const { db, store, close } = setup();
    await store.save("p1", sampleProject("Mine"), { baseRevision: 0, message: "a" });
    await store.save("p1", sampleProject("Theirs"), { baseRevision: 1, message: "b" });
    await expect(store.save("p1", sampleProject("Stale"), { baseRevision: 1, message: "c" })).rejects.toMatchObject({
      kind: "conflict",
      details: { stored: 2, base: 1 },
    });
    expect(await db.revisions.count()).toBe(2);
    expect((await store.load("p1")).document.name).toBe("Theirs");
    close();
  });

  it("lets exactly one of two simultaneous saves from the same base win", async () => {
    const factory = freshFactory();
    const a = setup(factory);
    const b = setup(factory);
    const results = await Promise.allSettled([
      a.store.save("p1", sampleProject("A"), { baseRevision: 0, message: "a" }),
      b.store.save("p1", sampleProject("B"), { baseRevision: 0, message: "b" }),
    ]);
    expect(results.filter((r) => r.status === "fulfilled")).toHaveLength(1);
    const rejected = results.find((r) => r.status === "rejected") as PromiseRejectedResult;
    expect(rejected.reason).toMatchObject({ kind: "conflict" });
    const latest = await a.store.load("p1");
    const winner = (results.find((r) => r.status === "fulfilled") as PromiseFulfilledResult<{ document: { name: string } }>).value;
    expect(latest.document.name).toBe(winner.document.name);
    a.close();
    b.close();
  });

  it("reports a full disk as kind storage and leaves every stored revision untouched", async () => {
    const { db, store, close } = setup();
    await store.save("p1", sampleProject("Safe"), { baseRevision: 0, message: "safe" });
    const before = { documents: await db.documents.toArray(), revisions: await db.revisions.toArray(), signOffs: await db.signOffs.toArray() };
    // The fake throws on the second write of the transaction, after the revision row was added,
    // so the test also proves the transaction rolls the first write back.
    const spy = vi.spyOn(db.documents, "put").mockImplementation(() => {
      throw quotaError();
    });
    const error = await store.save("p1", sampleProject("Lost"), { baseRevision: 1, message: "too big" }).catch((e: unknown) => e);
    spy.mockRestore();
    expect(error).toMatchObject({ kind: "storage", details: { reason: "quota", cause: "QuotaExceededError" } });
    expect((error as Error).message).toMatch(/storage for Loopwright is full\. Nothing was changed/);
    expect({ documents: await db.documents.toArray(), revisions: await db.revisions.toArray(), signOffs: await db.signOffs.toArray() }).toEqual(before);
    expect((await store.load("p1")).revision).toBe(1);
    // The store still works once there is room again.
    expect((await store.save("p1", sampleProject("Later"), { baseRevision: 1, message: "retry" })).revision).toBe(2);
    close();
  });

  it("reports a quota error wrapped by Dexie as an abort the same way", async () => {
    const { db, store, close } = setup();
    const wrapped = Object.assign(new Error("Transaction aborted"), { name: "AbortError", inner: quotaError() });
    const spy = vi.spyOn(db.revisions, "add").mockImplementation(() => {
      throw wrapped;
    });
    await expect(store.save("p1", sampleProject(), { baseRevision: 0, message: "x" })).rejects.toMatchObject({ kind: "storage", details: { reason: "quota" } });
    spy.mockRestore();
    expect(await db.revisions.count()).toBe(0);
    close();
  });

  it("restores an old revision as a new revision, keeping every revision in between", async () => {
    const { store, close } = setup();
    await store.save("p1", sampleProject("First"), { baseRevision: 0, message: "a" });
    await store.save("p1", sampleProject("Second"), { baseRevision: 1, message: "b" });
    const restored = await restoreRevision(store, "p1", 1, 2);
    expect(restored).toMatchObject({ revision: 3, document: { name: "First" } });
    expect((await store.history("p1")).map((h) => h.message)).toEqual(["Restored revision 1", "b", "a"]);
    await expect(restoreRevision(store, "p1", 1, 2)).rejects.toMatchObject({ kind: "conflict" });
    close();
  });

  it("mirrors the latest document's sign-offs into the signOffs table", async () => {
    const { db, store, close } = setup();
    const doc = sampleProject();
    doc.signOffs = [{ variant: "lqr-soft", role: "approved", name: "R. Reviewer", date: "2025-06-01", fingerprint: "abc" }];
    await store.save("p1", doc, { baseRevision: 0, message: "signed" });
    expect(await db.signOffs.where("[projectId+variant]").equals(["p1", "lqr-soft"]).toArray()).toMatchObject([{ role: "approved", name: "R. Reviewer" }]);
    delete doc.signOffs;
    await store.save("p1", doc, { baseRevision: 1, message: "unsigned" });
    expect(await db.signOffs.count()).toBe(0);
    close();
  });

  it("returns copies, so changing a loaded or saved document does not change the stored one", async () => {
    const { store, close } = setup();
    const doc = sampleProject("Original");
    const saved = await store.save("p1", doc, { baseRevision: 0, message: "a" });
    doc.name = "Changed input";
    saved.document.name = "Changed result";
    (await store.load("p1")).document.name = "Changed load";
    expect((await store.load("p1")).document.name).toBe("Original");
    close();
  });

  it("reports a damaged stored document by its field path", async () => {
    const { db, store, close } = setup();
    await db.documents.put({ projectId: "p1", revision: 1, savedAt: 1, document: { format: "loopwright-project", name: "x", plants: {} } as never });
    await expect(store.load("p1")).rejects.toMatchObject({ kind: "validation", details: { path: "documents[p1].document.plants" } });
    close();
  });

  it("tells another tab's subscriber about a save, and stops after the disposer runs", async () => {
    const factory = freshFactory();
    const channelName = `test-${Math.random()}`;
    const open = () => new BroadcastChannel(channelName) as unknown as ChannelLike;
    const tabA = setup(factory, open);
    const tabB = setup(factory, open);
    const heard: number[] = [];
    const stop = tabB.store.subscribe("p1", (latest) => heard.push(latest.revision));
    await tabA.store.save("p1", sampleProject(), { baseRevision: 0, message: "a" });
    await vi.waitFor(() => expect(heard).toEqual([1]));
    stop();
    await tabA.store.save("p1", sampleProject(), { baseRevision: 1, message: "b" });
    await new Promise((resolve) => setTimeout(resolve, 50));
    expect(heard).toEqual([1]);
    tabA.close();
    tabB.close();
  });

  it("requests persistent storage where the browser offers it and reports false where it does not", async () => {
    const persist = vi.fn(async () => true);
    expect(await requestPersistentStorage({ persisted: async () => false, persist })).toBe(true);
    expect(persist).toHaveBeenCalledOnce();
    expect(await requestPersistentStorage({ persisted: async () => true, persist })).toBe(true);
    expect(persist).toHaveBeenCalledOnce();
    expect(await requestPersistentStorage(undefined)).toBe(false);
    expect(await requestPersistentStorage({ persist: async () => Promise.reject(new Error("denied")) })).toBe(false);
  });
});
