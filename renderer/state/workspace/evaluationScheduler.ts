/**
 * The workspace store's evaluation path: every edit re-evaluates the active variant through the
 * bridge, debounced and latest-wins (a newer edit aborts the previous request and its late
 * result is discarded). Live edits (dragging a pole) are throttled instead, one request in
 * flight, and ask for a drag preview ("project.previewVariant") shown over the last full
 * result's plant report; the full evaluation runs once the gesture settles.
 */
import type { EngineBridge, VariantResult } from "../../../shared-engine/api/contract";
import { stepHorizon, variantForDisplay } from "./designHelpers";
import { findPlant } from "./documentEdits";
import { activeVariantOf, type WorkspaceState } from "./workspaceState";

export interface EvaluationContext {
  bridge: EngineBridge;
  /** Debounce of evaluation after an edit (ms). */
  evaluateDelay: number;
  /** Quiet time after the last live edit before the full evaluation runs (ms). */
  settleDelay: number;
  now: () => number;
  onResult?: (result: VariantResult, durationMs: number, kind: "preview" | "full") => void;
  getState(): WorkspaceState;
  update(patch: Partial<WorkspaceState>): void;
}

export interface EvaluationScheduler {
  /** Sends the active variant now (full evaluation unless `live`). */
  send(live: boolean): void;
  /** An edit happened: debounce a full evaluation, or (live) send a throttled preview. */
  schedule(live: boolean): void;
  /** A live gesture ended: run the full evaluation now if a preview is shown or pending. */
  settle(): void;
  /** Stops timers and the request in flight; the shown result stays. */
  cancel(): void;
  dispose(): void;
}

function messageOf(error: unknown): string {
  return error instanceof Error ? error.message : String(error);
}

