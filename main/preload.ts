/**
 * The preload script (bundled to dist/main/preload.cjs, format cjs, electron external: a
 * sandboxed preload cannot be an ES module). Exposes exactly one object, `window.loopwright`
 * (engine `request`/`cancel`, and `printSheet` for the design sheet's PDF).
 */
import { contextBridge, ipcRenderer } from "electron";
import { createPreloadApi } from "./createPreloadApi";

contextBridge.exposeInMainWorld("loopwright", createPreloadApi(ipcRenderer));
