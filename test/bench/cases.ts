/** Benchmark cases for the design and analysis layers (filled in as those layers land). */
import type { BenchCase } from "./harness";
import { randomMatrix, seededRandom } from "./harness";
import { createStateSpace } from "../../shared-engine/model";
import { frequencyResponse } from "../../shared-engine/analysis/frequencyResponse";
import { stepResponse } from "../../shared-engine/analysis/timeResponse";
import { rootLocus } from "../../shared-engine/analysis/rootLocus";
import { placementCases, riccatiCases } from "./designCases";

export function designCases(): BenchCase[] {
  return [...riccatiCases(), ...placementCases()];
}

export function analysisCases(): BenchCase[] {
  return [...frequencyResponseCases(), ...timeAndLocusCases()];
}

/** SISO frequency response at 1,000 log-spaced frequencies (scipy reference: freqresp, via zeros/poles). */
function frequencyResponseCases(): BenchCase[] {
  return [20, 100].map((n) => {
    const rand = seededRandom(2000 + n);
    const A = randomMatrix(n, n, rand).map((row, i) => row.map((v, j) => (i === j ? v - Math.sqrt(n) - 1 : v)));
    const B = randomMatrix(n, 1, rand);
    const C = randomMatrix(1, n, rand);
    const D = [[0]];
    const w = Array.from({ length: 1000 }, (_, k) => 10 ** (-2 + (4 * k) / 999));
    const model = createStateSpace({ A, B, C, D });
    return { id: `freqresp-${n}`, group: "frequency response (1000 ω)", n, run: () => frequencyResponse(model, w), reference: { op: "freqresp", args: { A, B, C, D, w } }, repeats: n <= 20 ? 100 : 10 };
  });
}

/** 2,000-sample step response at n = 50 (scipy reference: lsim, zero-order hold) and an
 * n = 20 root locus with ≥ 500 points per branch (no scipy counterpart). */
function timeAndLocusCases(): BenchCase[] {
  const rand = seededRandom(3050);
  const n = 50;
  const A = randomMatrix(n, n, rand).map((row, i) => row.map((v, j) => (i === j ? v - Math.sqrt(n) - 1 : v)));
  const B = randomMatrix(n, 1, rand);
  const C = randomMatrix(1, n, rand);
  const D = [[0]];
  const t = Array.from({ length: 2000 }, (_, k) => k * 0.005);
  const model = createStateSpace({ A, B, C, D });
  const r20 = seededRandom(3020);
  const A20 = randomMatrix(20, 20, r20).map((row, i) => row.map((v, j) => (i === j ? v - 3 : v)));
  const loop = createStateSpace({ A: A20, B: randomMatrix(20, 1, r20), C: randomMatrix(1, 20, r20) });
  return [
    { id: "step-50", group: "step response (2000 samples)", n, run: () => stepResponse(model, t), reference: { op: "lsim", args: { A, B, C, D, t } }, repeats: 10 },
    { id: "rootlocus-20", group: "root locus (≥ 500 points/branch)", n: 20, run: () => rootLocus(loop, { pointsPerBranch: 500 }), reference: null, repeats: 3 },
  ];
}