export function createEvaluationScheduler(ctx: EvaluationContext): EvaluationScheduler {
  const { update, now } = ctx;
  let evaluateTimer: ReturnType<typeof setTimeout> | null = null;
  let inFlight: { seq: number; controller: AbortController; live: boolean } | null = null;
  let liveDirty = false;
  let settleTimer: ReturnType<typeof setTimeout> | null = null;
  // The plant spec and result of the last full evaluation: a preview reuses its plant report,
  // which is valid only while the plant spec is the very same object (edits replace, never mutate).
  let lastFull: { variantId: string; plant: unknown; result: VariantResult } | null = null;
  let disposed = false;

  function clearEvaluateTimer(): void {
    if (evaluateTimer !== null) clearTimeout(evaluateTimer);
    evaluateTimer = null;
  }

  function clearSettleTimer(): void {
    if (settleTimer !== null) clearTimeout(settleTimer);
    settleTimer = null;
  }

  function send(live: boolean, refit = false): void {
    clearEvaluateTimer();
    if (!live) clearSettleTimer();
    const state = ctx.getState();
    const doc = state.document;
    const variant = activeVariantOf(state);
    if (!doc || !variant) {
      update({ evaluation: { ...state.evaluation, status: "idle" } });
      return;
    }
    if (inFlight) inFlight.controller.abort();
    const seq = ctx.getState().evaluation.sent + 1;
    const controller = new AbortController();
    inFlight = { seq, controller, live };
    liveDirty = false;
    const shown = ctx.getState().evaluation;
    const lastResult = shown.variantId === variant.id ? shown.result : null;
    let plant;
    try {
      plant = findPlant(doc, variant.plant);
    } catch (error) {
      inFlight = null;
      update({ evaluation: { ...ctx.getState().evaluation, status: "failed", error: messageOf(error), sent: seq } });
      return;
    }
    const started = now();
    const horizon = stepHorizon(variant, lastResult);
    const display = variantForDisplay(variant, lastResult);
    const base = live && lastFull && lastFull.variantId === variant.id && lastFull.plant === plant && !lastFull.result.error ? lastFull : null;
    update({ evaluation: { ...ctx.getState().evaluation, status: "running", sent: seq } });
    const answer: Promise<{ result: VariantResult; kind: "preview" | "full" }> = base
      ? ctx.bridge.request("project.previewVariant", { plant, variant: display }, { signal: controller.signal }).then((preview) => {
          const { preview: isPreview, ...fields } = preview;
          if (!isPreview) return { result: fields, kind: "full" as const };
          // Plant report from the last full run (same plant object); margins and checks that need
          // them are left out rather than shown stale.
          return { result: { ...fields, ...(base.result.plant ? { plant: base.result.plant } : {}) }, kind: "preview" as const };
        })
      : ctx.bridge.request("project.evaluateVariant", { plant, variant: display, requirements: doc.requirements }, { signal: controller.signal }).then((result) => ({ result, kind: "full" as const }));
    answer
      .then(
        ({ result, kind }) => {
          if (kind === "full" && !controller.signal.aborted && inFlight?.seq === seq) lastFull = { variantId: variant.id, plant, result };
          finish(seq, controller, variant.id, { result, kind }, now() - started);
          // The first answer for a variant without its own step times used a guessed horizon;
          // when the response had not settled and the result suggests a longer one, ask once more.
          if (!refit && inFlight === null && evaluateTimer === null && !variant.step && ctx.getState().evaluation.result === result && stepHorizon(variant, result) > 1.5 * horizon) {
            send(live, true);
          }
        },
        (error: unknown) => finish(seq, controller, variant.id, { error }, now() - started),
      );
  }

  function finish(seq: number, controller: AbortController, variantId: string, outcome: { result?: VariantResult; kind?: "preview" | "full"; error?: unknown }, durationMs: number): void {
    if (disposed) return;
    const latest = inFlight?.seq === seq;
    const evaluation = ctx.getState().evaluation;
    if (controller.signal.aborted || !latest) {
      // Superseded: a newer request was sent after this one. Its answer describes a document
      // that no longer exists, so showing it would contradict the editor.
      update({ evaluation: { ...evaluation, discarded: evaluation.discarded + 1 } });
      return;
    }
    const wasLive = inFlight?.live ?? false;
    inFlight = null;
    const pending = evaluateTimer !== null;
    if (outcome.result) {
      const r = outcome.result;
      const kind = outcome.kind ?? "full";
      update({
        evaluation: { ...evaluation, status: pending ? "waiting" : "done", result: r, variantId, error: r.error ? r.error.message : null, durationMs, preview: kind === "preview" },
      });
      ctx.onResult?.(r, durationMs, kind);
    } else {
      const error = outcome.error as { kind?: string } | undefined;
      if (error?.kind === "cancelled") {
        update({ evaluation: { ...evaluation, status: "idle" } });
      } else {
        update({ evaluation: { ...evaluation, status: pending ? "waiting" : "failed", variantId, error: messageOf(outcome.error), durationMs } });
      }
    }
    if (wasLive && liveDirty) send(true);
  }

  function settle(): void {
    clearSettleTimer();
    if (ctx.getState().evaluation.preview || inFlight?.live || liveDirty) send(false);
  }

  function schedule(live: boolean): void {
    if (live) {
      clearSettleTimer();
      settleTimer = setTimeout(settle, ctx.settleDelay);
      if (inFlight?.live) {
        liveDirty = true; // sent when the one in flight returns (throttle, latest wins)
        return;
      }
      send(true);
      return;
    }
    clearEvaluateTimer();
    // A newer edit makes the running request stale: cancel it now rather than when it returns.
    if (inFlight) {
      inFlight.controller.abort();
    }
    update({ evaluation: { ...ctx.getState().evaluation, status: "waiting" } });
    evaluateTimer = setTimeout(() => send(false), ctx.evaluateDelay);
  }

  return {
    send: (live) => send(live),
    schedule,
    settle,
    cancel() {
      clearEvaluateTimer();
      clearSettleTimer();
      if (inFlight) {
        inFlight.controller.abort();
        inFlight = null;
      }
      update({ evaluation: { ...ctx.getState().evaluation, status: "idle", error: "Cancelled; the plots show the last finished result." } });
    },
    dispose() {
      disposed = true;
      clearEvaluateTimer();
      clearSettleTimer();
      inFlight?.controller.abort();
    },
  };
}
