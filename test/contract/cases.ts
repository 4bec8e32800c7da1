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
  // Model, analysis and design requests (deterministic; answers checked in test/app/api/dispatcher.test.ts).
  { name: "realize 1/(s²+3s+2)", method: "model.fromTransferFunction", params: { numerator: [1], denominator: [1, 3, 2], balance: false }, expected: { ok: true } },
  { name: "realize zeros, poles and gain", method: "model.fromZeroPoleGain", params: { zeros: [-3], poles: [{ re: -1, im: 1 }, { re: -1, im: -1 }], gain: 2 }, expected: { ok: true } },
  { name: "sample the double integrator (zero-order hold)", method: "model.discretize", params: { model: { A: [[0, 1], [0, 0]], B: [[0], [1]], C: [[1, 0]] }, period: 0.1 }, expected: { ok: true } },
  { name: "sample with Tustin and prewarping", method: "model.discretize", params: { model: { A: [[0, 1], [-4, -0.4]], B: [[0], [1]], C: [[1, 0]] }, period: 0.1, method: "tustin", prewarpRadPerSec: 2 }, expected: { ok: true } },
  { name: "structure of an unstabilizable plant", method: "analysis.structure", params: { model: { A: [[-1, 0], [0, 2]], B: [[1], [0]], C: [[1, 1]] } }, expected: { ok: true } },
  { name: "transmission zero at the origin", method: "analysis.zeros", params: { model: { A: [[-1, 0], [0, -2]], B: [[1], [1]], C: [[1, -2]] } }, expected: { ok: true } },
  { name: "frequency response with an unbounded point", method: "analysis.frequencyResponse", params: { model: { A: [[0]], B: [[1]], C: [[1]] }, frequenciesRadPerSec: [0, 1, 10] }, expected: { ok: true } },
  { name: "margins of 2/(s(s+1)(s+2))", method: "analysis.margins", params: { model: { A: [[0, 1, 0], [0, 0, 1], [0, -2, -3]], B: [[0], [0], [1]], C: [[2, 0, 0]] } }, expected: { ok: true } },
  { name: "pole placement on a companion form", method: "design.placePoles", params: { A: [[0, 1, 0], [0, 0, 1], [-1, -5, -6]], B: [[0], [0], [1]], poles: [{ re: -2, im: 4 }, { re: -2, im: -4 }, -10] }, expected: { ok: true } },
  { name: "LQR of the double integrator", method: "design.lqr", params: { A: [[0, 1], [0, 0]], B: [[0], [1]], Q: [[1, 0], [0, 2]], R: [[1]] }, expected: { ok: true } },
  { name: "discrete Riccati equation", method: "design.riccati", params: { kind: "discrete", A: [[0, 1], [0, 0]], B: [[0], [1]], Q: [[1, 0], [0, 1]], R: [[1]] }, expected: { ok: true } },
  { name: "Bryson weights with an unweighted state", method: "design.brysonWeights", params: { maxState: [0.1, null], maxInput: [5] }, expected: { ok: true } },
  { name: "a negative sample period", method: "model.discretize", params: { model: { A: [[0]], B: [[1]], C: [[1]] }, period: -1 }, expected: { ok: false, kind: "invalid-argument" } },
  { name: "a model whose B has the wrong rows", method: "analysis.structure", params: { model: { A: [[0, 1], [0, 0]], B: [[1]], C: [[1, 0]] } }, expected: { ok: false, kind: "shape-mismatch" } },
  { name: "a Riccati request without its kind", method: "design.riccati", params: { A: [[0]], B: [[1]], Q: [[1]], R: [[1]] }, expected: { ok: false, kind: "invalid-argument" } },
  { name: "an LQR sweep with no weights", method: "design.lqrSweep", params: { A: [[1]], B: [[1]], Q: [[1]], R: [[1]], rhoValues: [] }, expected: { ok: false, kind: "empty" } },
  // Nonlinear plants, servo design and the JSON parameter loci (answers checked in
  // test/app/api/nonlinearRequests.test.ts and servoAndLocusRequests.test.ts).
  { name: "check equations with a syntax error (a result, not an error)", method: "nonlinear.check", params: { equations: [{ field: "f", text: "a + * b" }], names: ["a", "b"] }, expected: { ok: true } },
  { name: "operating point of a scalar lag", method: "nonlinear.operatingPoint", params: { plant: lagPlant(), request: { unknowns: ["x"], inputs: { u: 0.05 } } }, expected: { ok: true } },
  { name: "linearize a scalar lag", method: "nonlinear.linearize", params: { plant: lagPlant(), request: { unknowns: ["u"], states: { x: 0.02 } } }, expected: { ok: true } },
  { name: "simulate a saturating scalar lag", method: "nonlinear.simulate", params: { plant: lagPlant(), request: { unknowns: ["x"], inputs: { u: 0 } }, K: [[10]], scenario: { initialOffset: { x: 1 } }, times: [0, 0.5, 1] }, expected: { ok: true } },
  { name: "robustness sweep of a scalar lag", method: "nonlinear.robustness", params: { plant: lagPlant(), request: { unknowns: ["x"], inputs: { u: 0 } }, K: [[1]], parameters: [{ name: "k", percent: 20 }], sampling: { kind: "random", samples: 3, seed: 7 } }, expected: { ok: true } },
  { name: "a plant equation that does not parse", method: "nonlinear.linearize", params: { plant: { ...lagPlant(), stateEquations: { x: "-k*x +" } }, request: { unknowns: ["x"] } }, expected: { ok: false, kind: "parse-error" } },
  { name: "servo design by pole placement", method: "design.integral", params: { model: { A: [[-1]], B: [[1]], C: [[1]] }, outputs: [0], method: "poles", poles: [-2], integratorPoles: [-3] }, expected: { ok: true } },
  { name: "reference feedforward", method: "design.feedforward", params: { model: { A: [[-1]], B: [[1]], C: [[2]] }, K: [[3]] }, expected: { ok: true } },
  { name: "observer-based compensator", method: "design.compensator", params: { model: { A: [[0]], B: [[1]], C: [[1]] }, K: [[2]], L: [[3]], form: "predictor" }, expected: { ok: true } },
  { name: "reduced-order observer", method: "design.reducedObserver", params: { A: [[0, 1], [-2, -3]], B: [[0], [1]], C: [[1, 0]], poles: [-8] }, expected: { ok: true } },
  { name: "LQR weight locus", method: "analysis.lqrWeightLocus", params: { A: [[1]], B: [[1]], Q: [[1]], R0: [[1]], rhoRange: [0.1, 10], points: 5 }, expected: { ok: true } },
  { name: "observer speed locus", method: "analysis.observerSpeedLocus", params: { A: [[0, 1], [-2, -3]], C: [[1, 0]], poles: [-10, -11], factorRange: [0.5, 2], points: 5 }, expected: { ok: true } },
  { name: "a servo design without its method", method: "design.integral", params: { model: { A: [[-1]], B: [[1]], C: [[1]] }, outputs: [0] }, expected: { ok: false, kind: "invalid-argument" } },
];

/** Sorts eigenvalues by real part, then imaginary part, for comparison with expectedEigenvalues. */
export function sortedEigenvalues(values: readonly ComplexNumber[]): ComplexNumber[] {
  return [...values].sort((a, b) => a.re - b.re || a.im - b.im);
}

/** ẋ = −k·x + u + w, |u| ≤ 0.1, y = x: a scalar lag typed as equations (for the nonlinear cases; a hoisted declaration so the list above can use it). */
function lagPlant() {
  return {
    states: [{ name: "x" }],
    inputs: [{ name: "u", min: -0.1, max: 0.1 }],
    disturbances: [{ name: "w" }],
    parameters: [{ name: "k", value: 1 }],
    stateEquations: { x: "-k*x + u + w" },
    outputs: [{ name: "y", equation: "x" }],
  };
}
