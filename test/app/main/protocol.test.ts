import path from "node:path";
import fc from "fast-check";
import { describe, expect, it } from "vitest";
import {
  APP_SCHEME_PRIVILEGES,
  CONTENT_SECURITY_POLICY,
  createAppProtocolHandler,
  installAppProtocol,
  registerAppSchemePrivileged,
  resolveAppRequest,
} from "../../../main/protocol";

const root = path.resolve("/srv/loopwright/dist/renderer");

// The exact policy required by the foundation issue (items 3/4); common practice for hardened
// Electron apps: no remote sources, no inline script, no eval, no plugins, no framing.
const REQUIRED_CSP =
  "default-src 'self'; script-src 'self'; style-src 'self' 'unsafe-inline'; img-src 'self' data: blob:; font-src 'self'; connect-src 'self'; worker-src 'self' blob:; object-src 'none'; base-uri 'none'; form-action 'none'; frame-ancestors 'none'";

describe("resolveAppRequest", () => {
  it("serves index.html for the bare origin and for /", () => {
    for (const url of ["app://loopwright", "app://loopwright/", "app://loopwright/?x=1#top"]) {
      expect(resolveAppRequest(url, root)).toEqual({ ok: true, filePath: path.join(root, "index.html"), mimeType: "text/html; charset=utf-8" });
    }
  });

  it("maps nested asset paths inside the root with their MIME types, ignoring query and fragment", () => {
    const cases: Array<[string, string, string]> = [
      ["app://loopwright/assets/index-3f2a.js?v=2", "assets/index-3f2a.js", "text/javascript; charset=utf-8"],
      ["app://loopwright/assets/worker.mjs", "assets/worker.mjs", "text/javascript; charset=utf-8"],
      ["app://loopwright/assets/app.css#x", "assets/app.css", "text/css; charset=utf-8"],
      ["app://loopwright/icon.svg", "icon.svg", "image/svg+xml"],
      ["app://loopwright/fonts/Inter.WOFF2", "fonts/Inter.WOFF2", "font/woff2"],
      ["app://loopwright/engine.wasm", "engine.wasm", "application/wasm"],
      ["app://loopwright/my%20plot.png", "my plot.png", "image/png"],
      ["APP://LoopWright/index.html", "index.html", "text/html; charset=utf-8"],
    ];
    for (const [url, relative, mimeType] of cases) {
      expect(resolveAppRequest(url, root), url).toEqual({ ok: true, filePath: path.join(root, relative), mimeType });
    }
  });

  const hostile: Array<[string, number]> = [
    ["app://loopwright/../secret.txt", 403],
    ["app://loopwright/assets/../../etc/passwd.txt", 403],
    ["app://loopwright/%2e%2e/%2e%2e/etc/passwd.txt", 403],
    ["app://loopwright/%2E%2E/x.js", 403],
    ["app://loopwright/.%2e/x.js", 403],
    ["app://loopwright/assets/..%2f..%2fx.js", 403],
    ["app://loopwright/..%5c..%5cwindows%5cwin.ini", 403],
    ["app://loopwright/%252e%252e/x.js", 403],
    ["app://loopwright/./index.html", 403],
    ["app://loopwright//etc/passwd.txt", 403],
    ["app://loopwright/C:/Windows/win.ini", 403],
    ["app://loopwright/C%3A%5CWindows%5Cwin.ini", 403],
    ["app://loopwright/index.html%00.png", 403],
    ["app://loopwright/%E0%A4%A", 403],
    ["app://loopwright\\..\\secret.txt", 403],
    ["app://other/index.html", 403],
    ["app://loopwright.evil/index.html", 403],
    ["app://user@loopwright/index.html", 403],
    ["app://loopwright:443/index.html", 403],
    ["file:///etc/passwd", 403],
    ["https://loopwright/index.html", 403],
    ["/etc/passwd", 403],
    ["", 403],
    ["app://loopwright/main/main.ts", 404],
    ["app://loopwright/secrets.env", 404],
    ["app://loopwright/bin/loopwright", 404],
  ];
  it.each(hostile)("refuses %j with status %i", (url, status) => {
    const result = resolveAppRequest(url, root);
    expect(result.ok).toBe(false);
    if (!result.ok) expect(result.status).toBe(status);
  });

  it("never resolves a path outside the root, whatever segments a URL is built from", () => {
    const segment = fc.constantFrom("..", ".", "%2e%2e", "%2E.", ".%2e", "assets", "a.js", "%2f", "%5c", "", "x%00", "..%2f", "C:", "%252e");
    fc.assert(
      fc.property(fc.array(segment, { minLength: 1, maxLength: 6 }), (segments) => {
        const result = resolveAppRequest(`app://loopwright/${segments.join("/")}`, root);
        if (result.ok) {
          const relative = path.relative(root, result.filePath);
          expect(relative.startsWith("..") || path.isAbsolute(relative)).toBe(false);
          expect(result.filePath.startsWith(root + path.sep)).toBe(true);
        }
      }),
      { seed: 20240611, numRuns: 500 },
    );
  });
});

