import { describe, expect, it } from "vitest";
import { DEMO_PROJECT_DESCRIPTION, DEMO_PROJECT_NAME, createProjectRepository, ensureDemoProject } from "../../../renderer/db";
import { freshFactory, openTestDatabase } from "./dbTestSupport";

describe("demo project", () => {
  it("is created on first start, marked as demo and described as invented data", async () => {
    const db = openTestDatabase();
    expect(await ensureDemoProject(db)).toBe(true);
    const { projects } = await createProjectRepository(db).list();
    expect(projects).toHaveLength(1);
    expect(projects[0]).toMatchObject({ name: DEMO_PROJECT_NAME, isDemo: true });
    expect(DEMO_PROJECT_DESCRIPTION).toMatch(/^Invented example data/);
    db.close();
  });

  it("is not created again on later starts", async () => {
    const db = openTestDatabase();
    await ensureDemoProject(db);
    expect(await ensureDemoProject(db)).toBe(false);
    expect(await db.projects.count()).toBe(1);
    db.close();
  });

  it("stays deleted after the user deletes it", async () => {
    const db = openTestDatabase();
    await ensureDemoProject(db);
    const repo = createProjectRepository(db);
    await repo.remove((await repo.list()).projects[0]!.id);
    expect(await ensureDemoProject(db)).toBe(false);
    expect(await db.projects.count()).toBe(0);
    db.close();
  });

  it("is created exactly once when two windows start at the same time on one profile", async () => {
    const factory = freshFactory();
    const windows = Array.from({ length: 4 }, () => openTestDatabase(factory));
    const created = await Promise.all(windows.map((db) => ensureDemoProject(db)));
    expect(created.filter(Boolean)).toHaveLength(1);
    expect(await windows[0]!.projects.count()).toBe(1);
    windows.forEach((db) => db.close());
  });
});
