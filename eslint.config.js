// ESLint flat config. Besides the usual TypeScript checks it enforces the layering of
// ../shared/ARCHITECTURE.md: each restriction's message says what IS allowed. Relaxing a rule
// needs a written reason beside it.
import { builtinModules } from "node:module";
import tseslint from "typescript-eslint";

const nodeBuiltins = [...new Set(builtinModules.filter((m) => !m.startsWith("_")).map((m) => m.split("/")[0]))];
const nodeBuiltinRegex = `^(node:.*|(${nodeBuiltins.join("|")})(/.*)?)$`;

const ENGINE_MESSAGE =
  "shared-engine/ is pure TypeScript: it may import only other shared-engine modules and ml-matrix. No DOM, Electron, Node built-ins, main/ or renderer/.";
const RENDERER_MESSAGE =
  "renderer/ reaches the engine only through the bridge: from shared-engine it may import api/contract, api/client, api/preloadApi, errors, format, version and project/fingerprint (engine.worker.ts may also import api/server). No Electron and no Node built-ins.";
const MAIN_MESSAGE = "main/ never imports renderer/: the two meet only through the bridge contract in shared-engine/api.";
const ELECTRON_MESSAGE = "Only main/ and its preload import Electron (importing it outside the Electron binary throws).";

export default tseslint.config(
  {
    ignores: ["node_modules/**", "dist/**", "out/**", "test-output/**", "bench-output/**", "test/fixtures/lint/**", "coverage/**"],
  },
  ...tseslint.configs.recommended,
  {
    files: ["**/*.{ts,tsx,js,mjs}"],
    rules: {
      "@typescript-eslint/no-unused-vars": ["error", { argsIgnorePattern: "^_", varsIgnorePattern: "^_" }],
      "no-eval": "error",
      "no-new-func": "error",
      "no-implied-eval": "error",
    },
  },
  {
    files: ["shared-engine/**/*.ts"],
    rules: {
      "no-restricted-imports": [
        "error",
        {
          paths: [
            {
              name: "ml-matrix",
              importNames: ["EigenvalueDecomposition", "EVD"],
              message: "ml-matrix's eigen-decomposition has no iteration cap and was seen looping forever on badly scaled input: use eigenvalues/eigenvectors/realSchur from shared-engine/linalg.",
            },
          ],
          patterns: [
            { regex: "(^|/)(main|renderer)(/|$)", message: ENGINE_MESSAGE },
            { regex: nodeBuiltinRegex, message: ENGINE_MESSAGE },
            { regex: "^(electron|react|react-dom|dexie|d3)(/.*)?$", message: ENGINE_MESSAGE },
          ],
        },
      ],
      "no-restricted-globals": [
        "error",
        ...["window", "document", "navigator", "localStorage", "indexedDB", "fetch", "XMLHttpRequest", "process", "require", "Buffer", "__dirname", "__filename"].map(
          (name) => ({ name, message: ENGINE_MESSAGE }),
        ),
      ],
    },
  },
  {
    files: ["renderer/**/*.{ts,tsx}"],
    rules: {
      "no-restricted-imports": [
        "error",
        {
          patterns: [
            { regex: "^electron(/.*)?$", message: RENDERER_MESSAGE },
            { regex: nodeBuiltinRegex, message: RENDERER_MESSAGE },
            { regex: "(^|/)main(/|$)", message: RENDERER_MESSAGE },
            {
              // project/fingerprint is allowed too: a pure, DOM-free hash of plain specs (no numerics),
              // and the design sheet must compute exactly the fingerprint the CLI and sign-offs use.
              regex: "(^|/)shared-engine/(?!(api/contract|api/client|api/preloadApi|errors|format|version|project/fingerprint)$)",
              message: RENDERER_MESSAGE,
            },
          ],
        },
      ],
    },
  },
  {
    // The browser-mode engine host: the one renderer file that runs the engine itself.
    files: ["renderer/bridge/engine.worker.ts"],
    rules: {
      "no-restricted-imports": [
        "error",
        {
          patterns: [
            { regex: "^electron(/.*)?$", message: RENDERER_MESSAGE },
            { regex: nodeBuiltinRegex, message: RENDERER_MESSAGE },
            { regex: "(^|/)shared-engine/(?!(api/server|api|errors)$)", message: RENDERER_MESSAGE },
          ],
        },
      ],
    },
  },
  {
    files: ["main/**/*.ts"],
    rules: {
      "no-restricted-imports": ["error", { patterns: [{ regex: "(^|/)renderer(/|$)", message: MAIN_MESSAGE }] }],
    },
  },
  {
    files: ["test/**/*.{ts,tsx}", "scripts/**/*.mjs", "*.config.ts", "*.config.js"],
    rules: {
      "@typescript-eslint/no-restricted-imports": [
        "error",
        { paths: [{ name: "electron", message: ELECTRON_MESSAGE, allowTypeImports: true }] },
      ],
    },
  },
);
