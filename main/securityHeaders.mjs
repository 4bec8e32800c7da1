// The response headers and file types shared by the desktop app's `app://` protocol handler
// (main/protocol.ts, bundled by esbuild) and the browser-mode static server
// (scripts/static-server.mjs, plain Node): one table, so the two serve the same files the same
// way. Plain JavaScript so that both can import it; types in securityHeaders.d.mts.
//
// The Content-Security-Policy is here too (main/protocol.ts documents it directive by
// directive); renderer/index.html repeats it in a meta tag, less frame-ancestors, and
// test/e2e/staticServer.test.ts keeps that copy equal.

/** The strict policy on every response of both servers: own files only, no remote content. */
export const CONTENT_SECURITY_POLICY =
  "default-src 'self'; script-src 'self'; style-src 'self' 'unsafe-inline'; img-src 'self' data: blob:; " +
  "font-src 'self'; connect-src 'self'; worker-src 'self' blob:; object-src 'none'; base-uri 'none'; " +
  "form-action 'none'; frame-ancestors 'none'";

/** MIME types of the files a renderer build contains. Other extensions are refused (404). */
export const MIME_TYPES = {
  ".html": "text/html; charset=utf-8",
  ".js": "text/javascript; charset=utf-8",
  ".mjs": "text/javascript; charset=utf-8",
  ".css": "text/css; charset=utf-8",
  ".json": "application/json; charset=utf-8",
  ".map": "application/json; charset=utf-8",
  ".svg": "image/svg+xml",
  ".png": "image/png",
  ".jpg": "image/jpeg",
  ".jpeg": "image/jpeg",
  ".webp": "image/webp",
  ".ico": "image/x-icon",
  ".woff": "font/woff",
  ".woff2": "font/woff2",
  ".ttf": "font/ttf",
  ".wasm": "application/wasm",
  ".txt": "text/plain; charset=utf-8",
};

/**
 * Headers on every response besides Content-Type and the Content-Security-Policy: no MIME
 * sniffing, no referrer, a separate browsing context group, and revalidation on every load.
 */
export const COMMON_RESPONSE_HEADERS = {
  "X-Content-Type-Options": "nosniff",
  "Referrer-Policy": "no-referrer",
  "Cross-Origin-Opener-Policy": "same-origin",
  "Cache-Control": "no-cache",
};
