/** Helpers shared by the model tests (not a test file). */
import { expect } from "vitest";
import { Matrix } from "ml-matrix";
import { EngineError } from "../../../shared-engine/errors";
import type { Complex } from "../../../shared-engine/linalg/complex";
import type { StateSpace } from "../../../shared-engine/model";

export function expectEngineError(fn: () => unknown, kind: string, pattern: RegExp): void {
  try {
    fn();
  } catch (error) {
    expect(error).toBeInstanceOf(EngineError);
    expect((error as EngineError).kind).toBe(kind);
    expect((error as EngineError).message).toMatch(pattern);
    return;
  }
  expect.fail(`expected an EngineError of kind ${kind}`);
}

/**
 * G_ij(s) = C_i (sI − A)⁻¹ B_j + D_ij by a direct real 2n×2n solve of
 * [[σI − A, −ωI], [ωI, σI − A]]·[xr; xi] = [b; 0] (Gaussian elimination with partial pivoting).
 * Independent of the engine's conversion routines, so it can check them.
 */
export function evaluateChannel(model: { A: Matrix; B: Matrix; C: Matrix; D: Matrix }, s: Complex, input = 0, output = 0): Complex {
  const n = model.A.rows;
  const N = 2 * n;
  const M = Matrix.zeros(N, N + 1);
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < n; j++) {
      const a = (i === j ? s.re : 0) - model.A.get(i, j);
      M.set(i, j, a);
      M.set(n + i, n + j, a);
    }
    M.set(i, n + i, -s.im);
    M.set(n + i, i, s.im);
    M.set(i, N, model.B.get(i, input));
  }
  const x = solveAugmented(M, N);
  let re = model.D.get(output, input);
  let im = 0;
  for (let k = 0; k < n; k++) {
    re += model.C.get(output, k) * x[k]!;
    im += model.C.get(output, k) * x[n + k]!;
  }
  return { re, im };
}

function solveAugmented(M: Matrix, N: number): number[] {
  for (let k = 0; k < N; k++) {
    let piv = k;
    for (let i = k + 1; i < N; i++) if (Math.abs(M.get(i, k)) > Math.abs(M.get(piv, k))) piv = i;
    if (piv !== k) {
      const tmp = M.getRow(k);
      M.setRow(k, M.getRow(piv));
      M.setRow(piv, tmp);
    }
    for (let i = k + 1; i < N; i++) {
      const f = M.get(i, k) / M.get(k, k);
      for (let j = k; j <= N; j++) M.set(i, j, M.get(i, j) - f * M.get(k, j));
    }
  }
  const x = new Array<number>(N).fill(0);
  for (let i = N - 1; i >= 0; i--) {
    let s = M.get(i, N);
    for (let j = i + 1; j < N; j++) s -= M.get(i, j) * x[j]!;
    x[i] = s / M.get(i, i);
  }
  return x;
}

export function complexDistance(a: Complex, b: Complex): number {
  return Math.hypot(a.re - b.re, a.im - b.im);
}

/** |a − b| ≤ tol·max(|b|, floor), reporting both. */
export function expectComplexClose(actual: Complex, expected: Complex, tol: number, what: string, floor = 1): void {
  const err = complexDistance(actual, expected);
  const allowed = tol * Math.max(Math.hypot(expected.re, expected.im), floor);
  if (!(err <= allowed)) {
    expect.fail(`${what}: got ${actual.re}${actual.im >= 0 ? "+" : ""}${actual.im}j, expected ${expected.re}${expected.im >= 0 ? "+" : ""}${expected.im}j; error ${err.toExponential(3)} exceeds ${allowed.toExponential(3)}`);
  }
}

/** Test points away from the real axis (poles of the test models are real or complex, but never exactly here). */
export const TEST_POINTS: Complex[] = [
  { re: 0.3, im: 0.7 },
  { re: -0.05, im: 2.1 },
  { re: 1.7, im: -0.4 },
];

export function modelToRows(model: StateSpace) {
  return { A: model.A.to2DArray(), B: model.B.to2DArray(), C: model.C.to2DArray(), D: model.D.to2DArray() };
}
