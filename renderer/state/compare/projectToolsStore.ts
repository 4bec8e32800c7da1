/**
 * State of the project tools screen (comparison, variants and requirements, history), in plain
 * TypeScript: commands in, immutable snapshots out. Every document change goes through `apply`,
 * which saves a new revision based on the revision the screen shows; a stale base comes back as
 * a conflict, which is shown and answered by reloading (never by overwriting).
 */
import { isEngineError } from "../../../shared-engine/errors";
import type { EngineBridge, ProjectFile, VariantResult } from "../../../shared-engine/api/contract";
import type { DocumentStore, RevisionSummary, StoredDocument } from "../../db";
import { restoreRevision } from "../../db";
import { normaliseBaseline } from "./variantCommands";

/** The comparison shows at least two and at most four variants side by side. */
export const MIN_COMPARED = 2;
export const MAX_COMPARED = 4;

export interface ProjectToolsState {
  phase: "loading" | "ready" | "failed";
  loadError: string | null;
  stored: StoredDocument | null;
  /** Variant ids chosen for the comparison, in project order. */
  selected: readonly string[];
  evaluation: { status: "idle" | "running" | "done" | "failed"; revision: number; results: Readonly<Record<string, VariantResult>>; error: string | null };
  history: readonly RevisionSummary[];
  /** A revision opened read-only in the history view. */
  inspected: StoredDocument | null;
  busy: boolean;
  notice: { kind: "info" | "error" | "conflict"; text: string } | null;
}

export interface ProjectToolsStore {
  getState(): ProjectToolsState;
  subscribe(listener: () => void): () => void;
  start(): Promise<void>;
  dispose(): void;
  reload(): Promise<void>;
  toggleSelected(variantId: string): void;
  evaluate(): Promise<void>;
  /** Saves `change(document)` as a new revision with `message`. Returns whether it was saved. */
  apply(change: (document: ProjectFile) => ProjectFile, message: string): Promise<boolean>;
  inspect(revision: number | null): Promise<void>;
  restore(revision: number): Promise<boolean>;
  dismissNotice(): void;
}

export interface ProjectToolsDeps {
  projectId: string;
  documents: DocumentStore;
  bridge: EngineBridge;
}

function messageOf(error: unknown): string {
  return isEngineError(error) || error instanceof Error ? error.message : String(error);
}

