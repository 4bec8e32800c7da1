/**
 * State of the design workspace, in plain TypeScript: commands in, immutable snapshots out.
 * React reads snapshots; tests drive the same commands headlessly.
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
import type { EngineBridge, ProjectFile, VariantResult, VariantSpec } from "../../../shared-engine/api/contract";
import type { DocumentStore } from "../../db/documentStore";
import { stepHorizon, variantForDisplay } from "./designHelpers";
import { findPlant, stateSpaceDimensions, type PlantDimensions } from "./documentEdits";
import { parseNumberText } from "./parseMatrixText";

export interface FieldDraft {
  text: string;
  error: string;
}

export interface EvaluationState {
  status: "idle" | "waiting" | "running" | "done" | "failed";
  /** The latest shown result (kept while a newer one is computed, so plots never blank). */
  result: VariantResult | null;
  /** Variant id the result belongs to. */
  variantId: string | null;
  error: string | null;
  /** Milliseconds the shown result took, request to answer. */
  durationMs: number | null;
  /**
   * True while the shown result is a drag preview: gain, poles, step and Bode are current, the
   * plant report is the last full result's, and margins and requirement checks are absent until
   * the full evaluation that follows the gesture.
   */
  preview?: boolean;
  /** Results that arrived after a newer request was sent, and were dropped. */
  discarded: number;
  /** Requests sent so far (the sequence number of the newest). */
  sent: number;
}

export interface SaveState {
  status: "saved" | "pending" | "saving" | "conflict" | "failed";
  revision: number;
  error: string | null;
  lastMessage: string | null;
}

export interface WorkspaceState {
  phase: "loading" | "ready" | "failed";
  loadError: string | null;
  projectId: string;
  document: ProjectFile | null;
  activeVariantId: string | null;
  drafts: Readonly<Record<string, FieldDraft>>;
  /** The last edit that was refused (bad paste, duplicate name), in words. */
  editError: string | null;
  evaluation: EvaluationState;
  save: SaveState;
  undoLabel: string | null;
  redoLabel: string | null;
}

export interface WorkspaceStoreDeps {
  documents: DocumentStore;
  bridge: EngineBridge;
  projectId: string;
  /** Debounce of evaluation after an edit (ms). */
  evaluateDelayMs?: number;
  /** Debounce of autosave after an edit (ms). */
  saveDelayMs?: number;
  now?: () => number;
  /** The document to start from when the project was never saved (revision 0), e.g. the demo's. */
  initialDocument?: () => ProjectFile | null;
  /** Called when a result is shown (the view marks frame times from here); `kind` says whether it is a drag preview. */
  onResult?: (result: VariantResult, durationMs: number, kind: "preview" | "full") => void;
  /** Quiet time after the last live edit before the full evaluation runs (ms). */
  settleDelayMs?: number;
}

export interface EditOptions {
  /** Consecutive edits with the same key merge into one undo step. */
  coalesce?: string;
  /** Evaluate at once, throttled, instead of debounced (dragging). */
  live?: boolean;
}

export type DocumentEdit = (doc: ProjectFile) => ProjectFile;

export interface WorkspaceStore {
  getState(): WorkspaceState;
  subscribe(listener: () => void): () => void;
  load(): Promise<void>;
  /** Applies an edit; returns false (and sets editError, document unchanged) when it throws. */
  edit(label: string, change: DocumentEdit, options?: EditOptions): boolean;
  /** A numeric field: parses `text`; on success clears its draft and applies the edit, else keeps the text with an error. */
  editNumber(fieldKey: string, text: string, label: string, apply: (doc: ProjectFile, value: number) => ProjectFile, options?: EditOptions): boolean;
  /** Any text field whose parse can fail: `parse` returns the edit or an error message. */
  editText(fieldKey: string, text: string, label: string, parse: (text: string) => { ok: true; apply: DocumentEdit } | { ok: false; error: string }): boolean;
  clearDraft(fieldKey: string): void;
  selectVariant(variantId: string): void;
  undo(): boolean;
  redo(): boolean;
  /** Sends the active variant now (also after a failure, to retry). */
  evaluateNow(): void;
  /** A live gesture ended (pointer released): run the full evaluation now if a preview is shown or pending. */
  settleLiveEdits(): void;
  cancelEvaluation(): void;
  /** Writes pending changes now (e.g. before leaving the workspace). */
  flushSave(): Promise<void>;
  /** After a conflict: keep this tab's document, saving it on top of the newer revision. */
  keepMineAfterConflict(): Promise<void>;
  /** After a conflict: drop this tab's unsaved changes and load the newer revision. */
  takeTheirsAfterConflict(): Promise<void>;
  dismissEditError(): void;
  dispose(): void;
}

