/**
 * The demo project, created on first start exactly once per profile. The "created" flag lives
 * in the `meta` table and is read and written in the same transaction as the project, so two
 * windows starting together cannot both create it (IndexedDB runs read-write transactions on
 * overlapping tables one after another). Deleting the demo does not bring it back.
 */
import type { ProjectFile } from "../../shared-engine/api/contract";
import exampleDocument from "../../assets/examples/queue-backlog.loopwright.json";
import type { LoopwrightDatabase, ProjectRecord } from "./database";
import type { DocumentStore } from "./documentStore";
import { randomProjectId } from "./projectRepository";
import { nameKeyOf } from "./schema";

/** Meta key of the one-time flag. WARNING: renaming it re-creates the demo in every profile. */
export const DEMO_CREATED_KEY = "demoProjectCreated";

export const DEMO_PROJECT_NAME = "Demo — invented scenario: message-queue backlog regulator";
export const DEMO_PROJECT_DESCRIPTION =
  "Invented example data, not a real system: a regulator that keeps the backlog of a message queue " +
  "near a set level by adjusting the number of active consumers, with a burst of arrivals as the disturbance.";

/** The demo's design document: the shipped example (assets/examples), bundled by Vite. */
export const DEMO_DOCUMENT = exampleDocument as unknown as ProjectFile;

/**
 * Creates the demo project unless it was ever created in this database. Returns whether it did
 * now. With `documents`, the example design is saved as the demo's first revision too.
 */
export async function ensureDemoProject(db: LoopwrightDatabase, now: () => number = () => Date.now(), documents?: DocumentStore): Promise<boolean> {
  let createdId: string | null = null;
  const created = await db.transaction("rw", db.projects, db.meta, async () => {
    if (await db.meta.get(DEMO_CREATED_KEY)) return false;
    const time = now();
    const demo: ProjectRecord = {
      id: randomProjectId(),
      name: DEMO_PROJECT_NAME,
      nameKey: nameKeyOf(DEMO_PROJECT_NAME),
      description: DEMO_PROJECT_DESCRIPTION,
      createdAt: time,
      updatedAt: time,
      isDemo: true,
    };
    await db.projects.add(demo);
    await db.meta.put({ key: DEMO_CREATED_KEY, value: { at: time, projectId: demo.id } });
    createdId = demo.id;
    return true;
  });
  // Outside the transaction: the document store writes its own tables.
  if (created && createdId && documents) {
    const stored = await documents.load(createdId);
    if (stored.revision === 0) await documents.save(createdId, structuredClone(DEMO_DOCUMENT), { baseRevision: 0, message: "the example design" });
  }
  return created;
}
