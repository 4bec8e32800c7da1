/**
 * The one origin the app's own pages are served from. Everything that decides "is this ours?"
 * (the protocol handler, navigation guards, the IPC sender check, the window's start URL) reads
 * these constants, so they cannot drift apart.
 *
 * WARNING: changing the scheme or host changes the origin, and with it the IndexedDB storage of
 * every saved project (storage is keyed by origin). Treat these as part of the file format.
 */
export const APP_SCHEME = "app";
export const APP_HOST = "loopwright";
export const APP_ORIGIN = `${APP_SCHEME}://${APP_HOST}`;
export const APP_ENTRY_URL = `${APP_ORIGIN}/index.html`;

/**
 * Splits a URL into scheme, authority and path without normalising it (the WHATWG parser would
 * silently remove `..` and `%2e%2e` segments, hiding a traversal attempt we want to refuse).
 * Returns null when the text is not of the form `scheme://authority/path?query#fragment`.
 */
export function splitUrl(url: string): { scheme: string; authority: string; path: string } | null {
  const match = /^([a-zA-Z][a-zA-Z0-9+.-]*):\/\/([^/?#\\]*)([^?#]*)/.exec(url);
  if (!match) return null;
  return { scheme: match[1]!.toLowerCase(), authority: match[2]!.toLowerCase(), path: match[3]! };
}

/**
 * True when `url` belongs to the app origin exactly: scheme `app`, host `loopwright`, no user
 * info and no port. Anything else (other hosts, `file:`, `http:`, `app://loopwright.evil`,
 * `app://x@loopwright`) is false.
 */
export function isAppOriginUrl(url: unknown): boolean {
  if (typeof url !== "string") return false;
  const parts = splitUrl(url);
  return parts !== null && parts.scheme === APP_SCHEME && parts.authority === APP_HOST;
}
