/**
 * In-process stand-ins for the Electron IPC objects (the Electron binary cannot start in tests).
 * `createIpcPair` joins a fake ipcRenderer to a fake ipcMain the way Electron does: arguments
 * and answers are structured-cloned, handlers get an event with `sender` and `senderFrame`.
 */
import type { IpcEventLike, IpcMainLike, IpcSender } from "../../../main/ipc";
import type { IpcRendererLike } from "../../../main/createPreloadApi";

type MainListener = (event: IpcEventLike, ...args: unknown[]) => unknown;

export interface FakeIpcMain extends IpcMainLike {
  handlers: Map<string, MainListener>;
  listeners: Map<string, MainListener[]>;
}

export function createFakeIpcMain(): FakeIpcMain {
  const handlers = new Map<string, MainListener>();
  const listeners = new Map<string, MainListener[]>();
  return {
    handlers,
    listeners,
    handle(channel, listener) {
      if (handlers.has(channel)) throw new Error(`Attempted to register a second handler for '${channel}'`);
      handlers.set(channel, listener as MainListener);
    },
    removeHandler(channel) {
      handlers.delete(channel);
    },
    on(channel, listener) {
      listeners.set(channel, [...(listeners.get(channel) ?? []), listener as MainListener]);
      return this;
    },
    removeListener(channel, listener) {
      listeners.set(channel, (listeners.get(channel) ?? []).filter((l) => l !== listener));
      return this;
    },
  };
}

export interface FakeSender extends IpcSender {
  sent: Array<{ channel: string; payload: unknown }>;
  destroyed: boolean;
}

export function createFakeSender(id = 1, deliver?: (channel: string, payload: unknown) => void): FakeSender {
  const sender: FakeSender = {
    id,
    sent: [],
    destroyed: false,
    send(channel, payload) {
      sender.sent.push({ channel, payload });
      deliver?.(channel, structuredClone(payload));
    },
    isDestroyed: () => sender.destroyed,
  };
  return sender;
}

export interface IpcPair {
  ipcMain: FakeIpcMain;
  ipcRenderer: IpcRendererLike;
  sender: FakeSender;
  /** The URL of the frame the renderer side claims to be (the sender check reads it). */
  frame: { url: string };
}

export function createIpcPair(frameUrl = "app://loopwright/index.html", senderId = 1): IpcPair {
  const ipcMain = createFakeIpcMain();
  const rendererListeners = new Map<string, Array<(event: unknown, ...args: unknown[]) => void>>();
  const frame = { url: frameUrl };
  const sender = createFakeSender(senderId, (channel, payload) => {
    for (const listener of rendererListeners.get(channel) ?? []) listener({}, payload);
  });
  const event = (): IpcEventLike => ({ sender, senderFrame: frame });
  const ipcRenderer: IpcRendererLike = {
    async invoke(channel, ...args) {
      const handler = ipcMain.handlers.get(channel);
      if (!handler) throw new Error(`No handler registered for '${channel}'`);
      const cloned = structuredClone(args); // throws DataCloneError for functions, as Electron does
      return structuredClone(await handler(event(), ...cloned));
    },
    send(channel, ...args) {
      const cloned = structuredClone(args);
      for (const listener of ipcMain.listeners.get(channel) ?? []) listener(event(), ...cloned);
    },
    on(channel, listener) {
      rendererListeners.set(channel, [...(rendererListeners.get(channel) ?? []), listener]);
      return this;
    },
  };
  return { ipcMain, ipcRenderer, sender, frame };
}