describe("createAppProtocolHandler", () => {
  const files = new Map<string, string>([
    [path.join(root, "index.html"), "<!doctype html><title>Loopwright</title>"],
    [path.join(root, "assets", "app.js"), "console.log(1)"],
  ]);
  const reads: string[] = [];
  const handler = createAppProtocolHandler(
    {
      async readFile(filePath) {
        reads.push(filePath);
        if (filePath.endsWith("broken.js")) throw Object.assign(new Error("EIO"), { code: "EIO" });
        const text = files.get(filePath);
        if (text === undefined) throw Object.assign(new Error("ENOENT"), { code: "ENOENT" });
        return new TextEncoder().encode(text);
      },
    },
    root,
  );

  it("serves an existing file with its MIME type, the strict CSP and nosniff", async () => {
    const response = await handler({ url: "app://loopwright/index.html", method: "GET" });
    expect(response.status).toBe(200);
    expect(response.headers.get("content-type")).toBe("text/html; charset=utf-8");
    expect(response.headers.get("content-security-policy")).toBe(REQUIRED_CSP);
    expect(response.headers.get("x-content-type-options")).toBe("nosniff");
    expect(await response.text()).toBe("<!doctype html><title>Loopwright</title>");
  });

  it("puts the CSP on refusals too: 403 traversal, 404 missing, 405 wrong method, 500 read failure", async () => {
    const cases: Array<[string, string, number]> = [
      ["app://loopwright/%2e%2e/%2e%2e/etc/passwd.txt", "GET", 403],
      ["app://loopwright/missing.js", "GET", 404],
      ["app://loopwright/assets/app.js", "POST", 405],
      ["app://loopwright/broken.js", "GET", 500],
    ];
    for (const [url, method, status] of cases) {
      const response = await handler({ url, method });
      expect(response.status, url).toBe(status);
      expect(response.headers.get("content-security-policy"), url).toBe(REQUIRED_CSP);
    }
  });

  it("does not touch the file system for a refused URL", async () => {
    reads.length = 0;
    await handler({ url: "app://loopwright/../../etc/passwd.txt", method: "GET" });
    await handler({ url: "app://evil/index.html", method: "GET" });
    expect(reads).toEqual([]);
  });

  it("answers HEAD with headers and no body", async () => {
    const response = await handler({ url: "app://loopwright/assets/app.js", method: "HEAD" });
    expect(response.status).toBe(200);
    expect(response.headers.get("content-type")).toBe("text/javascript; charset=utf-8");
    expect(await response.text()).toBe("");
  });
});

describe("scheme registration", () => {
  it("uses exactly the required Content-Security-Policy", () => {
    expect(CONTENT_SECURITY_POLICY).toBe(REQUIRED_CSP);
  });

  it("registers app as standard, secure and fetch-capable, without bypassing CSP", () => {
    const calls: unknown[] = [];
    registerAppSchemePrivileged({ registerSchemesAsPrivileged: (schemes) => calls.push(schemes) });
    expect(calls).toEqual([[{ scheme: "app", privileges: { standard: true, secure: true, supportFetchAPI: true } }]]);
    expect(APP_SCHEME_PRIVILEGES).not.toHaveProperty("bypassCSP");
  });

  it("installs a handler for the app scheme that forwards url and method", async () => {
    let installed: ((request: Request) => Response | Promise<Response>) | null = null;
    const seen: Array<{ url: string; method: string }> = [];
    installAppProtocol(
      {
        handle: (scheme, h) => {
          expect(scheme).toBe("app");
          installed = h;
        },
      },
      async (request) => {
        seen.push(request);
        return new Response("ok");
      },
    );
    await installed!(new Request("app://loopwright/index.html", { method: "GET" }));
    expect(seen).toEqual([{ url: "app://loopwright/index.html", method: "GET" }]);
  });
});
