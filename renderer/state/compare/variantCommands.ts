/**
 * Pure commands on the variants of a project document: duplicate, rename, describe, mark the
 * baseline, and edit with the lock rule. Each returns a new document and never changes its input,
 * so the workspace's undo stack can keep before/after pairs.
 *
 * Baseline rule: a document with variants has exactly one baseline (`baseline: true`); the
 * others carry no `baseline` field. Lock rule: a variant named by any sign-off is locked, because
 * the sign-off's fingerprint certifies that exact specification; editing a locked variant leaves
 * it as it is and creates a new variant whose `parent` is the locked one.
 */
import { EngineError } from "../../../shared-engine/errors";
import type { ProjectFile, VariantSpec } from "../../../shared-engine/api/contract";

/** Longest variant name accepted (after trimming), in characters. */
export const MAX_VARIANT_NAME_LENGTH = 80;
/** Longest variant description accepted, in characters. */
export const MAX_VARIANT_DESCRIPTION_LENGTH = 2000;

export interface VariantCommandResult {
  document: ProjectFile;
  /** The variant the command produced or changed (the new one after a duplicate or a fork). */
  variantId: string;
  /** True when an edit of a locked variant created a new variant instead. */
  forked: boolean;
}

function copyOf(document: ProjectFile): ProjectFile {
  return structuredClone(document);
}

function indexOfVariant(document: ProjectFile, variantId: string): number {
  const index = document.variants.findIndex((v) => v.id === variantId);
  if (index < 0) {
    throw new EngineError("invalid-argument", `variantId "${variantId}" names no variant of this project (known: ${document.variants.map((v) => v.id).join(", ") || "none"})`, {
      field: "variantId",
      variantId,
    });
  }
  return index;
}

/** The display name of a variant: its name, else its id. */
export function variantLabel(variant: VariantSpec): string {
  return variant.name && variant.name.trim().length > 0 ? variant.name : variant.id;
}

/** Ids of the variants named by a sign-off (locked against editing). */
export function lockedVariantIds(document: ProjectFile): Set<string> {
  return new Set((document.signOffs ?? []).map((s) => s.variant));
}

export function isVariantLocked(document: ProjectFile, variantId: string): boolean {
  return lockedVariantIds(document).has(variantId);
}

/** `base`, or `base-2`, `base-3`, ... : the first id not used by a variant (or a plant, to keep ids readable). */
export function freshVariantId(document: ProjectFile, base: string): string {
  const taken = new Set(document.variants.map((v) => v.id));
  const stem = base.replace(/[^A-Za-z0-9_.-]+/g, "-").replace(/^-+|-+$/g, "") || "variant";
  if (!taken.has(stem)) return stem;
  for (let k = 2; k < 10_000; k++) if (!taken.has(`${stem}-${k}`)) return `${stem}-${k}`;
  throw new EngineError("invalid-argument", `no free variant id starting with "${stem}" (10 000 tried)`, { base });
}

/** The id of the baseline variant: the one marked, else the first; null when there are no variants. */
export function baselineVariantId(document: ProjectFile): string | null {
  return (document.variants.find((v) => v.baseline === true) ?? document.variants[0])?.id ?? null;
}

/** Returns a copy where exactly one variant (the marked one, else the first) is the baseline. */
export function normaliseBaseline(document: ProjectFile): ProjectFile {
  const next = copyOf(document);
  const keep = baselineVariantId(next);
  for (const v of next.variants) {
    if (v.id === keep) v.baseline = true;
    else delete v.baseline;
  }
  return next;
}

/** Marks `variantId` as the one baseline (clearing the mark on every other variant). */
export function setBaseline(document: ProjectFile, variantId: string): VariantCommandResult {
  indexOfVariant(document, variantId);
  const next = copyOf(document);
  for (const v of next.variants) {
    if (v.id === variantId) v.baseline = true;
    else delete v.baseline;
  }
  return { document: next, variantId, forked: false };
}

/**
 * Inserts a copy of `variantId` right after it: new id, name "<name> (copy)", `parent` set to the
 * source, never the baseline, no sign-offs (they certify the source only).
 */
export function duplicateVariant(document: ProjectFile, variantId: string, options: { name?: string } = {}): VariantCommandResult {
  const index = indexOfVariant(document, variantId);
  const next = normaliseBaseline(document);
  const source = next.variants[index]!;
  const copy: VariantSpec = structuredClone(source);
  copy.id = freshVariantId(next, `${source.id}-copy`);
  copy.name = options.name !== undefined ? checkedName(options.name) : `${variantLabel(source)} (copy)`.slice(0, MAX_VARIANT_NAME_LENGTH);
  copy.parent = source.id;
  delete copy.baseline;
  next.variants.splice(index + 1, 0, copy);
  return { document: next, variantId: copy.id, forked: false };
}

// C0/C1 control characters: a variant name is one line of plain text.
const CONTROL_CHARACTER = /[\u0000-\u001f\u007f-\u009f]/;

function checkedName(name: unknown): string {
  if (typeof name !== "string") throw new EngineError("validation", `The variant name must be text (it was ${typeof name})`, { field: "name", reason: "not-text" });
  const trimmed = name.normalize("NFC").trim();
  if (trimmed.length === 0) throw new EngineError("validation", "The variant name is empty; type at least one visible character", { field: "name", reason: "empty" });
  if (trimmed.length > MAX_VARIANT_NAME_LENGTH) {
    throw new EngineError("validation", `The variant name has ${trimmed.length} characters; at most ${MAX_VARIANT_NAME_LENGTH} are allowed`, { field: "name", reason: "too-long" });
  }
  if (CONTROL_CHARACTER.test(trimmed)) throw new EngineError("validation", "The variant name contains a line break or tab; use one line of plain text", { field: "name", reason: "control-character" });
  return trimmed;
}

/** Applies `change` to the variant, or, when it is locked, to a new variant whose `parent` is it. */
export function editVariant(document: ProjectFile, variantId: string, change: (variant: VariantSpec) => void): VariantCommandResult {
  const index = indexOfVariant(document, variantId);
  if (isVariantLocked(document, variantId)) {
    const forked = duplicateVariant(document, variantId);
    const target = forked.document.variants.find((v) => v.id === forked.variantId)!;
    target.name = `${variantLabel(document.variants[index]!)} (revised)`.slice(0, MAX_VARIANT_NAME_LENGTH);
    change(target);
    // The change must not move the new variant off its lineage or its id.
    target.id = forked.variantId;
    target.parent = variantId;
    return { document: forked.document, variantId: forked.variantId, forked: true };
  }
  const next = copyOf(document);
  const target = next.variants[index]!;
  change(target);
  target.id = variantId;
  return { document: next, variantId, forked: false };
}

export function renameVariant(document: ProjectFile, variantId: string, name: string): VariantCommandResult {
  const checked = checkedName(name);
  return editVariant(document, variantId, (v) => {
    v.name = checked;
  });
}

/** Sets (or, with an empty text, removes) the variant's description. */
export function describeVariant(document: ProjectFile, variantId: string, description: string): VariantCommandResult {
  if (typeof description !== "string") throw new EngineError("validation", "The variant description must be text", { field: "description", reason: "not-text" });
  const text = description.normalize("NFC").trim();
  if (text.length > MAX_VARIANT_DESCRIPTION_LENGTH) {
    throw new EngineError("validation", `The variant description has ${text.length} characters; at most ${MAX_VARIANT_DESCRIPTION_LENGTH} are allowed`, {
      field: "description",
      reason: "too-long",
    });
  }
  return editVariant(document, variantId, (v) => {
    if (text) v.description = text;
    else delete v.description;
  });
}
