// Helpers shared by the bridge request tests: run a request through the dispatcher (checking
// the result is plain JSON), expect a typed failure, and record progress for cancellation.
import { expect } from "vitest";
import { dispatch, type EngineMethod, type EngineResult, type RequestContext } from "../../../shared-engine/api";
import { EngineError } from "../../../shared-engine/errors";

export async function call<M extends EngineMethod>(method: M, params: unknown, context?: RequestContext): Promise<EngineResult<M>> {
  const result = (await dispatch(method, params, context)) as EngineResult<M>;
  expect(JSON.parse(JSON.stringify(result))).toEqual(result);
  return result;
}

export async function failure(method: string, params: unknown, context?: RequestContext): Promise<EngineError> {
  try {
    await dispatch(method, params, context);
  } catch (error) {
    expect(error).toBeInstanceOf(EngineError);
    return error as EngineError;
  }
  throw new Error(`${method} was expected to fail`);
}

/** Records progress fractions; cancels once `cancelAfter` reports have arrived (never when undefined). */
export function recorder(cancelAfter?: number): { context: RequestContext; fractions: number[] } {
  const fractions: number[] = [];
  return {
    fractions,
    context: { isCancelled: () => cancelAfter !== undefined && fractions.length >= cancelAfter, reportProgress: (p) => fractions.push(p.fraction) },
  };
}

/** More than `moreThan` reports, each in [0, 1], never decreasing, ending at 1. */
export function expectMonotonicFractions(fractions: number[], moreThan = 1): void {
  expect(fractions.length).toBeGreaterThan(moreThan);
  fractions.forEach((f, i) => {
    expect(f).toBeGreaterThanOrEqual(0);
    expect(f).toBeLessThanOrEqual(1);
    if (i > 0) expect(f).toBeGreaterThanOrEqual(fractions[i - 1]!);
  });
  expect(fractions[fractions.length - 1]).toBe(1);
}
