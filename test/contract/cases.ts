/**
 * Bridge contract cases: the same requests must give the same answers through every path to
 * the engine — `dispatch()` directly, Electron IPC (preload → main → worker thread), and the
 * browser-mode Web Worker. Each case says whether it succeeds or which error kind it fails
 * with; successful results are compared between paths for exact equality, and the optional
 * `expectedEigenvalues` is an independent check with its source named.
 *
 * Params are plain JSON, so the cases can be sent from a Playwright page as they are.
 */
import type { EngineErrorKind } from "../../shared-engine/errors";
import type { ComplexNumber } from "../../shared-engine/api/contract";

export interface ContractCase {
  name: string;
  method: string;
  params: unknown;
  expected: { ok: true } | { ok: false; kind: EngineErrorKind };
  /** Exact eigenvalues, sorted by (re, im), for eigenvalue cases with a known answer. */
  expectedEigenvalues?: ComplexNumber[];
}

export const CONTRACT_CASES: readonly ContractCase[] = [
  { name: "engine identity", method: "engine.info", params: {}, expected: { ok: true } },
  {
    name: "eigenvalues of a 1×1 matrix",
    method: "linalg.eigenvalues",
    params: { matrix: [[-4.5]] },
    expected: { ok: true },
    expectedEigenvalues: [{ re: -4.5, im: 0 }], // definition: the single entry
  },
  {
    name: "eigenvalues of a diagonal matrix",
    method: "linalg.eigenvalues",
    params: { matrix: [[3, 0, 0], [0, -1, 0], [0, 0, 0.5]] },
    expected: { ok: true },
    expectedEigenvalues: [{ re: -1, im: 0 }, { re: 0.5, im: 0 }, { re: 3, im: 0 }], // definition: the diagonal
  },
  {
    name: "eigenvalues of a rotation generator (a complex pair)",
    method: "linalg.eigenvalues",
    params: { matrix: [[0, -1], [1, 0]] },
    expected: { ok: true },
    expectedEigenvalues: [{ re: 0, im: -1 }, { re: 0, im: 1 }], // textbook: λ² + 1 = 0 (from memory)
  },
  {
    name: "eigenvalues of a companion matrix of (s+1)(s+2)(s+3)",
    method: "linalg.eigenvalues",
    params: { matrix: [[0, 1, 0], [0, 0, 1], [-6, -11, -6]] },
    expected: { ok: true },
    expectedEigenvalues: [{ re: -3, im: 0 }, { re: -2, im: 0 }, { re: -1, im: 0 }], // roots of s³+6s²+11s+6 (textbook, from memory)
  },
  {
    name: "eigenvalues of a dense nonsymmetric 6×6 matrix",
    method: "linalg.eigenvalues",
    params: {
      matrix: [
        [4, -2, 1, 0.5, 3, -1],
        [1, 0, -3, 2, 0.25, 4],
        [-2, 5, 1, -1, 2, 0],
        [0.5, 1, 2, -4, 1, 3],
        [3, -1, 0, 2, -2, 1],
        [1, 2, -1, 0, 3, 0.5],
      ],
    },
    expected: { ok: true },
  },
  { name: "an unknown method", method: "linalg.nope", params: {}, expected: { ok: false, kind: "unknown-method" } },
  { name: "a non-square matrix", method: "linalg.eigenvalues", params: { matrix: [[1, 2, 3], [4, 5, 6]] }, expected: { ok: false, kind: "shape-mismatch" } },
  { name: "ragged rows", method: "linalg.eigenvalues", params: { matrix: [[1, 2], [3]] }, expected: { ok: false, kind: "shape-mismatch" } },
  { name: "an empty matrix", method: "linalg.eigenvalues", params: { matrix: [] }, expected: { ok: false, kind: "empty" } },
  { name: "a non-number entry", method: "linalg.eigenvalues", params: { matrix: [[1, "2"], [3, 4]] }, expected: { ok: false, kind: "invalid-argument" } },
  { name: "a missing matrix", method: "linalg.eigenvalues", params: {}, expected: { ok: false, kind: "invalid-argument" } },
  { name: "params that are not an object", method: "engine.info", params: [1, 2], expected: { ok: false, kind: "invalid-argument" } },
];

/** Sorts eigenvalues by real part, then imaginary part, for comparison with expectedEigenvalues. */
export function sortedEigenvalues(values: readonly ComplexNumber[]): ComplexNumber[] {
  return [...values].sort((a, b) => a.re - b.re || a.im - b.im);
}
