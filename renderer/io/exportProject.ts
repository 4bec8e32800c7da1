/**
 * Exporting a project, or one variant of it, as a project file ("loopwright-project" JSON) and
 * offering it as a download (a Blob behind a temporary link; the same works in Electron, whose
 * session asks where to save).
 */
import { EngineError } from "../../shared-engine/errors";
import type { ProjectFile } from "../../shared-engine/api/contract";

/** The file text of a whole project: two-space indented JSON with a final newline, for clean diffs. */
export function projectFileText(document: ProjectFile): string {
  return JSON.stringify(document, null, 2) + "\n";
}

/**
 * A project file holding just one variant and the plant it is built on, plus the project's
 * requirements and the sign-offs of that variant (so a reviewer sees what it was checked
 * against). The variant is marked as the baseline and its `parent` is dropped when the parent
 * is not in the file.
 */
export function singleVariantDocument(document: ProjectFile, variantId: string): ProjectFile {
  const variant = document.variants.find((v) => v.id === variantId);
  if (!variant) throw new EngineError("invalid-argument", `variantId "${variantId}" names no variant of this project`, { field: "variantId" });
  const plant = document.plants.find((p) => p.id === variant.plant);
  if (!plant) throw new EngineError("validation", `variant "${variantId}" names plant "${variant.plant}", which the project does not have`, { path: `variants.plant` });
  const copy = structuredClone(variant);
  copy.baseline = true;
  delete copy.parent;
  const out: ProjectFile = {
    format: document.format,
    version: document.version,
    name: `${document.name} — ${variant.name ?? variant.id}`,
    ...(document.description ? { description: document.description } : {}),
    plants: [structuredClone(plant)],
    variants: [copy],
  };
  if (document.requirements && document.requirements.length > 0) out.requirements = structuredClone(document.requirements);
  const signOffs = (document.signOffs ?? []).filter((s) => s.variant === variantId);
  if (signOffs.length > 0) out.signOffs = structuredClone(signOffs);
  return out;
}

/** A file name from a title: letters, digits, dot, dash and underscore, ending in .loopwright.json. */
export function exportFileName(title: string): string {
  const stem = title
    .normalize("NFKD")
    .replace(/[\u0300-\u036f]/g, "")
    .replace(/[^A-Za-z0-9._-]+/g, "-")
    .replace(/^-+|-+$/g, "")
    .slice(0, 80);
  return `${stem || "project"}.loopwright.json`;
}

/** Offers `text` as a download named `fileName` through a temporary Blob URL (browser and Electron renderer). */
export function downloadText(text: string, fileName: string, mimeType = "application/json", doc: Document = document): void {
  const url = URL.createObjectURL(new Blob([text], { type: mimeType }));
  const anchor = doc.createElement("a");
  anchor.href = url;
  anchor.download = fileName;
  anchor.rel = "noopener";
  anchor.style.display = "none";
  doc.body.appendChild(anchor);
  anchor.click();
  anchor.remove();
  // Revoke later: some browsers read the URL after click() returns.
  setTimeout(() => URL.revokeObjectURL(url), 10_000);
}

export function exportProject(document: ProjectFile): void {
  downloadText(projectFileText(document), exportFileName(document.name));
}

export function exportVariant(document: ProjectFile, variantId: string): void {
  const single = singleVariantDocument(document, variantId);
  downloadText(projectFileText(single), exportFileName(single.name));
}
