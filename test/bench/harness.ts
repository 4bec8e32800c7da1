/**
 * Benchmark harness: times our routines and, when python3 with scipy is present, the reference
 * routine on the same inputs in the same run, then prints a table with the ratio ours/theirs.
 * Never used by tests: speed is measured here, not asserted.
 */
import { execFileSync, spawnSync } from "node:child_process";
import { mkdtempSync, readFileSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";

export interface BenchCase {
  id: string;
  group: string;
  n: number;
  run: () => unknown;
  /** The numpy/scipy operation and its inputs (see reference.py), or null when there is none. */
  reference: { op: string; args: Record<string, unknown> } | null;
  repeats: number;
}

export function medianSeconds(fn: () => unknown, repeats: number): number {
  // Warm-up until the JIT has settled: one call is not enough at n ≤ 20, where the first
  // hundreds of calls run in V8's baseline tiers (the reference side, compiled LAPACK behind
  // Python, needs no such warm-up). V8's optimising tier settles after about 300–400 calls of
  // the small QZ and Riccati cases, so: at least 3 calls, then until 1,000 calls (or 5·repeats,
  // if more) or 500 ms, whichever comes first.
  const warmUntil = performance.now() + 500;
  const warmCalls = Math.max(1000, 5 * repeats);
  for (let i = 0; i < 3 || (i < warmCalls && performance.now() < warmUntil); i++) fn();
  // The repeats are timed in BLOCKS blocks and the smallest block median is reported, so a
  // burst of load from other processes on the shared machine spoils one block, not the
  // result. reference.py measures the same way.
  let best = Infinity;
  const perBlock = Math.max(1, Math.ceil(repeats / BLOCKS));
  for (let b = 0; b < BLOCKS; b++) {
    const samples: number[] = [];
    for (let i = 0; i < perBlock; i++) {
      const t0 = performance.now();
      fn();
      samples.push((performance.now() - t0) / 1000);
    }
    samples.sort((x, y) => x - y);
    best = Math.min(best, samples[Math.floor(samples.length / 2)]!);
  }
  return best;
}

/** Timing blocks per case (see medianSeconds; reference.py uses the same number). */
export const BLOCKS = 3;

/** Deterministic pseudo-random numbers (mulberry32), so every run times the same matrices. */
export function seededRandom(seed: number): () => number {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

export function randomMatrix(rows: number, cols: number, rand: () => number, scale = 1): number[][] {
  return Array.from({ length: rows }, () => Array.from({ length: cols }, () => (2 * rand() - 1) * scale));
}

function pythonWithScipy(): boolean {
  const r = spawnSync("python3", ["-c", "import numpy, scipy"], { encoding: "utf8" });
  return r.status === 0;
}

function fmtTime(seconds: number | null | undefined): string {
  if (seconds === null || seconds === undefined) return "—";
  if (seconds < 1e-3) return `${(seconds * 1e6).toFixed(1)} µs`;
  if (seconds < 1) return `${(seconds * 1e3).toFixed(2)} ms`;
  return `${seconds.toFixed(2)} s`;
}

export function runBench(cases: BenchCase[]): string {
  const ours = new Map<string, number>();
  for (const c of cases) {
    ours.set(c.id, medianSeconds(c.run, c.repeats));
    process.stderr.write(".");
  }
  process.stderr.write("\n");
  let theirs: Record<string, number | null> = {};
  let note = "";
  if (pythonWithScipy()) {
    const dir = mkdtempSync(join(tmpdir(), "lw-bench-"));
    const input = join(dir, "cases.json");
    const output = join(dir, "times.json");
    writeFileSync(input, JSON.stringify(cases.filter((c) => c.reference).map((c) => ({ id: c.id, op: c.reference!.op, args: c.reference!.args, repeats: c.repeats }))));
    // One BLAS thread: two threads on a busy two-core machine give erratic reference times.
    execFileSync("python3", ["test/bench/reference.py", input, output], {
      stdio: ["ignore", "inherit", "inherit"],
      env: { ...process.env, OPENBLAS_NUM_THREADS: "1", OMP_NUM_THREADS: "1", MKL_NUM_THREADS: "1" },
    });
    const parsed = JSON.parse(readFileSync(output, "utf8")) as { versions: Record<string, string>; times: Record<string, number | null> };
    theirs = parsed.times;
    note = `reference: numpy ${parsed.versions.numpy}, scipy ${parsed.versions.scipy} (one BLAS thread), same inputs, same run; median = smallest of ${BLOCKS} block medians on both sides`;
  } else {
    note = "python3 with numpy/scipy not found: our times alone";
  }
  const rows: string[][] = [["routine", "n", "ours (median)", "reference (median)", "ours/theirs"]];
  for (const c of cases) {
    const a = ours.get(c.id)!;
    const b = theirs[c.id];
    rows.push([c.group, String(c.n), fmtTime(a), fmtTime(b), b ? (a / b).toFixed(2) : "—"]);
  }
  const widths = rows[0]!.map((_, i) => Math.max(...rows.map((r) => r[i]!.length)));
  const lines = rows.map((r) => "| " + r.map((cell, i) => cell.padEnd(widths[i]!)).join(" | ") + " |");
  lines.splice(1, 0, "|" + widths.map((w) => "-".repeat(w + 2)).join("|") + "|");
  return `${lines.join("\n")}\n${note}\n`;
}
