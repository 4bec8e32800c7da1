/**
 * The main-process end of the engine bridge: one `ipcMain.handle` for requests, one listener
 * for cancellations, and progress reports sent back to the requesting web contents. Every
 * argument from the renderer is treated as hostile: the sender frame is checked, the payload
 * must be small plain data with a known method, and the answer is always an `Envelope` (errors
 * as `{ kind, message, details }`), never a throw across IPC.
 */
import { EngineError, toErrorPayload } from "../shared-engine/errors";
import {
  ENGINE_METHODS,
  IPC_CHANNELS,
  isEngineMethod,
  type EngineBridge,
  type EngineMethod,
  type Envelope,
  type Progress,
} from "../shared-engine/api/contract";
import type { IpcProgressPayload, IpcRequestPayload } from "../shared-engine/api/preloadApi";
import type { SenderFrameLike } from "./guards";

/** Limits on what one request may carry. */
export const IPC_LIMITS = {
  /** Largest request, as JSON text length (about 4 MiB: a 300×300 matrix is ~1.8 MB). */
  maxPayloadChars: 4 * 1024 * 1024,
  /** Deepest nesting of arrays/objects in params (a matrix needs 2). */
  maxDepth: 32,
} as const;

/** Keys refused anywhere in a payload: they could pollute prototypes in careless consumers. */
const FORBIDDEN_KEYS = new Set(["__proto__", "constructor", "prototype"]);

export interface IpcSender {
  readonly id: number;
  send(channel: string, payload: IpcProgressPayload): void;
  isDestroyed(): boolean;
}

export interface IpcEventLike {
  readonly sender: IpcSender;
  readonly senderFrame: SenderFrameLike | null | undefined;
}

/** The slice of Electron's `ipcMain` used here. */
export interface IpcMainLike {
  handle(channel: string, listener: (event: IpcEventLike, ...args: unknown[]) => Promise<unknown>): void;
  removeHandler(channel: string): void;
  on(channel: string, listener: (event: IpcEventLike, ...args: unknown[]) => void): unknown;
  removeListener(channel: string, listener: (event: IpcEventLike, ...args: unknown[]) => void): unknown;
}

/**
 * Checks one request argument from the renderer and returns it typed, or throws EngineError
 * ("invalid-argument" or "unknown-method") naming the field and the violated property.
 */
export function validateIpcRequest(raw: unknown, limits: { maxPayloadChars: number; maxDepth: number } = IPC_LIMITS): IpcRequestPayload & { method: EngineMethod } {
  if (!isPlainObject(raw)) throw invalid("the request must be a plain object { requestId, method, params }", { field: "request" });
  for (const key of Object.keys(raw)) {
    if (key !== "requestId" && key !== "method" && key !== "params") {
      throw invalid(`the request has an unexpected field ${JSON.stringify(key)}; allowed: requestId, method, params`, { field: key });
    }
  }
  const { requestId, method, params } = raw as Record<string, unknown>;
  if (!isRequestId(requestId)) throw invalid("requestId must be a non-zero safe integer", { field: "requestId" });
  if (!isEngineMethod(method)) {
    throw new EngineError("unknown-method", `Unknown engine request ${describe(method)}; known: ${ENGINE_METHODS.join(", ")}`, {
      method: typeof method === "string" ? method.slice(0, 100) : typeof method,
    });
  }
  if (!isPlainObject(params)) throw invalid(`${method}: params must be a plain object`, { field: "params", method });
  // Walk before measuring: JSON.stringify would throw on a cycle and hide non-JSON values.
  checkPlainData(params, "params", 1, limits.maxDepth, new Set());
  const size = JSON.stringify(params).length;
  if (size > limits.maxPayloadChars) {
    throw invalid(`${method}: params are ${size} characters as JSON; at most ${limits.maxPayloadChars} are accepted`, {
      field: "params",
      size,
      limit: limits.maxPayloadChars,
    });
  }
  return { requestId, method, params };
}

export function isRequestId(value: unknown): value is number {
  return typeof value === "number" && Number.isSafeInteger(value) && value !== 0;
}

