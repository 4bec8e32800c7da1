// Type-checks each layer with its own compiler settings, so the engine is checked without DOM
// or Node types and the renderer without Node types.
import { spawnSync } from "node:child_process";
const projects = ["shared-engine", "renderer", "main", "test"];
let failed = 0;
for (const project of projects) {
  const result = spawnSync("npx", ["tsc", "-p", `${project}/tsconfig.json`], { stdio: "inherit" });
  if (result.status !== 0) { failed += 1; console.error(`typecheck failed in ${project}/`); }
}
if (failed === 0) console.log(`typecheck: ${projects.length} layers clean`);
process.exit(failed === 0 ? 0 : 1);
