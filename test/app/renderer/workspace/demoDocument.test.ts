import { readFileSync } from "node:fs";
import { describe, expect, it } from "vitest";
import { createDexieDocumentStore, createProjectRepository, ensureDemoProject } from "../../../../renderer/db";
import { DEMO_DOCUMENT } from "../../../../renderer/db/demoProject";
import { openTestDatabase } from "../../db/dbTestSupport";

describe("demo project document", () => {
  it("is the shipped example file, saved as the demo's first revision when the document store is given", async () => {
    const db = openTestDatabase();
    const documents = createDexieDocumentStore(db, { openChannel: () => null });
    expect(await ensureDemoProject(db, undefined, documents)).toBe(true);
    const demo = (await createProjectRepository(db).list()).projects[0]!;
    const stored = await documents.load(demo.id);
    expect(stored.revision).toBe(1);
    const shipped = JSON.parse(readFileSync(new URL("../../../../assets/examples/queue-backlog.loopwright.json", import.meta.url), "utf8"));
    expect(stored.document).toEqual(shipped);
    expect(DEMO_DOCUMENT).toEqual(shipped);
    // A second start neither creates the demo again nor adds a revision.
    expect(await ensureDemoProject(db, undefined, documents)).toBe(false);
    expect((await documents.load(demo.id)).revision).toBe(1);
    documents.dispose();
    db.close();
  });
});
