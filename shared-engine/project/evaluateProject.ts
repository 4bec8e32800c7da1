/**
 * Evaluates every variant of a loaded project (or one, by id). Each variant is designed
 * independently: one that fails carries its error and the others are still designed.
 */
import { EngineError } from "../errors";
import { ENGINE_VERSION } from "../version";
import { evaluateVariant } from "./evaluateVariant";
import type { LoadedProject } from "./loadProject";
import type { DesignRunResult } from "./result";

export function evaluateProject(loaded: LoadedProject, options: { variant?: string } = {}): DesignRunResult {
  const { project } = loaded;
  const chosen = options.variant === undefined ? project.variants : project.variants.filter((v) => v.id === options.variant);
  if (options.variant !== undefined && chosen.length === 0) {
    throw new EngineError("invalid-argument", `No variant "${options.variant}" in the project; variants are: ${project.variants.map((v) => v.id).join(", ") || "none"}`, {
      variant: options.variant,
    });
  }
  const variants = chosen.map((variant) => {
    const variantIndex = project.variants.indexOf(variant);
    const plantIndex = project.plants.findIndex((p) => p.id === variant.plant);
    return evaluateVariant(project.plants[plantIndex]!, variant, { requirements: project.requirements, variantIndex, plantIndex });
  });
  return { format: "loopwright-design-result", engineVersion: ENGINE_VERSION, project: project.name, variants, warnings: loaded.warnings };
}
