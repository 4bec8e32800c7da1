import { multiplyInto, solveInPlace } from "../../shared-engine/linalg/denseKernels";
for (const n of [10, 20, 50, 100, 200]) {
  const a = new Float64Array(n * n).map(() => Math.random() - 0.5);
  const b = new Float64Array(n * n).map(() => Math.random() - 0.5);
  const c = new Float64Array(n * n);
  const reps = Math.max(3, Math.floor(2e8 / (2 * n * n * n)));
  let best = Infinity;
  for (let r = 0; r < 5; r++) {
    const t0 = performance.now();
    for (let i = 0; i < reps; i++) multiplyInto(a, b, n, n, n, c);
    best = Math.min(best, (performance.now() - t0) / reps);
  }
  let bestLu = Infinity;
  for (let r = 0; r < 5; r++) {
    const t0 = performance.now();
    for (let i = 0; i < Math.max(1, reps >> 2); i++) { const m = a.slice(); for (let k = 0; k < n; k++) m[k * n + k] += n; solveInPlace(m, b.slice(), n, n, "x"); }
    bestLu = Math.min(bestLu, (performance.now() - t0) / Math.max(1, reps >> 2));
  }
  console.log(`n=${n} gemm ${(best * 1000).toFixed(1)}us ${(2 * n ** 3 / best / 1e6).toFixed(2)} GF/s   lu-solve ${(bestLu * 1000).toFixed(1)}us ${((8 / 3) * n ** 3 / bestLu / 1e6).toFixed(2)} GF/s`);
}
