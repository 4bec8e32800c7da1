/**
 * The `app://loopwright/...` protocol: serves the built renderer (dist/renderer) and nothing
 * else. Pages are never loaded from `file://` (which would grant file-wide access) nor from a
 * local web server (which any process on the machine could reach).
 *
 * `resolveAppRequest` is pure: it maps a URL to a file inside the root or to a refusal, and is
 * unit-tested with hostile inputs. `createAppProtocolHandler` adds file reading and headers.
 */
import path from "node:path";
import { APP_HOST, APP_SCHEME, splitUrl } from "./appOrigin";
// A plain-JS module so that scripts/static-server.mjs (plain Node) serves with the same table.
import { COMMON_RESPONSE_HEADERS, CONTENT_SECURITY_POLICY, MIME_TYPES } from "./securityHeaders.mjs";

/**
 * The Content-Security-Policy sent with every response (pages, assets and refusals alike).
 *
 * - default-src 'self': anything not listed below may come only from app://loopwright.
 * - script-src 'self': only the bundled scripts; no inline script, no eval (the expression
 *   language is parsed, never evaluated as JavaScript).
 * - style-src 'self' 'unsafe-inline': bundled stylesheets, plus inline style attributes and
 *   <style> elements in markup built as text (SVG figures serialised for the design sheet and
 *   for export). React `style` props and d3 `.style()` go through the CSSOM and would not need
 *   it; drop 'unsafe-inline' once no markup-as-text carries style attributes.
 * - img-src 'self' data: blob: : plot exports are previewed and downloaded as data:/blob: URLs.
 * - font-src 'self': bundled fonts only; the app works offline.
 * - connect-src 'self': fetch() of the app's own assets (the scheme supports the Fetch API);
 *   the app makes no network requests.
 * - worker-src 'self' blob: : the bundled engine worker (browser mode) and workers the bundler
 *   inlines as blob: URLs.
 * - object-src 'none', base-uri 'none', form-action 'none', frame-ancestors 'none': no
 *   plugins, no <base> rewriting, no form posts, and the app cannot be framed.
 */
export { CONTENT_SECURITY_POLICY };

/** MIME types of the files a renderer build contains (shared with the static server). Other extensions are refused (404). */
export { MIME_TYPES };

export type AppRequestResolution =
  | { ok: true; filePath: string; mimeType: string }
  | { ok: false; status: 403 | 404; reason: string };

/**
 * Maps an `app://loopwright/<path>` URL to a file below `rootDir`, or refuses it.
 *
 * Refused with 403: another scheme or host (including user info or a port), a path segment that
 * is `.`/`..` raw or percent-encoded (`%2e%2e`), an empty segment (`//etc`), a segment holding
 * a slash, backslash, colon (drive letters), NUL or a `%` left after decoding (double encoding),
 * malformed percent-encoding, and (as a last check) any result outside `rootDir`.
 * Refused with 404: a file type not in MIME_TYPES. `/` and `` serve `index.html`; query and
 * fragment are ignored.
 */
export function resolveAppRequest(url: string, rootDir: string): AppRequestResolution {
  const parts = typeof url === "string" ? splitUrl(url) : null;
  if (!parts) return refuse(403, "not an absolute URL");
  if (parts.scheme !== APP_SCHEME) return refuse(403, `scheme ${parts.scheme} is not served`);
  if (parts.authority !== APP_HOST) return refuse(403, `host ${parts.authority} is not served`);

  if (parts.path !== "" && !parts.path.startsWith("/")) return refuse(403, "path does not start with /");
  const rawSegments = parts.path === "" || parts.path === "/" ? ["index.html"] : parts.path.slice(1).split("/");
  const segments: string[] = [];
  for (const raw of rawSegments) {
    let segment: string;
    try {
      segment = decodeURIComponent(raw);
    } catch {
      return refuse(403, "malformed percent-encoding");
    }
    if (segment === "" || segment === "." || segment === "..") return refuse(403, "empty or dot path segment");
    if (/[/\\:\0%]/.test(segment)) return refuse(403, "forbidden character in path segment");
    segments.push(segment);
  }

  const root = path.resolve(rootDir);
  const filePath = path.resolve(root, ...segments);
  const relative = path.relative(root, filePath);
  if (relative === "" || relative.startsWith("..") || path.isAbsolute(relative)) {
    return refuse(403, "path leaves the renderer folder");
  }
  const mimeType = MIME_TYPES[path.extname(filePath).toLowerCase()];
  if (!mimeType) return refuse(404, "file type is not served");
  return { ok: true, filePath, mimeType };
}

