/** Benchmark cases for the design and analysis layers (filled in as those layers land). */
import type { BenchCase } from "./harness";
import { randomMatrix, seededRandom } from "./harness";
import { createStateSpace } from "../../shared-engine/model";
import { frequencyResponse } from "../../shared-engine/analysis/frequencyResponse";

export function designCases(): BenchCase[] {
  return [];
}

export function analysisCases(): BenchCase[] {
  return [...frequencyResponseCases()];
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
