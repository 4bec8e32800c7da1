/**
 * The bridge contract: every engine request, its parameters and its result, as plain
 * JSON-serialisable data. This module holds types only (plus the list of method names), so the
 * renderer can import it without pulling in any numerics.
 *
 * Two clients implement `EngineBridge`: the Electron IPC client (through the preload) and the
 * Web Worker client (browser mode). Both talk to the same dispatcher (`dispatcher.ts`).
 */
import type { ErrorPayload } from "../errors";
import type { PlantSpec, ProjectFile, RequirementSpec, SignOffSpec, VariantSpec } from "../project/format";
import type { DesignRunResult, VariantResult } from "../project/result";

import type * as MD from "./modelContractTypes";
import type * as AN from "./analysisContractTypes";
import type * as DS from "./designContractTypes";
import type * as NL from "./nonlinearContractTypes";
import type * as SV from "./servoContractTypes";
import type * as SIM from "./simulationContractTypes";

export type { PlantSpec, ProjectFile, RequirementSpec, SignOffSpec, VariantSpec, DesignRunResult, VariantResult };
export type * from "./contractTypes";
export type * from "./modelContractTypes";
export type * from "./analysisContractTypes";
export type * from "./designContractTypes";
export type * from "./nonlinearContractTypes";
export type * from "./servoContractTypes";
export type * from "./simulationContractTypes";

export interface ComplexNumber {
  re: number;
  im: number;
}

