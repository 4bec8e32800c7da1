// Bundles the Node-side entry points with esbuild: the command line, and the Electron main
// process, its engine worker thread and the preload. Runs on `npm install` (prepare), so
// `npx loopwright` works right after a clean install.
import { build } from "esbuild";
import { copyFileSync, existsSync, mkdirSync } from "node:fs";

const common = { bundle: true, platform: "node", target: "node20", sourcemap: true, logLevel: "warning", legalComments: "none" };

const targets = [
  { entryPoints: ["main/cli/cli.ts"], outfile: "dist/cli/cli.js", format: "esm" },
  { entryPoints: ["main/main.ts"], outfile: "dist/main/main.js", format: "esm", external: ["electron"] },
  { entryPoints: ["main/engineWorker.ts"], outfile: "dist/main/engineWorker.js", format: "esm" },
  // Sandboxed preload scripts cannot be ES modules: CommonJS, with only `electron` left external.
  { entryPoints: ["main/preload.ts"], outfile: "dist/main/preload.cjs", format: "cjs", external: ["electron"] },
];

let failed = false;
for (const target of targets) {
  const entry = target.entryPoints[0];
  if (!existsSync(entry)) {
    console.error(`build-node: missing entry ${entry}`);
    failed = true;
    continue;
  }
  // ESM bundles of CommonJS dependencies need `require`: give them one.
  const banner = target.format === "esm"
    ? { js: "import { createRequire as __lwCreateRequire } from 'node:module'; const require = __lwCreateRequire(import.meta.url);" }
    : undefined;
  await build({ ...common, ...target, banner });
}
// The window icon at run time (packaging takes its icons from assets/ directly).
mkdirSync("dist/main", { recursive: true });
copyFileSync("assets/icon.png", "dist/main/icon.png");
if (failed) process.exit(1);
