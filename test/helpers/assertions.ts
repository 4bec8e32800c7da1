/**
 * One place for numerical tolerances in tests. Each helper reports the actual and the allowed
 * error, so a failure says how far off a result was, not just that it was.
 */
import { expect } from "vitest";
import { EngineError } from "../../shared-engine/errors";
import { doubleArray } from "../../shared-engine/linalg/arrayKernels";

export const EPS = Number.EPSILON;

type MatrixLike = ArrayLike<ArrayLike<number>> | { to2DArray(): number[][] };

export function toRows(m: MatrixLike): number[][] {
  if ("to2DArray" in m) return m.to2DArray();
  return Array.from(m as ArrayLike<ArrayLike<number>>, (row) => Array.from(row));
}

export function frobenius(m: MatrixLike): number {
  let s = 0;
  for (const row of toRows(m)) for (const v of row) s += v * v;
  return Math.sqrt(s);
}

export function frobeniusDifference(a: MatrixLike, b: MatrixLike): number {
  const ra = toRows(a);
  const rb = toRows(b);
  expect(ra.length, "row count").toBe(rb.length);
  let s = 0;
  for (let i = 0; i < ra.length; i++) {
    expect(ra[i]!.length, `column count of row ${i}`).toBe(rb[i]!.length);
    for (let j = 0; j < ra[i]!.length; j++) {
      const d = ra[i]![j]! - rb[i]![j]!;
      s += d * d;
    }
  }
  return Math.sqrt(s);
}

/** |actual − expected| ≤ tol·max(|expected|, floor). */
export function expectRelativeClose(actual: number, expected: number, tol: number, what = "value", floor = 0): void {
  const err = Math.abs(actual - expected);
  const allowed = tol * Math.max(Math.abs(expected), floor);
  if (!(err <= allowed) || !Number.isFinite(actual)) {
    expect.fail(`${what}: got ${actual}, expected ${expected}; error ${err.toExponential(3)} exceeds allowed ${allowed.toExponential(3)}`);
  }
}

/** ‖actual − expected‖_F ≤ tol·max(‖expected‖_F, floor). */
export function expectMatrixClose(actual: MatrixLike, expected: MatrixLike, tol: number, what = "matrix", floor = 1): void {
  const err = frobeniusDifference(actual, expected);
  const allowed = tol * Math.max(frobenius(expected), floor);
  if (!(err <= allowed)) {
    expect.fail(`${what}: ‖actual − expected‖_F = ${err.toExponential(3)} exceeds allowed ${allowed.toExponential(3)}`);
  }
}

/** A plain bound check with a readable message: value ≤ allowed. */
export function expectAtMost(value: number, allowed: number, what: string): void {
  if (!(value <= allowed)) expect.fail(`${what}: ${value.toExponential(3)} exceeds allowed ${allowed.toExponential(3)}`);
}

export interface ComplexLike { re: number; im: number }

/** Matches two multisets of complex numbers (greedy nearest pairing after sorting). */
export function expectComplexSetsClose(actual: ComplexLike[], expected: ComplexLike[], tol: number, what = "eigenvalues"): void {
  expect(actual.length, `${what}: count`).toBe(expected.length);
  const remaining = [...actual];
  for (const e of expected) {
    let best = -1;
    let bestDist = Infinity;
    remaining.forEach((a, i) => {
      const d = Math.hypot(a.re - e.re, a.im - e.im);
      if (d < bestDist) { bestDist = d; best = i; }
    });
    const allowed = tol * Math.max(1, Math.hypot(e.re, e.im));
    if (!(bestDist <= allowed)) {
      expect.fail(`${what}: no match for ${e.re}${e.im >= 0 ? "+" : ""}${e.im}j; nearest is ${bestDist.toExponential(3)} away, allowed ${allowed.toExponential(3)}`);
    }
    remaining.splice(best, 1);
  }
}

