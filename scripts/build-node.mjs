// Bundles the Node-side entry points with esbuild: the command line, and the Electron main
// process, its engine worker thread and the preload. Runs on `npm install` (prepare), so
// `npx loopwright` works right after a clean install.
import { build } from "esbuild";
import { copyFileSync, existsSync, mkdirSync, readFileSync } from "node:fs";
import path from "node:path";

// The design-sheet bundle (for `loopwright sheet`): `*.css?inline` imports become the CSS text
// (as Vite does in the app), plain `*.css` imports (component side effects) become nothing.
const inlineCssPlugin = {
  name: "inline-css",
  setup(b) {
    b.onResolve({ filter: /\.css\?inline$/ }, (args) => ({ path: path.resolve(args.resolveDir, args.path.replace(/\?inline$/, "")), namespace: "inline-css" }));
    b.onLoad({ filter: /.*/, namespace: "inline-css" }, (args) => ({ contents: readFileSync(args.path, "utf8"), loader: "text" }));
  },
};

const common = { bundle: true, platform: "node", target: "node20", sourcemap: true, logLevel: "warning", legalComments: "none" };

const targets = [
  { entryPoints: ["main/cli/cli.ts"], outfile: "dist/cli/cli.js", format: "esm" },
  { entryPoints: ["main/main.ts"], outfile: "dist/main/main.js", format: "esm", external: ["electron"] },
  { entryPoints: ["main/engineWorker.ts"], outfile: "dist/main/engineWorker.js", format: "esm" },
  // Sandboxed preload scripts cannot be ES modules: CommonJS, with only `electron` left external.
  { entryPoints: ["main/preload.ts"], outfile: "dist/main/preload.cjs", format: "cjs", external: ["electron"] },
  // The design sheet, rendered to static HTML by the command line (loaded at run time by path,
  // so main/ never imports renderer/ code statically).
  {
    entryPoints: ["renderer/sheet/renderSheetHtml.tsx"],
    outfile: "dist/sheet/sheet.js",
    format: "esm",
    jsx: "automatic",
    loader: { ".css": "empty" },
    define: { "process.env.NODE_ENV": '"production"' },
    plugins: [inlineCssPlugin],
  },
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
