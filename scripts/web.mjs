// `npm run web`: builds the renderer and serves it in browser mode on 127.0.0.1.
// Options: --port N (or PORT=N); default 5178; 0 picks any free port. --no-build serves the
// existing dist/renderer.
import { fileURLToPath } from "node:url";
import { build } from "vite";
import { startStaticServer } from "./static-server.mjs";

function parsePort(argv, env) {
  const index = argv.indexOf("--port");
  const inline = argv.find((a) => a.startsWith("--port="));
  const text = inline ? inline.slice("--port=".length) : index >= 0 ? argv[index + 1] : env.PORT;
  if (text === undefined || text === "") return 5178;
  const port = Number(text);
  if (!Number.isInteger(port) || port < 0 || port > 65535) {
    throw new Error(`--port must be an integer from 0 to 65535 (got ${JSON.stringify(text)})`);
  }
  return port;
}

const repoRoot = fileURLToPath(new URL("..", import.meta.url));
const distDir = fileURLToPath(new URL("../dist/renderer", import.meta.url));

try {
  const argv = process.argv.slice(2);
  const port = parsePort(argv, process.env);
  if (!argv.includes("--no-build")) await build({ configFile: `${repoRoot}vite.config.ts`, logLevel: "warn" });
  const server = await startStaticServer({ root: distDir, port });
  console.log(`Loopwright (browser mode) at ${server.url}`);
  const stop = () => void server.close().then(() => process.exit(0));
  process.once("SIGINT", stop);
  process.once("SIGTERM", stop);
} catch (error) {
  console.error(`npm run web failed: ${error instanceof Error ? error.message : String(error)}`);
  process.exit(1);
}
