/**
 * Create, rename, delete, restore and list projects. Every write validates its input first
 * and writes nothing when a rule fails (see projectRecord.ts for the rules and error reasons).
 */
import type { LoopwrightDatabase, ProjectRecord } from "./database";
import { normaliseProjectDescription, normaliseProjectName, projectInputError, readProjectRecord } from "./projectRecord";
import { nameKeyOf } from "./schema";

export interface NewProject {
  name: string;
  description?: string;
  isDemo?: boolean;
}

/** The list as read: valid projects, and records that failed the read check (shown as a warning). */
export interface ProjectListing {
  projects: ProjectRecord[];
  unreadable: { id: string; message: string }[];
}

export interface ProjectRepository {
  list(): Promise<ProjectListing>;
  create(input: NewProject): Promise<ProjectRecord>;
  rename(id: string, name: string): Promise<ProjectRecord>;
  /** Deletes and returns the deleted record, so the caller can offer undo through `restore`. */
  remove(id: string): Promise<ProjectRecord>;
  /** Puts back a record returned by `remove` (same id and dates). */
  restore(record: ProjectRecord): Promise<ProjectRecord>;
}

export interface RepositoryOptions {
  /** Clock in epoch milliseconds; tests fix it. */
  now?: () => number;
  /** Id generator; defaults to 128 random bits from crypto.getRandomValues. */
  newId?: () => string;
}

export function randomProjectId(): string {
  const bytes = new Uint8Array(16);
  globalThis.crypto.getRandomValues(bytes);
  return "p-" + Array.from(bytes, (b) => b.toString(16).padStart(2, "0")).join("");
}

export function createProjectRepository(db: LoopwrightDatabase, options: RepositoryOptions = {}): ProjectRepository {
  const now = options.now ?? (() => Date.now());
  const newId = options.newId ?? randomProjectId;

  async function requireUniqueName(name: string, exceptId?: string): Promise<void> {
    const clash = await db.projects.where("nameKey").equals(nameKeyOf(name)).filter((p) => p.id !== exceptId).first();
    if (clash) {
      throw projectInputError("duplicate", "name", `A project named "${clash.name}" already exists; choose another name`, { existingId: clash.id });
    }
  }

  async function requireExisting(id: unknown): Promise<ProjectRecord> {
    const record = typeof id === "string" ? await db.projects.get(id) : undefined;
    if (!record) throw projectInputError("not-found", "id", `No project with id ${JSON.stringify(id)} exists (it may have been deleted in another window)`);
    return record;
  }

  return {
    async list() {
      const rows = await db.projects.orderBy("nameKey").toArray();
      const listing: ProjectListing = { projects: [], unreadable: [] };
      rows.forEach((row, index) => {
        try {
          listing.projects.push(readProjectRecord(row, `projects[${index}]`));
        } catch (error) {
          const id = typeof (row as { id?: unknown }).id === "string" ? (row as { id: string }).id : `#${index}`;
          listing.unreadable.push({ id, message: (error as Error).message });
        }
      });
      return listing;
    },

    async create(input) {
      const name = normaliseProjectName(input?.name);
      const description = normaliseProjectDescription(input?.description);
      return db.transaction("rw", db.projects, async () => {
        await requireUniqueName(name);
        const time = now();
        const record: ProjectRecord = {
          id: newId(),
          name,
          nameKey: nameKeyOf(name),
          description,
          createdAt: time,
          updatedAt: time,
          isDemo: input.isDemo === true,
        };
        await db.projects.add(record);
        return { ...record };
      });
    },

    async rename(id, newName) {
      const name = normaliseProjectName(newName);
      return db.transaction("rw", db.projects, async () => {
        const existing = await requireExisting(id);
        if (existing.name === name) return { ...existing };
        await requireUniqueName(name, id);
        const updated: ProjectRecord = { ...existing, name, nameKey: nameKeyOf(name), updatedAt: now() };
        await db.projects.put(updated);
        return { ...updated };
      });
    },

    async remove(id) {
      return db.transaction("rw", db.projects, async () => {
        const existing = await requireExisting(id);
        await db.projects.delete(existing.id);
        return { ...existing };
      });
    },

    async restore(record) {
      const checked = readProjectRecord(record, "restored project");
      return db.transaction("rw", db.projects, async () => {
        if (await db.projects.get(checked.id)) {
          throw projectInputError("duplicate", "id", `A project with id ${checked.id} already exists; it cannot be restored twice`);
        }
        await requireUniqueName(checked.name);
        const restored = { ...checked, nameKey: nameKeyOf(checked.name) };
        await db.projects.add(restored);
        return { ...restored };
      });
    },
  };
}