/** Every engine request: `params` in, `result` out. Add a method here, then to the dispatcher. */
export interface EngineMethods {
  /** Engine identity, for the about box, the design-sheet fingerprint and health checks. */
  "engine.info": {
    params: Record<string, never>;
    result: { name: "loopwright-engine"; version: string; methods: string[] };
  };
  /** Eigenvalues of a real square matrix (balanced, Hessenberg, Francis QR with a cap). */
  "linalg.eigenvalues": {
    params: { matrix: number[][] };
    result: { eigenvalues: ComplexNumber[] };
  };
  /** Parses, migrates and validates project-file text; problems carry JSON paths. */
  "project.load": {
    params: { text: string };
    result: { project: ProjectFile; warnings: { path: string; message: string }[]; fromVersion: number };
  };
  /** Designs one variant on one plant: the same pipeline as `loopwright design` and the sheet. */
  "project.evaluateVariant": {
    params: { plant: PlantSpec; variant: VariantSpec; requirements?: RequirementSpec[] };
    result: VariantResult;
  };
  /**
   * The lean pipeline behind a drag: gain, closed-loop poles, step and Bode only (no structure,
   * zeros, margins or requirement checks); `preview: false` when the full pipeline had to run.
   */
  "project.previewVariant": {
    params: { plant: PlantSpec; variant: VariantSpec };
    result: VariantResult & { preview: boolean };
  };
  /**
   * One variant's sampled controller as C99 source, the text `loopwright controller --format c`
   * writes (`sampleTime` only for a continuous design). `checksPassed` false: the file's header
   * says which implementation check failed.
   */
  "project.controllerSource": {
    params: { plant: PlantSpec; variant: VariantSpec; sampleTime?: number };
    result: { text: string; fileName: string; checksPassed: boolean; warnings: string[] };
  };
  /** Designs every variant (or one) of a whole project given as data. */
  "project.evaluate": {
    params: { project: unknown; variant?: string };
    result: DesignRunResult;
  };
  /** Realizes a transfer function (SISO or a transfer matrix) as a state-space model. */
  "model.fromTransferFunction": { params: MD.FromTransferFunctionParams; result: MD.ModelResult };
  /** Realizes zeros, poles and gain as a series of first- and second-order sections. */
  "model.fromZeroPoleGain": { params: MD.FromZeroPoleGainParams; result: MD.ModelResult };
  /** Samples a continuous model: zero-order hold, or Tustin with optional prewarping. */
  "model.discretize": { params: MD.DiscretizeParams; result: MD.DiscretizeResult };
  /** Poles, stability and DC gain. */
  "analysis.poles": { params: AN.ModelParams; result: AN.PolesResult };
  /** Controllability/observability with the failing modes, stabilizability, detectability. */
  "analysis.structure": { params: AN.StructureParams; result: AN.StructureResult };
  /** Transmission zeros (finite, infinite count, decoupling zeros) of a channel selection. */
  "analysis.zeros": { params: AN.ZerosParams; result: AN.ZerosResult };
  /** Real modal (block-diagonal) form and the mode/state coupling report. */
  "analysis.modalForm": { params: AN.ModelParams; result: AN.ModalFormResult };
  /** Controllability and observability Gramians and Hankel singular values (stable models). */
  "analysis.gramians": { params: AN.ModelParams; result: AN.GramiansResult };
  /** G(jω) (or G(e^{jωT})) on a given or automatic grid; null where unbounded. */
  "analysis.frequencyResponse": { params: AN.FrequencyResponseParams; result: AN.FrequencyResponseResult };
  /** Gain, phase, delay and disk margins and sensitivity peaks of a SISO loop. */
  "analysis.margins": { params: AN.MarginsParams; result: AN.MarginsResult };
  /** Step response and its metrics per output. */
  "analysis.step": { params: AN.StepParams; result: AN.StepResult };
  /** Response to a given input sequence u[k][j] (and optional disturbances, initial state). */
  "analysis.simulate": { params: SIM.SimulateParams; result: SIM.SimulationResult };
  /** Free response from an initial state x0 (no input). */
  "analysis.initial": { params: SIM.InitialParams; result: SIM.SimulationResult };
  /** Root locus of a SISO loop (or one channel): branches, asymptotes, break points, crossings. */
  "analysis.rootLocus": { params: AN.RootLocusParams; result: AN.RootLocusResult };
  /** State-feedback gain K with eig(A − BK) at the requested poles. */
  "design.placePoles": { params: DS.PlacePolesParams; result: DS.PlacePolesResult };
  /** Observer gain L with eig(A − LC) at the requested poles. */
  "design.observerPoles": { params: DS.ObserverPolesParams; result: DS.ObserverPolesResult };
  /** Continuous or discrete algebraic Riccati equation with optional cross weight N. */
  "design.riccati": { params: DS.RiccatiParams; result: DS.RiccatiResultJson };
  /** LQR gain, Riccati solution and (continuous, one input) loop margins. */
  "design.lqr": { params: DS.LqrParams; result: DS.LqrResultJson };
  /** Steady-state Kalman filter (continuous, or discrete predictor/current form). */
  "design.kalman": { params: DS.KalmanParams; result: DS.KalmanResultJson };
  /** Diagonal LQR weights from the largest acceptable state and input excursions. */
  "design.brysonWeights": { params: DS.BrysonParams; result: DS.BrysonResult };
  /** LQR gains and closed-loop poles along R = ρ·R₀ (reports progress, can be cancelled). */
  "design.lqrSweep": { params: DS.LqrSweepParams; result: DS.LqrSweepResult };
  /** Integral (servo) gains Kx, Ki by LQR or pole placement, with the servo DC-gain check. */
  "design.integral": { params: SV.IntegralDesignParams; result: SV.IntegralDesignResult };
  /** Reference feedforward N (u = −Kx + N r) with its nominal-model caveat. */
  "design.feedforward": { params: SV.FeedforwardParams; result: SV.FeedforwardResult };
  /** Observer-based compensator: controller, closed loop, separation and margin comparison. */
  "design.compensator": { params: SV.CompensatorParams; result: SV.CompensatorResult };
  /** Reduced-order (minimal-order) observer by pole placement. */
  "design.reducedObserver": { params: SV.ReducedObserverParams; result: SV.ReducedObserverResultJson };
  /** Closed-loop LQR poles as R = ρ·R0 varies (reports progress, can be cancelled). */
  "analysis.lqrWeightLocus": { params: SV.LqrWeightLocusParams; result: SV.LqrWeightLocusResult };
  /** Eigenvalues of A − L(f)C with observer poles f·poles (reports progress, can be cancelled). */
  "analysis.observerSpeedLocus": { params: SV.ObserverSpeedLocusParams; result: SV.ObserverSpeedLocusResult };
  /** Live check of typed equations: per-equation problems with columns; never fails on syntax. */
  "nonlinear.check": { params: NL.NonlinearCheckParams; result: NL.NonlinearCheckResult };
  /** Operating point (equilibrium plus output set-points) of a nonlinear plant. */
  "nonlinear.operatingPoint": { params: NL.NonlinearPlantParams; result: NL.OperatingPointResult };
  /** Exact linearization at the solved operating point. */
  "nonlinear.linearize": { params: NL.NonlinearPlantParams; result: NL.LinearizeResult };
  /** Closed-loop simulation of the nonlinear plant beside the linear prediction (progress, cancel). */
  "nonlinear.simulate": { params: NL.NonlinearSimulateParams; result: NL.NonlinearSimulateResult };
  /** Parameter sweep with the gain fixed: poles, stability, margins (progress, cancel). */
  "nonlinear.robustness": { params: NL.NonlinearRobustnessParams; result: NL.NonlinearRobustnessResult };
}

