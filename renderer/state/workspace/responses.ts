/**
 * The Responses panel's state: which time response is shown (disturbance step, initial-condition
 * response, or a pasted input sequence), the model it runs on (the designed closed loop, or the
 * plant alone), the engine request for it, and the answer as a plot series. Plain TypeScript;
 * requests go through the bridge and are latest-wins (a newer run aborts the older one, and an
 * older answer that still arrives is dropped).
 *
 * The closed loop here is the plant under u = −K x + N r with measured states (N the reference
 * feedforward when the design has one, else I), with the control inputs appended as outputs:
 * outputs [y; u], y = (C − DK)x + DN r + E w, u = −Kx + N r. Integrators and observers of the
 * design are not in this loop; a note says so when the variant has them.
 */
import type { EngineBridge, ModelJson, PlantSpec, SimulationResult, StepParams, StepResult, VariantResult, VariantSpec } from "../../../shared-engine/api/contract";
import type { ResponseSeries } from "../../plots/responseModel";
import type { InputSequence } from "./inputSequence";

export type ResponseKind = "disturbance" | "initial" | "sequence";
export type ResponseTarget = "closed-loop" | "plant";

/** Samples of a continuous response grid (a sampled model uses its own instants). */
export const RESPONSE_POINTS = 501;
/** Most samples of a sampled model's grid. */
export const MAX_SAMPLED_POINTS = 5000;

export interface ResponseModel {
  model: ModelJson;
  /** Number of leading outputs that are plant outputs (the rest are control inputs). */
  plantOutputs: number;
  outputNames: string[];
  inputNames: string[];
  stateNames: string[];
  disturbanceNames: string[];
  sampleTime: number | null;
  notes: string[];
}

interface LinearPlant {
  A: number[][];
  B: number[][];
  C: number[][];
  D: number[][];
  F: number[][];
  E: number[][];
  sampleTime: number | null;
}

const zeros = (rows: number, cols: number) => Array.from({ length: rows }, () => new Array<number>(cols).fill(0));
const mul = (X: number[][], Y: number[][], cols: number) => X.map((row) => Array.from({ length: cols }, (_, j) => row.reduce((s, x, k) => s + x * (Y[k]?.[j] ?? 0), 0)));

/** The plant the design used (sampled when the variant discretizes), with F and E filled in. */
export function designPlantOf(plant: PlantSpec | undefined, result: VariantResult | null): LinearPlant | null {
  const fill = (m: { A: number[][]; B: number[][]; C: number[][]; D?: number[][]; F?: number[][]; E?: number[][] }, sampleTime: number | null, q: number): LinearPlant => ({
    A: m.A,
    B: m.B,
    C: m.C,
    D: m.D ?? zeros(m.C.length, m.B[0]?.length ?? 0),
    F: m.F ?? zeros(m.A.length, q),
    E: m.E ?? zeros(m.C.length, q),
    sampleTime,
  });
  const q = result?.plant?.dimensions.disturbances ?? 0;
  if (result?.discrete) return fill(result.discrete, result.discrete.sampleTime, result.discrete.F?.[0]?.length ?? q);
  const lin = result?.plant?.linearization;
  if (lin) return fill(lin, null, lin.F[0]?.length ?? q);
  if (plant?.model.type === "state-space") {
    const m = plant.model;
    return fill(m, m.sampleTime ?? null, m.F?.[0]?.length ?? 0);
  }
  return null;
}

/**
 * The model a response runs on. Closed loop: needs the design's K. Plant: the plant itself, its
 * outputs only. Throws an Error in words when the model is not available yet.
 */
