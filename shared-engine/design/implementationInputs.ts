/**
 * Argument checks of `controllerImplementation`: the sample period, the measured-states
 * requirement of an observer-less export, gain shapes, the integrated-output selection and
 * plain number vectors. Each throws a typed EngineError naming the argument.
 */
import { Matrix } from "ml-matrix";
import { EngineError } from "../errors";
import { asMatrix, requireFinite, shapeOf, type MatrixInput } from "../linalg";
import type { StateSpace } from "../model";

/**
 * The period the controller runs at: the requested one for a continuous design (required), the
 * design's own for a sampled one (a different requested period is refused).
 */
export function periodOf(model: StateSpace, requested: number | undefined): number {
  if (requested !== undefined && !(typeof requested === "number" && Number.isFinite(requested) && requested > 0)) {
    throw new EngineError("invalid-argument", `sampleTime is ${String(requested)}; it must be a positive finite number of seconds`, { argument: "sampleTime" });
  }
  if (model.sampleTime === null) {
    if (requested === undefined) throw new EngineError("invalid-argument", "the design is continuous: give the sample period T (seconds) at which the controller will run", { argument: "sampleTime" });
    return requested;
  }
  if (requested !== undefined && Math.abs(requested - model.sampleTime) > 1e-12 * model.sampleTime) {
    throw new EngineError("invalid-argument", `the design is sampled at ${model.sampleTime} s, so the controller runs at that period; the requested ${requested} s would need a new design`, { argument: "sampleTime" });
  }
  return model.sampleTime;
}

/** An export without observer reads every state: C must be the identity and D zero. */
export function requireMeasuredStates(model: StateSpace): void {
  const n = model.A.rows;
  const p = model.C.rows;
  if (p < n) {
    throw new EngineError("invalid-argument", `needs an observer: the plant measures ${p} of ${n} states, and state feedback without an observer reads every state (C = I)`, { measured: p, states: n });
  }
  const identity = p === n && model.C.to2DArray().every((row, i) => row.every((v, j) => v === (i === j ? 1 : 0)));
  const noFeedthrough = model.D.to2DArray().every((row) => row.every((v) => v === 0));
  if (!identity || !noFeedthrough) {
    throw new EngineError("invalid-argument", `needs an observer: state feedback without an observer reads the states directly (C = I, D = 0), but this plant's ${p} outputs are other combinations of the states and inputs`, { measured: p, states: n });
  }
}

/** S (r×p) selecting the integrated outputs (distinct indices from 0 to p − 1). */
export function selection(outputs: number[], p: number): Matrix {
  const S = new Matrix(outputs.length, p);
  const seen = new Set<number>();
  outputs.forEach((o, i) => {
    if (!Number.isInteger(o) || o < 0 || o >= p || seen.has(o)) {
      throw new EngineError("invalid-argument", `integratedOutputs[${i}] is ${String(o)}; it must be a distinct output index from 0 to ${p - 1}`, { argument: "integratedOutputs", index: i });
    }
    seen.add(o);
    S.set(i, o, 1);
  });
  return S;
}

/** `value` as a finite rows×cols matrix (a copy); an empty input stands for an empty shape. */
export function gain(value: MatrixInput, name: string, rows: number, cols: number): Matrix {
  const raw = asMatrix(value, name);
  const G = raw.rows === 0 && rows * cols === 0 ? new Matrix(rows, cols) : raw;
  if (G.rows !== rows || G.columns !== cols) throw new EngineError("shape-mismatch", `${name} must be ${rows}×${cols} (it is ${shapeOf(G)})`, { argument: name });
  requireFinite(G, name);
  return G.clone();
}

/** `v` must be an array of `length` finite numbers. */
export function checkVector(v: readonly number[], name: string, length: number): void {
  if (!Array.isArray(v) || v.length !== length) throw new EngineError("shape-mismatch", `${name} must have ${length} entries (it has ${Array.isArray(v) ? v.length : "none"})`, { argument: name });
  v.forEach((x, i) => {
    if (typeof x !== "number" || !Number.isFinite(x)) throw new EngineError("non-finite", `${name}[${i}] is ${String(x)}; it must be a finite number`, { argument: name, index: i });
  });
}
