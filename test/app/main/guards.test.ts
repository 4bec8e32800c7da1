import { describe, expect, it } from "vitest";
import { denyAllPermissions, hardenWebContents, installGuards, isTrustedSender, type GuardedWebContents, type GuardRefusal, type GuardedSession } from "../../../main/guards";
import { isAppOriginUrl } from "../../../main/appOrigin";

type RequestHandler = Parameters<GuardedSession["setPermissionRequestHandler"]>[0];
type CheckHandler = Parameters<GuardedSession["setPermissionCheckHandler"]>[0];

type Listener = (event: { preventDefault(): void; url?: string }, url?: string) => void;

function fakeContents() {
  const listeners = new Map<string, Listener>();
  let openHandler: ((details: { url: string }) => { action: "deny" }) | null = null;
  const contents: GuardedWebContents = {
    on(event: string, listener: Listener) {
      listeners.set(event, listener);
      return contents;
    },
    setWindowOpenHandler(handler) {
      openHandler = handler;
    },
  } as GuardedWebContents;
  /** Fires an event and says whether the guard prevented it. */
  const fire = (event: string, url?: string, positional = false): boolean => {
    let prevented = false;
    const e = { preventDefault: () => (prevented = true), ...(positional ? {} : { url }) };
    const listener = listeners.get(event);
    if (!listener) throw new Error(`no ${event} listener`);
    listener(e, url);
    return prevented;
  };
  return { contents, fire, open: (url: string) => openHandler?.({ url }) };
}

const foreignUrls = [
  "https://example.com/",
  "http://loopwright/index.html",
  "file:///etc/passwd",
  "app://loopwright.evil/index.html",
  "app://evil/index.html",
  "app://user@loopwright/index.html",
  "app://loopwright:8080/index.html",
  "javascript:alert(1)",
  "data:text/html,<script>1</script>",
  "about:blank",
  "",
];

describe("navigation guards", () => {
  it("allow navigation and redirects within app://loopwright", () => {
    const { contents, fire } = fakeContents();
    hardenWebContents(contents);
    expect(fire("will-navigate", "app://loopwright/index.html#/plants")).toBe(false);
    expect(fire("will-redirect", "app://loopwright/sheet.html")).toBe(false);
    expect(fire("will-frame-navigate", "app://loopwright/sheet.html")).toBe(false);
    expect(fire("will-navigate", "APP://LOOPWRIGHT/index.html")).toBe(false);
  });

  it.each(foreignUrls)("prevent navigation and redirects to %j", (url) => {
    const { contents, fire } = fakeContents();
    const refused: GuardRefusal[] = [];
    hardenWebContents(contents, (r) => refused.push(r));
    expect(fire("will-navigate", url)).toBe(true);
    expect(fire("will-frame-navigate", url)).toBe(true);
    expect(fire("will-redirect", url)).toBe(true);
    expect(refused.map((r) => r.what)).toEqual(["navigation", "navigation", "redirect"]);
  });

  it("read the URL from the positional argument when the event carries none", () => {
    const { contents, fire } = fakeContents();
    hardenWebContents(contents);
    expect(fire("will-navigate", "https://example.com/", true)).toBe(true);
    expect(fire("will-navigate", "app://loopwright/index.html", true)).toBe(false);
  });

  it("prevent navigation when no URL is known at all", () => {
    const { contents, fire } = fakeContents();
    hardenWebContents(contents);
    expect(fire("will-navigate", undefined)).toBe(true);
  });

  it("deny every new window and every webview, even same-origin ones", () => {
    const { contents, fire, open } = fakeContents();
    hardenWebContents(contents);
    expect(open("app://loopwright/index.html")).toEqual({ action: "deny" });
    expect(open("https://example.com/")).toEqual({ action: "deny" });
    expect(fire("will-attach-webview")).toBe(true);
  });
});

describe("installGuards", () => {
  it("hardens every web contents created after it is installed and denies all permissions", () => {
    let created: ((event: unknown, contents: GuardedWebContents) => void) | null = null;
    const app = {
      on(_event: "web-contents-created", listener: (event: unknown, contents: GuardedWebContents) => void) {
        created = listener;
      },
    };
    const handlers: { request?: RequestHandler; check?: CheckHandler } = {};
    const session = {
      setPermissionRequestHandler: (h: RequestHandler) => (handlers.request = h),
      setPermissionCheckHandler: (h: CheckHandler) => (handlers.check = h),
    };
    installGuards(app, session);
    const { contents, fire } = fakeContents();
    created!({}, contents);
    expect(fire("will-navigate", "https://example.com/")).toBe(true);
    const answers: boolean[] = [];
    for (const permission of ["media", "notifications", "geolocation", "clipboard-read", "openExternal"]) {
      handlers.request!({}, permission, (granted: boolean) => answers.push(granted), {});
      answers.push(handlers.check!({}, permission, "app://loopwright", {}));
    }
    expect(answers).toHaveLength(10);
    expect(answers.every((granted) => granted === false)).toBe(true);
  });

  it("reports each refused permission to the refusal callback", () => {
    const handlers: { request?: RequestHandler; check?: CheckHandler } = {};
    const refused: GuardRefusal[] = [];
    denyAllPermissions(
      { setPermissionRequestHandler: (h) => (handlers.request = h), setPermissionCheckHandler: (h) => (handlers.check = h) },
      (r) => refused.push(r),
    );
    handlers.request!({}, "media", () => undefined);
    handlers.check!({}, "hid");
    expect(refused).toEqual([
      { what: "permission-request", detail: "media" },
      { what: "permission-check", detail: "hid" },
    ]);
  });
});

describe("isTrustedSender", () => {
  it("accepts frames on the app origin", () => {
    expect(isTrustedSender({ url: "app://loopwright/index.html" })).toBe(true);
    expect(isTrustedSender({ url: "app://loopwright/" })).toBe(true);
  });

  it.each(foreignUrls)("refuses a frame at %j", (url) => {
    expect(isTrustedSender({ url })).toBe(false);
  });

  it("refuses a missing frame, a non-string URL and a frame that throws on access", () => {
    expect(isTrustedSender(null)).toBe(false);
    expect(isTrustedSender(undefined)).toBe(false);
    expect(isTrustedSender({ url: 42 } as unknown as { url: string })).toBe(false);
    const destroyed = Object.defineProperty({}, "url", {
      get() {
        throw new Error("Render frame was disposed before WebFrameMain could be accessed");
      },
    }) as { url: string };
    expect(isTrustedSender(destroyed)).toBe(false);
  });

  it("agrees with isAppOriginUrl on every listed URL", () => {
    for (const url of [...foreignUrls, "app://loopwright/x"]) expect(isTrustedSender({ url })).toBe(isAppOriginUrl(url));
  });
});
