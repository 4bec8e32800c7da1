/**
 * The DocumentStore on the project database (schema v3): every save writes the new revision and
 * the "latest" pointer in ONE read-write transaction after checking the base revision, so a save
 * is either wholly stored or not at all, and two tabs never silently mix their edits (the later
 * one gets kind "conflict"). Other tabs hear about a save through a BroadcastChannel.
 *
 * Durability: the database is opened with strict durability (database.ts), so "saved" means the
 * transaction reached the disk. A write the browser refuses (quota, disk full) becomes
 * EngineError kind "storage"; the transaction is aborted, so the stored revisions are untouched.
 */
import { EngineError } from "../../shared-engine/errors";
import type { ProjectFile } from "../../shared-engine/api/contract";
import type { LoopwrightDatabase, RevisionRecord, SignOffRecord } from "./database";
import { emptyDocument, type DocumentStore, type RevisionSummary, type StoredDocument } from "./documentStore";
import { readStoredDocument } from "./storedDocumentCheck";

/** The channel name shared by every tab of one profile. WARNING: renaming it splits old and new tabs. */
export const DOCUMENT_CHANNEL_NAME = "loopwright-documents";

/** What a tab posts after a committed save. */
export interface DocumentSavedMessage {
  type: "document-saved";
  projectId: string;
  revision: number;
}

/** The part of BroadcastChannel the store uses (tests pass Node's, or a fake). */
export interface ChannelLike {
  postMessage(message: unknown): void;
  addEventListener(type: "message", listener: (event: { data: unknown }) => void): void;
  removeEventListener(type: "message", listener: (event: { data: unknown }) => void): void;
  close(): void;
}

export interface DexieDocumentStoreOptions {
  now?: () => number;
  /** Opens the cross-tab channel; default `new BroadcastChannel(DOCUMENT_CHANNEL_NAME)` when available. */
  openChannel?: () => ChannelLike | null;
}

export interface DexieDocumentStore extends DocumentStore {
  /** Closes the cross-tab channel and drops every listener. */
  dispose(): void;
}

function defaultChannel(): ChannelLike | null {
  const Channel = (globalThis as { BroadcastChannel?: new (name: string) => ChannelLike }).BroadcastChannel;
  return Channel ? new Channel(DOCUMENT_CHANNEL_NAME) : null;
}

/** True for the browser's "no room left" failures, however Dexie wrapped them. */
export function isQuotaError(error: unknown): boolean {
  for (let e: unknown = error, depth = 0; e && typeof e === "object" && depth < 5; depth++) {
    const name = (e as { name?: unknown }).name;
    if (name === "QuotaExceededError") return true;
    e = (e as { inner?: unknown }).inner ?? (e as { cause?: unknown }).cause;
  }
  return false;
}

/** Rewraps a database failure as EngineError; EngineErrors pass through unchanged. */
export function storageError(error: unknown, action: string, details: Record<string, unknown> = {}): EngineError {
  if (error instanceof EngineError) return error;
  const name = error && typeof error === "object" ? String((error as { name?: unknown }).name ?? "Error") : "Error";
  const message = error instanceof Error ? error.message : String(error);
  if (isQuotaError(error)) {
    return new EngineError(
      "storage",
      `Could not ${action}: this computer's storage for Loopwright is full. Nothing was changed; your previous revision is intact. Free disk space or delete old projects, then save again.`,
      { ...details, reason: "quota", cause: name },
    );
  }
  return new EngineError("storage", `Could not ${action}: the local database refused the write (${name}: ${message}). Nothing was changed.`, {
    ...details,
    reason: "database",
    cause: name,
  });
}

function signOffRows(projectId: string, document: ProjectFile): SignOffRecord[] {
  return (document.signOffs ?? []).map((s, index) => ({ ...structuredClone(s), id: `${projectId}/${s.variant}/${s.role}/${index}`, projectId }));
}

