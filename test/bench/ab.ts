/**
 * A/B timing: the routines of a reference copy of linalg/ (module URL in LW_AB_BASE) against the
 * working tree, interleaved in one process so machine load hits both alike. Prints the best
 * (minimum) per-call time of each over several rounds and the ratio new/base. Run it through
 * scripts/bench-ab.mjs, which bundles both sides and runs them with plain Node:
 *   npm run bench:ab -- HEAD qz,expm 10,20,50
 */
import { Matrix } from "ml-matrix";
import * as current from "../../shared-engine/linalg";
import { randomMatrix, seededRandom } from "./harness";

type Linalg = typeof current;
const basePath = process.env.LW_AB_BASE;
if (!basePath) { console.error("run through `npm run bench:ab -- BASE` (scripts/bench-ab.mjs), which sets LW_AB_BASE"); process.exit(2); }
const base = (await import(basePath)) as Linalg;
const which = (process.argv[2] ?? "schur,qz,expm,lyap").split(",");
const sizes = (process.argv[3] ?? "10,20,50,100").split(",").map(Number);
const rounds = Number(process.env.ROUNDS ?? 7);

function best(fn: () => unknown, reps: number): number {
  const t0 = performance.now();
  for (let i = 0; i < reps; i++) fn();
  return (performance.now() - t0) / reps;
}
function fmt(ms: number): string { return ms < 1 ? `${(ms * 1000).toFixed(1)}µs` : `${ms.toFixed(2)}ms`; }

for (const n of sizes) {
  const rand = seededRandom(1000 + n);
  const A = randomMatrix(n, n, rand);
  const E = randomMatrix(n, n, rand);
  const stable = A.map((row, i) => row.map((v, j) => (i === j ? v - Math.sqrt(n) - 1 : v)));
  const Qraw = randomMatrix(n, n, rand);
  const Q = Qraw.map((row, i) => row.map((_, j) => Qraw.reduce((s, r) => s + r[i]! * r[j]!, 0)));
  const scaled = A.map((row) => row.map((v) => (v * 5) / Math.sqrt(n)));
  const mA = new Matrix(A), mE = new Matrix(E), mS = new Matrix(stable), mQ = new Matrix(Q), mX = new Matrix(scaled);
  const reps = Math.max(2, Math.round(20000 / (n * n * Math.sqrt(n))));
  const ops: Record<string, (l: Linalg) => unknown> = {
    schur: (l) => l.realSchur(mA),
    qz: (l) => l.qz(mA, mE),
    expm: (l) => l.expm(mX),
    lyap: (l) => l.solveContinuousLyapunov(mS, mQ),
  };
  const line: string[] = [];
  for (const name of which) {
    const op = ops[name]!;
    for (let w = 0; w < 3; w++) { op(base); op(current); }
    let b = Infinity, c = Infinity;
    for (let r = 0; r < rounds; r++) {
      b = Math.min(b, best(() => op(base), reps));
      c = Math.min(c, best(() => op(current), reps));
    }
    line.push(`${name} ${fmt(b)}→${fmt(c)} (${(c / b).toFixed(2)})`);
  }
  console.log(`n=${String(n).padEnd(3)} ${line.join("  ")}`);
}
