/**
 * State of the design workspace, in plain TypeScript: commands in, immutable snapshots out.
 * React reads snapshots; tests drive the same commands headlessly. This module holds the
 * document, the commands and undo; the evaluation path is in evaluationScheduler.ts, the save
 * path in autosave.ts, the types and selectors in workspaceState.ts.
 *
 * - The document (format "loopwright-project") comes from a DocumentStore and goes back to it
 *   through debounced autosaves, each with a message naming what changed.
 * - Every edit is a (before, after) pair on an undo stack; consecutive edits with the same
 *   `coalesce` key (one drag, one slider scrub) merge into one undo step.
 * - Every edit re-evaluates the active variant through the bridge: debounced, latest-wins. A
 *   newer edit aborts the previous request (AbortController) and its late result is discarded.
 *   Live edits (dragging a pole) are throttled instead: one request in flight, the newest
 *   position sent as soon as it returns, so the picture keeps moving while the hand moves.
 *   A live edit asks for a preview ("project.previewVariant": gain, poles, step, Bode only) and
 *   shows it over the last full result's plant report, without margins; the full evaluation runs
 *   once the gesture settles (`settleLiveEdits`, or `settleDelayMs` after the last live edit).
 * - Text the user typed is never lost: a cell that does not parse keeps its raw text and an
 *   error message, and the document keeps its last valid value until the text parses.
 */
import type { ProjectFile } from "../../../shared-engine/api/contract";
import { parseNumberText } from "./parseMatrixText";
import { createAutosave } from "./autosave";
import { createEvaluationScheduler } from "./evaluationScheduler";
import type { DocumentEdit, EditOptions, FieldDraft, WorkspaceState, WorkspaceStore, WorkspaceStoreDeps } from "./workspaceState";

export type { DocumentEdit, EditOptions, EvaluationState, FieldDraft, SaveState, WorkspaceState, WorkspaceStore, WorkspaceStoreDeps } from "./workspaceState";
export { activeVariantOf, plantDimensionsOf } from "./workspaceState";

interface UndoEntry {
  label: string;
  before: ProjectFile;
  after: ProjectFile;
  coalesce?: string;
}

function messageOf(error: unknown): string {
  return error instanceof Error ? error.message : String(error);
}

