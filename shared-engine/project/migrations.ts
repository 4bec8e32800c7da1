/**
 * Migrations of project files from older format versions to PROJECT_VERSION. Each step takes
 * the plain JSON of version k and returns version k+1; steps never lose user data (unknown
 * content is carried along). WARNING: a migration, once released, must never change: files in
 * version control depend on it. Add a new step instead.
 */
import { EngineError } from "../errors";
import { PROJECT_FORMAT, PROJECT_VERSION } from "./format";

export type Migration = (project: Record<string, unknown>) => Record<string, unknown>;

/** MIGRATIONS[k] turns version k into version k+1. Version 1 is the first released format. */
export const MIGRATIONS: Readonly<Record<number, Migration>> = {};

export interface MigrationResult {
  project: Record<string, unknown>;
  fromVersion: number;
  migrated: boolean;
}

export function migrateProject(
  value: unknown,
  migrations: Readonly<Record<number, Migration>> = MIGRATIONS,
  target: number = PROJECT_VERSION,
): MigrationResult {
  if (value === null || typeof value !== "object" || Array.isArray(value)) {
    throw new EngineError("validation", "(top level): a project file must be a JSON object", { path: "" });
  }
  const project = value as Record<string, unknown>;
  if (project.format !== PROJECT_FORMAT) {
    throw new EngineError("validation", `format: this is not a Loopwright project (expected "format": "${PROJECT_FORMAT}", found ${JSON.stringify(project.format)})`, {
      path: "format",
    });
  }
  const version = project.version;
  if (typeof version !== "number" || !Number.isInteger(version) || version < 1) {
    throw new EngineError("validation", `version: must be a whole number from 1, is ${JSON.stringify(version)}`, { path: "version" });
  }
  if (version > target) {
    throw new EngineError("validation", `version: the file is format version ${version}, newer than this Loopwright reads (${target}); update Loopwright to open it`, {
      path: "version",
    });
  }
  let current: Record<string, unknown> = project;
  for (let k = version; k < target; k++) {
    const step = migrations[k];
    if (!step) throw new EngineError("internal", `No migration from project version ${k} to ${k + 1}`, { version: k });
    current = { ...step(current), version: k + 1 };
  }
  return { project: current, fromVersion: version, migrated: version !== target };
}
