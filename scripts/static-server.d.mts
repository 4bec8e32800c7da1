// Types for static-server.mjs (used by the end-to-end tests, which are TypeScript).
export declare const CONTENT_SECURITY_POLICY: string;
export declare const MIME_TYPES: Readonly<Record<string, string>>;
export declare function safeRelativePath(urlPath: string): string | null;
export interface StaticServer {
  url: string;
  port: number;
  close(): Promise<void>;
}
export declare function startStaticServer(options: { root: string; port?: number; host?: string }): Promise<StaticServer>;
