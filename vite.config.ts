// Builds the renderer (renderer/) into dist/renderer, loaded by the desktop app through
// app://loopwright/ and by browser mode (`npm run web`) from a local static server.
import { fileURLToPath } from "node:url";
import { defineConfig } from "vite";

export default defineConfig({
  root: fileURLToPath(new URL("./renderer", import.meta.url)),
  // Relative asset URLs: the same build works under app://loopwright/ and http://127.0.0.1:PORT/.
  base: "./",
  // TSX is compiled by Vite's own transformer; no React plugin (and no fast-refresh preamble,
  // which would be an inline script the CSP forbids).
  oxc: { jsx: { runtime: "automatic" } },
  worker: { format: "es" },
  build: {
    outDir: fileURLToPath(new URL("./dist/renderer", import.meta.url)),
    emptyOutDir: true,
    target: "es2022",
    // Never inline assets as data: URLs into scripts; keeps every file a separate, cacheable
    // 'self' resource under the CSP.
    assetsInlineLimit: 0,
    sourcemap: true,
  },
  server: { host: "127.0.0.1", strictPort: false },
});
