export declare const CONTENT_SECURITY_POLICY: string;
// Types for securityHeaders.mjs (imported by main/protocol.ts and scripts/static-server.mjs).
export declare const MIME_TYPES: Readonly<Record<string, string>>;
export declare const COMMON_RESPONSE_HEADERS: Readonly<{
  "X-Content-Type-Options": string;
  "Referrer-Policy": string;
  "Cross-Origin-Opener-Policy": string;
  "Cache-Control": string;
}>;