export function responseModelOf(plant: PlantSpec | undefined, variant: VariantSpec, result: VariantResult | null, target: ResponseTarget): ResponseModel {
  const p = designPlantOf(plant, result);
  if (!p) throw new Error("The responses need the plant in state-space form; wait for the design to finish.");
  const n = p.A.length;
  const m = p.B[0]?.length ?? 0;
  // Names from the design run, else the state-space spec, else x1…, u1…, y1…, w1… (only when the counts match).
  const given = result?.plant?.names ?? (plant?.model.type === "state-space" ? plant.model.names : undefined);
  const pick = (list: string[] | undefined, count: number, prefix: string) => (list && list.length === count ? [...list] : Array.from({ length: count }, (_, i) => `${prefix}${i + 1}`));
  const stateNames = pick(given?.states, n, "x");
  const inputNames = pick(given?.inputs, m, "u");
  const outputNames = pick(given?.outputs, p.C.length, "y");
  const disturbanceNames = pick(given?.disturbances, p.F[0]?.length ?? 0, "w");
  const notes: string[] = [];
  if (target === "plant") {
    return {
      model: { A: p.A, B: p.B, C: p.C, D: p.D, F: p.F, E: p.E, sampleTime: p.sampleTime, names: { states: stateNames, inputs: inputNames, outputs: outputNames, disturbances: disturbanceNames } },
      plantOutputs: p.C.length,
      outputNames,
      inputNames,
      stateNames,
      disturbanceNames,
      sampleTime: p.sampleTime,
      notes: ["Open loop: the plant alone, no feedback."],
    };
  }
  // The design run's own closed loop (with its integrators and observer) when it has one.
  const cl = result?.closedLoop;
  if (cl && cl.C.length === p.C.length + m) {
    if (variant.integralAction) notes.push("The loop includes the design's integrators; the references drive the integrated outputs.");
    if (variant.observer) notes.push("The loop includes the design's observer: the controller sees only the measured outputs.");
    if (result?.gain?.referenceGain) notes.push("The reference enters through the design's feedforward gain N.");
    return {
      model: { A: cl.A, B: cl.B, C: cl.C, D: cl.D, F: cl.F, E: cl.E, sampleTime: cl.sampleTime, names: { ...cl.names } },
      plantOutputs: p.C.length,
      outputNames,
      inputNames,
      stateNames: [...cl.names.states],
      disturbanceNames: [...cl.names.disturbances],
      sampleTime: cl.sampleTime,
      notes,
    };
  }
  const K = result?.gain?.K;
  if (!K || K.length !== m || (K[0]?.length ?? 0) !== n) throw new Error("The closed loop needs the design's state-feedback gain K; wait for the design to finish.");
  const N = result?.gain?.referenceGain && result.gain.referenceGain.length === m ? result.gain.referenceGain : Array.from({ length: m }, (_, i) => Array.from({ length: m }, (_, j) => (i === j ? 1 : 0)));
  const r = N[0]?.length ?? m;
  const BK = mul(p.B, K, n);
  const DK = mul(p.D, K, n);
  const A = p.A.map((row, i) => row.map((a, j) => a - BK[i]![j]!));
  const Cy = p.C.map((row, i) => row.map((c, j) => c - DK[i]![j]!));
  const Cu = K.map((row) => row.map((k) => -k));
  const model: ModelJson = {
    A,
    B: mul(p.B, N, r),
    C: [...Cy, ...Cu],
    D: [...mul(p.D, N, r), ...N.map((row) => [...row])],
    F: p.F,
    E: [...p.E, ...zeros(m, p.F[0]?.length ?? 0)],
    sampleTime: p.sampleTime,
    names: {
      states: stateNames,
      inputs: (result?.gain?.referenceGain ? outputNames.slice(0, r) : inputNames).map((x) => `r_${x}`),
      outputs: [...outputNames, ...inputNames],
      disturbances: disturbanceNames,
    },
  };
  if (variant.integralAction) notes.push("The integrators of this design are left out here: the loop is the state feedback alone.");
  if (variant.observer) notes.push("States are taken as measured here: the observer of this design is left out.");
  if (result?.gain?.referenceGain) notes.push("The reference enters through the design's feedforward gain N.");
  return { model, plantOutputs: p.C.length, outputNames, inputNames, stateNames, disturbanceNames, sampleTime: p.sampleTime, notes };
}

/** Sample times over [0, horizon]: 501 points (continuous) or every sample instant (sampled, at most 5000). */
export function responseTimes(horizonSec: number, sampleTime: number | null): number[] {
  if (!(horizonSec > 0)) throw new Error("The horizon must be a positive number of seconds.");
  if (sampleTime === null) return Array.from({ length: RESPONSE_POINTS }, (_, k) => (horizonSec * k) / (RESPONSE_POINTS - 1));
  const count = Math.min(MAX_SAMPLED_POINTS, Math.max(2, Math.ceil(horizonSec / sampleTime - 1e-9) + 1));
  return Array.from({ length: count }, (_, k) => k * sampleTime);
}

/** The horizon to show: the variant's step horizon when it has one, else 10 s. */
export function responseHorizon(result: VariantResult | null): number {
  const t = result?.step?.time;
  const last = t && t.length > 1 ? t[t.length - 1]! : 0;
  return last > 0 ? last : 10;
}

export function disturbanceStepRequest(rm: ResponseModel, disturbance: number, horizonSec: number): StepParams {
  const q = rm.disturbanceNames.length;
  if (q === 0) throw new Error("This plant has no disturbance inputs (F has no columns).");
  if (!Number.isInteger(disturbance) || disturbance < 0 || disturbance >= q) throw new Error(`Disturbance ${disturbance + 1} does not exist; the plant has ${q}.`);
  return { model: rm.model, from: "disturbance", input: disturbance, times: responseTimes(horizonSec, rm.sampleTime) };
}

