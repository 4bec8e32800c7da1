/**
 * Shared by `analyze`, `discretize` and `locus`: read a project file, pick one plant by id, and
 * return its model as the bridge's plain JSON (the commands then call the engine dispatcher,
 * exactly as the workbench does). Also a few plain-text helpers for their tables.
 */
import { buildPlantModel, loadProjectText, type PlantSpec } from "../../shared-engine/project";
import { stateSpaceToSpec } from "../../shared-engine/model";
import type { FullModelJson } from "../../shared-engine/api";
import { formatReal } from "../../shared-engine/format";
import { CliError, EXIT, usageError, type CliIo } from "./io";

export interface ProjectPlant {
  plant: PlantSpec;
  /** Index of the plant in the file (for messages with JSON paths). */
  index: number;
  model: FullModelJson;
  warnings: { path: string; message: string }[];
}

export async function readProjectPlant(path: string, plantId: string | undefined, io: CliIo, command: string): Promise<ProjectPlant> {
  let text: string;
  try {
    text = await io.readFile(path);
  } catch (error) {
    const code = (error as { code?: string }).code;
    throw usageError(`cannot read ${path}${code === "ENOENT" ? ": no such file" : code ? ` (${code})` : ""}`);
  }
  const loaded = loadProjectText(text);
  const plants = loaded.project.plants;
  if (plantId === undefined) {
    if (plants.length === 1) plantId = plants[0]!.id;
    else throw usageError(`${command} needs --plant ID (plants in ${path}: ${plants.map((p) => p.id).join(", ")})`);
  }
  const index = plants.findIndex((p) => p.id === plantId);
  if (index < 0) {
    throw new CliError(`no plant "${plantId}" in ${path}; plants are: ${plants.map((p) => p.id).join(", ") || "none"}`, EXIT.failure);
  }
  const plant = plants[index]!;
  const model = stateSpaceToSpec(buildPlantModel(plant.model, `plants[${index}].model`)) as FullModelJson;
  return { plant, index, model, warnings: loaded.warnings };
}

/** Rows of a matrix as aligned text, one line per row. */
export function matrixLines(m: number[][], indent: string, digits = 6): string[] {
  if (m.length === 0 || m[0]!.length === 0) return [`${indent}(empty: ${m.length}×${m[0]?.length ?? 0})`];
  const cells = m.map((row) => row.map((v) => formatReal(v, digits)));
  const width = Math.max(1, ...cells.flat().map((c) => c.length));
  return cells.map((row) => `${indent}[ ${row.map((c) => c.padStart(width)).join("  ")} ]`);
}

export function optionalNumber(value: number | null | undefined, unit = "", digits = 6): string {
  return value === null || value === undefined ? "none" : `${formatReal(value, digits)}${unit}`;
}

export function printJson(io: CliIo, value: unknown): void {
  io.stdout(`${JSON.stringify(value, null, 2)}\n`);
}