export function createProjectToolsStore(deps: ProjectToolsDeps): ProjectToolsStore {
  let state: ProjectToolsState = {
    phase: "loading",
    loadError: null,
    stored: null,
    selected: [],
    evaluation: { status: "idle", revision: -1, results: {}, error: null },
    history: [],
    inspected: null,
    busy: false,
    notice: null,
  };
  const listeners = new Set<() => void>();
  let stopSubscription: (() => void) | null = null;
  let evaluationToken = 0;
  // The newest revision this screen knows of, set synchronously when its own save returns, so
  // the store's echo of that save is not announced as coming from another window.
  let knownRevision = 0;

  const set = (patch: Partial<ProjectToolsState>) => {
    state = { ...state, ...patch };
    for (const l of [...listeners]) l();
  };

  /** Keeps the selection valid for the document: known ids only; defaults to the first up to 4. */
  function selectionFor(document: ProjectFile, previous: readonly string[]): string[] {
    const ids = document.variants.map((v) => v.id);
    const kept = ids.filter((id) => previous.includes(id)).slice(0, MAX_COMPARED);
    return kept.length >= Math.min(MIN_COMPARED, ids.length) ? kept : ids.slice(0, MAX_COMPARED);
  }

  async function show(stored: StoredDocument): Promise<void> {
    knownRevision = Math.max(knownRevision, stored.revision);
    const history = await deps.documents.history(deps.projectId);
    set({ stored, history, selected: selectionFor(stored.document, state.selected), phase: "ready", loadError: null });
  }

  const store: ProjectToolsStore = {
    getState: () => state,
    subscribe(listener) {
      listeners.add(listener);
      return () => listeners.delete(listener);
    },

    async start() {
      try {
        await show(await deps.documents.load(deps.projectId));
      } catch (error) {
        set({ phase: "failed", loadError: messageOf(error) });
        return;
      }
      stopSubscription = deps.documents.subscribe(deps.projectId, (latest) => {
        // While this screen's own save is in flight (busy), the event is that save's echo, or a
        // foreign save that makes ours fail with a conflict, which is then shown.
        if (!state.stored || state.busy || latest.revision <= knownRevision) return;
        void show(latest).then(() => {
          // A refused save stays announced: the user must learn that their change was not kept.
          const refused = state.notice?.kind === "conflict" ? state.notice.text : null;
          set({
            notice: refused
              ? { kind: "conflict", text: `${refused} Now showing revision ${latest.revision} from the other window; make your change again there.` }
              : { kind: "info", text: `Revision ${latest.revision} was saved in another window; showing it now.` },
          });
        });
      });
      void store.evaluate();
    },

    dispose() {
      stopSubscription?.();
      stopSubscription = null;
      listeners.clear();
    },

    async reload() {
      try {
        await show(await deps.documents.load(deps.projectId));
        void store.evaluate();
      } catch (error) {
        set({ notice: { kind: "error", text: messageOf(error) } });
      }
    },

    toggleSelected(variantId) {
      if (!state.stored) return;
      const on = state.selected.includes(variantId);
      if (on && state.selected.length <= MIN_COMPARED) {
        set({ notice: { kind: "info", text: `Keep at least ${MIN_COMPARED} variants selected to compare.` } });
        return;
      }
      if (!on && state.selected.length >= MAX_COMPARED) {
        set({ notice: { kind: "info", text: `At most ${MAX_COMPARED} variants fit side by side; clear one first.` } });
        return;
      }
      const wanted = on ? state.selected.filter((id) => id !== variantId) : [...state.selected, variantId];
      set({ selected: state.stored.document.variants.map((v) => v.id).filter((id) => wanted.includes(id)) });
    },

    async evaluate() {
      const stored = state.stored;
      if (!stored || stored.document.variants.length === 0) return;
      const token = ++evaluationToken;
      set({ evaluation: { ...state.evaluation, status: "running", error: null } });
      try {
        const run = await deps.bridge.request("project.evaluate", { project: stored.document });
        if (token !== evaluationToken) return;
        const results: Record<string, VariantResult> = {};
        for (const r of run.variants) results[r.id] = r;
        set({ evaluation: { status: "done", revision: stored.revision, results, error: null } });
      } catch (error) {
        if (token !== evaluationToken) return;
        set({ evaluation: { status: "failed", revision: stored.revision, results: {}, error: messageOf(error) } });
      }
    },

    async apply(change, message) {
      const stored = state.stored;
      if (!stored || state.busy) return false;
      let next: ProjectFile;
      try {
        next = normaliseBaseline(change(stored.document));
      } catch (error) {
        set({ notice: { kind: "error", text: messageOf(error) } });
        return false;
      }
      set({ busy: true });
      try {
        const saved = await deps.documents.save(deps.projectId, next, { baseRevision: stored.revision, message });
        await show(saved);
        set({ busy: false, notice: null });
        void store.evaluate();
        return true;
      } catch (error) {
        const conflict = isEngineError(error) && error.kind === "conflict";
        set({
          busy: false,
          notice: { kind: conflict ? "conflict" : "error", text: conflict ? `Not saved: ${messageOf(error)}` : messageOf(error) },
        });
        return false;
      }
    },

    async inspect(revision) {
      if (revision === null) {
        set({ inspected: null });
        return;
      }
      try {
        set({ inspected: await deps.documents.revision(deps.projectId, revision) });
      } catch (error) {
        set({ notice: { kind: "error", text: messageOf(error) } });
      }
    },

    async restore(revision) {
      const stored = state.stored;
      if (!stored || state.busy) return false;
      set({ busy: true });
      try {
        const saved = await restoreRevision(deps.documents, deps.projectId, revision, stored.revision);
        await show(saved);
        set({ busy: false, inspected: null, notice: { kind: "info", text: `Revision ${revision} restored as revision ${saved.revision}; nothing was deleted.` } });
        void store.evaluate();
        return true;
      } catch (error) {
        const conflict = isEngineError(error) && error.kind === "conflict";
        set({ busy: false, notice: { kind: conflict ? "conflict" : "error", text: messageOf(error) } });
        return false;
      }
    },

    dismissNotice() {
      set({ notice: null });
    },
  };
  return store;
}