function refuse(status: 403 | 404, reason: string): AppRequestResolution {
  return { ok: false, status, reason };
}

/** Headers on every response: the CSP plus no MIME sniffing, no referrer, no caching quirks. */
export function appResponseHeaders(contentType: string): Record<string, string> {
  return {
    "Content-Type": contentType,
    "Content-Security-Policy": CONTENT_SECURITY_POLICY,
    ...COMMON_RESPONSE_HEADERS,
  };
}

export interface AppProtocolFiles {
  readFile(filePath: string): Promise<Uint8Array>;
}

export type AppProtocolHandler = (request: { url: string; method: string }) => Promise<Response>;

/** A protocol handler serving files below `rootDir` (GET and HEAD only). Never throws. */
export function createAppProtocolHandler(files: AppProtocolFiles, rootDir: string): AppProtocolHandler {
  return async (request) => {
    const method = (request.method || "GET").toUpperCase();
    if (method !== "GET" && method !== "HEAD") {
      return textResponse(405, "Method not allowed", { Allow: "GET, HEAD" });
    }
    const resolved = resolveAppRequest(request.url, rootDir);
    if (!resolved.ok) return textResponse(resolved.status, resolved.status === 403 ? "Forbidden" : "Not found");
    let body: Uint8Array;
    try {
      body = await files.readFile(resolved.filePath);
    } catch (error) {
      const code = (error as { code?: unknown } | null)?.code;
      const missing = code === "ENOENT" || code === "EISDIR" || code === "ENOTDIR";
      return textResponse(missing ? 404 : 500, missing ? "Not found" : "Could not read file");
    }
    const headers = appResponseHeaders(resolved.mimeType);
    return new Response(method === "HEAD" ? null : (body as unknown as ConstructorParameters<typeof Response>[0]), { status: 200, headers });
  };
}

function textResponse(status: number, text: string, extra: Record<string, string> = {}): Response {
  return new Response(text, { status, headers: { ...appResponseHeaders("text/plain; charset=utf-8"), ...extra } });
}

/** The slice of Electron's `protocol` module used here. */
export interface ProtocolLike {
  registerSchemesAsPrivileged(schemes: Array<{ scheme: string; privileges: Record<string, boolean> }>): void;
  handle(scheme: string, handler: (request: Request) => Response | Promise<Response>): void;
}

/**
 * The privileges of the `app` scheme. standard: URLs parse with host and path and the scheme
 * has an origin (so storage and same-origin checks work); secure: counts as a secure context
 * (crypto.subtle, workers); supportFetchAPI: the page may fetch its own assets.
 * Deliberately NOT bypassCSP (the CSP above must apply), not corsEnabled, not allowServiceWorkers.
 */
export const APP_SCHEME_PRIVILEGES = { standard: true, secure: true, supportFetchAPI: true } as const;

/** Registers the scheme as privileged. Electron requires this before `app` is ready. */
export function registerAppSchemePrivileged(protocol: Pick<ProtocolLike, "registerSchemesAsPrivileged">): void {
  protocol.registerSchemesAsPrivileged([{ scheme: APP_SCHEME, privileges: { ...APP_SCHEME_PRIVILEGES } }]);
}

/** Installs the handler for `app://` (after `app` is ready). */
export function installAppProtocol(protocol: Pick<ProtocolLike, "handle">, handler: AppProtocolHandler): void {
  protocol.handle(APP_SCHEME, (request) => handler({ url: request.url, method: request.method }));
}