/**
 * Backward error of an orthogonal similarity A ≈ Q·T·Qᵀ: relative residual
 * ‖A − Q T Qᵀ‖_F / ‖A‖_F (absolute when A = 0) and loss of orthogonality ‖QᵀQ − I‖_F.
 */
export function orthogonalSimilarityErrors(A: MatrixLike, Q: MatrixLike, T: MatrixLike): { residual: number; orthogonality: number } {
  const a = toRows(A);
  const q = toRows(Q);
  const t = toRows(T);
  const n = a.length;
  const qt: number[][] = a.map(() => new Array<number>(n).fill(0));
  for (let i = 0; i < n; i++) for (let k = 0; k < n; k++) { const v = q[i]![k]!; if (v !== 0) for (let j = 0; j < n; j++) qt[i]![j]! += v * t[k]![j]!; }
  let res = 0;
  let orth = 0;
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < n; j++) {
      let s = 0;
      let o = 0;
      for (let k = 0; k < n; k++) { s += qt[i]![k]! * q[j]![k]!; o += q[k]![i]! * q[k]![j]!; }
      res += (a[i]![j]! - s) ** 2;
      orth += (o - (i === j ? 1 : 0)) ** 2;
    }
  }
  const normA = frobenius(a);
  return { residual: normA > 0 ? Math.sqrt(res) / normA : Math.sqrt(res), orthogonality: Math.sqrt(orth) };
}

/** Deterministic pseudo-random rows×cols matrix with entries in [−0.5, 0.5) (Park–Miller minimal standard generator). */
export function seededMatrix(rows: number, cols: number, seed: number): number[][] {
  let s = (Math.abs(Math.floor(seed)) % 2147483646) + 1;
  const next = (): number => {
    s = (s * 16807) % 2147483647;
    return s / 2147483647 - 0.5;
  };
  return Array.from({ length: rows }, () => Array.from({ length: cols }, next));
}

/**
 * Deterministic pseudo-random entries in [−0.5, 0.5) (Mulberry32, common practice) in a plain
 * array of doubles (`doubleArray`, so V8 keeps the double element kind the array kernels want).
 */
export function seededDoubles(length: number, seed: number): number[] {
  let a = seed >>> 0;
  const out = doubleArray(length);
  for (let i = 0; i < length; i++) {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    out[i] = ((t ^ (t >>> 14)) >>> 0) / 4294967296 - 0.5;
  }
  return out;
}

/**
 * T is upper quasi-triangular in standard form: exact zeros below the first subdiagonal, no two
 * consecutive nonzero subdiagonal entries, each 2×2 block with equal diagonal entries and
 * off-diagonal entries of opposite sign; `eigenvalues` (if given) follow the diagonal, pairs
 * with the positive imaginary part first, matching the blocks to `tol` relative.
 */
export function expectStandardQuasiTriangular(T: MatrixLike, eigenvalues?: ComplexLike[], tol = 1e-12): void {
  const t = toRows(T);
  const n = t.length;
  for (let i = 2; i < n; i++) for (let j = 0; j < i - 1; j++) {
    if (t[i]![j] !== 0) expect.fail(`T[${i}][${j}] = ${t[i]![j]} is below the subdiagonal but not zero`);
  }
  for (let i = 0; i < n; i++) {
    const isPair = i + 1 < n && t[i + 1]![i] !== 0;
    if (isPair) {
      if (i + 2 < n && t[i + 2]![i + 1] !== 0) expect.fail(`T has consecutive nonzero subdiagonal entries at rows ${i + 1}, ${i + 2}`);
      const a = t[i]![i]!, b = t[i]![i + 1]!, c = t[i + 1]![i]!, d = t[i + 1]![i + 1]!;
      if (a !== d) expect.fail(`2×2 block at ${i}: diagonal entries ${a} and ${d} differ`);
      if (!(b * c < 0)) expect.fail(`2×2 block at ${i}: off-diagonal entries ${b}, ${c} do not have opposite signs`);
      if (eigenvalues) {
        const im = Math.sqrt(Math.abs(b)) * Math.sqrt(Math.abs(c));
        const scale = Math.max(1, Math.hypot(a, im));
        const e0 = eigenvalues[i]!, e1 = eigenvalues[i + 1]!;
        if (!(Math.abs(e0.re - a) <= tol * scale && Math.abs(e0.im - im) <= tol * scale && Math.abs(e1.re - a) <= tol * scale && Math.abs(e1.im + im) <= tol * scale)) {
          expect.fail(`eigenvalues ${i}, ${i + 1} (${e0.re}±${e0.im}i) do not match the block ${a} ± ${im}i (positive part first)`);
        }
      }
      i++;
    } else if (eigenvalues) {
      const e = eigenvalues[i]!;
      if (!(Math.abs(e.re - t[i]![i]!) <= tol * Math.max(1, Math.abs(t[i]![i]!)) && e.im === 0)) {
        expect.fail(`eigenvalue ${i} = ${e.re}+${e.im}i does not match the diagonal entry ${t[i]![i]}`);
      }
    }
  }
}

