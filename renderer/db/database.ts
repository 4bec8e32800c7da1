/**
 * The renderer's IndexedDB database ("loopwright"), opened through Dexie 4.
 */
import { Dexie, type EntityTable, type Table } from "dexie";
import type { ProjectFile, SignOffSpec } from "../../shared-engine/api/contract";
import { DATABASE_NAME, declareSchema } from "./schema";

/** A stored project (schema v2). Dates are epoch milliseconds so records stay plain JSON. */
export interface ProjectRecord {
  id: string;
  name: string;
  /** Derived from `name` by `nameKeyOf`; indexed. */
  nameKey: string;
  description: string;
  createdAt: number;
  updatedAt: number;
  isDemo: boolean;
}

/** A one-time flag or small setting. */
export interface MetaRecord {
  key: string;
  value: unknown;
}

/** The latest revision of one project's document (schema v3). */
export interface DocumentRecord {
  projectId: string;
  revision: number;
  document: ProjectFile;
  savedAt: number;
}

/** One saved revision (schema v3); never changed once written. */
export interface RevisionRecord {
  projectId: string;
  revision: number;
  document: ProjectFile;
  savedAt: number;
  message: string;
}

/** A sign-off of the latest document, indexed per project and variant (schema v3). */
export interface SignOffRecord extends SignOffSpec {
  /** `${projectId}/${variant}/${role}/${index}`. */
  id: string;
  projectId: string;
}

/** A user preference (schema v3). */
export interface SettingRecord {
  key: string;
  value: unknown;
}

export type LoopwrightDatabase = Dexie & {
  projects: EntityTable<ProjectRecord, "id">;
  meta: EntityTable<MetaRecord, "key">;
  documents: EntityTable<DocumentRecord, "projectId">;
  revisions: Table<RevisionRecord, [string, number]>;
  signOffs: EntityTable<SignOffRecord, "id">;
  settings: EntityTable<SettingRecord, "key">;
};

export interface OpenDatabaseOptions {
  /** Database name; tests use a fresh one each. */
  name?: string;
  /** IndexedDB implementation; tests pass fake-indexeddb's. Defaults to the browser's. */
  indexedDB?: IDBFactory;
  IDBKeyRange?: typeof IDBKeyRange;
}

/**
 * Creates (does not yet open) the project database. Dexie opens it on first use; call
 * `db.close()` to dispose. Transactions use strict durability on Chromium so a project that
 * the UI reports as saved has reached the disk.
 */
export function createDatabase(options: OpenDatabaseOptions = {}): LoopwrightDatabase {
  const db = new Dexie(options.name ?? DATABASE_NAME, {
    chromeTransactionDurability: "strict",
    ...(options.indexedDB ? { indexedDB: options.indexedDB } : {}),
    ...(options.IDBKeyRange ? { IDBKeyRange: options.IDBKeyRange } : {}),
  }) as LoopwrightDatabase;
  declareSchema(db);
  return db;
}
