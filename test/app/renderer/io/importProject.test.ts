import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { createDexieDocumentStore, createProjectRepository } from "../../../../renderer/db";
import { exportFileName, importProjectText, importedProjectName, projectFileText, singleVariantDocument } from "../../../../renderer/io";
import { openTestDatabase, steppingClock } from "../../db/dbTestSupport";
import { sampleProject } from "../../db/sampleProject";
import { inProcessBridge } from "./inProcessBridge";

function setup() {
  const db = openTestDatabase();
  const repository = createProjectRepository(db, { now: steppingClock() });
  const documents = createDexieDocumentStore(db, { openChannel: () => null });
  const snapshot = async () => ({
    projects: await db.projects.toArray(),
    documents: await db.documents.toArray(),
    revisions: await db.revisions.toArray(),
  });
  return { db, deps: { bridge: inProcessBridge, repository, documents }, snapshot, close: () => (documents.dispose(), db.close()) };
}

describe("project import", () => {
  it("opens a valid file as a new project at revision 1 with the file's content", async () => {
    const { deps, close } = setup();
    const outcome = await importProjectText(projectFileText(sampleProject("Imported table")), "table.loopwright.json", deps);
    expect(outcome.ok).toBe(true);
    if (!outcome.ok) return;
    const stored = await deps.documents.load(outcome.project.id);
    expect(stored.revision).toBe(1);
    expect(stored.document.variants.map((v) => v.id)).toEqual(["lqr-soft", "poles-fast"]);
    expect((await deps.documents.history(outcome.project.id))[0]!.message).toBe("Imported from table.loopwright.json");
    close();
  });

  it("gives a second import of the same file a distinct name instead of failing", async () => {
    const { deps, close } = setup();
    const text = projectFileText(sampleProject("Twice"));
    const names = [];
    for (let i = 0; i < 3; i++) {
      const o = await importProjectText(text, "twice.json", deps);
      if (o.ok) names.push(o.project.name);
    }
    expect(names).toEqual(["Twice", "Twice (imported)", "Twice (imported 2)"]);
    close();
  });

  it("rejects an invalid file with its field paths and leaves stored data untouched", async () => {
    const { deps, snapshot, close } = setup();
    await importProjectText(projectFileText(sampleProject("Existing")), "a.json", deps);
    const before = await snapshot();
    const bad = sampleProject();
    (bad.plants[0]!.model as { A: unknown }).A = [[0, 1], [-2]];
    const outcome = await importProjectText(JSON.stringify(bad), "bad.json", deps);
    expect(outcome.ok).toBe(false);
    if (outcome.ok) return;
    expect(outcome.problems.some((p) => p.path.startsWith("plants[0].model.A"))).toBe(true);
    expect(outcome.message).toMatch(/^bad\.json was not imported/);
    expect(await snapshot()).toEqual(before);
    close();
  });

  it("rejects text that is not JSON with a plain message", async () => {
    const { deps, close } = setup();
    const outcome = await importProjectText("{ not json", "broken.json", deps);
    expect(outcome).toMatchObject({ ok: false, message: expect.stringMatching(/not valid JSON/) });
    close();
  });

  it("cleans a file's project name so the project list accepts it", () => {
    expect(importedProjectName("  two\nlines ", "fallback")).toBe("two lines");
    expect(importedProjectName("", "from-file")).toBe("from-file");
    expect(importedProjectName("x".repeat(300), "f")).toHaveLength(120);
  });

  it("never throws and never changes stored data when given random or mutated files", async () => {
    // Fuzzing (c): random text, random JSON, and valid files with one field replaced by junk.
    const { deps, snapshot, close } = setup();
    await importProjectText(projectFileText(sampleProject("Keep")), "keep.json", deps);
    const junk = fc.oneof(
      fc.constant(null),
      fc.integer({ min: -1000, max: 1000 }).map((k) => k / 7),
      fc.string({ maxLength: 20 }),
      fc.constantFrom(1e308 * 10, "NaN", "__proto__", [], {}, [[1, 2], [3]], { constructor: 1 }),
    );
    const paths: (string | number)[][] = [
      ["format"], ["version"], ["name"], ["plants"], ["plants", 0, "id"], ["plants", 0, "model", "type"], ["plants", 0, "model", "A"],
      ["plants", 0, "model", "A", 1], ["plants", 0, "model", "B", 0, 0], ["plants", 0, "model", "sampleTime"], ["variants"], ["variants", 0, "plant"],
      ["variants", 0, "stateFeedback", "method"], ["variants", 0, "stateFeedback", "Q"], ["variants", 1, "stateFeedback", "poles", 0], ["variants", 0, "step", "times"],
      ["requirements", 0, "metric"], ["requirements", 1, "max"], ["variants", 1, "id"],
    ];
    const mutated = fc.tuple(fc.constantFrom(...paths), junk).map(([path, value]) => {
      const doc = sampleProject("Mutated") as unknown as Record<string, unknown>;
      let node: Record<string | number, unknown> = doc;
      for (const key of path.slice(0, -1)) node = node[key] as Record<string | number, unknown>;
      node[path[path.length - 1]!] = value;
      return JSON.stringify(doc);
    });
    const text = fc.oneof(fc.string({ maxLength: 200 }), fc.json({ maxDepth: 4 }), mutated);
    let before = await snapshot();
    await fc.assert(
      fc.asyncProperty(text, async (t) => {
        const outcome = await importProjectText(t, "fuzz.json", deps);
        const after = await snapshot();
        if (outcome.ok) {
          // An accepted file adds exactly one project with one revision and touches nothing else.
          expect(after.projects.length).toBe(before.projects.length + 1);
          expect(after.revisions.length).toBe(before.revisions.length + 1);
          for (const p of before.projects) expect(after.projects).toContainEqual(p);
          for (const r of before.revisions) expect(after.revisions).toContainEqual(r);
          // What was stored validates again through the engine.
          await inProcessBridge.request("project.load", { text: JSON.stringify(outcome.document) });
        } else {
          expect(after).toEqual(before);
          expect(outcome.problems.length).toBeGreaterThan(0);
        }
        before = after;
      }),
      { seed: 7_031_2025, numRuns: 150 },
    );
    close();
  });
});

