/**
 * The Electron main-process entry (bundled to dist/main/main.js). Thin wiring only: all
 * behaviour lives in startApp.ts and the modules it calls, which are unit-tested.
 * Layout at run time: dist/main/{main.js, preload.cjs, engineWorker.js}, dist/renderer/.
 */
import { app, BrowserWindow, dialog, ipcMain, protocol, session } from "electron";
import { readFile, writeFile } from "node:fs/promises";
import path from "node:path";
import { fileURLToPath } from "node:url";
import { Worker } from "node:worker_threads";
import { startApp } from "./startApp";

const here = path.dirname(fileURLToPath(import.meta.url));

startApp({
  app,
  protocol,
  session: () => session.defaultSession,
  ipcMain,
  BrowserWindow,
  platform: process.platform,
  files: { readFile: (filePath) => readFile(filePath) },
  paths: {
    rendererRoot: path.join(here, "..", "renderer"),
    preload: path.join(here, "preload.cjs"),
    icon: path.join(here, "icon.png"), // copied from assets/icon.png by the build
  },
  createWorker: () => new Worker(path.join(here, "engineWorker.js")),
  log: (line) => console.warn(`[loopwright] ${line}`),
  printing: {
    BrowserWindow,
    // Modal to the window the user printed from, when it still has focus.
    showSaveDialog: (options) => {
      const parent = BrowserWindow.getFocusedWindow();
      return parent ? dialog.showSaveDialog(parent, options) : dialog.showSaveDialog(options);
    },
    writeFile: (filePath, bytes) => writeFile(filePath, bytes),
  },
});
