import { describe, expect, it } from "vitest";
import { IPC_CHANNELS } from "../../../shared-engine/api/contract";
import { startApp } from "../../../main/startApp";
import { createFakeIpcMain } from "./fakeElectron";
import { InProcessWorker } from "./inProcessWorker";

function fakeElectron(options: { lock?: boolean; platform?: string } = {}) {
  const log: string[] = [];
  const appListeners = new Map<string, Array<(...args: never[]) => void>>();
  let readyResolve: () => void = () => undefined;
  const ready = new Promise<void>((resolve) => (readyResolve = resolve));
  const app = {
    quitCalls: 0,
    requestSingleInstanceLock: () => options.lock ?? true,
    quit() {
      app.quitCalls++;
    },
    whenReady: () => ready,
    on(event: string, listener: (...args: never[]) => void) {
      log.push(`app.on ${event}`);
      appListeners.set(event, [...(appListeners.get(event) ?? []), listener]);
      return app;
    },
  };
  const emit = (event: string, ...args: unknown[]) => (appListeners.get(event) ?? []).forEach((l) => (l as (...a: unknown[]) => void)(...args));
  const protocol = {
    registerSchemesAsPrivileged: (schemes: unknown) => log.push(`privileged ${JSON.stringify(schemes)}`),
    handle: (scheme: string) => log.push(`handle ${scheme}`),
  };
  const session = {
    setPermissionRequestHandler: () => log.push("permission request handler"),
    setPermissionCheckHandler: () => log.push("permission check handler"),
  };
  const windows: FakeWindow[] = [];
  class FakeWindow {
    minimized = true;
    focused = false;
    urls: string[] = [];
    constructor(public options: { webPreferences?: { preload?: string } }) {
      windows.push(this);
    }
    static getAllWindows = () => windows;
    loadURL(url: string) {
      this.urls.push(url);
      return Promise.resolve();
    }
    once() {}
    show() {}
    isMinimized() {
      return this.minimized;
    }
    restore() {
      this.minimized = false;
    }
    focus() {
      this.focused = true;
    }
  }
  const ipcMain = createFakeIpcMain();
  const deps = {
    app,
    protocol,
    session: () => session,
    ipcMain,
    BrowserWindow: FakeWindow,
    platform: options.platform ?? "linux",
    files: { readFile: async () => new Uint8Array() },
    paths: { rendererRoot: "/r", preload: "/m/preload.cjs" },
    createWorker: () => new InProcessWorker(),
  };
  return { deps, app, log, emit, windows, ipcMain, ready: async () => (readyResolve(), await ready, await Promise.resolve()) };
}

describe("startApp", () => {
  it("registers the app scheme as privileged before anything else, then waits for ready", () => {
    const fake = fakeElectron();
    expect(startApp(fake.deps)).toBe(true);
    expect(fake.log[0]).toBe('privileged [{"scheme":"app","privileges":{"standard":true,"secure":true,"supportFetchAPI":true}}]');
    expect(fake.windows).toHaveLength(0);
    expect(fake.ipcMain.handlers.size).toBe(0);
  });

  it("quits at once and sets nothing up when another instance holds the lock", async () => {
    const fake = fakeElectron({ lock: false });
    expect(startApp(fake.deps)).toBe(false);
    expect(fake.app.quitCalls).toBe(1);
    await fake.ready();
    expect(fake.windows).toHaveLength(0);
    expect(fake.log.filter((l) => l.startsWith("app.on"))).toEqual([]);
  });

  it("on ready installs guards, the protocol and the engine IPC before opening the hardened window", async () => {
    const fake = fakeElectron();
    startApp(fake.deps);
    await fake.ready();
    const order = fake.log.filter((l) => !l.startsWith("privileged"));
    expect(order.indexOf("app.on web-contents-created")).toBeLessThan(order.indexOf("handle app"));
    expect(order).toContain("permission request handler");
    expect(order).toContain("permission check handler");
    expect(fake.ipcMain.handlers.has(IPC_CHANNELS.request)).toBe(true);
    expect(fake.windows).toHaveLength(1);
    expect(fake.windows[0]!.options.webPreferences?.preload).toBe("/m/preload.cjs");
    expect(fake.windows[0]!.urls).toEqual(["app://loopwright/index.html"]);
  });

  it("focuses and restores the existing window when a second instance starts", async () => {
    const fake = fakeElectron();
    startApp(fake.deps);
    await fake.ready();
    fake.emit("second-instance");
    expect(fake.windows[0]!.minimized).toBe(false);
    expect(fake.windows[0]!.focused).toBe(true);
  });

  it.each([
    ["linux", 1],
    ["win32", 1],
    ["darwin", 0],
  ])("on %s, closing all windows quits %i time(s)", async (platform, quits) => {
    const fake = fakeElectron({ platform });
    startApp(fake.deps);
    await fake.ready();
    fake.emit("window-all-closed");
    expect(fake.app.quitCalls).toBe(quits);
  });

  it("reopens a window on activate when none is open, and removes the IPC handlers on will-quit", async () => {
    const fake = fakeElectron({ platform: "darwin" });
    startApp(fake.deps);
    await fake.ready();
    fake.emit("activate");
    expect(fake.windows).toHaveLength(1); // one is open: nothing to do
    fake.windows.length = 0;
    fake.emit("activate");
    expect(fake.windows).toHaveLength(1);
    fake.emit("will-quit");
    expect(fake.ipcMain.handlers.has(IPC_CHANNELS.request)).toBe(false);
  });
});
