/**
 * Small conversions from engine values to the plain JSON of a VariantResult, shared by the full
 * pipeline (evaluateVariant) and the drag preview so both write the same fields the same way.
 */
import type { Matrix } from "ml-matrix";
import type { Complex } from "../linalg";
import type { StateSpace } from "../model";
import type { ComplexJson, VariantResult } from "./result";

/** A matrix as an array of rows (a copy). */
export const rows = (m: Matrix): number[][] => m.to2DArray();

/** Complex numbers as plain `{ re, im }` records (copies). */
export const complexList = (list: readonly Complex[]): ComplexJson[] => list.map((c) => ({ re: c.re, im: c.im }));

/**
 * Whether every pole is strictly stable: Re p < 0 for a continuous model (sampleTime null),
 * |p| < 1 for a sampled one. Poles on the boundary count as unstable.
 */
export function isStable(poles: readonly Complex[], sampleTime: number | null): boolean {
  return sampleTime === null ? poles.every((p) => p.re < 0) : poles.every((p) => Math.hypot(p.re, p.im) < 1);
}

/** The closed loop as reported in `result.closedLoop` (all matrices and names, copied). */
export function closedLoopJson(loop: StateSpace): NonNullable<VariantResult["closedLoop"]> {
  return {
    A: rows(loop.A), B: rows(loop.B), C: rows(loop.C), D: rows(loop.D), F: rows(loop.F), E: rows(loop.E),
    sampleTime: loop.sampleTime,
    names: {
      states: [...loop.names.states],
      inputs: [...loop.names.inputs],
      outputs: [...loop.names.outputs],
      disturbances: [...loop.names.disturbances],
    },
  };
}
