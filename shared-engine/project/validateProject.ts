/**
 * Validation of a project file (format "loopwright-project"): structure, types, matrix shapes
 * and cross-references, every problem reported with its JSON path. Runs after parseProjectJson
 * (hostile-content checks) and migrateProject (older versions), before anything is computed.
 * This file checks the top level, requirements and sign-offs; plants are checked in
 * validatePlant.ts (zero-pole-gain in validateZeroPoleGain.ts, equations in
 * validateNonlinear.ts), variants in validateVariant.ts, shared pieces in validationParts.ts.
 */
import { EngineError } from "../errors";
import { Checker, type Finding } from "./checker";
import { PROJECT_FORMAT, PROJECT_VERSION, type PlantSpec, type ProjectFile, type VariantSpec } from "./format";
import type { PlantDims } from "./validateNonlinear";
import { checkPlant } from "./validatePlant";
import { checkVariant } from "./validateVariant";
import { checkId } from "./validationParts";

export { ID_PATTERN } from "./validationParts";

export interface ValidatedProject {
  project: ProjectFile;
  warnings: Finding[];
}

/** Validates and returns the project (the same data, unknown keys still present but ignored). */
export function validateProject(value: unknown): ValidatedProject {
  const c = new Checker();
  const top = c.object(value, [], ["format", "version", "name", "description", "plants", "variants", "requirements", "notes", "signOffs"]);
  if (!top) throw validationError(c);
  if (top.format !== PROJECT_FORMAT) c.problem(["format"], `must be "${PROJECT_FORMAT}", is ${JSON.stringify(top.format)}`);
  if (top.version !== PROJECT_VERSION) c.problem(["version"], `must be ${PROJECT_VERSION} after migration, is ${JSON.stringify(top.version)}`);
  c.string(top.name, ["name"], { nonEmpty: true, maxLength: 200 });
  c.string(top.description, ["description"], { optional: true });
  c.string(top.notes, ["notes"], { optional: true });

  const plantDims = new Map<string, PlantDims>();
  const plants = c.array(top.plants, ["plants"], { nonEmpty: true }) ?? [];
  plants.forEach((plant, i) => {
    const dims = checkPlant(c, plant, ["plants", i]);
    const id = (plant as PlantSpec | null)?.id;
    if (typeof id === "string") {
      if (plantDims.has(id)) c.problem(["plants", i, "id"], `duplicate plant id "${id}"`);
      else if (dims) plantDims.set(id, dims);
      else plantDims.set(id, { n: -1, m: -1, p: -1, q: -1, outputs: [], discrete: false });
    }
  });

  const variantIds = new Set<string>();
  const variants = c.array(top.variants, ["variants"]) ?? [];
  variants.forEach((variant, i) => {
    checkVariant(c, variant, ["variants", i], plantDims);
    const id = (variant as VariantSpec | null)?.id;
    if (typeof id === "string") {
      if (variantIds.has(id)) c.problem(["variants", i, "id"], `duplicate variant id "${id}"`);
      variantIds.add(id);
    }
  });

  const requirements = c.array(top.requirements, ["requirements"], { optional: true }) ?? [];
  requirements.forEach((req, i) => {
    const r = c.object(req, ["requirements", i], ["id", "metric", "min", "max", "description"]);
    if (!r) return;
    checkId(c, r.id, ["requirements", i, "id"]);
    c.string(r.metric, ["requirements", i, "metric"], { nonEmpty: true });
    const min = c.number(r.min, ["requirements", i, "min"], { optional: true });
    const max = c.number(r.max, ["requirements", i, "max"], { optional: true });
    if (r.min === undefined && r.max === undefined) c.problem(["requirements", i], "needs a min, a max, or both");
    if (min !== undefined && max !== undefined && min > max) c.problem(["requirements", i], `min ${min} is above max ${max}`);
    c.string(r.description, ["requirements", i, "description"], { optional: true });
  });

  const signOffs = c.array(top.signOffs, ["signOffs"], { optional: true }) ?? [];
  signOffs.forEach((s, i) => {
    const so = c.object(s, ["signOffs", i], ["variant", "role", "name", "date", "fingerprint", "comment"]);
    if (!so) return;
    const v = c.string(so.variant, ["signOffs", i, "variant"], { nonEmpty: true });
    if (v !== undefined && !variantIds.has(v)) c.problem(["signOffs", i, "variant"], `names no variant ("${v}")`);
    c.oneOf(so.role, ["signOffs", i, "role"], ["prepared", "reviewed", "approved"] as const);
    c.string(so.name, ["signOffs", i, "name"], { nonEmpty: true, maxLength: 200 });
    c.string(so.date, ["signOffs", i, "date"], { nonEmpty: true });
    c.string(so.fingerprint, ["signOffs", i, "fingerprint"], { nonEmpty: true });
    c.string(so.comment, ["signOffs", i, "comment"], { optional: true });
  });

  if (c.problems.length > 0) throw validationError(c);
  return { project: top as unknown as ProjectFile, warnings: c.warnings };
}

function validationError(c: Checker): EngineError {
  const shown = c.problems.slice(0, 8).map((p) => `${p.path}: ${p.message}`);
  const more = c.problems.length > shown.length ? `\n(and ${c.problems.length - shown.length} more)` : "";
  return new EngineError("validation", `The project is not valid:\n${shown.join("\n")}${more}`, {
    problems: c.problems,
    warnings: c.warnings,
  });
}
