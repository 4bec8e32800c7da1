/**
 * Long engine requests (nonlinear simulation, robustness sweep, root locus, parameter loci) with
 * progress and Cancel, in plain TypeScript: `run(params)` in, immutable snapshots out.
 *
 * - Latest wins: a new run aborts the one in flight (AbortController); a late answer of an
 *   aborted or superseded run is dropped, so the state always describes the newest request.
 * - Progress shown is monotonic within one run: the bridge may repeat or reorder fractions
 *   (IPC, worker hops); the bar never moves backwards. A new run starts again at 0.
 * - Cancel leaves a consistent state: status "cancelled", the previous finished result kept (the
 *   plots keep showing it), no run in flight.
 */
import type { EngineBridge, EngineMethod, EngineParams, EngineResult } from "../../../shared-engine/api/contract";

export interface LongTaskState<M extends EngineMethod> {
  status: "idle" | "running" | "done" | "failed" | "cancelled";
  /** Fraction done in [0, 1] of the run in flight (1 after success). */
  progress: number;
  /** The engine's short description of the current step. */
  progressLabel: string;
  /** The last finished result (kept through later runs, cancels and failures). */
  result: EngineResult<M> | null;
  /** Parameters of `result`. */
  resultParams: EngineParams<M> | null;
  error: string | null;
  /** Runs started so far (sequence number of the newest). */
  runs: number;
  /** Late answers dropped because a newer run or a cancel came first. */
  dropped: number;
}

export interface LongTask<M extends EngineMethod> {
  getState(): LongTaskState<M>;
  subscribe(listener: () => void): () => void;
  /** Starts a run (aborting the one in flight); resolves when this run settles, whatever its outcome. */
  run(params: EngineParams<M>): Promise<void>;
  cancel(): void;
  /** Forgets the result (e.g. when the variant it described changed). */
  reset(): void;
  dispose(): void;
}

function messageOf(error: unknown): string {
  return error instanceof Error ? error.message : String(error);
}

export function createLongTask<M extends EngineMethod>(bridge: EngineBridge, method: M): LongTask<M> {
  let state: LongTaskState<M> = { status: "idle", progress: 0, progressLabel: "", result: null, resultParams: null, error: null, runs: 0, dropped: 0 };
  const listeners = new Set<() => void>();
  let inFlight: { seq: number; controller: AbortController } | null = null;
  let disposed = false;

  function update(patch: Partial<LongTaskState<M>>): void {
    if (disposed) return;
    state = { ...state, ...patch };
    for (const listener of [...listeners]) listener();
  }

  async function run(params: EngineParams<M>): Promise<void> {
    inFlight?.controller.abort();
    const seq = state.runs + 1;
    const controller = new AbortController();
    inFlight = { seq, controller };
    update({ status: "running", progress: 0, progressLabel: "starting", error: null, runs: seq });
    const current = () => inFlight?.seq === seq && !controller.signal.aborted;
    try {
      const result = await bridge.request(method, params, {
        signal: controller.signal,
        onProgress: (p) => {
          if (!current()) return;
          const fraction = Math.min(1, Math.max(0, Number.isFinite(p.fraction) ? p.fraction : 0));
          if (fraction < state.progress) return; // never backwards within a run
          update({ progress: fraction, progressLabel: p.label });
        },
      });
      if (!current()) {
        update({ dropped: state.dropped + 1 });
        return;
      }
      inFlight = null;
      update({ status: "done", progress: 1, progressLabel: "done", result, resultParams: params, error: null });
    } catch (error) {
      if (!current()) {
        update({ dropped: state.dropped + 1 });
        return;
      }
      inFlight = null;
      if ((error as { kind?: string } | null)?.kind === "cancelled") update({ status: "cancelled", error: null });
      else update({ status: "failed", error: messageOf(error) });
    }
  }

  return {
    getState: () => state,
    subscribe(listener) {
      listeners.add(listener);
      return () => listeners.delete(listener);
    },
    run,
    cancel() {
      if (!inFlight) return;
      inFlight.controller.abort();
      inFlight = null;
      update({ status: "cancelled", error: null, progressLabel: "cancelled" });
    },
    reset() {
      inFlight?.controller.abort();
      inFlight = null;
      update({ status: "idle", progress: 0, progressLabel: "", result: null, resultParams: null, error: null });
    },
    dispose() {
      inFlight?.controller.abort();
      inFlight = null;
      disposed = true;
      listeners.clear();
    },
  };
}