/** Builds the store. The caller owns `db` and calls `dispose()` before closing it. */
export function createDexieDocumentStore(db: LoopwrightDatabase, options: DexieDocumentStoreOptions = {}): DexieDocumentStore {
  const now = options.now ?? (() => Date.now());
  const listeners = new Map<string, Set<(latest: StoredDocument) => void>>();
  let channel: ChannelLike | null = null;
  try {
    channel = (options.openChannel ?? defaultChannel)();
  } catch {
    channel = null; // No cross-tab channel (very old browser): saves still conflict-check.
  }

  async function projectName(projectId: string): Promise<string> {
    const record = await db.projects.get(projectId);
    return typeof record?.name === "string" ? record.name : "Untitled";
  }

  async function load(projectId: string): Promise<StoredDocument> {
    const row = await db.documents.get(projectId);
    if (!row) return { projectId, document: emptyDocument(await projectName(projectId)), revision: 0, savedAt: 0 };
    return readStoredDocument(row, `documents[${projectId}]`);
  }

  async function notify(projectId: string): Promise<void> {
    const set = listeners.get(projectId);
    if (!set || set.size === 0) return;
    let latest: StoredDocument;
    try {
      latest = await load(projectId);
    } catch {
      return; // The listener learns about it on its next explicit load, which reports the error.
    }
    for (const listener of [...set]) listener(structuredClone(latest));
  }

  const onMessage = (event: { data: unknown }) => {
    const data = event.data as Partial<DocumentSavedMessage> | null;
    if (data && data.type === "document-saved" && typeof data.projectId === "string") void notify(data.projectId);
  };
  channel?.addEventListener("message", onMessage);

  return {
    load,

    async save(projectId, document, { baseRevision, message }) {
      if (typeof projectId !== "string" || projectId.length === 0) {
        throw new EngineError("invalid-argument", "projectId must be non-empty text", { projectId });
      }
      // Copy first: the caller's object must not be stored by reference, and a document that
      // cannot be cloned (functions, cycles) is refused before the transaction starts.
      let copy: ProjectFile;
      try {
        copy = structuredClone(document);
      } catch (error) {
        throw new EngineError("invalid-argument", `The document cannot be stored: ${(error as Error).message}`, { projectId });
      }
      let saved: StoredDocument;
      try {
        saved = await db.transaction("rw", [db.documents, db.revisions, db.signOffs, db.projects], async () => {
          const stored = await db.documents.get(projectId);
          const storedRevision = stored?.revision ?? 0;
          if (baseRevision !== storedRevision) {
            throw new EngineError(
              "conflict",
              `This project was changed elsewhere (now at revision ${storedRevision}); your edit was based on revision ${baseRevision}. Reload to see the other change, then edit again.`,
              { stored: storedRevision, base: baseRevision, projectId },
            );
          }
          const revision = storedRevision + 1;
          const savedAt = now();
          const record: RevisionRecord = { projectId, revision, document: copy, savedAt, message: String(message ?? "") };
          await db.revisions.add(record);
          await db.documents.put({ projectId, revision, document: copy, savedAt });
          await db.signOffs.where("projectId").equals(projectId).delete();
          const rows = signOffRows(projectId, copy);
          if (rows.length > 0) await db.signOffs.bulkPut(rows);
          await db.projects.update(projectId, { updatedAt: savedAt });
          return { projectId, document: structuredClone(copy), revision, savedAt };
        });
      } catch (error) {
        throw storageError(error, "save the project", { projectId, baseRevision });
      }
      // Only after the commit: tell this tab's listeners and the other tabs.
      channel?.postMessage({ type: "document-saved", projectId, revision: saved.revision } satisfies DocumentSavedMessage);
      void notify(projectId);
      return saved;
    },

    async history(projectId): Promise<RevisionSummary[]> {
      const rows = await db.revisions.where("projectId").equals(projectId).toArray();
      return rows
        .map((r) => ({ revision: r.revision, savedAt: r.savedAt, message: typeof r.message === "string" ? r.message : "" }))
        .sort((a, b) => b.revision - a.revision);
    },

    async revision(projectId, revision) {
      const row = await db.revisions.get([projectId, revision]);
      if (!row) throw new EngineError("invalid-argument", `Project ${projectId} has no revision ${revision}`, { projectId, revision });
      return readStoredDocument(row, `revisions[${projectId}, ${revision}]`);
    },

    subscribe(projectId, listener) {
      const set = listeners.get(projectId) ?? new Set();
      set.add(listener);
      listeners.set(projectId, set);
      return () => {
        set.delete(listener);
      };
    },

    dispose() {
      listeners.clear();
      channel?.removeEventListener("message", onMessage);
      channel?.close();
      channel = null;
    },
  };
}

/**
 * Restores an old revision by saving its document as a NEW revision (nothing is lost: the
 * revisions in between stay in the history). Fails with "conflict" like any save when
 * `baseRevision` is stale.
 */
export async function restoreRevision(store: DocumentStore, projectId: string, revision: number, baseRevision: number): Promise<StoredDocument> {
  const old = await store.revision(projectId, revision);
  return store.save(projectId, old.document, { baseRevision, message: `Restored revision ${revision}` });
}

/**
 * Asks the browser to keep this origin's storage under pressure (no eviction). Returns whether
 * storage is persistent; false when the API is missing or the browser declines.
 */
export async function requestPersistentStorage(storage: { persist?: () => Promise<boolean>; persisted?: () => Promise<boolean> } | undefined): Promise<boolean> {
  try {
    if (!storage) return false;
    if (storage.persisted && (await storage.persisted())) return true;
    return storage.persist ? await storage.persist() : false;
  } catch {
    return false;
  }
}
