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

export type { PlantSpec, ProjectFile, RequirementSpec, SignOffSpec, VariantSpec, DesignRunResult, VariantResult };

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
  /** Designs every variant (or one) of a whole project given as data. */
  "project.evaluate": {
    params: { project: unknown; variant?: string };
    result: DesignRunResult;
  };
}

export type EngineMethod = keyof EngineMethods;
export type EngineParams<M extends EngineMethod> = EngineMethods[M]["params"];
export type EngineResult<M extends EngineMethod> = EngineMethods[M]["result"];

/** The method names, for validation at the process boundary. Keep in step with EngineMethods. */
export const ENGINE_METHODS: readonly EngineMethod[] = ["engine.info", "linalg.eigenvalues", "project.load", "project.evaluateVariant", "project.evaluate"] as const;

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
} as const;
