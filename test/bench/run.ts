/**
 * `npm run bench`: our routines beside numpy/scipy on the same inputs, in the same run.
 * Goals (from the issues): faster than scipy for n ≤ 20, within 3× at n = 100.
 *   npm run bench                 all groups
 *   npm run bench -- linalg       one group (linalg, design, analysis)
 */
import { Matrix } from "ml-matrix";
import { expm, qz, realSchur, solveContinuousLyapunov } from "../../shared-engine/linalg";
import { type BenchCase, randomMatrix, runBench, seededRandom } from "./harness";
import { analysisCases, designCases } from "./cases";

const SIZES = [10, 20, 50, 100, 200];

function repeatsFor(n: number): number {
  return n <= 20 ? 200 : n <= 50 ? 30 : n <= 100 ? 10 : 5;
}

function linalgCases(): BenchCase[] {
  const cases: BenchCase[] = [];
  for (const n of SIZES) {
    const rand = seededRandom(1000 + n);
    const A = randomMatrix(n, n, rand);
    const E = randomMatrix(n, n, rand);
    // A stable matrix for the Lyapunov solver: shift the spectrum left of the imaginary axis.
    const stable = A.map((row, i) => row.map((v, j) => (i === j ? v - Math.sqrt(n) - 1 : v)));
    const Qraw = randomMatrix(n, n, rand);
    const Q = Qraw.map((row, i) => row.map((_, j) => Qraw.reduce((s, r) => s + r[i]! * r[j]!, 0)));
    // expm: a matrix of norm about 5, so scaling and squaring does real work.
    const scaled = A.map((row) => row.map((v) => (v * 5) / Math.sqrt(n)));
    const repeats = repeatsFor(n);
    const mA = new Matrix(A);
    const mE = new Matrix(E);
    const mStable = new Matrix(stable);
    const mQ = new Matrix(Q);
    const mScaled = new Matrix(scaled);
    cases.push({ id: `schur-${n}`, group: "real Schur", n, run: () => realSchur(mA), reference: { op: "schur", args: { A } }, repeats });
    cases.push({ id: `qz-${n}`, group: "QZ", n, run: () => qz(mA, mE), reference: { op: "qz", args: { A, E } }, repeats });
    cases.push({ id: `expm-${n}`, group: "expm", n, run: () => expm(mScaled), reference: { op: "expm", args: { A: scaled } }, repeats });
    cases.push({ id: `lyap-${n}`, group: "continuous Lyapunov", n, run: () => solveContinuousLyapunov(mStable, mQ), reference: { op: "lyapunov", args: { A: stable, Q } }, repeats });
  }
  return cases;
}

const groups: Record<string, () => BenchCase[]> = { linalg: linalgCases, design: designCases, analysis: analysisCases };
const wanted = process.argv.slice(2).filter((a) => !a.startsWith("-"));
for (const name of wanted) {
  if (!(name in groups)) {
    console.error(`bench: unknown group "${name}"; groups are ${Object.keys(groups).join(", ")}`);
    process.exit(2);
  }
}
for (const [name, make] of Object.entries(groups)) {
  if (wanted.length > 0 && !wanted.includes(name)) continue;
  const cases = make();
  if (cases.length === 0) continue;
  console.log(`\n## ${name}\n`);
  console.log(runBench(cases));
}