/** Deterministic well-posed state-space data for design tests: entries are integers/4 in [−5, 5]. */
export function quarterIntegerMatrix(entries: number[], rows: number, cols: number): number[][] {
  const out: number[][] = [];
  for (let i = 0; i < rows; i++) out.push(entries.slice(i * cols, (i + 1) * cols).map((v) => v / 4));
  return out;
}

/**
 * Deep equality of plain JSON data where numbers may differ by `relTol` relative (absolute below
 * `absFloor`). Used where the same engine runs on two JavaScript engines: V8 in Node and V8 in
 * Chromium are different versions, and their Math.* functions may differ in the last bit.
 */
export function expectDeepClose(actual: unknown, expected: unknown, relTol = 1e-12, absFloor = 1e-300, path = "$"): void {
  if (typeof expected === "number") {
    if (typeof actual !== "number") expect.fail(`${path}: expected a number, got ${JSON.stringify(actual)}`);
    const err = Math.abs(actual - expected);
    if (!(err <= Math.max(relTol * Math.abs(expected), absFloor)) && actual !== expected) {
      expect.fail(`${path}: ${actual} vs ${expected} (relative difference ${(err / Math.abs(expected)).toExponential(2)} > ${relTol})`);
    }
    return;
  }
  if (Array.isArray(expected)) {
    if (!Array.isArray(actual)) expect.fail(`${path}: expected a list, got ${JSON.stringify(actual)}`);
    expect(actual.length, `${path} length`).toBe(expected.length);
    expected.forEach((e, i) => expectDeepClose(actual[i], e, relTol, absFloor, `${path}[${i}]`));
    return;
  }
  if (expected !== null && typeof expected === "object") {
    if (actual === null || typeof actual !== "object") expect.fail(`${path}: expected an object, got ${JSON.stringify(actual)}`);
    expect(Object.keys(actual as object).sort(), `${path} keys`).toEqual(Object.keys(expected).sort());
    for (const [k, e] of Object.entries(expected)) expectDeepClose((actual as Record<string, unknown>)[k], e, relTol, absFloor, `${path}.${k}`);
    return;
  }
  expect(actual, path).toEqual(expected);
}

/**
 * Runs `fn` and expects it to throw an EngineError of `kind` (the message is the assertion's
 * label, so a wrong kind shows what was thrown), optionally with a message matching
 * `messagePart` and a `details.reason`. Returns the error for further checks.
 */
export function expectEngineError(fn: () => unknown, kind: string, messagePart?: RegExp, reason?: string): EngineError {
  try {
    fn();
  } catch (error) {
    expect(error).toBeInstanceOf(EngineError);
    const e = error as EngineError;
    expect(e.kind, e.message).toBe(kind);
    if (messagePart) expect(e.message).toMatch(messagePart);
    if (reason !== undefined) expect(e.details.reason).toBe(reason);
    return e;
  }
  return expect.fail(`expected an EngineError of kind ${kind}`);
}
