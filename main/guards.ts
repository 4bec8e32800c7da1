/**
 * Guards applied to every web contents the app creates: no navigation (of any frame) away from the app origin,
 * no new windows, no <webview>, no permissions (camera, notifications, ...), and an IPC sender
 * check. Each takes the Electron objects as narrow injected interfaces so tests use fakes.
 */
import { isAppOriginUrl } from "./appOrigin";

/** The `event` Electron passes to will-navigate / will-redirect / will-attach-webview. */
export interface PreventableEvent {
  preventDefault(): void;
  /** Present on navigation events since Electron 25; older positional `url` is the fallback. */
  url?: string;
}

export interface GuardedWebContents {
  on(event: "will-navigate" | "will-frame-navigate" | "will-redirect", listener: (event: PreventableEvent, url?: string) => void): unknown;
  on(event: "will-attach-webview", listener: (event: PreventableEvent) => void): unknown;
  setWindowOpenHandler(handler: (details: { url: string }) => { action: "deny" }): void;
}

export interface GuardedApp {
  on(event: "web-contents-created", listener: (event: unknown, contents: GuardedWebContents) => void): unknown;
}

export interface GuardedSession {
  setPermissionRequestHandler(
    handler: (webContents: unknown, permission: string, callback: (granted: boolean) => void, details?: unknown) => void,
  ): void;
  setPermissionCheckHandler(handler: (webContents: unknown, permission: string, requestingOrigin?: string, details?: unknown) => boolean): void;
}

/** What a guard refused, for an optional log line (the guards never log by themselves). */
export interface GuardRefusal {
  what: "navigation" | "redirect" | "window-open" | "webview" | "permission-request" | "permission-check";
  detail: string;
}

/** Applies the navigation, window-open and webview guards to one web contents. */
export function hardenWebContents(contents: GuardedWebContents, onRefused: (refusal: GuardRefusal) => void = () => undefined): void {
  const navigationGuard = (what: "navigation" | "redirect") => (event: PreventableEvent, url?: string) => {
    const target = event.url ?? url;
    if (!isAppOriginUrl(target)) {
      event.preventDefault();
      onRefused({ what, detail: String(target) });
    }
  };
  contents.on("will-navigate", navigationGuard("navigation"));
  // Sub-frame navigations (will-navigate covers only the main frame since Electron 25).
  contents.on("will-frame-navigate", navigationGuard("navigation"));
  contents.on("will-redirect", navigationGuard("redirect"));
  contents.on("will-attach-webview", (event) => {
    event.preventDefault();
    onRefused({ what: "webview", detail: "webview tags are disabled" });
  });
  contents.setWindowOpenHandler((details) => {
    onRefused({ what: "window-open", detail: String(details?.url) });
    return { action: "deny" };
  });
}

/** Denies every permission request and check on a session. */
export function denyAllPermissions(session: GuardedSession, onRefused: (refusal: GuardRefusal) => void = () => undefined): void {
  session.setPermissionRequestHandler((_webContents, permission, callback) => {
    onRefused({ what: "permission-request", detail: String(permission) });
    callback(false);
  });
  session.setPermissionCheckHandler((_webContents, permission) => {
    onRefused({ what: "permission-check", detail: String(permission) });
    return false;
  });
}

/**
 * Installs the guards app-wide: every web contents created from now on is hardened (call this
 * before the first window is created), and the session denies all permissions.
 */
export function installGuards(app: GuardedApp, session: GuardedSession, onRefused?: (refusal: GuardRefusal) => void): void {
  app.on("web-contents-created", (_event, contents) => hardenWebContents(contents, onRefused));
  denyAllPermissions(session, onRefused);
}

/** The part of an IPC event's `senderFrame` that is checked. */
export interface SenderFrameLike {
  readonly url: string;
}

/**
 * True only for a frame whose URL is on the app origin (app://loopwright). A missing frame
 * (destroyed or navigated away), a frame on any other origin, or a non-string URL is untrusted.
 */
export function isTrustedSender(frame: SenderFrameLike | null | undefined): boolean {
  if (!frame || typeof frame !== "object") return false;
  let url: unknown;
  try {
    url = frame.url; // a destroyed WebFrameMain throws on access
  } catch {
    return false;
  }
  return isAppOriginUrl(url);
}
