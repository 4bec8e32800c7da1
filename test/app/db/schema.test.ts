import { readFileSync } from "node:fs";
import { Dexie } from "dexie";
import { IDBKeyRange } from "fake-indexeddb";
import { describe, expect, it } from "vitest";
import { CURRENT_SCHEMA_VERSION, SCHEMA_VERSIONS, createProjectRepository, nameKeyOf } from "../../../renderer/db";
import { freshFactory, openTestDatabase } from "./dbTestSupport";

interface V1Fixture {
  schemaVersion: number;
  stores: Record<string, string>;
  tables: { projects: Record<string, unknown>[]; meta: { key: string; value: unknown }[] };
}
// Source: hand-written v1 records, see the fixture's "source" field.
const fixture = JSON.parse(readFileSync(new URL("../../fixtures/db/projects-v1.json", import.meta.url), "utf8")) as V1Fixture;

async function writeV1Data(factory: ReturnType<typeof freshFactory>): Promise<void> {
  // Written with the frozen v1 store definition from the fixture, not with today's code.
  const v1 = new Dexie("loopwright-test", { indexedDB: factory, IDBKeyRange });
  v1.version(fixture.schemaVersion).stores(fixture.stores);
  await v1.open();
  await v1.table("projects").bulkAdd(fixture.tables.projects);
  await v1.table("meta").bulkAdd(fixture.tables.meta);
  v1.close();
}

describe("project database schema", () => {
  it("keeps version numbers strictly increasing and starts at 1", () => {
    const versions = SCHEMA_VERSIONS.map((s) => s.version);
    expect(versions[0]).toBe(1);
    for (let i = 1; i < versions.length; i++) expect(versions[i]!).toBeGreaterThan(versions[i - 1]!);
    expect(CURRENT_SCHEMA_VERSION).toBe(versions[versions.length - 1]);
  });

  it("still declares version 1 exactly as the frozen v1 fixture records it", () => {
    expect(SCHEMA_VERSIONS[0]!.stores).toEqual(fixture.stores);
  });

  it("opens data written by schema v1 with every record and field intact", async () => {
    const factory = freshFactory();
    await writeV1Data(factory);
    const db = openTestDatabase(factory);
    await db.open();
    expect(db.verno).toBe(CURRENT_SCHEMA_VERSION);
    const stored = await db.projects.toArray();
    expect(stored).toHaveLength(fixture.tables.projects.length);
    for (const original of fixture.tables.projects) {
      const upgraded = stored.find((p) => p.id === original.id);
      expect(upgraded, `project ${String(original.id)} survives the upgrade`).toBeDefined();
      for (const [field, value] of Object.entries(original)) expect(upgraded![field as keyof typeof upgraded]).toEqual(value);
    }
    expect(await db.meta.toArray()).toEqual(fixture.tables.meta);
    db.close();
  });

  it("fills the v2 nameKey of every v1 project so the list sorts without regard to case", async () => {
    const factory = freshFactory();
    await writeV1Data(factory);
    const db = openTestDatabase(factory);
    for (const p of await db.projects.toArray()) expect(p.nameKey).toBe(nameKeyOf(p.name));
    const listing = await createProjectRepository(db).list();
    expect(listing.unreadable).toEqual([]);
    // Both case variants of the greenhouse name are kept (v1 allowed them), sorted together.
    expect(listing.projects.map((p) => p.nameKey)).toEqual([
      "demo — invented scenario: message-queue backlog regulator",
      "greenhouse vent loop",
      "greenhouse vent loop",
      "äbc — crane sway damper",
    ]);
    db.close();
  });

  it("refuses a new name that matches an upgraded v1 name apart from case", async () => {
    const factory = freshFactory();
    await writeV1Data(factory);
    const db = openTestDatabase(factory);
    const repo = createProjectRepository(db);
    await expect(repo.create({ name: "GREENHOUSE vent LOOP" })).rejects.toMatchObject({ kind: "validation", details: { reason: "duplicate" } });
    db.close();
  });
});
