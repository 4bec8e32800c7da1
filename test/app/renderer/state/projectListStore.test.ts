import { describe, expect, it } from "vitest";
import type { EngineBridge } from "../../../../shared-engine/api/contract";
import { EngineError } from "../../../../shared-engine/errors";
import { DEMO_PROJECT_NAME, createProjectRepository, ensureDemoProject } from "../../../../renderer/db";
import { createProjectListStore, formatComplex } from "../../../../renderer/state/projectListStore";
import { openTestDatabase, steppingClock } from "../../db/dbTestSupport";

/** A bridge stand-in answering like the engine would; eigenvalues of the check matrix are −1, −2. */
function fakeBridge(overrides: Partial<Record<string, () => unknown>> = {}): EngineBridge & { calls: string[] } {
  const calls: string[] = [];
  return {
    calls,
    async request(method, _params) {
      calls.push(method);
      const override = overrides[method];
      if (override) return override() as never;
      if (method === "engine.info") return { name: "loopwright-engine", version: "9.8.7", methods: [] } as never;
      // Companion matrix of s² + 3s + 2 = (s + 1)(s + 2): eigenvalues −1, −2 (common practice).
      return { eigenvalues: [{ re: -1, im: 0 }, { re: -2, im: 0 }] } as never;
    },
  };
}

async function setup(options: { demo?: boolean; bridge?: EngineBridge } = {}) {
  const db = openTestDatabase();
  const repository = createProjectRepository(db, { now: steppingClock() });
  const bridge = options.bridge ?? fakeBridge();
  const store = createProjectListStore({
    repository,
    bridge,
    transport: "worker",
    ...(options.demo ? { prepare: () => ensureDemoProject(db) } : {}),
  });
  await store.start();
  return { db, store, bridge };
}

const names = (store: { getState(): { projects: readonly { name: string }[] } }) => store.getState().projects.map((p) => p.name);

describe("project list store", () => {
  it("starts with the demo project on a fresh profile and shows the engine version from the bridge", async () => {
    const { db, store } = await setup({ demo: true });
    const state = store.getState();
    expect(state.phase).toBe("ready");
    expect(names(store)).toEqual([DEMO_PROJECT_NAME]);
    expect(state.engine).toEqual({ status: "ready", transport: "worker", version: "9.8.7", error: null });
    db.close();
  });

  it("shows an empty list when there are no projects", async () => {
    const { db, store } = await setup();
    expect(store.getState()).toMatchObject({ phase: "ready", projects: [] });
    db.close();
  });

  it("creates a project from the draft name and clears the draft", async () => {
    const { db, store } = await setup();
    store.setCreateDraft("  Conveyor speed loop ");
    expect(await store.create()).toBe(true);
    expect(names(store)).toEqual(["Conveyor speed loop"]);
    expect(store.getState()).toMatchObject({ createDraft: "", createError: null, busy: false });
    db.close();
  });

  it("keeps the draft and shows the reason when the name is empty, writing nothing", async () => {
    const { db, store } = await setup();
    store.setCreateDraft("   ");
    expect(await store.create()).toBe(false);
    expect(store.getState().createError).toMatch(/empty/);
    expect(store.getState().createDraft).toBe("   ");
    expect(await db.projects.count()).toBe(0);
    store.setCreateDraft("x");
    expect(store.getState().createError).toBeNull();
    db.close();
  });

  it("renames inline: start, edit, commit; an invalid name keeps the field open with the reason", async () => {
    const { db, store } = await setup();
    store.setCreateDraft("Draft name");
    await store.create();
    const id = store.getState().projects[0]!.id;
    store.startRename(id);
    expect(store.getState().rename).toEqual({ id, draft: "Draft name", error: null });
    store.setRenameDraft("");
    expect(await store.commitRename()).toBe(false);
    expect(store.getState().rename?.error).toMatch(/empty/);
    store.setRenameDraft("Final name");
    expect(await store.commitRename()).toBe(true);
    expect(store.getState().rename).toBeNull();
    expect(names(store)).toEqual(["Final name"]);
    db.close();
  });

  it("cancelling a rename leaves the name unchanged", async () => {
    const { db, store } = await setup();
    store.setCreateDraft("Same");
    await store.create();
    store.startRename(store.getState().projects[0]!.id);
    store.setRenameDraft("Other");
    store.cancelRename();
    expect(store.getState().rename).toBeNull();
    expect(names(store)).toEqual(["Same"]);
    db.close();
  });

  it("deletes only after confirmation, and undo brings the project back", async () => {
    const { db, store } = await setup();
    for (const name of ["Alpha", "Beta"]) {
      store.setCreateDraft(name);
      await store.create();
    }
    const beta = store.getState().projects[1]!;
    store.askDelete(beta.id);
    expect(store.getState().pendingDeleteId).toBe(beta.id);
    store.cancelDelete();
    expect(await store.confirmDelete()).toBe(false); // nothing pending: nothing deleted
    expect(names(store)).toEqual(["Alpha", "Beta"]);

    store.askDelete(beta.id);
    expect(await store.confirmDelete()).toBe(true);
    expect(names(store)).toEqual(["Alpha"]);
    expect(store.getState().lastDeleted?.id).toBe(beta.id);

    expect(await store.undoDelete()).toBe(true);
    expect(store.getState().projects).toContainEqual(beta);
    expect(store.getState().lastDeleted).toBeNull();
    expect(await store.undoDelete()).toBe(false);
    db.close();
  });

  it("ignores a second write while one is in flight", async () => {
    const { db, store } = await setup();
    store.setCreateDraft("Once");
    const [first, second] = await Promise.all([store.create(), store.create()]);
    expect([first, second]).toEqual([true, false]);
    expect(await db.projects.count()).toBe(1);
    db.close();
  });

  it("runs the engine check through the bridge and keeps the eigenvalues it returned", async () => {
    const { db, store, bridge } = await setup();
    await store.checkEngine();
    expect((bridge as ReturnType<typeof fakeBridge>).calls).toContain("linalg.eigenvalues");
    expect(store.getState().engineCheck).toMatchObject({ status: "done", eigenvalues: [{ re: -1, im: 0 }, { re: -2, im: 0 }] });
    db.close();
  });

  it("reports an engine failure as text instead of a version", async () => {
    const bridge = fakeBridge({
      "engine.info": () => {
        throw new EngineError("internal", "The engine worker failed: boom");
      },
    });
    const { db, store } = await setup({ bridge });
    expect(store.getState().engine).toMatchObject({ status: "failed", version: null, error: "The engine worker failed: boom" });
    db.close();
  });

  it("notifies subscribers on change and stops after the disposer runs", async () => {
    const { db, store } = await setup();
    let calls = 0;
    const dispose = store.subscribe(() => calls++);
    store.setCreateDraft("a");
    expect(calls).toBe(1);
    dispose();
    store.setCreateDraft("b");
    expect(calls).toBe(1);
    db.close();
  });

  it("switches theme between system, light and dark", async () => {
    const { db, store } = await setup();
    expect(store.getState().theme).toBe("system");
    store.setTheme("dark");
    expect(store.getState().theme).toBe("dark");
    db.close();
  });
});

describe("complex number display", () => {
  it("uses a true minus sign and shows the imaginary part only when non-zero", () => {
    expect(formatComplex({ re: -1, im: 0 })).toBe("−1");
    expect(formatComplex({ re: -0.5, im: -1.3228756555 })).toBe("−0.5 − 1.32288i");
    expect(formatComplex({ re: -0, im: 2 })).toBe("0 + 2i");
  });
});
