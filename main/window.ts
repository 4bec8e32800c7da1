/**
 * The main window, created with the Electron security checklist applied. `mainWindowOptions` is
 * pure (unit-tested); `createMainWindow` only constructs the window and loads the app entry.
 */
import type { BrowserWindowConstructorOptions } from "electron";
import { APP_ENTRY_URL } from "./appOrigin";

export interface MainWindowSettings {
  /** Absolute path of the bundled preload script (dist/main/preload.cjs). */
  preloadPath: string;
  /** Window icon (Linux and Windows; macOS takes it from the bundle). */
  iconPath?: string;
  width?: number;
  height?: number;
  /** Told when the entry page fails to load (for example when dist/renderer was not built). */
  onLoadError?: (error: unknown) => void;
}

/** The few members of a BrowserWindow that this module uses. */
export interface MainWindowLike {
  loadURL(url: string): Promise<void>;
  once(event: "ready-to-show", listener: () => void): unknown;
  show(): void;
}

/** The slice of the electron module this module needs (injected so tests need no Electron). */
export interface WindowElectron<W extends MainWindowLike = MainWindowLike> {
  BrowserWindow: new (options: BrowserWindowConstructorOptions) => W;
}

/**
 * Computes the BrowserWindow options. Every web preference that matters for security is set
 * explicitly, even where it equals Electron's default, so a future default change cannot
 * weaken the app silently.
 */
export function mainWindowOptions(settings: MainWindowSettings): BrowserWindowConstructorOptions {
  if (typeof settings.preloadPath !== "string" || settings.preloadPath.length === 0) {
    throw new TypeError("preloadPath must be a non-empty absolute path to the bundled preload script");
  }
  return {
    width: settings.width ?? 1280,
    height: settings.height ?? 820,
    minWidth: 900,
    minHeight: 600,
    title: "Loopwright",
    // Shown on ready-to-show, so the user never sees an empty white frame.
    show: false,
    ...(settings.iconPath ? { icon: settings.iconPath } : {}),
    webPreferences: {
      preload: settings.preloadPath,
      // The page and the preload run in separate JavaScript worlds; only contextBridge crosses.
      contextIsolation: true,
      // The renderer is an OS-sandboxed Chromium process; the preload gets no Node either.
      sandbox: true,
      nodeIntegration: false,
      nodeIntegrationInWorker: false,
      nodeIntegrationInSubFrames: false,
      webSecurity: true,
      allowRunningInsecureContent: false,
      experimentalFeatures: false,
      webviewTag: false,
      navigateOnDragDrop: false,
      spellcheck: false,
    },
  };
}

/** Creates the main window, shows it when painted, and loads `app://loopwright/index.html`. */
export function createMainWindow<W extends MainWindowLike>(electron: WindowElectron<W>, settings: MainWindowSettings): W {
  const window = new electron.BrowserWindow(mainWindowOptions(settings));
  window.once("ready-to-show", () => window.show());
  window.loadURL(APP_ENTRY_URL).catch((error: unknown) => settings.onLoadError?.(error));
  return window;
}
