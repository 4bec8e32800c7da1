import { readFileSync } from "node:fs";
import { Dexie } from "dexie";
import { IDBKeyRange } from "fake-indexeddb";
import { describe, expect, it } from "vitest";
import { CURRENT_SCHEMA_VERSION, SCHEMA_VERSIONS, createDexieDocumentStore, createProjectRepository } from "../../../renderer/db";
import { freshFactory, openTestDatabase } from "./dbTestSupport";
import { sampleProject } from "./sampleProject";

interface V2Fixture {
  schemaVersion: number;
  stores: Record<string, string>;
  tables: { projects: Record<string, unknown>[]; meta: { key: string; value: unknown }[] };
}
// Source: hand-written v2 records, see the fixture's "source" field.
const fixture = JSON.parse(readFileSync(new URL("../../fixtures/db/projects-v2.json", import.meta.url), "utf8")) as V2Fixture;

async function writeV2Data(factory: ReturnType<typeof freshFactory>): Promise<void> {
  // Written with the frozen v2 store definition from the fixture, not with today's code.
  const v2 = new Dexie("loopwright-test", { indexedDB: factory, IDBKeyRange });
  v2.version(fixture.schemaVersion).stores(fixture.stores);
  await v2.open();
  await v2.table("projects").bulkAdd(fixture.tables.projects);
  await v2.table("meta").bulkAdd(fixture.tables.meta);
  v2.close();
}

describe("project database schema v3", () => {
  it("still declares version 2 exactly as the frozen v2 fixture records it", () => {
    expect(SCHEMA_VERSIONS.find((s) => s.version === 2)!.stores).toEqual(fixture.stores);
  });

  it("is the current version and keeps every v2 store with the same definition", () => {
    expect(CURRENT_SCHEMA_VERSION).toBeGreaterThanOrEqual(3);
    const v3 = SCHEMA_VERSIONS.find((s) => s.version === 3)!;
    for (const [table, definition] of Object.entries(fixture.stores)) expect(v3.stores[table]).toBe(definition);
    expect(Object.keys(v3.stores).sort()).toEqual(["documents", "meta", "projects", "revisions", "settings", "signOffs"]);
  });

  it("opens data written by schema v2 with every project and meta record intact", async () => {
    const factory = freshFactory();
    await writeV2Data(factory);
    const db = openTestDatabase(factory);
    await db.open();
    expect(db.verno).toBe(CURRENT_SCHEMA_VERSION);
    expect(await db.projects.orderBy("id").toArray()).toEqual([...fixture.tables.projects].sort((a, b) => String(a.id).localeCompare(String(b.id))));
    expect(await db.meta.toArray()).toEqual(fixture.tables.meta);
    expect(await db.documents.count()).toBe(0);
    expect(await db.revisions.count()).toBe(0);
    expect((await createProjectRepository(db).list()).unreadable).toEqual([]);
    db.close();
  });

  it("opens an upgraded v2 project at revision 0 with an empty document named after the project, then saves revision 1", async () => {
    const factory = freshFactory();
    await writeV2Data(factory);
    const db = openTestDatabase(factory);
    const store = createDexieDocumentStore(db, { openChannel: () => null, now: () => 1_750_000_000_000 });
    const id = "p-4d4d4d4d4d4d4d4d4d4d4d4d4d4d4d4d";
    const opened = await store.load(id);
    expect(opened.revision).toBe(0);
    expect(opened.document.name).toBe("Äbc — crane sway damper");
    const saved = await store.save(id, sampleProject("Äbc — crane sway damper"), { baseRevision: 0, message: "first design" });
    expect(saved.revision).toBe(1);
    // The save moves the project's update time, so the list shows it as recently changed.
    expect((await db.projects.get(id))!.updatedAt).toBe(1_750_000_000_000);
    store.dispose();
    db.close();
  });
});
