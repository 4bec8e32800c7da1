import { describe, expect, it } from "vitest";
import { MAX_PROJECT_NAME_LENGTH, createProjectRepository } from "../../../renderer/db";
import { openTestDatabase, steppingClock } from "./dbTestSupport";

function setup() {
  const db = openTestDatabase();
  const repo = createProjectRepository(db, { now: steppingClock() });
  return { db, repo };
}

describe("project repository", () => {
  it("creates a project with a trimmed name, equal creation and update times, and lists it", async () => {
    const { db, repo } = setup();
    const created = await repo.create({ name: "  Crane sway damper  ", description: "trial" });
    expect(created.name).toBe("Crane sway damper");
    expect(created.createdAt).toBe(created.updatedAt);
    expect(created.isDemo).toBe(false);
    const { projects } = await repo.list();
    expect(projects).toEqual([created]);
    db.close();
  });

  it("lists projects sorted by name without regard to case", async () => {
    const { db, repo } = setup();
    for (const name of ["beta", "Alpha", "gamma", "ALPHA two"]) await repo.create({ name });
    expect((await repo.list()).projects.map((p) => p.name)).toEqual(["Alpha", "ALPHA two", "beta", "gamma"]);
    db.close();
  });

  it.each([
    ["an empty name", "", "empty"],
    ["a name of spaces only", "   \u00a0 ", "empty"],
    ["a name one character over the limit", "x".repeat(MAX_PROJECT_NAME_LENGTH + 1), "too-long"],
    ["a name with a line break", "two\nlines", "control-character"],
    ["a name that is not text", 42, "not-text"],
  ])("rejects %s with a specific reason and writes nothing", async (_label, name, reason) => {
    const { db, repo } = setup();
    await expect(repo.create({ name: name as string })).rejects.toMatchObject({ kind: "validation", details: { field: "name", reason } });
    expect(await db.projects.count()).toBe(0);
    db.close();
  });

  it("accepts a name exactly at the length limit", async () => {
    const { db, repo } = setup();
    const created = await repo.create({ name: "y".repeat(MAX_PROJECT_NAME_LENGTH) });
    expect(created.name).toHaveLength(MAX_PROJECT_NAME_LENGTH);
    db.close();
  });

  it("rejects a second project whose name differs only in case and spacing", async () => {
    const { db, repo } = setup();
    await repo.create({ name: "Pump station" });
    await expect(repo.create({ name: " PUMP STATION " })).rejects.toMatchObject({ details: { reason: "duplicate" } });
    expect(await db.projects.count()).toBe(1);
    db.close();
  });

  it("renames a project, moves its update time forward and keeps its creation time", async () => {
    const { db, repo } = setup();
    const created = await repo.create({ name: "Old name" });
    const renamed = await repo.rename(created.id, "New name");
    expect(renamed.name).toBe("New name");
    expect(renamed.createdAt).toBe(created.createdAt);
    expect(renamed.updatedAt).toBeGreaterThan(created.updatedAt);
    expect((await db.projects.get(created.id))?.name).toBe("New name");
    db.close();
  });

  it("allows a rename that only changes the letter case of the same project", async () => {
    const { db, repo } = setup();
    const created = await repo.create({ name: "pump station" });
    expect((await repo.rename(created.id, "Pump Station")).name).toBe("Pump Station");
    db.close();
  });

  it("leaves the stored name unchanged when a rename is invalid or clashes", async () => {
    const { db, repo } = setup();
    const a = await repo.create({ name: "First" });
    await repo.create({ name: "Second" });
    await expect(repo.rename(a.id, "")).rejects.toMatchObject({ details: { reason: "empty" } });
    await expect(repo.rename(a.id, "second")).rejects.toMatchObject({ details: { reason: "duplicate" } });
    expect((await db.projects.get(a.id))).toMatchObject({ name: "First", updatedAt: a.updatedAt });
    db.close();
  });

  it("reports a missing project by id on rename and delete", async () => {
    const { db, repo } = setup();
    await expect(repo.rename("p-none", "Name")).rejects.toMatchObject({ details: { reason: "not-found", field: "id" } });
    await expect(repo.remove("p-none")).rejects.toMatchObject({ details: { reason: "not-found" } });
    db.close();
  });

  it("deletes a project and restores it with the same id and dates", async () => {
    const { db, repo } = setup();
    const created = await repo.create({ name: "Keep me" });
    const removed = await repo.remove(created.id);
    expect(await db.projects.count()).toBe(0);
    await repo.restore(removed);
    expect((await repo.list()).projects).toEqual([created]);
    await expect(repo.restore(removed)).rejects.toMatchObject({ details: { reason: "duplicate" } });
    db.close();
  });

  it("returns copies, so changing a returned record does not change the stored one", async () => {
    const { db, repo } = setup();
    const created = await repo.create({ name: "Original" });
    created.name = "Mutated";
    const listed = (await repo.list()).projects[0]!;
    listed.name = "Mutated again";
    expect((await repo.list()).projects[0]!.name).toBe("Original");
    db.close();
  });

  it("reports a damaged stored record by its field path instead of failing the whole list", async () => {
    const { db, repo } = setup();
    await repo.create({ name: "Healthy" });
    await db.projects.put({ id: "p-bad", name: "Damaged", nameKey: "damaged", description: "", createdAt: Number.NaN, updatedAt: 1, isDemo: false });
    const listing = await repo.list();
    expect(listing.projects.map((p) => p.name)).toEqual(["Healthy"]);
    expect(listing.unreadable).toEqual([{ id: "p-bad", message: "projects[0].createdAt must be a finite time in milliseconds" }]);
    db.close();
  });
});
