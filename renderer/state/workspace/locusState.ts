/**
 * Root locus and parameter loci of the active variant, in plain TypeScript: which loop, the
 * three long requests (each with progress and Cancel through `LongTask`), and the picked gain or
 * parameter value with the closed-loop poles there.
 *
 * Loops (single input, single output only):
 *   - "plant": the plant's first input to its first output, u = −k·y;
 *   - "designed": the state-feedback loop broken at the plant input, L = K(sI − A)⁻¹B, so the
 *     designed closed loop sits at k = 1 (integrators, observers and feedforward left out).
 */
import type { ComplexValue, EngineBridge, LqrWeightLocusParams, ModelJson, ObserverSpeedLocusParams, PlantSpec, ProjectFile, RootLocusParams, VariantResult, VariantSpec } from "../../../shared-engine/api/contract";
import { createLongTask, type LongTask } from "./longTask";

export type LocusLoop = "plant" | "designed";

interface LinearModel {
  A: number[][];
  B: number[][];
  C: number[][];
  D: number[][];
  sampleTime: number | null;
}

/** The linear model the variant was designed on (sampled when the variant discretizes). */
export function designModelOf(plant: PlantSpec | undefined, variant: VariantSpec, result: VariantResult | null, continuous = false): LinearModel {
  if (!continuous && result?.discrete) {
    const d = result.discrete;
    return { A: d.A, B: d.B, C: d.C, D: d.D, sampleTime: d.sampleTime };
  }
  const lin = result?.plant?.linearization;
  if (lin) return { A: lin.A, B: lin.B, C: lin.C, D: lin.D, sampleTime: null };
  if (plant?.model.type === "state-space") {
    const m = plant.model;
    const D = m.D ?? m.C.map(() => m.B[0]!.map(() => 0));
    return { A: m.A, B: m.B, C: m.C, D, sampleTime: continuous ? null : (m.sampleTime ?? null) };
  }
  throw new Error(`The locus needs the state-space form of plant ${variant.plant}; wait for the design to finish.`);
}

export function rootLocusParams(loop: LocusLoop, plant: PlantSpec | undefined, variant: VariantSpec, result: VariantResult | null): RootLocusParams {
  const m = designModelOf(plant, variant, result);
  const inputs = m.B[0]?.length ?? 0;
  if (loop === "plant") {
    if (inputs !== 1 || m.C.length !== 1) throw new Error(`The root locus needs one input and one output; this plant has ${inputs} inputs and ${m.C.length} outputs.`);
    const model: ModelJson = { A: m.A, B: m.B, C: m.C, D: m.D, sampleTime: m.sampleTime };
    return { model, pointsPerBranch: 200 };
  }
  const K = result?.gain?.K;
  if (!K) throw new Error("The designed loop needs the variant's gain K; wait for the design to finish.");
  if (K.length !== 1) throw new Error(`The root locus needs one input; this design has ${K.length}.`);
  const model: ModelJson = { A: m.A, B: m.B, C: K, D: [[0]], sampleTime: m.sampleTime };
  return { model, pointsPerBranch: 200 };
}

/** Closed-loop matrix of u = −k·y for a SISO model: A − k·B·C/(1 + k·d). */
export function closedLoopMatrix(model: ModelJson, k: number): number[][] {
  const d = model.D?.[0]?.[0] ?? 0;
  const denominator = 1 + k * d;
  if (Math.abs(denominator) < 1e-12) throw new Error(`At gain ${k} the loop is not well posed (1 + k·D = 0).`);
  const g = k / denominator;
  return model.A.map((row, i) => row.map((a, j) => a - g * model.B[i]![0]! * model.C[0]![j]!));
}

export function lqrWeightLocusParams(plant: PlantSpec | undefined, variant: VariantSpec, result: VariantResult | null): LqrWeightLocusParams {
  const sf = variant.stateFeedback;
  if (sf?.method !== "lqr") throw new Error("The weight locus needs an LQR design; this variant places poles.");
  const m = designModelOf(plant, variant, result);
  return { A: m.A, B: m.B, Q: sf.Q, R0: sf.R, rhoRange: [1e-3, 1e3], points: 121, sampleTime: m.sampleTime };
}

/** Nominal observer poles: the variant's own, else its observer's, else twice the state-feedback poles. */
export function observerSpeedLocusParams(plant: PlantSpec | undefined, variant: VariantSpec, result: VariantResult | null): ObserverSpeedLocusParams & { nominalFrom: string } {
  const m = designModelOf(plant, variant, result, true);
  const n = m.A.length;
  let poles: ComplexValue[];
  let nominalFrom: string;
  if (variant.observer?.method === "poles") {
    poles = variant.observer.poles.map((p) => (typeof p === "number" ? { re: p, im: 0 } : { re: p.re, im: p.im ?? 0 }));
    nominalFrom = "the variant's observer poles";
  } else if (result?.observerPoles?.length === n && !result.discrete) {
    poles = result.observerPoles;
    nominalFrom = "the variant's Kalman observer poles";
  } else {
    const designed = variant.stateFeedback?.method === "poles" ? variant.stateFeedback.poles.map((p) => (typeof p === "number" ? { re: p, im: 0 } : { re: p.re, im: p.im ?? 0 })) : null;
    // Common practice: an observer 2–5 times faster than the state-feedback loop.
    const base = designed ?? (result?.discrete ? null : result?.closedLoopPoles?.slice(0, n)) ?? Array.from({ length: n }, (_, i) => ({ re: -(i + 1), im: 0 }));
    poles = base.slice(0, n).map((p) => ({ re: 2 * p.re, im: 2 * p.im }));
    nominalFrom = "twice the state-feedback poles (this variant has no observer poles)";
  }
  return { A: m.A, C: m.C, poles, factorRange: [0.25, 8], points: 121, nominalFrom };
}

