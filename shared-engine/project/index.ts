/** Public surface of the project layer: the file format, its loader, and the one pipeline. */
export * from "./format";
export * from "./result";
export { loadProjectText, loadProjectValue, type LoadedProject } from "./loadProject";
export { parseProjectJson, checkPlainJson, formatPath, PROJECT_LIMITS } from "./safeJson";
export { migrateProject, MIGRATIONS } from "./migrations";
export { validateProject } from "./validateProject";
export { evaluateVariant, RICCATI_RESIDUAL_LIMIT, type EvaluateOptions } from "./evaluateVariant";
export { evaluateProject } from "./evaluateProject";
export { previewVariant, previewCovers, type VariantPreview } from "./preview";
export { REQUIREMENT_METRICS, checkRequirements } from "./requirements";
export { buildPlantModel } from "./buildPlant";
export { fingerprint, canonicalJson, sha256Hex, utf8Bytes, FINGERPRINT_PREFIX } from "./fingerprint";
export { controllerSource, cDoubleLiteral, CONTROLLER_CAUTIONS, type ControllerSource } from "./controllerSource";
