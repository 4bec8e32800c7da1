import { Matrix } from "ml-matrix";
import { expm, qz, realSchur, solveContinuousLyapunov } from "../../shared-engine/linalg";
import { randomMatrix, seededRandom } from "./harness";
const which = (process.argv[2] ?? "schur,qz,expm,lyap").split(",");
const sizes = (process.argv[3] ?? "10,20,50,100").split(",").map(Number);
function time(fn: () => unknown, reps: number): number {
  fn(); fn();
  const s: number[] = [];
  for (let r = 0; r < 5; r++) {
    const t0 = performance.now();
    for (let i = 0; i < reps; i++) fn();
    s.push((performance.now() - t0) / reps);
  }
  return Math.min(...s) * 1000; // µs
}
for (const n of sizes) {
  const rand = seededRandom(1000 + n);
  const A = randomMatrix(n, n, rand);
  const E = randomMatrix(n, n, rand);
  const stable = A.map((row, i) => row.map((v, j) => (i === j ? v - Math.sqrt(n) - 1 : v)));
  const Qraw = randomMatrix(n, n, rand);
  const Q = Qraw.map((row, i) => row.map((_, j) => Qraw.reduce((s, r) => s + r[i]! * r[j]!, 0)));
  const scaled = A.map((row) => row.map((v) => (v * 5) / Math.sqrt(n)));
  const reps = (n <= 20 ? 200 : n <= 50 ? 20 : 4) * Number(process.env.REPS ?? 1);
  const mA = new Matrix(A), mE = new Matrix(E), mS = new Matrix(stable), mQ = new Matrix(Q), mX = new Matrix(scaled);
  const out: string[] = [];
  if (which.includes("schur")) out.push(`schur ${time(() => realSchur(mA), reps).toFixed(1)}`);
  if (which.includes("qz")) out.push(`qz ${time(() => qz(mA, mE), reps).toFixed(1)}`);
  if (which.includes("expm")) out.push(`expm ${time(() => expm(mX), reps).toFixed(1)}`);
  if (which.includes("lyap")) out.push(`lyap ${time(() => solveContinuousLyapunov(mS, mQ), reps).toFixed(1)}`);
  console.log(`n=${n}: ` + out.join("  "));
}