export type EngineMethod = keyof EngineMethods;
export type EngineParams<M extends EngineMethod> = EngineMethods[M]["params"];
export type EngineResult<M extends EngineMethod> = EngineMethods[M]["result"];

/** The method names, for validation at the process boundary. Keep in step with EngineMethods. */
export const ENGINE_METHODS: readonly EngineMethod[] = [
  "engine.info",
  "linalg.eigenvalues",
  "project.load",
  "project.evaluateVariant",
  "project.previewVariant",
  "project.evaluate",
  "project.controllerSource",
  "model.fromTransferFunction",
  "model.fromZeroPoleGain",
  "model.discretize",
  "analysis.poles",
  "analysis.structure",
  "analysis.zeros",
  "analysis.modalForm",
  "analysis.gramians",
  "analysis.frequencyResponse",
  "analysis.margins",
  "analysis.step",
  "analysis.simulate",
  "analysis.initial",
  "analysis.rootLocus",
  "design.placePoles",
  "design.observerPoles",
  "design.riccati",
  "design.lqr",
  "design.kalman",
  "design.brysonWeights",
  "design.lqrSweep",
  "design.integral",
  "design.feedforward",
  "design.compensator",
  "design.reducedObserver",
  "analysis.lqrWeightLocus",
  "analysis.observerSpeedLocus",
  "nonlinear.check",
  "nonlinear.operatingPoint",
  "nonlinear.linearize",
  "nonlinear.simulate",
  "nonlinear.robustness",
] as const;

export function isEngineMethod(value: unknown): value is EngineMethod {
  return typeof value === "string" && (ENGINE_METHODS as readonly string[]).includes(value);
}

/** Progress of a long request (sweeps, simulations): fraction in [0, 1] and a short label. */
export interface Progress {
  fraction: number;
  label: string;
}

/** Structural subset of AbortSignal, so the engine needs no DOM types. */
export interface CancelSignal {
  readonly aborted: boolean;
  addEventListener(type: "abort", listener: () => void): void;
  removeEventListener(type: "abort", listener: () => void): void;
}

export interface RequestOptions {
  signal?: CancelSignal;
  onProgress?: (progress: Progress) => void;
}

/** What the renderer holds. Rejections are always EngineError (kind, message, details). */
export interface EngineBridge {
  request<M extends EngineMethod>(method: M, params: EngineParams<M>, options?: RequestOptions): Promise<EngineResult<M>>;
}

// ---- Wire protocol shared by the Web Worker and the main process' worker thread ----------

export interface RequestMessage {
  type: "request";
  id: number;
  method: string;
  params: unknown;
}
export interface CancelMessage {
  type: "cancel";
  id: number;
}
export type ClientMessage = RequestMessage | CancelMessage;

export type ServerMessage =
  | { type: "result"; id: number; result: unknown }
  | { type: "error"; id: number; error: ErrorPayload }
  | { type: "progress"; id: number; progress: Progress };

/** What crosses Electron IPC: one invoke per request, answered by an envelope (never a throw). */
export type Envelope<T> = { ok: true; result: T } | { ok: false; error: ErrorPayload };

/** IPC channel names. Only these are exposed by the preload and handled by main. */
export const IPC_CHANNELS = {
  request: "loopwright:engine-request",
  cancel: "loopwright:engine-cancel",
  progress: "loopwright:engine-progress",
  /** Desktop only: print the design sheet to a PDF file the user picks (main/printIpc.ts). */
  printSheet: "loopwright:print-sheet",
} as const;
