/**
 * The read check for `documents` and `revisions` rows: stored data is untrusted (another version
 * or a damaged profile may have written it). This checks the envelope and the document's outline
 * here, without the engine; the full project-file validation runs through the bridge
 * ("project.load") when a document is opened for computing. Failures are EngineError kind
 * "validation" naming the record and the field path.
 */
import { EngineError } from "../../shared-engine/errors";
import type { ProjectFile } from "../../shared-engine/api/contract";
import type { StoredDocument } from "./documentStore";

export function readStoredDocument(value: unknown, path: string): StoredDocument {
  const fail = (field: string, rule: string): never => {
    throw new EngineError("validation", `${path}.${field} ${rule}`, { path: `${path}.${field}` });
  };
  if (value === null || typeof value !== "object") throw new EngineError("validation", `${path} is not a record`, { path });
  const r = value as Record<string, unknown>;
  if (typeof r.projectId !== "string" || r.projectId.length === 0) fail("projectId", "must be non-empty text");
  if (typeof r.revision !== "number" || !Number.isInteger(r.revision) || r.revision < 1) fail("revision", "must be a whole number ≥ 1");
  if (typeof r.savedAt !== "number" || !Number.isFinite(r.savedAt)) fail("savedAt", "must be a finite time in milliseconds");
  const d = r.document as Record<string, unknown> | null;
  if (d === null || typeof d !== "object" || Array.isArray(d)) fail("document", "must be a project document (an object)");
  if (d!.format !== "loopwright-project") fail("document.format", 'must be "loopwright-project"');
  if (typeof d!.name !== "string") fail("document.name", "must be text");
  if (!Array.isArray(d!.plants)) fail("document.plants", "must be a list");
  if (!Array.isArray(d!.variants)) fail("document.variants", "must be a list");
  return {
    projectId: r.projectId as string,
    revision: r.revision as number,
    savedAt: r.savedAt as number,
    document: structuredClone(d) as unknown as ProjectFile,
  };
}
