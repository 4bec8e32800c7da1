/**
 * Benchmark cases for the design layer: continuous and discrete Riccati at n = 5…200 (m = 2)
 * and multi-input pole placement at n = 5…50, beside scipy's solve_continuous_are,
 * solve_discrete_are and place_poles (method "YT", which handles complex poles) on the same problems.
 */
import { Matrix } from "ml-matrix";
import { placePoles, solveContinuousRiccati, solveDiscreteRiccati } from "../../shared-engine/design";
import { eigenvalues } from "../../shared-engine/linalg";
import { type BenchCase, randomMatrix, seededRandom } from "./harness";

function gram(rows: number[][]): number[][] {
  const n = rows[0]!.length;
  return Array.from({ length: n }, (_, i) => Array.from({ length: n }, (_, j) => rows.reduce((s, r) => s + r[i]! * r[j]!, 0) + (i === j ? 1 : 0)));
}

export function riccatiCases(): BenchCase[] {
  const cases: BenchCase[] = [];
  for (const n of [5, 10, 20, 50, 100, 200]) {
    const rand = seededRandom(5000 + n);
    // Random (A, B) with two inputs become numerically unstabilizable as n grows (scipy fails
    // on them too at n = 100), so the timing problems start from a stable A: every case then
    // has a well-defined stabilizing solution and both solvers do the same work.
    const A = randomMatrix(n, n, rand, 1 / Math.sqrt(n)).map((row, i) => row.map((v, j) => (i === j ? v - 1.5 : v)));
    const Ad = A.map((row, i) => row.map((v, j) => 0.5 * (i === j ? v + 1.5 : v)));
    const B = randomMatrix(n, 2, rand);
    const Q = gram(randomMatrix(n, n, rand, 1 / Math.sqrt(n)));
    const R = [[1, 0], [0, 1]];
    const repeats = n <= 20 ? 50 : n <= 50 ? 10 : n <= 100 ? 3 : 1;
    const [mA, mAd, mB, mQ, mR] = [A, Ad, B, Q, R].map((m) => new Matrix(m)) as [Matrix, Matrix, Matrix, Matrix, Matrix];
    cases.push({ id: `care-${n}`, group: "continuous Riccati (m = 2)", n, run: () => solveContinuousRiccati(mA, mB, mQ, mR), reference: { op: "care", args: { A, B, Q, R } }, repeats });
    cases.push({ id: `dare-${n}`, group: "discrete Riccati (m = 2)", n, run: () => solveDiscreteRiccati(mAd, mB, mQ, mR), reference: { op: "dare", args: { A: Ad, B, Q, R } }, repeats });
  }
  return cases;
}

export function placementCases(): BenchCase[] {
  return [5, 10, 20, 50].map((n) => {
    const rand = seededRandom(6000 + n);
    const A = randomMatrix(n, n, rand);
    const B = randomMatrix(n, 2, rand);
    // The open-loop eigenvalues mirrored into the left half-plane and shifted by 0.5: a request
    // of the plant's own scale. (Far-away poles with two inputs make the problem so ill-posed
    // that scipy returns poles off by 50 or more at n = 20 while we refuse with a typed error.)
    const request = eigenvalues(A).map((p) => ({ re: -Math.abs(p.re) - 0.5, im: p.im }));
    const mA = new Matrix(A);
    const mB = new Matrix(B);
    return {
      id: `place-${n}`,
      group: "pole placement (m = 2, robust)",
      n,
      run: () => placePoles(mA, mB, request),
      reference: { op: "place", args: { A, B, polesRe: request.map((p) => p.re), polesIm: request.map((p) => p.im) } },
      repeats: n <= 10 ? 20 : n <= 20 ? 5 : 1,
    };
  });
}
