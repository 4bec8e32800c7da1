/**
 * Where a project's design lives: the project-file document (format "loopwright-project"),
 * saved as numbered revisions. The workspace talks to this interface only; the Dexie
 * implementation lives in renderer/db, and `createMemoryDocumentStore` serves tests.
 *
 * Concurrency: every save names the revision it was based on; a save based on an older
 * revision than the stored one fails with kind "conflict" (two tabs editing one project never
 * silently mix their changes).
 */
import { EngineError } from "../../shared-engine/errors";
import type { ProjectFile } from "../../shared-engine/api/contract";

export interface StoredDocument {
  projectId: string;
  document: ProjectFile;
  /** 1 for the first saved revision; increases by one per save. 0 = never saved. */
  revision: number;
  savedAt: number;
}

export interface RevisionSummary {
  revision: number;
  savedAt: number;
  /** What changed, in words ("edited A[1][0] of plant queue"). */
  message: string;
}

export interface DocumentStore {
  /** The latest revision; a project never saved gets `emptyDocument(name)` at revision 0. */
  load(projectId: string): Promise<StoredDocument>;
  save(projectId: string, document: ProjectFile, options: { baseRevision: number; message: string }): Promise<StoredDocument>;
  history(projectId: string): Promise<RevisionSummary[]>;
  revision(projectId: string, revision: number): Promise<StoredDocument>;
  /** Called when another tab or window saved this project. Returns a disposer. */
  subscribe(projectId: string, listener: (latest: StoredDocument) => void): () => void;
}

export function emptyDocument(name: string): ProjectFile {
  return {
    format: "loopwright-project",
    version: 1,
    name,
    plants: [
      {
        id: "plant",
        name: "New plant",
        model: { type: "state-space", A: [[-1]], B: [[1]], C: [[1]], D: [[0]], sampleTime: null },
      },
    ],
    variants: [],
  };
}

/** An in-memory store with the same semantics (conflicts, revisions), for tests. */
export function createMemoryDocumentStore(now: () => number = () => Date.now()): DocumentStore {
  const revisions = new Map<string, { document: ProjectFile; savedAt: number; message: string }[]>();
  const listeners = new Map<string, Set<(latest: StoredDocument) => void>>();
  const clone = (d: ProjectFile): ProjectFile => structuredClone(d);
  const latestOf = (projectId: string): StoredDocument => {
    const list = revisions.get(projectId) ?? [];
    const last = list[list.length - 1];
    return last
      ? { projectId, document: clone(last.document), revision: list.length, savedAt: last.savedAt }
      : { projectId, document: emptyDocument("Untitled"), revision: 0, savedAt: 0 };
  };
  return {
    async load(projectId) {
      return latestOf(projectId);
    },
    async save(projectId, document, { baseRevision, message }) {
      const list = revisions.get(projectId) ?? [];
      if (baseRevision !== list.length) {
        throw new EngineError("conflict", `This project was changed elsewhere (revision ${list.length}); your edit was based on revision ${baseRevision}`, {
          stored: list.length,
          base: baseRevision,
        });
      }
      list.push({ document: clone(document), savedAt: now(), message });
      revisions.set(projectId, list);
      const latest = latestOf(projectId);
      for (const listener of listeners.get(projectId) ?? []) listener(latest);
      return latest;
    },
    async history(projectId) {
      return (revisions.get(projectId) ?? []).map((r, i) => ({ revision: i + 1, savedAt: r.savedAt, message: r.message })).reverse();
    },
    async revision(projectId, revision) {
      const r = (revisions.get(projectId) ?? [])[revision - 1];
      if (!r) throw new EngineError("invalid-argument", `Project ${projectId} has no revision ${revision}`, { revision });
      return { projectId, document: clone(r.document), revision, savedAt: r.savedAt };
    },
    subscribe(projectId, listener) {
      const set = listeners.get(projectId) ?? new Set();
      set.add(listener);
      listeners.set(projectId, set);
      return () => set.delete(listener);
    },
  };
}
