/**
 * The end-to-end rig: serves the built renderer (dist/renderer) with the browser-mode static
 * server and drives Debian Chromium through playwright-core with a fresh profile directory.
 */
import { existsSync, mkdirSync, mkdtempSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { fileURLToPath } from "node:url";
import { chromium, type BrowserContext, type Page } from "playwright-core";
import { afterAll, beforeAll } from "vitest";
import { startStaticServer, type StaticServer } from "../../scripts/static-server.mjs";

export const REPO_ROOT = fileURLToPath(new URL("../..", import.meta.url));
export const RENDERER_BUILD = path.join(REPO_ROOT, "dist", "renderer");
/** Screenshots land here (git-ignored). */
export const SCREENSHOT_DIR = path.join(REPO_ROOT, "test-output", "e2e");

export const CHROMIUM_ARGS = [
  "--headless",
  "--no-sandbox",
  "--disable-gpu",
  "--disable-quic",
  "--no-first-run",
  "--disable-background-networking",
  "--disable-component-update",
  "--disable-sync",
];

/** Serves dist/renderer on 127.0.0.1 at a free port. The build must exist (`vite build`). */
export async function serveRendererBuild(): Promise<StaticServer> {
  if (!existsSync(path.join(RENDERER_BUILD, "index.html"))) {
    throw new Error(`No renderer build at ${RENDERER_BUILD}; run \`npx vite build\` first (npm run test:e2e does).`);
  }
  return startStaticServer({ root: RENDERER_BUILD, port: 0 });
}

/** A new, empty browser profile directory; remove it with `removeProfileDir`. */
export function freshProfileDir(): string {
  return mkdtempSync(path.join(tmpdir(), "loopwright-e2e-"));
}

export function removeProfileDir(dir: string): void {
  rmSync(dir, { recursive: true, force: true });
}

/** Launches headless Chromium on `profileDir`, with a 1366×768 viewport (our smallest target). */
export async function launchBrowser(profileDir: string, options: { colorScheme?: "light" | "dark" } = {}): Promise<BrowserContext> {
  const executablePath = process.env.CHROMIUM_PATH ?? "/usr/bin/chromium";
  if (!existsSync(executablePath)) throw new Error(`Chromium not found at ${executablePath}; install it or set CHROMIUM_PATH`);
  return chromium.launchPersistentContext(profileDir, {
    executablePath,
    headless: true,
    args: CHROMIUM_ARGS,
    viewport: { width: 1366, height: 768 },
    colorScheme: options.colorScheme ?? "light",
  });
}

/**
 * Collects what must never happen on our pages: uncaught errors, console errors (CSP
 * violations are reported there) and requests to any origin other than the page's own.
 */
export function watchPageProblems(page: Page, allowedOrigin: string): string[] {
  const problems: string[] = [];
  page.on("pageerror", (error) => problems.push(`page error: ${error.message}`));
  page.on("console", (message) => {
    if (message.type() === "error") problems.push(`console error: ${message.text()}`);
  });
  page.on("request", (request) => {
    const url = request.url();
    if (!url.startsWith(allowedOrigin) && !url.startsWith("data:") && !url.startsWith("blob:")) problems.push(`remote request: ${url}`);
  });
  page.on("response", (response) => {
    if (response.status() >= 400) problems.push(`HTTP ${response.status()} for ${response.url()}`);
  });
  return problems;
}

export function screenshotPath(name: string): string {
  mkdirSync(SCREENSHOT_DIR, { recursive: true });
  return path.join(SCREENSHOT_DIR, name);
}

/**
 * For a test file: serves the renderer build and makes a fresh browser profile folder before
 * its tests (beforeAll), and closes and removes both after them (afterAll).
 */
export function useServedRenderer(): { readonly server: StaticServer; readonly profileDir: string } {
  let server: StaticServer | undefined;
  let profileDir: string | undefined;
  beforeAll(async () => {
    server = await serveRendererBuild();
    profileDir = freshProfileDir();
  });
  afterAll(async () => {
    await server?.close();
    if (profileDir) removeProfileDir(profileDir);
  });
  return {
    get server() {
      return server!;
    },
    get profileDir() {
      return profileDir!;
    },
  };
}

/**
 * One browser for a whole test file: serves the renderer build, launches Chromium on a fresh
 * profile, opens the project list and watches the page for problems (console errors, failed or
 * off-origin requests). Closed and removed after the file.
 */
export function useOpenedApp(): { readonly server: StaticServer; readonly context: BrowserContext; readonly page: Page; readonly problems: string[] } {
  const served = useServedRenderer();
  let context: BrowserContext | undefined;
  let page: Page | undefined;
  let problems: string[] = [];
  beforeAll(async () => {
    context = await launchBrowser(served.profileDir);
    page = context.pages()[0] ?? (await context.newPage());
    problems = watchPageProblems(page, served.server.url.replace(/\/$/, ""));
    await page.goto(served.server.url);
    await page.getByTestId("project-count").filter({ hasText: /project/ }).waitFor();
  });
  // Vitest runs after-hooks in reverse order of registration, so the browser closes before the server.
  afterAll(async () => {
    await context?.close();
  });
  return {
    get server() { return served.server; },
    get context() { return context!; },
    get page() { return page!; },
    get problems() { return problems; },
  };
}