interface UndoEntry {
  label: string;
  before: ProjectFile;
  after: ProjectFile;
  coalesce?: string;
}

function messageOf(error: unknown): string {
  return error instanceof Error ? error.message : String(error);
}

/** Dimensions of a plant as far as the document alone tells (state-space), else from a result. */
export function plantDimensionsOf(doc: ProjectFile, plantId: string, result: VariantResult | null): PlantDimensions | null {
  const plant = doc.plants.find((p) => p.id === plantId);
  if (!plant) return null;
  if (plant.model.type === "state-space") return stateSpaceDimensions(plant.model);
  return result?.plant?.dimensions ?? null;
}

export function activeVariantOf(state: WorkspaceState): VariantSpec | null {
  return state.document?.variants.find((v) => v.id === state.activeVariantId) ?? null;
}

export function createWorkspaceStore(deps: WorkspaceStoreDeps): WorkspaceStore {
  const evaluateDelay = deps.evaluateDelayMs ?? 120;
  const settleDelay = deps.settleDelayMs ?? 300;
  const saveDelay = deps.saveDelayMs ?? 800;
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
  let unsavedLabels: string[] = [];
  let evaluateTimer: ReturnType<typeof setTimeout> | null = null;
  let saveTimer: ReturnType<typeof setTimeout> | null = null;
  let inFlight: { seq: number; controller: AbortController; live: boolean } | null = null;
  let liveDirty = false;
  let settleTimer: ReturnType<typeof setTimeout> | null = null;
  // The plant spec and result of the last full evaluation: a preview reuses its plant report,
  // which is valid only while the plant spec is the very same object (edits replace, never mutate).
  let lastFull: { variantId: string; plant: unknown; result: VariantResult } | null = null;
  let saving: Promise<void> | null = null;
  // True from just before our own save call until it settles: the store's change notification
  // for our own write may arrive synchronously, before `saving` is assigned.
  let writing = false;
  let disposed = false;
  let stopWatching: (() => void) | null = null;

  function update(patch: Partial<WorkspaceState>): void {
    state = { ...state, ...patch };
    for (const listener of [...listeners]) listener();
  }
  const undoPatch = () => ({ undoLabel: undoStack.at(-1)?.label ?? null, redoLabel: redoStack.at(-1)?.label ?? null });

  // ---- evaluation -------------------------------------------------------------------------

  function clearEvaluateTimer(): void {
    if (evaluateTimer !== null) clearTimeout(evaluateTimer);
    evaluateTimer = null;
  }

  function clearSettleTimer(): void {
    if (settleTimer !== null) clearTimeout(settleTimer);
    settleTimer = null;
  }

  function send(live: boolean, refit = false): void {
    clearEvaluateTimer();
    if (!live) clearSettleTimer();
    const doc = state.document;
    const variant = activeVariantOf(state);
    if (!doc || !variant) {
      update({ evaluation: { ...state.evaluation, status: "idle" } });
      return;
    }
    if (inFlight) inFlight.controller.abort();
    const seq = state.evaluation.sent + 1;
    const controller = new AbortController();
    inFlight = { seq, controller, live };
    liveDirty = false;
    const lastResult = state.evaluation.variantId === variant.id ? state.evaluation.result : null;
    let plant;
    try {
      plant = findPlant(doc, variant.plant);
    } catch (error) {
      inFlight = null;
      update({ evaluation: { ...state.evaluation, status: "failed", error: messageOf(error), sent: seq } });
      return;
    }
    const started = now();
    const horizon = stepHorizon(variant, lastResult);
    const display = variantForDisplay(variant, lastResult);
    const base = live && lastFull && lastFull.variantId === variant.id && lastFull.plant === plant && !lastFull.result.error ? lastFull : null;
    update({ evaluation: { ...state.evaluation, status: "running", sent: seq } });
    const answer: Promise<{ result: VariantResult; kind: "preview" | "full" }> = base
      ? deps.bridge.request("project.previewVariant", { plant, variant: display }, { signal: controller.signal }).then((preview) => {
          const { preview: isPreview, ...fields } = preview;
          if (!isPreview) return { result: fields, kind: "full" as const };
          // Plant report from the last full run (same plant object); margins and checks that need
          // them are left out rather than shown stale.
          return { result: { ...fields, ...(base.result.plant ? { plant: base.result.plant } : {}) }, kind: "preview" as const };
        })
      : deps.bridge.request("project.evaluateVariant", { plant, variant: display, requirements: doc.requirements }, { signal: controller.signal }).then((result) => ({ result, kind: "full" as const }));
    answer
      .then(
        ({ result, kind }) => {
          if (kind === "full" && !controller.signal.aborted && inFlight?.seq === seq) lastFull = { variantId: variant.id, plant, result };
          finish(seq, controller, variant.id, { result, kind }, now() - started);
          // The first answer for a variant without its own step times used a guessed horizon;
          // when the response had not settled and the result suggests a longer one, ask once more.
          if (!refit && inFlight === null && evaluateTimer === null && !variant.step && state.evaluation.result === result && stepHorizon(variant, result) > 1.5 * horizon) {
            send(live, true);
          }
        },
        (error: unknown) => finish(seq, controller, variant.id, { error }, now() - started),
      );
  }

  function finish(seq: number, controller: AbortController, variantId: string, outcome: { result?: VariantResult; kind?: "preview" | "full"; error?: unknown }, durationMs: number): void {
    if (disposed) return;
    const latest = inFlight?.seq === seq;
    if (controller.signal.aborted || !latest) {
      // Superseded: a newer request was sent after this one. Its answer describes a document
      // that no longer exists, so showing it would contradict the editor.
      update({ evaluation: { ...state.evaluation, discarded: state.evaluation.discarded + 1 } });
      return;
    }
    const wasLive = inFlight?.live ?? false;
    inFlight = null;
    const pending = evaluateTimer !== null;
    if (outcome.result) {
      const r = outcome.result;
      const kind = outcome.kind ?? "full";
      update({
        evaluation: { ...state.evaluation, status: pending ? "waiting" : "done", result: r, variantId, error: r.error ? r.error.message : null, durationMs, preview: kind === "preview" },
      });
      deps.onResult?.(r, durationMs, kind);
    } else {
      const error = outcome.error as { kind?: string } | undefined;
      if (error?.kind === "cancelled") {
        update({ evaluation: { ...state.evaluation, status: "idle" } });
      } else {
        update({ evaluation: { ...state.evaluation, status: pending ? "waiting" : "failed", variantId, error: messageOf(outcome.error), durationMs } });
      }
    }
    if (wasLive && liveDirty) send(true);
  }

  function settle(): void {
    clearSettleTimer();
    if (state.evaluation.preview || inFlight?.live || liveDirty) send(false);
  }

  function scheduleEvaluate(live: boolean): void {
    if (live) {
      clearSettleTimer();
      settleTimer = setTimeout(settle, settleDelay);
      if (inFlight?.live) {
        liveDirty = true; // sent when the one in flight returns (throttle, latest wins)
        return;
      }
      send(true);
      return;
    }
    clearEvaluateTimer();
    // A newer edit makes the running request stale: cancel it now rather than when it returns.
    if (inFlight) {
      inFlight.controller.abort();
    }
    update({ evaluation: { ...state.evaluation, status: "waiting" } });
    evaluateTimer = setTimeout(() => send(false), evaluateDelay);
  }

  // ---- saving -----------------------------------------------------------------------------

  function scheduleSave(): void {
    if (saveTimer !== null) clearTimeout(saveTimer);
    if (state.save.status !== "conflict") update({ save: { ...state.save, status: "pending" } });
    saveTimer = setTimeout(() => {
      saveTimer = null;
      void runSave();
    }, saveDelay);
  }

  function summarise(labels: string[]): string {
    if (labels.length === 0) return "saved";
    const distinct = [...new Set(labels)];
    return distinct.length <= 3 ? distinct.join("; ") : `${distinct.slice(0, 3).join("; ")}; and ${distinct.length - 3} more changes`;
  }

  async function runSave(): Promise<void> {
    if (saving) {
      await saving;
      if (unsavedLabels.length > 0 && saveTimer === null) return runSave();
      return;
    }
    const doc = state.document;
    if (!doc || unsavedLabels.length === 0 || state.save.status === "conflict") return;
    const labels = unsavedLabels;
    unsavedLabels = [];
    const message = summarise(labels);
    update({ save: { ...state.save, status: "saving" } });
    writing = true;
    saving = (async () => {
      try {
        const stored = await deps.documents.save(state.projectId, doc, { baseRevision: state.save.revision, message });
        update({ save: { status: unsavedLabels.length ? "pending" : "saved", revision: stored.revision, error: null, lastMessage: message } });
      } catch (error) {
        unsavedLabels = [...labels, ...unsavedLabels];
        const kind = (error as { kind?: string }).kind;
        update({
          save: {
            ...state.save,
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
    if (unsavedLabels.length > 0 && saveTimer === null && state.save.status === "pending") scheduleSave();
  }

  // ---- edits ------------------------------------------------------------------------------

  function applyDocument(doc: ProjectFile, label: string, live: boolean): void {
    let active = state.activeVariantId;
    if (!doc.variants.some((v) => v.id === active)) active = doc.variants[0]?.id ?? null;
    update({ document: doc, activeVariantId: active, editError: null, ...undoPatch() });
    unsavedLabels.push(label);
    scheduleSave();
    scheduleEvaluate(live);
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
      unsavedLabels = [];
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
        if (latest.revision > state.save.revision && !writing && unsavedLabels.length === 0) {
          update({ document: latest.document, save: { ...state.save, revision: latest.revision, status: "saved" } });
          scheduleEvaluate(false);
        }
      });
      send(false);
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
      send(false);
    },
    undo: () => moveUndo(undoStack, redoStack, true, "undid"),
    redo: () => moveUndo(redoStack, undoStack, false, "redid"),
    evaluateNow: () => send(false),
    settleLiveEdits: () => settle(),
    cancelEvaluation() {
      clearEvaluateTimer();
      clearSettleTimer();
      if (inFlight) {
        inFlight.controller.abort();
        inFlight = null;
      }
      update({ evaluation: { ...state.evaluation, status: "idle", error: "Cancelled; the plots show the last finished result." } });
    },
    async flushSave() {
      if (saveTimer !== null) {
        clearTimeout(saveTimer);
        saveTimer = null;
      }
      await runSave();
    },
    async keepMineAfterConflict() {
      const latest = await deps.documents.load(deps.projectId);
      update({ save: { ...state.save, status: "pending", revision: latest.revision, error: null } });
      if (unsavedLabels.length === 0) unsavedLabels.push("kept this window's version");
      await runSave();
    },
    async takeTheirsAfterConflict() {
      unsavedLabels = [];
      await load();
    },
    dismissEditError() {
      update({ editError: null });
    },
    dispose() {
      disposed = true;
      clearEvaluateTimer();
      clearSettleTimer();
      if (saveTimer !== null) clearTimeout(saveTimer);
      inFlight?.controller.abort();
      stopWatching?.();
      listeners.clear();
    },
  };
}