describe("project export", () => {
  it("writes a single variant with its plant as a project file that the engine loads", async () => {
    const doc = sampleProject();
    doc.signOffs = [
      { variant: "poles-fast", role: "reviewed", name: "B. Reviewer", date: "2025-06-02", fingerprint: "beef" },
      { variant: "lqr-soft", role: "approved", name: "A. Approver", date: "2025-06-01", fingerprint: "f00d" },
    ];
    doc.variants[1]!.parent = "lqr-soft";
    const single = singleVariantDocument(doc, "poles-fast");
    expect(single.variants.map((v) => v.id)).toEqual(["poles-fast"]);
    expect(single.variants[0]).toMatchObject({ baseline: true });
    expect(single.variants[0]!.parent).toBeUndefined();
    expect(single.plants.map((p) => p.id)).toEqual(["table"]);
    expect(single.signOffs!.map((s) => s.variant)).toEqual(["poles-fast"]);
    const loaded = await inProcessBridge.request("project.load", { text: projectFileText(single) });
    expect(loaded.project.variants).toHaveLength(1);
    expect(() => singleVariantDocument(doc, "missing")).toThrow(/names no variant/);
  });

  it("writes a whole project that loads back equal to the document", async () => {
    const doc = sampleProject();
    const loaded = await inProcessBridge.request("project.load", { text: projectFileText(doc) });
    expect(loaded.project).toEqual(doc);
    expect(exportFileName("Äbc — crane/sway: v2")).toBe("Abc-crane-sway-v2.loopwright.json");
  });
});
