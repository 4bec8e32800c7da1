/**
 * A workspace store on an in-memory document store whose bridge refuses every request: for tests
 * that look at documents and undo labels, not results. Not a test file.
 */
import type { EngineBridge, ProjectFile } from "../../../../shared-engine/api/contract";
import { EngineError } from "../../../../shared-engine/errors";
import { createMemoryDocumentStore } from "../../../../renderer/db/documentStore";
import { createWorkspaceStore, type WorkspaceStore } from "../../../../renderer/state/workspace";

const refusingBridge: EngineBridge = { request: () => Promise.reject(new EngineError("cancelled", "no engine in this test", {})) };

/** Saves `doc` as revision 1 of project "p" and opens a workspace store on it. */
export async function openDocumentOnlyStore(doc: ProjectFile): Promise<WorkspaceStore> {
  const documents = createMemoryDocumentStore(() => 1000);
  await documents.save("p", structuredClone(doc), { baseRevision: 0, message: "test document" });
  const store = createWorkspaceStore({ documents, bridge: refusingBridge, projectId: "p", evaluateDelayMs: 5, saveDelayMs: 5 });
  await store.load();
  return store;
}