/** Index of the sweep value nearest to `value` (on a log scale: the sweeps are logarithmic). */
export function nearestIndex(values: readonly number[], value: number): number {
  let best = 0;
  const target = Math.log(Math.max(value, 1e-300));
  values.forEach((v, k) => {
    if (Math.abs(Math.log(Math.max(v, 1e-300)) - target) < Math.abs(Math.log(Math.max(values[best]!, 1e-300)) - target)) best = k;
  });
  return best;
}

export interface LocusPick {
  value: number;
  poles: ComplexValue[];
  status: "idle" | "working" | "done" | "failed";
  error: string | null;
}

export interface LocusState {
  loop: LocusLoop;
  gainPick: LocusPick | null;
  rhoPick: LocusPick | null;
  factorPick: LocusPick | null;
}

export interface LocusController {
  rootLocus: LongTask<"analysis.rootLocus">;
  lqrLocus: LongTask<"analysis.lqrWeightLocus">;
  observerLocus: LongTask<"analysis.observerSpeedLocus">;
  getState(): LocusState;
  subscribe(listener: () => void): () => void;
  setLoop(loop: LocusLoop): void;
  /** Closed-loop poles at gain k of the last root locus (exact eigenvalues, not interpolated). */
  pickGain(k: number): Promise<void>;
  /** Poles at the sweep point nearest to ρ (or to the factor). */
  pickRho(rho: number): void;
  pickFactor(factor: number): void;
  dispose(): void;
}

const emptyPick = (value: number, error: string): LocusPick => ({ value, poles: [], status: "failed", error });

export function createLocusController(bridge: EngineBridge): LocusController {
  const rootLocus = createLongTask(bridge, "analysis.rootLocus");
  const lqrLocus = createLongTask(bridge, "analysis.lqrWeightLocus");
  const observerLocus = createLongTask(bridge, "analysis.observerSpeedLocus");
  let state: LocusState = { loop: "designed", gainPick: null, rhoPick: null, factorPick: null };
  const listeners = new Set<() => void>();
  let pickSeq = 0;
  const update = (patch: Partial<LocusState>) => {
    state = { ...state, ...patch };
    for (const l of [...listeners]) l();
  };
  const pickFrom = (values: readonly number[] | undefined, branches: readonly ComplexValue[][] | undefined, value: number, what: string): LocusPick => {
    if (!values || !branches || values.length === 0) return emptyPick(value, `Compute the ${what} locus first.`);
    const k = nearestIndex(values, value);
    return { value: values[k]!, poles: branches.map((b) => b[k]!).filter(Boolean), status: "done", error: null };
  };
  return {
    rootLocus,
    lqrLocus,
    observerLocus,
    getState: () => state,
    subscribe(listener) {
      listeners.add(listener);
      return () => listeners.delete(listener);
    },
    setLoop(loop) {
      if (loop === state.loop) return;
      rootLocus.reset();
      update({ loop, gainPick: null });
    },
    async pickGain(k) {
      const params = rootLocus.getState().resultParams;
      if (!params) {
        update({ gainPick: emptyPick(k, "Compute the root locus first.") });
        return;
      }
      const seq = ++pickSeq;
      update({ gainPick: { value: k, poles: state.gainPick?.poles ?? [], status: "working", error: null } });
      try {
        const { eigenvalues } = await bridge.request("linalg.eigenvalues", { matrix: closedLoopMatrix(params.model, k) });
        if (seq === pickSeq) update({ gainPick: { value: k, poles: eigenvalues, status: "done", error: null } });
      } catch (error) {
        if (seq === pickSeq) update({ gainPick: emptyPick(k, error instanceof Error ? error.message : String(error)) });
      }
    },
    pickRho(rho) {
      const r = lqrLocus.getState().result;
      update({ rhoPick: pickFrom(r?.rho, r?.branches, rho, "weight") });
    },
    pickFactor(factor) {
      const r = observerLocus.getState().result;
      update({ factorPick: pickFrom(r?.factors, r?.branches, factor, "observer speed") });
    },
    dispose() {
      rootLocus.dispose();
      lqrLocus.dispose();
      observerLocus.dispose();
      listeners.clear();
    },
  };
}

/** The document's plant of a variant (undefined when missing). */
export function plantOfVariant(doc: ProjectFile, variant: VariantSpec): PlantSpec | undefined {
  return doc.plants.find((p) => p.id === variant.plant);
}
