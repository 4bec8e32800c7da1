// `npm run bench:ab -- BASE [ops] [sizes]`: times the linalg routines of a reference engine
// against the working tree's, interleaved in one process (test/bench/ab.ts), both bundled with
// esbuild and run by plain Node as `npm run bench` runs (a TypeScript loader can detach an
// ArrayBuffer at start-up, after which typed-array kernels lose about 20 %: DEVELOPERS.md).
// BASE is a git revision (e.g. HEAD, HEAD~3) or a directory holding a copy of shared-engine/.
// ml-matrix stays external in both bundles, so both sides share one Matrix class.
import { build } from "esbuild";
import { execFileSync, spawnSync } from "node:child_process";
import { existsSync, mkdirSync, mkdtempSync, rmSync } from "node:fs";
import path from "node:path";
import { fileURLToPath, pathToFileURL } from "node:url";

const repoRoot = fileURLToPath(new URL("..", import.meta.url));
const [baseArg, ...rest] = process.argv.slice(2);
if (!baseArg) {
  console.error("usage: npm run bench:ab -- BASE [ops] [sizes]   (BASE: a git revision or a shared-engine/ copy; ops: schur,qz,expm,lyap; sizes: 10,20,50,100)");
  process.exit(2);
}
// Inside the repository so that the bundles' bare `ml-matrix` imports resolve to node_modules.
const cacheRoot = path.join(repoRoot, "node_modules", ".cache");
mkdirSync(cacheRoot, { recursive: true });
const dir = mkdtempSync(path.join(cacheRoot, "loopwright-ab-"));
try {
  let baseEngine = path.resolve(baseArg);
  if (!existsSync(path.join(baseEngine, "linalg", "index.ts"))) {
    // A git revision: extract its shared-engine/ next to the bundles.
    const archive = execFileSync("git", ["archive", "--format=tar", baseArg, "shared-engine"], { cwd: repoRoot, maxBuffer: 1 << 28 });
    execFileSync("tar", ["-x", "-C", dir], { input: archive });
    baseEngine = path.join(dir, "shared-engine");
  }
  const common = { bundle: true, platform: "node", target: "node20", format: "esm", logLevel: "warning", external: ["ml-matrix"] };
  const baseOut = path.join(dir, "base.mjs");
  const abOut = path.join(dir, "ab.mjs");
  await build({ ...common, entryPoints: [path.join(baseEngine, "linalg", "index.ts")], outfile: baseOut });
  await build({ ...common, entryPoints: [path.join(repoRoot, "test", "bench", "ab.ts")], outfile: abOut });
  const run = spawnSync(process.execPath, [abOut, ...rest], { stdio: "inherit", env: { ...process.env, LW_AB_BASE: pathToFileURL(baseOut).href } });
  process.exitCode = run.status ?? 1;
} catch (error) {
  console.error(`bench:ab failed: ${error instanceof Error ? error.message : String(error)}`);
  process.exitCode = 1;
} finally {
  rmSync(dir, { recursive: true, force: true });
}
