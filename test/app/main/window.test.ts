import { describe, expect, it } from "vitest";
import { createMainWindow, mainWindowOptions } from "../../../main/window";
import { APP_ENTRY_URL } from "../../../main/appOrigin";

describe("mainWindowOptions", () => {
  it("applies every security web preference explicitly", () => {
    const options = mainWindowOptions({ preloadPath: "/opt/loopwright/dist/main/preload.cjs" });
    expect(options.webPreferences).toMatchObject({
      preload: "/opt/loopwright/dist/main/preload.cjs",
      contextIsolation: true,
      sandbox: true,
      nodeIntegration: false,
      nodeIntegrationInWorker: false,
      nodeIntegrationInSubFrames: false,
      webSecurity: true,
      allowRunningInsecureContent: false,
      experimentalFeatures: false,
      webviewTag: false,
    });
  });

  it("keeps the window hidden until it is painted and sets the icon only when given", () => {
    expect(mainWindowOptions({ preloadPath: "/p.cjs" }).show).toBe(false);
    expect(mainWindowOptions({ preloadPath: "/p.cjs" })).not.toHaveProperty("icon");
    expect(mainWindowOptions({ preloadPath: "/p.cjs", iconPath: "/i.png" }).icon).toBe("/i.png");
  });

  it("refuses an empty preload path", () => {
    expect(() => mainWindowOptions({ preloadPath: "" })).toThrow(/preloadPath/);
  });
});

describe("createMainWindow", () => {
  class FakeWindow {
    static created: FakeWindow[] = [];
    loaded: string[] = [];
    shown = false;
    readyListener: (() => void) | null = null;
    constructor(public options: unknown) {
      FakeWindow.created.push(this);
    }
    loadURL(url: string): Promise<void> {
      this.loaded.push(url);
      return Promise.resolve();
    }
    once(_event: "ready-to-show", listener: () => void): void {
      this.readyListener = listener;
    }
    show(): void {
      this.shown = true;
    }
  }

  it("loads the app entry URL and shows the window on ready-to-show", () => {
    const window = createMainWindow({ BrowserWindow: FakeWindow }, { preloadPath: "/p.cjs" });
    expect(window.loaded).toEqual([APP_ENTRY_URL]);
    expect(APP_ENTRY_URL).toBe("app://loopwright/index.html");
    expect(window.shown).toBe(false);
    window.readyListener?.();
    expect(window.shown).toBe(true);
    expect((window.options as { webPreferences: { sandbox: boolean } }).webPreferences.sandbox).toBe(true);
  });

  it("reports a failed page load to onLoadError instead of leaving an unhandled rejection", async () => {
    class FailingWindow extends FakeWindow {
      override loadURL(url: string): Promise<void> {
        this.loaded.push(url);
        return Promise.reject(new Error("ERR_FILE_NOT_FOUND"));
      }
    }
    const errors: unknown[] = [];
    createMainWindow({ BrowserWindow: FailingWindow }, { preloadPath: "/p.cjs", onLoadError: (e) => errors.push(e) });
    await new Promise((resolve) => setTimeout(resolve, 0));
    expect(String(errors[0])).toMatch(/ERR_FILE_NOT_FOUND/);
  });
});