function checkPlainData(value: unknown, path: string, depth: number, maxDepth: number, ancestors: Set<object>): void {
  if (value === null || typeof value === "boolean" || typeof value === "string") return;
  if (typeof value === "number") return; // finiteness is the dispatcher's check (it names the entry)
  if (typeof value !== "object") throw invalid(`${path} is a ${typeof value}; only JSON data is accepted`, { field: path });
  if (depth > maxDepth) throw invalid(`${path} is nested deeper than ${maxDepth} levels`, { field: path, limit: maxDepth });
  if (ancestors.has(value)) throw invalid(`${path} refers back to itself; only tree-shaped JSON data is accepted`, { field: path });
  ancestors.add(value);
  if (Array.isArray(value)) {
    if (Object.getPrototypeOf(value) !== Array.prototype) throw invalid(`${path} is not a plain array`, { field: path });
    for (let i = 0; i < value.length; i++) checkPlainData(value[i], `${path}[${i}]`, depth + 1, maxDepth, ancestors);
  } else {
    if (!isPlainObject(value)) throw invalid(`${path} is not a plain object (typed arrays, dates, maps are not accepted)`, { field: path });
    for (const key of Object.keys(value)) {
      if (FORBIDDEN_KEYS.has(key)) throw invalid(`${path} has the forbidden key ${JSON.stringify(key)}`, { field: `${path}.${key}` });
      checkPlainData((value as Record<string, unknown>)[key], `${path}.${key}`, depth + 1, maxDepth, ancestors);
    }
  }
  ancestors.delete(value);
}

function isPlainObject(value: unknown): value is Record<string, unknown> {
  if (value === null || typeof value !== "object" || Array.isArray(value)) return false;
  const proto = Object.getPrototypeOf(value);
  return proto === Object.prototype || proto === null;
}

function invalid(message: string, details: Record<string, unknown>): EngineError {
  return new EngineError("invalid-argument", message, details);
}

function describe(value: unknown): string {
  return typeof value === "string" ? JSON.stringify(value.slice(0, 100)) : `of type ${value === null ? "null" : typeof value}`;
}

/**
 * Registers the engine IPC handlers and returns a disposer that removes them and cancels every
 * request still in flight.
 *
 * - IPC_CHANNELS.request (invoke): `{ requestId, method, params }` → `Envelope`.
 * - IPC_CHANNELS.cancel (send): `{ requestId }` → the request resolves as `cancelled`.
 * - IPC_CHANNELS.progress (to the sender): `{ requestId, progress }`.
 * Request ids are scoped per web contents, so one page can neither cancel nor observe another's.
 */
export function registerEngineIpc(
  ipcMain: IpcMainLike,
  host: EngineBridge,
  isTrustedSender: (frame: SenderFrameLike | null | undefined) => boolean,
  limits: { maxPayloadChars: number; maxDepth: number } = IPC_LIMITS,
): () => void {
  const inFlight = new Map<string, AbortController>();
  const keyOf = (sender: IpcSender, requestId: number): string => `${sender.id}:${requestId}`;

  const onRequest = async (event: IpcEventLike, ...args: unknown[]): Promise<Envelope<unknown>> => {
    try {
      if (!trusted(event)) {
        throw new EngineError("forbidden", "the request came from a frame outside the app origin and was refused", { reason: "untrusted-sender" });
      }
      if (args.length !== 1) throw invalid(`the request must be one argument; got ${args.length}`, { field: "request" });
      const request = validateIpcRequest(args[0], limits);
      const key = keyOf(event.sender, request.requestId);
      if (inFlight.has(key)) {
        throw invalid(`requestId ${request.requestId} is already in flight`, { field: "requestId", requestId: request.requestId });
      }
      const controller = new AbortController();
      inFlight.set(key, controller);
      try {
        const result = await host.request(request.method, request.params as never, {
          signal: controller.signal,
          onProgress: (progress: Progress) => sendProgress(event.sender, request.requestId, progress),
        });
        return { ok: true, result };
      } finally {
        inFlight.delete(key);
      }
    } catch (error) {
      return { ok: false, error: toErrorPayload(error) };
    }
  };

  const onCancel = (event: IpcEventLike, ...args: unknown[]): void => {
    try {
      if (!trusted(event)) return;
      const payload = args[0];
      if (!isPlainObject(payload) || !isRequestId(payload.requestId)) return;
      inFlight.get(keyOf(event.sender, payload.requestId))?.abort();
    } catch {
      // A malformed cancel is ignored: there is nothing to answer it with.
    }
  };

  function trusted(event: IpcEventLike): boolean {
    try {
      return isTrustedSender(event?.senderFrame);
    } catch {
      return false;
    }
  }

  function sendProgress(sender: IpcSender, requestId: number, progress: Progress): void {
    try {
      if (!sender.isDestroyed()) sender.send(IPC_CHANNELS.progress, { requestId, progress: { fraction: progress.fraction, label: progress.label } });
    } catch {
      // The page went away between the check and the send; progress is best-effort.
    }
  }

  ipcMain.handle(IPC_CHANNELS.request, onRequest);
  ipcMain.on(IPC_CHANNELS.cancel, onCancel);
  return () => {
    ipcMain.removeHandler(IPC_CHANNELS.request);
    ipcMain.removeListener(IPC_CHANNELS.cancel, onCancel);
    for (const controller of inFlight.values()) controller.abort();
    inFlight.clear();
  };
}
