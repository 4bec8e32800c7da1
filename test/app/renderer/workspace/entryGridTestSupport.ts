/**
 * Workspace harness for the entry-grid tests (transfer-function and zero-pole-gain plants): the
 * store saves to a Dexie document store on fake-indexeddb and evaluates through the real engine,
 * dispatched in-process. Not a test file.
 */
import type { EngineBridge, ProjectFile } from "../../../../shared-engine/api/contract";
import { dispatch } from "../../../../shared-engine/api/dispatcher";
import { EngineError } from "../../../../shared-engine/errors";
import { createDexieDocumentStore } from "../../../../renderer/db";
import { createWorkspaceStore, type WorkspaceState, type WorkspaceStore } from "../../../../renderer/state/workspace";
import { openTestDatabase } from "../../db/dbTestSupport";

const inProcessEngine: EngineBridge = {
  request(method, params) {
    return new Promise((resolve, reject) => {
      setTimeout(() => {
        dispatch(method, params).then(resolve as (v: unknown) => void, (e: unknown) => reject(e instanceof EngineError ? e : new EngineError("internal", String(e))));
      }, 1);
    });
  },
};

export async function settle(store: WorkspaceStore, what: (s: WorkspaceState) => boolean, ms = 8000): Promise<void> {
  const end = Date.now() + ms;
  while (!what(store.getState())) {
    if (Date.now() > end) throw new Error(`timed out; state: ${JSON.stringify({ ev: store.getState().evaluation.status, error: store.getState().evaluation.error, save: store.getState().save })}`);
    await new Promise((r) => setTimeout(r, 5));
  }
}

export const idle = (s: WorkspaceState): boolean =>
  (s.evaluation.status === "done" || s.evaluation.status === "failed") && s.save.status === "saved";

/** Saves `doc` as revision 1 of project "p1" and opens a workspace on it. */
export async function openWorkspace(doc: ProjectFile) {
  const db = openTestDatabase();
  const documents = createDexieDocumentStore(db, { openChannel: () => null });
  await documents.save("p1", doc, { baseRevision: 0, message: "test document" });
  const store = createWorkspaceStore({ documents, bridge: inProcessEngine, projectId: "p1", evaluateDelayMs: 5, saveDelayMs: 10 });
  await store.load();
  await settle(store, idle);
  const close = () => {
    store.dispose();
    documents.dispose();
    db.close();
  };
  return { store, documents, close };
}