export function createWorkspaceStore(deps: WorkspaceStoreDeps): WorkspaceStore {
  const now = deps.now ?? (() => (typeof performance !== "undefined" ? performance.now() : Date.now()));
  let state: WorkspaceState = {
    phase: "loading",
    loadError: null,
    projectId: deps.projectId,
    document: null,
    activeVariantId: null,
    drafts: {},
    editError: null,
    evaluation: { status: "idle", result: null, variantId: null, error: null, durationMs: null, discarded: 0, sent: 0 },
    save: { status: "saved", revision: 0, error: null, lastMessage: null },
    undoLabel: null,
    redoLabel: null,
  };
  const listeners = new Set<() => void>();
  const undoStack: UndoEntry[] = [];
  const redoStack: UndoEntry[] = [];
  let stopWatching: (() => void) | null = null;

  function update(patch: Partial<WorkspaceState>): void {
    state = { ...state, ...patch };
    for (const listener of [...listeners]) listener();
  }
  const getState = () => state;
  const undoPatch = () => ({ undoLabel: undoStack.at(-1)?.label ?? null, redoLabel: redoStack.at(-1)?.label ?? null });

  const evaluation = createEvaluationScheduler({
    bridge: deps.bridge,
    evaluateDelay: deps.evaluateDelayMs ?? 120,
    settleDelay: deps.settleDelayMs ?? 300,
    now,
    onResult: (result, durationMs, kind) => deps.onResult?.(result, durationMs, kind),
    getState,
    update,
  });
  const autosave = createAutosave({ documents: deps.documents, projectId: deps.projectId, saveDelay: deps.saveDelayMs ?? 800, getState, update });

  // ---- edits ------------------------------------------------------------------------------

  function applyDocument(doc: ProjectFile, label: string, live: boolean): void {
    let active = state.activeVariantId;
    if (!doc.variants.some((v) => v.id === active)) active = doc.variants[0]?.id ?? null;
    update({ document: doc, activeVariantId: active, editError: null, ...undoPatch() });
    autosave.noteChange(label);
    evaluation.schedule(live);
  }

  function edit(label: string, change: DocumentEdit, options: EditOptions = {}): boolean {
    const before = state.document;
    if (!before) return false;
    let after: ProjectFile;
    try {
      after = change(before);
    } catch (error) {
      update({ editError: messageOf(error) });
      return false;
    }
    const top = undoStack.at(-1);
    if (options.coalesce && top && top.coalesce === options.coalesce && redoStack.length === 0) {
      top.after = after;
      top.label = label;
    } else {
      undoStack.push({ label, before, after, coalesce: options.coalesce });
      if (undoStack.length > 500) undoStack.shift();
    }
    redoStack.length = 0;
    applyDocument(after, label, options.live ?? false);
    return true;
  }

  function setDraft(fieldKey: string, draft: FieldDraft | null): void {
    const drafts = { ...state.drafts };
    if (draft) drafts[fieldKey] = draft;
    else delete drafts[fieldKey];
    update({ drafts });
  }

  function editText(fieldKey: string, text: string, label: string, parse: (text: string) => { ok: true; apply: DocumentEdit } | { ok: false; error: string }): boolean {
    const parsed = parse(text);
    if (!parsed.ok) {
      setDraft(fieldKey, { text, error: parsed.error });
      return false;
    }
    const before = state.drafts[fieldKey];
    if (before) setDraft(fieldKey, null);
    const ok = edit(label, parsed.apply);
    if (!ok) setDraft(fieldKey, { text, error: state.editError ?? "This value was refused." });
    return ok;
  }

  async function load(): Promise<void> {
    update({ phase: "loading", loadError: null });
    try {
      let stored = await deps.documents.load(deps.projectId);
      const initial = stored.revision === 0 ? deps.initialDocument?.() : null;
      if (initial) stored = await deps.documents.save(deps.projectId, initial, { baseRevision: 0, message: "started from the example document" });
      undoStack.length = 0;
      redoStack.length = 0;
      autosave.clearUnsaved();
      const active = stored.document.variants.find((v) => v.baseline)?.id ?? stored.document.variants[0]?.id ?? null;
      update({
        phase: "ready",
        document: stored.document,
        activeVariantId: active,
        drafts: {},
        save: { status: "saved", revision: stored.revision, error: null, lastMessage: null },
        ...undoPatch(),
      });
      stopWatching?.();
      stopWatching = deps.documents.subscribe(deps.projectId, (latest) => {
        // Our own saves come back here too; only a newer revision we did not write matters.
        if (latest.revision > state.save.revision && !autosave.isWriting() && !autosave.hasUnsaved()) {
          update({ document: latest.document, save: { ...state.save, revision: latest.revision, status: "saved" } });
          evaluation.schedule(false);
        }
      });
      evaluation.send(false);
    } catch (error) {
      update({ phase: "failed", loadError: `The project could not be opened: ${messageOf(error)}` });
    }
  }

  function moveUndo(from: UndoEntry[], to: UndoEntry[], useBefore: boolean, verb: string): boolean {
    const entry = from.pop();
    if (!entry) return false;
    to.push({ ...entry, coalesce: undefined });
    applyDocument(useBefore ? entry.before : entry.after, `${verb} ${entry.label}`, false);
    return true;
  }

  return {
    getState: () => state,
    subscribe(listener) {
      listeners.add(listener);
      return () => listeners.delete(listener);
    },
    load,
    edit,
    editNumber(fieldKey, text, label, apply, options) {
      const parsed = parseNumberText(text);
      if (!parsed.ok) {
        setDraft(fieldKey, { text, error: `This entry ${parsed.error}; the last valid value is still used.` });
        return false;
      }
      if (state.drafts[fieldKey]) setDraft(fieldKey, null);
      const ok = edit(label, (doc) => apply(doc, parsed.value), options);
      if (!ok) setDraft(fieldKey, { text, error: state.editError ?? "This value was refused." });
      return ok;
    },
    editText,
    clearDraft(fieldKey) {
      setDraft(fieldKey, null);
    },
    selectVariant(variantId) {
      if (!state.document?.variants.some((v) => v.id === variantId) || variantId === state.activeVariantId) return;
      update({ activeVariantId: variantId });
      evaluation.send(false);
    },
    undo: () => moveUndo(undoStack, redoStack, true, "undid"),
    redo: () => moveUndo(redoStack, undoStack, false, "redid"),
    evaluateNow: () => evaluation.send(false),
    settleLiveEdits: () => evaluation.settle(),
    cancelEvaluation: () => evaluation.cancel(),
    flushSave: () => autosave.flush(),
    keepMineAfterConflict: () => autosave.keepMine(),
    async takeTheirsAfterConflict() {
      autosave.clearUnsaved();
      await load();
    },
    dismissEditError() {
      update({ editError: null });
    },
    dispose() {
      evaluation.dispose();
      autosave.dispose();
      stopWatching?.();
      listeners.clear();
    },
  };
}
