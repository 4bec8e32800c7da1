#!/usr/bin/env node
// The `loopwright` command. The TypeScript sources in main/cli are bundled to dist/cli/cli.js by
// `npm install` (the `prepare` script) or `npm run build:node`.
import { existsSync } from "node:fs";

const bundle = new URL("../dist/cli/cli.js", import.meta.url);
if (!existsSync(bundle)) {
  process.stderr.write(
    "loopwright: the command line has not been built yet. Run `npm install` (it builds it) or `npm run build:node`.\n",
  );
  process.exit(2);
}
const { runCli } = await import(bundle.href);
process.exitCode = await runCli(process.argv.slice(2), {
  stdout: (text) => process.stdout.write(text),
  stderr: (text) => process.stderr.write(text),
  readFile: async (path) => (await import("node:fs/promises")).readFile(path, "utf8"),
});
