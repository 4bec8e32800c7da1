/**
 * The pipeline's discretization step: when a variant asks for it, the plant model is sampled
 * (zero-order hold or Tustin) and the sampled matrices are reported in `result.discrete`.
 */
import { discretize, type StateSpace } from "../model";
import { atPath } from "./buildPlant";
import type { VariantSpec } from "./format";
import type { VariantResult } from "./result";
import { rows } from "./resultJson";

/**
 * The model the rest of the pipeline designs for: `model` itself, or its sampled form when
 * `variant.discretize` is set (then `result.discrete` is filled). The file format's "bilinear"
 * is the engine's "tustin". Errors carry the path `<vpath>.discretize`.
 */
export function discretizeForVariant(model: StateSpace, variant: VariantSpec, vpath: string, result: VariantResult): StateSpace {
  if (!variant.discretize) return model;
  const d = variant.discretize;
  const method = d.method === "bilinear" ? "tustin" : d.method;
  const sampled = atPath(`${vpath}.discretize`, () => discretize(model, d.sampleTime, { method, prewarpRadPerSec: d.prewarpRadPerSec }));
  result.discrete = {
    A: rows(sampled.A), B: rows(sampled.B), C: rows(sampled.C), D: rows(sampled.D),
    ...(sampled.F.columns > 0 ? { F: rows(sampled.F), E: rows(sampled.E) } : {}),
    sampleTime: d.sampleTime,
    method,
  };
  return sampled;
}