/** x0 from the typed offsets: one per state, every one a finite number. */
export function initialRequest(rm: ResponseModel, offsets: readonly number[], horizonSec: number): { model: ModelJson; x0: number[]; times: number[] } {
  const n = rm.stateNames.length;
  if (offsets.length !== n) throw new Error(`Give one offset per state: ${n} expected, ${offsets.length} given.`);
  offsets.forEach((v, i) => {
    if (!Number.isFinite(v)) throw new Error(`The offset of ${rm.stateNames[i]} is not a finite number.`);
  });
  if (offsets.every((v) => v === 0)) throw new Error("Every state offset is 0: the response would stay at rest. Type an offset for at least one state.");
  return { model: rm.model, x0: [...offsets], times: responseTimes(horizonSec, rm.sampleTime) };
}

export function sequenceRequest(rm: ResponseModel, sequence: InputSequence): { model: ModelJson; times: number[]; u: number[][] } {
  const width = rm.model.B[0]?.length ?? 0;
  if (sequence.values.some((row) => row.length !== width)) throw new Error(`The sequence needs ${width} input column(s) after the time column.`);
  return { model: rm.model, times: [...sequence.times], u: sequence.values.map((row) => [...row]) };
}

/** A shown response, shaped for ResponsePlot (output[i][k], control[j][k]). */
export interface ResponseData {
  kind: ResponseKind;
  target: ResponseTarget;
  title: string;
  time: number[];
  output: number[][];
  outputNames: string[];
  control: number[][];
  controlNames: string[];
  /**
   * Sample period (s) of the model the response ran on, null when continuous: the plot draws the
   * held control inputs as stairs and the outputs as markers at the sample instants.
   */
  sampleTime: number | null;
  /** Step metrics of the first output (disturbance step only). */
  metrics: { settlingTime: number | null; peak: number; peakTime: number; steadyStateValue: number | null } | null;
  notes: string[];
}

/** Splits an answer [y; u] into the outputs and control panels. */
export function responseData(kind: ResponseKind, target: ResponseTarget, rm: ResponseModel, answer: StepResult | SimulationResult, title: string): ResponseData {
  const p = rm.plantOutputs;
  const closed = target === "closed-loop";
  const control = closed ? answer.outputs.slice(p) : kind === "sequence" ? answer.inputs : [];
  const step = kind === "disturbance" ? (answer as StepResult).metrics[0] : undefined;
  return {
    kind,
    target,
    title,
    time: answer.time,
    output: answer.outputs.slice(0, p),
    outputNames: rm.outputNames,
    control,
    controlNames: control.length ? rm.inputNames : [],
    sampleTime: rm.sampleTime,
    metrics: step ? { settlingTime: step.settlingTimeSec, peak: step.peak, peakTime: step.peakTimeSec, steadyStateValue: step.steadyStateValue } : null,
    notes: [...rm.notes, ...answer.diagnostics.warnings],
  };
}

export interface ResponsesState {
  status: "idle" | "working" | "done" | "failed";
  data: ResponseData | null;
  error: string | null;
  /** Requests sent / answers dropped because a newer one was sent. */
  sent: number;
  discarded: number;
}

export interface ResponsesController {
  getState(): ResponsesState;
  subscribe(listener: () => void): () => void;
  disturbanceStep(rm: ResponseModel, target: ResponseTarget, disturbance: number, horizonSec: number): Promise<void>;
  initial(rm: ResponseModel, target: ResponseTarget, offsets: readonly number[], horizonSec: number): Promise<void>;
  sequence(rm: ResponseModel, target: ResponseTarget, sequence: InputSequence): Promise<void>;
  /** Shows a response computed elsewhere (VariantResult.disturbanceStep) without a request. */
  show(data: ResponseData): void;
  dispose(): void;
}

const messageOf = (e: unknown) => (e instanceof Error ? e.message : String(e));
const loopWord = (t: ResponseTarget) => (t === "closed-loop" ? "closed loop" : "plant alone");

