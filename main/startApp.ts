/**
 * The app's lifecycle, with every Electron and Node object injected so it is tested without
 * the Electron binary: scheme registration before ready, single-instance lock, guards, the
 * app:// protocol, the engine host and IPC, the main window, and shutdown.
 */
import { installGuards, isTrustedSender, type GuardedApp, type GuardedSession, type GuardRefusal } from "./guards";
import { createAppProtocolHandler, installAppProtocol, registerAppSchemePrivileged, type AppProtocolFiles, type ProtocolLike } from "./protocol";
import { registerEngineIpc, type IpcMainLike } from "./ipc";
import { createEngineHost, type EngineHostEvent, type EngineWorkerFactory } from "./engineHost";
import { createMainWindow, type MainWindowLike, type WindowElectron } from "./window";
import { registerPrintSheetIpc, type PrintSheetDeps } from "./printIpc";

export interface AppWindowLike extends MainWindowLike {
  isMinimized(): boolean;
  restore(): void;
  focus(): void;
}

export interface LifecycleApp {
  requestSingleInstanceLock(): boolean;
  quit(): void;
  whenReady(): Promise<unknown>;
  on(event: string, listener: (...args: never[]) => void): unknown;
}

export interface StartAppDeps<W extends AppWindowLike> {
  app: LifecycleApp & GuardedApp;
  protocol: ProtocolLike;
  session: () => GuardedSession; // the default session exists only after ready
  ipcMain: IpcMainLike;
  BrowserWindow: WindowElectron<W>["BrowserWindow"] & { getAllWindows(): unknown[] };
  platform: string;
  files: AppProtocolFiles;
  paths: { rendererRoot: string; preload: string; icon?: string };
  createWorker: EngineWorkerFactory;
  log?: (line: string) => void;
  /** Print-to-PDF of the design sheet (IPC_CHANNELS.printSheet); the channel is absent without it. */
  printing?: Pick<PrintSheetDeps, "BrowserWindow" | "showSaveDialog" | "writeFile" | "readyTimeoutMs">;
}

/** Starts the app. Returns false (and quits) when another instance already holds the lock. */
export function startApp<W extends AppWindowLike>(deps: StartAppDeps<W>): boolean {
  const log = deps.log ?? (() => undefined);
  // Electron requires privileged schemes to be declared before the ready event.
  registerAppSchemePrivileged(deps.protocol);
  if (!deps.app.requestSingleInstanceLock()) {
    deps.app.quit();
    return false;
  }
  let mainWindow: W | null = null;
  let shutdown: (() => void) | null = null;
  const onRefused = (refusal: GuardRefusal): void => log(`refused ${refusal.what}: ${refusal.detail}`);
  const openWindow = (): W => {
    const window = createMainWindow({ BrowserWindow: deps.BrowserWindow }, {
      preloadPath: deps.paths.preload,
      ...(deps.paths.icon ? { iconPath: deps.paths.icon } : {}),
      onLoadError: (error) => log(`the app page did not load: ${String(error)}`),
    });
    mainWindow = window;
    return window;
  };

  deps.app.on("second-instance", () => {
    if (!mainWindow) return;
    if (mainWindow.isMinimized()) mainWindow.restore();
    mainWindow.focus();
  });
  deps.app.on("window-all-closed", () => {
    // macOS apps stay active without windows until the user quits explicitly.
    if (deps.platform !== "darwin") deps.app.quit();
  });
  deps.app.on("activate", () => {
    if (shutdown && deps.BrowserWindow.getAllWindows().length === 0) openWindow();
  });
  deps.app.on("will-quit", () => shutdown?.());

  void deps.app.whenReady().then(() => {
    installGuards(deps.app, deps.session(), onRefused);
    installAppProtocol(deps.protocol, createAppProtocolHandler(deps.files, deps.paths.rendererRoot));
    const host = createEngineHost(deps.createWorker, {
      onEvent: (event: EngineHostEvent) => {
        if (event.type === "died") log(`engine worker ${event.generation} stopped: ${event.reason} (${event.failedRequests} requests failed)`);
      },
    });
    const disposeIpc = registerEngineIpc(deps.ipcMain, host, isTrustedSender);
    const disposePrint = deps.printing
      ? registerPrintSheetIpc(deps.ipcMain, { ...deps.printing, preloadPath: deps.paths.preload, isTrustedSender })
      : () => undefined;
    shutdown = () => {
      shutdown = null;
      disposeIpc();
      disposePrint();
      void host.dispose();
    };
    openWindow();
  });
  return true;
}
