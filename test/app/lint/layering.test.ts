// The layering rules in eslint.config.js must reject imports that cross the architecture's
// boundaries, and accept the ones it allows. Each case lints a snippet as if it were a file at
// the given path (the file need not exist).
import { ESLint } from "eslint";
import { describe, expect, it } from "vitest";

const eslint = new ESLint({ cwd: process.cwd() });

async function restrictedImportMessages(filePath: string, code: string): Promise<string[]> {
  const [result] = await eslint.lintText(code, { filePath });
  return result!.messages
    .filter((m) => m.ruleId === "no-restricted-imports" || m.ruleId === "@typescript-eslint/no-restricted-imports" || m.ruleId === "no-restricted-globals")
    .map((m) => m.message);
}

describe("lint layering rules", () => {
  it.each([
    ["shared-engine/linalg/bad.ts", `import { readFileSync } from "node:fs"; export const x = readFileSync;`],
    ["shared-engine/linalg/bad.ts", `import { EventEmitter } from "events"; export const x = EventEmitter;`],
    ["shared-engine/model/bad.ts", `import { App } from "../../renderer/App"; export const x = App;`],
    ["shared-engine/model/bad.ts", `import { x as y } from "../../main/cli/cli"; export const x = y;`],
    ["shared-engine/model/bad.ts", `import { ipcMain } from "electron"; export const x = ipcMain;`],
    ["shared-engine/model/bad.ts", `export const x = () => document.title;`],
    ["renderer/views/Bad.tsx", `import { ipcRenderer } from "electron"; export const x = ipcRenderer;`],
    ["renderer/views/Bad.tsx", `import { readFile } from "node:fs/promises"; export const x = readFile;`],
    ["renderer/views/Bad.tsx", `import { eigenvalues } from "../../shared-engine/linalg"; export const x = eigenvalues;`],
    ["renderer/views/Bad.tsx", `import { dispatch } from "../../shared-engine/api/dispatcher"; export const x = dispatch;`],
    ["main/bad.ts", `import { App } from "../renderer/App"; export const x = App;`],
    ["test/app/bad.test.ts", `import { app } from "electron"; export const x = app;`],
  ])("rejects the layering violation in %s: %s", async (filePath, code) => {
    const messages = await restrictedImportMessages(filePath, code);
    expect(messages.length, `expected a layering error for ${code}`).toBeGreaterThan(0);
    // The message says what is allowed, not only what is not.
    expect(messages[0]).toMatch(/may import|meet only through|Only main\/|pure TypeScript/);
  });

  it.each([
    ["shared-engine/model/ok.ts", `import { Matrix } from "ml-matrix"; import { EngineError } from "../errors"; export const x = [Matrix, EngineError];`],
    ["renderer/views/Ok.tsx", `import type { EngineBridge } from "../../shared-engine/api/contract"; export type X = EngineBridge;`],
    ["renderer/views/Ok.tsx", `import { formatReal } from "../../shared-engine/format"; export const x = formatReal;`],
    ["renderer/bridge/engine.worker.ts", `import { createEngineServer } from "../../shared-engine/api/server"; export const x = createEngineServer;`],
    ["main/ok.ts", `import { app } from "electron"; import { join } from "node:path"; export const x = [app, join];`],
    ["test/app/ok.test.ts", `import type { BrowserWindow } from "electron"; export type X = BrowserWindow;`],
  ])("accepts the allowed import in %s: %s", async (filePath, code) => {
    expect(await restrictedImportMessages(filePath, code)).toEqual([]);
  });
});

describe("lint guard on ml-matrix's uncapped eigen-decomposition", () => {
  it("rejects EigenvalueDecomposition in the engine", async () => {
    const messages = await restrictedImportMessages("shared-engine/analysis/bad.ts", `import { EigenvalueDecomposition } from "ml-matrix"; export const x = EigenvalueDecomposition;`);
    expect(messages.join(" ")).toMatch(/no iteration cap/);
  });
});
