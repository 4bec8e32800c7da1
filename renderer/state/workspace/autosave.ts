/**
 * The workspace store's save path: edits are saved to the DocumentStore after a quiet time
 * (debounced), one save at a time, each revision with a message naming what changed. A
 * conflict (another window saved first) stops autosaving until the user keeps their version or
 * takes the other one.
 */
import type { ProjectFile } from "../../../shared-engine/api/contract";
import type { DocumentStore } from "../../db/documentStore";
import type { WorkspaceState } from "./workspaceState";

export interface AutosaveContext {
  documents: DocumentStore;
  projectId: string;
  /** Debounce of autosave after an edit (ms). */
  saveDelay: number;
  getState(): WorkspaceState;
  update(patch: Partial<WorkspaceState>): void;
}

export interface Autosave {
  /** An edit labelled `label` changed the document: save it after the quiet time. */
  noteChange(label: string): void;
  /** Whether edits are waiting to be saved. */
  hasUnsaved(): boolean;
  /** True from just before our own save call until it settles. */
  isWriting(): boolean;
  /** Forgets unsaved edits (a freshly loaded document). */
  clearUnsaved(): void;
  /** Writes pending changes now. */
  flush(): Promise<void>;
  /** After a conflict: save this window's document on top of the newer revision. */
  keepMine(): Promise<void>;
  dispose(): void;
}

function messageOf(error: unknown): string {
  return error instanceof Error ? error.message : String(error);
}

/** A save message from the edit labels: up to three distinct labels, then a count. */
function summarise(labels: string[]): string {
  if (labels.length === 0) return "saved";
  const distinct = [...new Set(labels)];
  return distinct.length <= 3 ? distinct.join("; ") : `${distinct.slice(0, 3).join("; ")}; and ${distinct.length - 3} more changes`;
}

export function createAutosave(ctx: AutosaveContext): Autosave {
  const { update } = ctx;
  let unsavedLabels: string[] = [];
  let saveTimer: ReturnType<typeof setTimeout> | null = null;
  let saving: Promise<void> | null = null;
  // True from just before our own save call until it settles: the store's change notification
  // for our own write may arrive synchronously, before `saving` is assigned.
  let writing = false;

  function scheduleSave(): void {
    if (saveTimer !== null) clearTimeout(saveTimer);
    if (ctx.getState().save.status !== "conflict") update({ save: { ...ctx.getState().save, status: "pending" } });
    saveTimer = setTimeout(() => {
      saveTimer = null;
      void runSave();
    }, ctx.saveDelay);
  }

  async function runSave(): Promise<void> {
    if (saving) {
      await saving;
      if (unsavedLabels.length > 0 && saveTimer === null) return runSave();
      return;
    }
    const doc: ProjectFile | null = ctx.getState().document;
    if (!doc || unsavedLabels.length === 0 || ctx.getState().save.status === "conflict") return;
    const labels = unsavedLabels;
    unsavedLabels = [];
    const message = summarise(labels);
    update({ save: { ...ctx.getState().save, status: "saving" } });
    writing = true;
    saving = (async () => {
      try {
        const stored = await ctx.documents.save(ctx.getState().projectId, doc, { baseRevision: ctx.getState().save.revision, message });
        update({ save: { status: unsavedLabels.length ? "pending" : "saved", revision: stored.revision, error: null, lastMessage: message } });
      } catch (error) {
        unsavedLabels = [...labels, ...unsavedLabels];
        const kind = (error as { kind?: string }).kind;
        update({
          save: {
            ...ctx.getState().save,
            status: kind === "conflict" ? "conflict" : "failed",
            error: kind === "conflict" ? "This project was changed in another window. Keep your version, or load theirs." : `Your changes are not saved yet: ${messageOf(error)}`,
          },
        });
      } finally {
        saving = null;
        writing = false;
      }
    })();
    await saving;
    if (unsavedLabels.length > 0 && saveTimer === null && ctx.getState().save.status === "pending") scheduleSave();
  }

  return {
    noteChange(label) {
      unsavedLabels.push(label);
      scheduleSave();
    },
    hasUnsaved: () => unsavedLabels.length > 0,
    isWriting: () => writing,
    clearUnsaved() {
      unsavedLabels = [];
    },
    async flush() {
      if (saveTimer !== null) {
        clearTimeout(saveTimer);
        saveTimer = null;
      }
      await runSave();
    },
    async keepMine() {
      const latest = await ctx.documents.load(ctx.projectId);
      update({ save: { ...ctx.getState().save, status: "pending", revision: latest.revision, error: null } });
      if (unsavedLabels.length === 0) unsavedLabels.push("kept this window's version");
      await runSave();
    },
    dispose() {
      if (saveTimer !== null) clearTimeout(saveTimer);
    },
  };
}
