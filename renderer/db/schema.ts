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
