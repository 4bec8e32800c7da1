import { mkdirSync, mkdtempSync, rmSync, symlinkSync, writeFileSync } from "node:fs";
import { request } from "node:http";
import { tmpdir } from "node:os";
import path from "node:path";
import { readFileSync } from "node:fs";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { CONTENT_SECURITY_POLICY, safeRelativePath, startStaticServer, type StaticServer } from "../../scripts/static-server.mjs";
import { CONTENT_SECURITY_POLICY as DESKTOP_POLICY } from "../../main/protocol";

let base: string;
let server: StaticServer;

/** Raw GET: node's http client sends the path exactly as given (no URL normalisation). */
function get(rawPath: string, method = "GET"): Promise<{ status: number; headers: Record<string, unknown>; body: string }> {
  return new Promise((resolve, reject) => {
    const req = request({ host: "127.0.0.1", port: server.port, path: rawPath, method }, (res) => {
      let body = "";
      res.setEncoding("utf8");
      res.on("data", (chunk) => (body += chunk));
      res.on("end", () => resolve({ status: res.statusCode ?? 0, headers: res.headers, body }));
    });
    req.on("error", reject);
    req.end();
  });
}

beforeAll(async () => {
  base = mkdtempSync(path.join(tmpdir(), "loopwright-static-"));
  const root = path.join(base, "root");
  mkdirSync(path.join(root, "assets"), { recursive: true });
  writeFileSync(path.join(root, "index.html"), "<!doctype html><title>t</title>");
  writeFileSync(path.join(root, "assets", "engine.worker-abc.js"), "self.onmessage=()=>{}");
  writeFileSync(path.join(root, "assets", "app.css"), "body{}");
  writeFileSync(path.join(root, "assets", "notes.unknownext"), "x");
  writeFileSync(path.join(base, "secret.txt"), "outside the root");
  symlinkSync(path.join(base, "secret.txt"), path.join(root, "link.txt"));
  server = await startStaticServer({ root, port: 0 });
});

afterAll(async () => {
  await server?.close();
  rmSync(base, { recursive: true, force: true });
});

describe("browser-mode static server", () => {
  it("listens on 127.0.0.1 at a free port when asked for port 0", () => {
    expect(server.port).toBeGreaterThan(0);
    expect(server.url).toBe(`http://127.0.0.1:${server.port}/`);
  });

  it("serves index.html at / with the app's Content-Security-Policy", async () => {
    const res = await get("/");
    expect(res.status).toBe(200);
    expect(res.headers["content-type"]).toBe("text/html; charset=utf-8");
    expect(res.headers["content-security-policy"]).toBe(CONTENT_SECURITY_POLICY);
    expect(res.headers["x-content-type-options"]).toBe("nosniff");
    expect(res.body).toContain("<title>t</title>");
  });

  it("serves worker scripts as JavaScript (module workers require a JavaScript MIME type)", async () => {
    const res = await get("/assets/engine.worker-abc.js?v=1");
    expect(res.status).toBe(200);
    expect(res.headers["content-type"]).toBe("text/javascript; charset=utf-8");
  });

  it("answers HEAD without a body and refuses other methods", async () => {
    expect(await get("/assets/app.css", "HEAD")).toMatchObject({ status: 200, body: "" });
    expect((await get("/", "POST")).status).toBe(405);
  });

  it.each([
    "/../secret.txt",
    "/assets/../../secret.txt",
    "/%2e%2e/secret.txt",
    "/assets/%2E%2E/%2e%2e/secret.txt",
    "/..%2fsecret.txt",
    "/..%5csecret.txt",
    "/%252e%252e/secret.txt",
    "//secret.txt",
    "/assets/%00.js",
    "/%E0%A4%A.js",
  ])("refuses the traversal attempt %s with 403", async (attempt) => {
    const res = await get(attempt);
    expect(res.status).toBe(403);
    expect(res.body).not.toContain("outside the root");
  });

  it("refuses a symbolic link that points outside the root", async () => {
    const res = await get("/link.txt");
    expect(res.status).toBe(403);
    expect(res.body).not.toContain("outside the root");
  });

  it("answers 404 for missing files and for file types it does not serve", async () => {
    expect((await get("/missing.js")).status).toBe(404);
    expect((await get("/assets/notes.unknownext")).status).toBe(404);
    expect((await get("/assets")).status).toBe(404);
  });

  it("maps request paths to relative file paths only when every segment is plain", () => {
    expect(safeRelativePath("/")).toBe("index.html");
    expect(safeRelativePath("/assets/a%20b.js")).toBe("assets/a b.js");
    expect(safeRelativePath("/a/./b.js")).toBeNull();
    expect(safeRelativePath("relative.js")).toBeNull();
  });

  it("sends the same policy as the desktop app's protocol handler", () => {
    expect(CONTENT_SECURITY_POLICY).toBe(DESKTOP_POLICY);
    expect(CONTENT_SECURITY_POLICY).toMatch(/^default-src 'self'; script-src 'self';/);
  });

  it("puts the same policy in index.html, less frame-ancestors (which a meta tag cannot set)", () => {
    const html = readFileSync(new URL("../../renderer/index.html", import.meta.url), "utf8");
    const meta = /http-equiv="Content-Security-Policy"\s+content="([^"]+)"/.exec(html)?.[1];
    expect(meta).toBe(CONTENT_SECURITY_POLICY.replace("; frame-ancestors 'none'", ""));
  });
});
