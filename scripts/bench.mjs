// `npm run bench`: bundles test/bench/run.ts with esbuild and runs it with plain Node, the way
// the command line and the engine worker run the engine. (Running it through a TypeScript
// loader instead can cost typed-array kernels ~20 %: some loaders detach an ArrayBuffer at
// start-up, which makes V8 add a detach check to every typed-array access; see DEVELOPERS.md.)
// Arguments are passed through: `npm run bench -- linalg`.
import { build } from "esbuild";
import { spawnSync } from "node:child_process";
import { mkdtempSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";

const dir = mkdtempSync(path.join(tmpdir(), "loopwright-bench-"));
const outfile = path.join(dir, "bench.mjs");
try {
  await build({
    entryPoints: ["test/bench/run.ts"],
    outfile,
    bundle: true,
    platform: "node",
    target: "node20",
    format: "esm",
    logLevel: "warning",
    banner: { js: "import { createRequire as __lwCreateRequire } from 'node:module'; const require = __lwCreateRequire(import.meta.url);" },
  });
  const run = spawnSync(process.execPath, [outfile, ...process.argv.slice(2)], { stdio: "inherit" });
  process.exitCode = run.status ?? 1;
} finally {
  rmSync(dir, { recursive: true, force: true });
}
