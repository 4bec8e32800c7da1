/**
 * The project database schema, version by version.
 *
 * WARNING: never edit the `stores` of a version that has shipped, and never renumber versions.
 * Saved projects on users' machines were written with those exact definitions; to change the
 * shape, append a new version with an `upgrade` function and test it against data written by
 * the previous version (test/fixtures/db/).
 */
import type { Dexie, Transaction } from "dexie";

/** One schema step. `stores` uses Dexie's syntax: primary key first, then indexed fields. */
export interface SchemaVersion {
  version: number;
  stores: Record<string, string | null>;
  /** Rewrites records written by the previous version. Runs inside the upgrade transaction. */
  upgrade?: (transaction: Transaction) => Promise<void>;
}

export const DATABASE_NAME = "loopwright";

/** The normalised form of a project name, used for case-insensitive sorting and duplicate checks. */
export function nameKeyOf(name: string): string {
  return name.normalize("NFC").trim().toLocaleLowerCase("en");
}

export const SCHEMA_VERSIONS: readonly SchemaVersion[] = [
  {
    // v1: the original shape. projects: { id, name, createdAt, updatedAt, description, isDemo };
    // meta: { key, value } for one-time flags such as "demo project created".
    version: 1,
    stores: { projects: "id, name, updatedAt", meta: "key" },
  },
  {
    // v2: adds `nameKey` (trimmed, lower-cased name) with an index, so the list sorts without
    // regard to case and a new name can be checked against existing ones in one index lookup.
    // Existing duplicates (possible in v1) are kept; only new names are checked.
    version: 2,
    stores: { projects: "id, name, nameKey, updatedAt", meta: "key" },
    upgrade: async (transaction) => {
      await transaction
        .table("projects")
        .toCollection()
        .modify((record: Record<string, unknown>) => {
          record.nameKey = nameKeyOf(typeof record.name === "string" ? record.name : "");
        });
    },
  },
  {
    // v3: the project document lives in the database, saved as numbered revisions.
    // documents: { projectId, revision, document, savedAt } (the latest revision of each project);
    // revisions: { projectId, revision, document, savedAt, message } keyed [projectId+revision];
    // signOffs: { id, projectId, variant, role, name, date, fingerprint } mirrors the latest
    //   document's sign-offs so they can be looked up per variant without loading documents;
    // settings: { key, value } for user preferences.
    // No upgrade function: v2 rows are kept as they are, and a project without a `documents` row
    // opens at revision 0 with an empty document named after the project (documentStore.load).
    version: 3,
    stores: {
      projects: "id, name, nameKey, updatedAt",
      meta: "key",
      documents: "projectId, savedAt",
      revisions: "[projectId+revision], projectId, savedAt",
      signOffs: "id, projectId, [projectId+variant]",
      settings: "key",
    },
  },
];

/** The version the current code writes. */
export const CURRENT_SCHEMA_VERSION = SCHEMA_VERSIONS[SCHEMA_VERSIONS.length - 1]!.version;

/** Declares every version up to and including `upTo` on a Dexie instance (before it opens). */
export function declareSchema(db: Dexie, upTo: number = CURRENT_SCHEMA_VERSION): void {
  for (const step of SCHEMA_VERSIONS) {
    if (step.version > upTo) break;
    const version = db.version(step.version).stores(step.stores);
    if (step.upgrade) version.upgrade(step.upgrade);
  }
}