export function createResponsesController(bridge: EngineBridge): ResponsesController {
  let state: ResponsesState = { status: "idle", data: null, error: null, sent: 0, discarded: 0 };
  const listeners = new Set<() => void>();
  let current: AbortController | null = null;
  const update = (patch: Partial<ResponsesState>) => {
    state = { ...state, ...patch };
    for (const l of [...listeners]) l();
  };
  async function run(build: () => { ask: (signal: AbortSignal) => Promise<StepResult | SimulationResult>; finish: (a: StepResult | SimulationResult) => ResponseData }): Promise<void> {
    current?.abort();
    const controller = new AbortController();
    current = controller;
    const seq = state.sent + 1;
    let job;
    try {
      job = build();
    } catch (error) {
      update({ status: "failed", error: messageOf(error), sent: seq });
      return;
    }
    update({ status: "working", error: null, sent: seq });
    try {
      const answer = await job.ask(controller.signal);
      if (current !== controller) return update({ discarded: state.discarded + 1 });
      update({ status: "done", data: job.finish(answer), error: null });
    } catch (error) {
      if (current !== controller) return update({ discarded: state.discarded + 1 });
      update({ status: "failed", error: messageOf(error) });
    } finally {
      if (current === controller) current = null;
    }
  }
  return {
    getState: () => state,
    subscribe(listener) {
      listeners.add(listener);
      return () => listeners.delete(listener);
    },
    disturbanceStep: (rm, target, disturbance, horizonSec) =>
      run(() => {
        const params = disturbanceStepRequest(rm, disturbance, horizonSec);
        return {
          ask: (signal) => bridge.request("analysis.step", params, { signal }),
          finish: (a) => responseData("disturbance", target, rm, a, `Disturbance step on ${rm.disturbanceNames[disturbance]} (${loopWord(target)})`),
        };
      }),
    initial: (rm, target, offsets, horizonSec) =>
      run(() => {
        const params = initialRequest(rm, offsets, horizonSec);
        return {
          ask: (signal) => bridge.request("analysis.initial", params, { signal }),
          finish: (a) => responseData("initial", target, rm, a, `Initial-condition response (${loopWord(target)})`),
        };
      }),
    sequence: (rm, target, sequence) =>
      run(() => {
        const params = sequenceRequest(rm, sequence);
        return {
          ask: (signal) => bridge.request("analysis.simulate", params, { signal }),
          finish: (a) => responseData("sequence", target, rm, a, `Input sequence (${loopWord(target)}, ${sequence.times.length} samples)`),
        };
      }),
    show(data) {
      current?.abort();
      current = null;
      update({ status: "done", data, error: null });
    },
    dispose() {
      current?.abort();
      current = null;
      listeners.clear();
    },
  };
}

/**
 * Sample period (s) of a design run's loop, null when continuous: the closed loop's own, else the
 * discretization's, else the (sampled) plant's (the comparison's resultSampleTime rule).
 */
export function sampleTimeOf(result: VariantResult | null): number | null {
  const t = result?.closedLoop?.sampleTime ?? result?.discrete?.sampleTime ?? result?.plant?.sampleTime ?? null;
  return typeof t === "number" && t > 0 ? t : null;
}

/**
 * The plot series of a shown response: one series named after the variant, in its palette slot,
 * sampled every `data.sampleTime` when the model is sampled; the input limits when there is one
 * control input (or one limit).
 */
export function responseSeriesOf(data: ResponseData, name: string, styleIndex: number, limits: readonly { lower: number | null; upper: number | null }[]): ResponseSeries {
  return {
    name,
    time: data.time,
    output: data.output,
    outputNames: data.outputNames,
    control: data.control.length ? data.control : undefined,
    controlNames: data.controlNames,
    metrics: data.metrics ? { peak: data.metrics.peak, peakTime: data.metrics.peakTime } : null,
    controlLimits: data.control.length === 1 || limits.length === 1 ? (limits[0] ?? null) : null,
    styleIndex,
    sampled: data.sampleTime !== null ? { period: data.sampleTime } : null,
  };
}

/** VariantResult.disturbanceStep as a shown response (no request needed). */
export function disturbanceStepFromResult(result: VariantResult, inputNames: readonly string[]): ResponseData | null {
  const d = result.disturbanceStep;
  if (!d) return null;
  return {
    kind: "disturbance",
    target: d.loop === "closed-loop" ? "closed-loop" : "plant",
    title: `Disturbance step on ${d.disturbance} of size ${d.size} (${d.loop === "closed-loop" ? "closed loop" : "plant alone"}, from the design run)`,
    time: d.time,
    output: d.output,
    outputNames: d.outputNames,
    control: d.control ?? [],
    controlNames: d.control ? [...inputNames] : [],
    sampleTime: sampleTimeOf(result),
    metrics: { settlingTime: d.settlingTime, peak: d.peakDeviation, peakTime: d.peakTime, steadyStateValue: d.steadyStateValue },
    notes: d.status === "settled" ? [] : [d.status === "unstable" ? "The loop is unstable: the response grows." : "The response has not settled within the horizon."],
  };
}

/**
 * Input limits the plant declares (equation-based plants: inputs[j].min/max), per input, in the
 * deviation variables the linear responses use: limit − u₀ at the solved operating point (when
 * the design run reports one; otherwise no limits, rather than limits on the wrong scale).
 */
export function inputLimitsOf(plant: PlantSpec | undefined, result: VariantResult | null = null): { lower: number | null; upper: number | null }[] {
  if (plant?.model.type !== "nonlinear") return [];
  const u0 = result?.plant?.operatingPoint?.inputs;
  if (!u0) return [];
  return plant.model.inputs.map((i) => {
    const at = u0[i.name] ?? 0;
    return { lower: i.min === undefined ? null : i.min - at, upper: i.max === undefined ? null : i.max - at };
  });
}
