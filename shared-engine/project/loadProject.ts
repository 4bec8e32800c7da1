/**
 * From the text of a project file to a validated project: hostile-content checks, migration
 * from older versions, then validation with JSON paths. Nothing is computed before all three
 * pass.
 */
import { type Finding } from "./checker";
import type { ProjectFile } from "./format";
import { migrateProject } from "./migrations";
import { checkPlainJson, parseProjectJson } from "./safeJson";
import { validateProject } from "./validateProject";

export interface LoadedProject {
  project: ProjectFile;
  warnings: Finding[];
  fromVersion: number;
}

export function loadProjectText(text: string): LoadedProject {
  return loadProjectValue(parseProjectJson(text), true);
}

/** For data already parsed (database records, structured clones): the same checks. */
export function loadProjectValue(value: unknown, alreadyChecked = false): LoadedProject {
  if (!alreadyChecked) checkPlainJson(value);
  const migrated = migrateProject(value);
  const { project, warnings } = validateProject(migrated.project);
  const all = migrated.migrated
    ? [{ path: "version", message: `migrated from format version ${migrated.fromVersion}` }, ...warnings]
    : warnings;
  return { project, warnings: all, fromVersion: migrated.fromVersion };
}
