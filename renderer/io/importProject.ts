/**
 * Opening a project file as a NEW project: the text is parsed, migrated and validated by the
 * engine ("project.load"); only a file that passes is stored (a new project row plus revision 1
 * of its document). A rejected file changes nothing, and its problems are returned with their
 * field paths for the view to list.
 */
import { EngineError, isEngineError } from "../../shared-engine/errors";
import type { EngineBridge, ProjectFile } from "../../shared-engine/api/contract";
import type { DocumentStore, ProjectRecord, ProjectRepository } from "../db";
import { MAX_PROJECT_NAME_LENGTH } from "../db";

export interface ImportProblem {
  /** JSON path in the file ("" for the whole file). */
  path: string;
  message: string;
}

export type ImportOutcome =
  | { ok: true; project: ProjectRecord; document: ProjectFile; warnings: ImportProblem[] }
  | { ok: false; message: string; problems: ImportProblem[] };

export interface ImportDependencies {
  bridge: EngineBridge;
  repository: ProjectRepository;
  documents: DocumentStore;
}

/** Largest file read, in bytes; the engine's own text limit applies again after reading. */
export const MAX_IMPORT_BYTES = 20 * 1024 * 1024;

/** The problems an engine error names: its `problems` list, else its `path`, else the message. */
export function problemsOf(error: unknown): ImportProblem[] {
  if (!isEngineError(error)) return [{ path: "", message: error instanceof Error ? error.message : String(error) }];
  const list = error.details.problems;
  if (Array.isArray(list) && list.length > 0) {
    return list.map((p) => ({ path: typeof p?.path === "string" ? p.path : "", message: typeof p?.message === "string" ? p.message : String(p) }));
  }
  return [{ path: typeof error.details.path === "string" ? error.details.path : "", message: error.message }];
}

// C0/C1 control characters are not allowed in project names (see projectRecord.ts).
const CONTROL_CHARACTERS = /[\u0000-\u001f\u007f-\u009f]+/g;

/** A project name from the file's `name` that the repository accepts. */
export function importedProjectName(name: unknown, fallback: string): string {
  const cleaned = (typeof name === "string" ? name : "").normalize("NFC").replace(CONTROL_CHARACTERS, " ").trim();
  const base = cleaned.length > 0 ? cleaned : fallback;
  return base.slice(0, MAX_PROJECT_NAME_LENGTH).trim() || "Imported project";
}

/**
 * Imports `text` (a project file's contents). `fileName` is used in the revision message and as
 * the name when the file has none. Never throws: every failure is returned as `{ ok: false }`.
 */
export async function importProjectText(text: string, fileName: string, deps: ImportDependencies): Promise<ImportOutcome> {
  let loaded: { project: ProjectFile; warnings: ImportProblem[] };
  try {
    if (typeof text !== "string") throw new EngineError("validation", "A project file must be text", {});
    loaded = await deps.bridge.request("project.load", { text });
  } catch (error) {
    return { ok: false, message: `${fileName} was not imported: ${isEngineError(error) ? error.message.split("\n")[0] : String(error)}`, problems: problemsOf(error) };
  }
  const base = importedProjectName(loaded.project.name, fileName.replace(/\.[^.]*$/, ""));
  let created: ProjectRecord | null = null;
  try {
    // A name already in use gets " (imported)", then " (imported 2)", ...
    for (let attempt = 0; attempt < 50 && !created; attempt++) {
      const suffix = attempt === 0 ? "" : attempt === 1 ? " (imported)" : ` (imported ${attempt})`;
      const name = base.slice(0, MAX_PROJECT_NAME_LENGTH - suffix.length).trim() + suffix;
      try {
        created = await deps.repository.create({ name, description: typeof loaded.project.description === "string" ? loaded.project.description.slice(0, 2000) : "" });
      } catch (error) {
        if (!(isEngineError(error) && error.details.reason === "duplicate")) throw error;
      }
    }
    if (!created) throw new EngineError("validation", `Every name from "${base}" to "${base} (imported 49)" is taken; rename a project and import again`, {});
    const document: ProjectFile = { ...loaded.project, name: created.name };
    await deps.documents.save(created.id, document, { baseRevision: 0, message: `Imported from ${fileName}` });
    return { ok: true, project: created, document, warnings: loaded.warnings };
  } catch (error) {
    // Leave nothing half-imported: drop the new project row if its document could not be saved.
    if (created) await deps.repository.remove(created.id).catch(() => undefined);
    return { ok: false, message: `${fileName} was not imported: ${isEngineError(error) ? error.message : String(error)}`, problems: problemsOf(error) };
  }
}

/** Reads a File (from an <input type="file"> or a drop) and imports it. */
export async function importProjectFile(file: Blob & { name?: string }, deps: ImportDependencies): Promise<ImportOutcome> {
  const fileName = file.name ?? "project file";
  if (file.size > MAX_IMPORT_BYTES) {
    return { ok: false, message: `${fileName} is ${file.size} bytes; project files are limited to ${MAX_IMPORT_BYTES} bytes`, problems: [{ path: "", message: "file too large" }] };
  }
  let text: string;
  try {
    text = await file.text();
  } catch (error) {
    return { ok: false, message: `${fileName} could not be read: ${(error as Error).message}`, problems: [{ path: "", message: "unreadable file" }] };
  }
  return importProjectText(text, fileName, deps);
}
