// A tiny static file server for browser mode and the end-to-end tests: serves one directory
// (the renderer build) on 127.0.0.1 only, with the app's Content-Security-Policy on every
// response. Refuses anything that could leave the root: `..` or `.` segments (raw or
// percent-encoded), backslashes, NUL, double encoding, and (as a last check) any resolved path
// outside the root, including through symbolic links.
import { createServer } from "node:http";
import { createReadStream } from "node:fs";
import { realpath, stat } from "node:fs/promises";
import path from "node:path";
import { COMMON_RESPONSE_HEADERS, CONTENT_SECURITY_POLICY, MIME_TYPES } from "../main/securityHeaders.mjs";

// The policy, like the file types and the other headers, comes from the one table the desktop
// app's protocol handler uses.
export { CONTENT_SECURITY_POLICY };

// The file types and the other headers come from the one table the desktop app uses.
export { MIME_TYPES };

const BASE_HEADERS = {
  "Content-Security-Policy": CONTENT_SECURITY_POLICY,
  ...COMMON_RESPONSE_HEADERS,
};

/**
 * Maps a request path (the part of the URL before `?`) to a relative file path inside the
 * root, or returns null when it must be refused. `/` maps to `index.html`.
 */
export function safeRelativePath(urlPath) {
  if (typeof urlPath !== "string" || !urlPath.startsWith("/")) return null;
  const raw = urlPath === "/" ? ["index.html"] : urlPath.slice(1).split("/");
  const segments = [];
  for (const part of raw) {
    let segment;
    try {
      segment = decodeURIComponent(part);
    } catch {
      return null; // malformed percent-encoding
    }
    if (segment === "" || segment === "." || segment === "..") return null;
    if (/[\\/:\0%]/.test(segment)) return null; // encoded slash, backslash, drive colon, NUL, double encoding
    segments.push(segment);
  }
  return segments.join("/");
}

/**
 * Starts the server. Resolves to { url, port, close() } once listening.
 * @param {{ root: string, port?: number, host?: string }} options port 0 picks a free port.
 */
export async function startStaticServer({ root, port = 5178, host = "127.0.0.1" }) {
  const rootReal = await realpath(root);

  const server = createServer(async (request, response) => {
    const send = (status, body, extra = {}) => {
      response.writeHead(status, { ...BASE_HEADERS, "Content-Type": "text/plain; charset=utf-8", ...extra });
      response.end(request.method === "HEAD" ? undefined : body);
    };
    try {
      if (request.method !== "GET" && request.method !== "HEAD") return send(405, "Method not allowed\n", { Allow: "GET, HEAD" });
      const urlPath = (request.url ?? "/").split(/[?#]/, 1)[0];
      const relative = safeRelativePath(urlPath);
      if (relative === null) return send(403, "Forbidden\n");
      const mimeType = MIME_TYPES[path.extname(relative).toLowerCase()];
      if (!mimeType) return send(404, "Not found\n");
      let filePath;
      try {
        filePath = await realpath(path.join(rootReal, relative));
      } catch {
        return send(404, "Not found\n");
      }
      if (filePath !== rootReal && !filePath.startsWith(rootReal + path.sep)) return send(403, "Forbidden\n");
      const info = await stat(filePath);
      if (!info.isFile()) return send(404, "Not found\n");
      response.writeHead(200, { ...BASE_HEADERS, "Content-Type": mimeType, "Content-Length": String(info.size) });
      if (request.method === "HEAD") return response.end();
      createReadStream(filePath)
        .on("error", () => response.destroy())
        .pipe(response);
    } catch {
      if (!response.headersSent) send(500, "Internal error\n");
      else response.destroy();
    }
  });

  await new Promise((resolve, reject) => {
    server.once("error", reject);
    server.listen(port, host, () => {
      server.off("error", reject);
      resolve();
    });
  });
  const actualPort = server.address().port;
  return {
    url: `http://${host}:${actualPort}/`,
    port: actualPort,
    close: () =>
      new Promise((resolve) => {
        server.close(() => resolve());
        server.closeAllConnections?.();
      }),
  };
}
