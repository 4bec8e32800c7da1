/**
 * Input rules for project names and descriptions, and the check applied to every record read
 * back from the database (stored data is untrusted: another version or a damaged profile may
 * have written it). Failures are EngineError kind "validation" whose `details.reason` says which
 * rule failed and whose message names the field path.
 */
import { EngineError } from "../../shared-engine/errors";
import type { ProjectRecord } from "./database";
import { nameKeyOf } from "./schema";

/** Longest project name accepted, in characters (after trimming). Fits one list row at 1366 px. */
export const MAX_PROJECT_NAME_LENGTH = 120;
/** Longest description accepted, in characters. */
export const MAX_PROJECT_DESCRIPTION_LENGTH = 2000;

export type ProjectInputReason = "not-text" | "empty" | "too-long" | "control-character" | "duplicate" | "not-found";

export function projectInputError(reason: ProjectInputReason, field: string, message: string, extra: Record<string, unknown> = {}): EngineError {
  return new EngineError("validation", message, { field, reason, ...extra });
}

// C0/C1 control characters (tabs and newlines included): a name is one line of plain text.
const CONTROL_CHARACTER = /[\u0000-\u001f\u007f-\u009f]/;

/** Returns the trimmed, NFC-normalised name, or throws naming the rule it breaks. */
export function normaliseProjectName(value: unknown): string {
  if (typeof value !== "string") {
    throw projectInputError("not-text", "name", `The project name must be text (it was ${value === null ? "null" : typeof value})`);
  }
  const name = value.normalize("NFC").trim();
  if (name.length === 0) throw projectInputError("empty", "name", "The project name is empty; type at least one visible character");
  if (name.length > MAX_PROJECT_NAME_LENGTH) {
    throw projectInputError("too-long", "name", `The project name has ${name.length} characters; at most ${MAX_PROJECT_NAME_LENGTH} are allowed`, {
      length: name.length,
      limit: MAX_PROJECT_NAME_LENGTH,
    });
  }
  if (CONTROL_CHARACTER.test(name)) {
    throw projectInputError("control-character", "name", "The project name contains a line break, tab or other control character; use one line of plain text");
  }
  return name;
}

export function normaliseProjectDescription(value: unknown): string {
  if (value === undefined) return "";
  if (typeof value !== "string") throw projectInputError("not-text", "description", `The project description must be text (it was ${typeof value})`);
  const description = value.normalize("NFC").trim();
  if (description.length > MAX_PROJECT_DESCRIPTION_LENGTH) {
    throw projectInputError(
      "too-long",
      "description",
      `The project description has ${description.length} characters; at most ${MAX_PROJECT_DESCRIPTION_LENGTH} are allowed`,
      { length: description.length, limit: MAX_PROJECT_DESCRIPTION_LENGTH },
    );
  }
  return description;
}

/**
 * Checks a value read from the `projects` table. `path` names the record in messages, e.g.
 * `projects[3]`. Returns a fresh, plain copy (never the stored object).
 */
export function readProjectRecord(value: unknown, path: string): ProjectRecord {
  const fail = (field: string, rule: string): never => {
    throw new EngineError("validation", `${path}.${field} ${rule}`, { path: `${path}.${field}` });
  };
  if (value === null || typeof value !== "object") throw new EngineError("validation", `${path} is not a record`, { path });
  const r = value as Record<string, unknown>;
  if (typeof r.id !== "string" || r.id.length === 0) fail("id", "must be non-empty text");
  if (typeof r.name !== "string" || r.name.trim().length === 0) fail("name", "must be non-empty text");
  if (typeof r.description !== "string") fail("description", "must be text");
  for (const field of ["createdAt", "updatedAt"] as const) {
    if (typeof r[field] !== "number" || !Number.isFinite(r[field])) fail(field, "must be a finite time in milliseconds");
  }
  if (typeof r.isDemo !== "boolean") fail("isDemo", "must be true or false");
  const name = r.name as string;
  return {
    id: r.id as string,
    name,
    nameKey: typeof r.nameKey === "string" ? r.nameKey : nameKeyOf(name),
    description: r.description as string,
    createdAt: r.createdAt as number,
    updatedAt: r.updatedAt as number,
    isDemo: r.isDemo as boolean,
  };
}
