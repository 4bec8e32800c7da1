/**
 * The types of the workspace store (workspaceStore.ts): its snapshot (WorkspaceState with the
 * evaluation and save sub-states), its dependencies and its commands; and selectors that read
 * a snapshot.
 */
import type { EngineBridge, ProjectFile, VariantResult, VariantSpec } from "../../../shared-engine/api/contract";
import type { DocumentStore } from "../../db/documentStore";
import { stateSpaceDimensions, type PlantDimensions } from "./documentEdits";

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
