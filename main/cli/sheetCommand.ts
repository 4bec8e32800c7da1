/**
 * `loopwright sheet`: the design sheet of one variant, as HTML or PDF. Evaluates the variant with
 * the same pipeline as `design`, renders the sheet with the bundle built from renderer/sheet
 * (dist/sheet/sheet.js, loaded at run time by path: main/ never imports renderer/ code), and for
 * PDF prints the HTML with headless Chromium. Everything outside the process (files, the
 * browser, the clock) is injected, so tests run without Chromium.
 */
import { spawn } from "node:child_process";
import { access, constants, mkdtemp, rm, stat, writeFile } from "node:fs/promises";
import { tmpdir } from "node:os";
import { delimiter, join, resolve } from "node:path";
import { fileURLToPath, pathToFileURL } from "node:url";
import { ENGINE_VERSION } from "../../shared-engine/version";
import { evaluateProject, loadProjectText } from "../../shared-engine/project";
import { sha256Hex, utf8Bytes } from "../../shared-engine/project/fingerprint";
import type { ProjectFile, VariantResult } from "../../shared-engine/project";
import { describeOptions, parseArgs, type OptionSpec } from "./args";
import { CliError, EXIT, usageError } from "./io";
import type { Command } from "./commands";

/** What the sheet renderer bundle exports (renderer/sheet/renderSheetHtml.tsx). */
export type RenderSheetHtml = (input: {
  project: ProjectFile;
  variantId: string;
  result: VariantResult;
  revision: string;
  date: string;
  pageSize: "a4" | "letter";
  engineVersion?: string;
}) => string;

export interface ProcessOutcome {
  exitCode: number | null;
  timedOut: boolean;
  stderr: string;
}

/** The outside world of `loopwright sheet`. `nodeSheetDeps()` gives the real one. */
export interface SheetDeps {
  loadRenderer(): Promise<RenderSheetHtml>;
  writeFile(path: string, text: string): Promise<void>;
  /** A new private directory for the temporary HTML and the browser profile. */
  makeTempDir(): Promise<string>;
  removeDir(path: string): Promise<void>;
  /** Size in bytes of a file, or null when it does not exist. */
  fileSize(path: string): Promise<number | null>;
  /** Absolute path of an executable found on PATH, or null. */
  findOnPath(name: string): Promise<string | null>;
  isExecutable(path: string): Promise<boolean>;
  runProcess(command: string, args: readonly string[], options: { timeoutMs: number }): Promise<ProcessOutcome>;
  env(name: string): string | undefined;
  /** Today's date, ISO yyyy-mm-dd. */
  today(): string;
  /** Absolute path (for the file:// URL). */
  resolvePath(path: string): string;
}

/** How long headless Chromium may take to print (it normally needs 1–3 s). */
export const PRINT_TIMEOUT_MS = 90_000;
/** Browsers looked for on PATH, in this order, after --browser, $LOOPWRIGHT_BROWSER and /usr/bin/chromium. */
export const BROWSER_NAMES = ["chromium", "chromium-browser", "google-chrome"] as const;

const sheetOptions: Record<string, OptionSpec> = {
  variant: { value: true, valueName: "ID", description: "the variant to record (may be left out when the project has one variant)" },
  out: { value: true, valueName: "FILE", description: "output file: .pdf (printed with headless Chromium) or .html (print it from any browser)" },
  page: { value: true, valueName: "a4|letter", description: "paper size, portrait (default a4)" },
  browser: { value: true, valueName: "PATH", description: "Chromium or Chrome executable for PDF output (default: $LOOPWRIGHT_BROWSER, /usr/bin/chromium, then PATH)" },
  revision: { value: true, valueName: "TEXT", description: "revision printed in the header (default: file-<first 8 hex digits of the file's SHA-256>)" },
  date: { value: true, valueName: "TEXT", description: "date printed in the header (default: today, yyyy-mm-dd)" },
};

const NO_BROWSER_HELP =
  "To get a PDF: install Chromium (Debian/Ubuntu: `sudo apt-get install chromium`), or pass --browser PATH " +
  "(or set LOOPWRIGHT_BROWSER) to a Chromium or Chrome executable, or write HTML with --out sheet.html and print it to PDF from any browser.";

/** The exact Chromium command line used to print (documented; tested). */
export function chromiumPrintArgs(outPdf: string, htmlUrl: string, profileDir: string): string[] {
  return [
    "--headless",
    "--no-sandbox",
    "--disable-gpu",
    "--disable-background-networking",
    "--no-first-run",
    // A private profile: a Chromium the user already has open never interferes.
    `--user-data-dir=${profileDir}`,
    "--no-pdf-header-footer",
    `--print-to-pdf=${outPdf}`,
    htmlUrl,
  ];
}

export async function findBrowser(requested: string | undefined, deps: SheetDeps): Promise<string> {
  if (requested !== undefined) {
    if (await deps.isExecutable(requested)) return requested;
    throw new CliError(`--browser ${requested} is not an executable file. ${NO_BROWSER_HELP}`, EXIT.failure);
  }
  const fromEnv = deps.env("LOOPWRIGHT_BROWSER");
  if (fromEnv) {
    if (await deps.isExecutable(fromEnv)) return fromEnv;
    throw new CliError(`LOOPWRIGHT_BROWSER=${fromEnv} is not an executable file. ${NO_BROWSER_HELP}`, EXIT.failure);
  }
  if (await deps.isExecutable("/usr/bin/chromium")) return "/usr/bin/chromium";
  for (const name of BROWSER_NAMES) {
    const found = await deps.findOnPath(name);
    if (found) return found;
  }
  throw new CliError(`no Chromium or Chrome browser found (looked at /usr/bin/chromium and for ${BROWSER_NAMES.join(", ")} on PATH). ${NO_BROWSER_HELP}`, EXIT.failure);
}

const fileUrl = (absolutePath: string): string => "file://" + absolutePath.split("/").map(encodeURIComponent).join("/");

export function createSheetCommand(makeDeps: () => SheetDeps): Command {
  return {
    name: "sheet",
    summary: "write the printable design sheet of one variant (PDF or HTML) for review and sign-off",
    help: () =>
      `Usage: loopwright sheet FILE --variant ID --out sheet.pdf|sheet.html [--page a4|letter]\n                       [--browser PATH] [--revision TEXT] [--date TEXT]\n\n` +
      `Designs the variant with the same pipeline as \`loopwright design\` and writes its design sheet:\n` +
      `plant, assumptions, method, gains, closed-loop poles, margins, plots, requirements, diagnostics,\n` +
      `the design fingerprint and the sign-off block. A .pdf is printed with headless Chromium; a .html\n` +
      `file is self-contained (no scripts, no external files) and prints from any browser.\n` +
      `Exit code 0 when written, 1 when the variant could not be designed (the sheet is still written\n` +
      `and says so) or no browser was found, 2 for usage errors.\n\nOptions:\n${describeOptions(sheetOptions)}\n`,
    async run(args, io) {
      const { options, positionals } = parseArgs(args, sheetOptions, "sheet");
      if (positionals.length !== 1) throw usageError("sheet needs exactly one project FILE");
      const out = options.get("out");
      if (typeof out !== "string") throw usageError("sheet needs --out FILE ending in .pdf or .html");
      const format = /\.pdf$/i.test(out) ? "pdf" : /\.html?$/i.test(out) ? "html" : null;
      if (!format) throw usageError(`--out ${out}: the file name must end in .pdf or .html`);
      const page = options.get("page") ?? "a4";
      if (page !== "a4" && page !== "letter") throw usageError(`--page must be a4 or letter (got ${String(page)})`);
      const deps = makeDeps();

      const path = positionals[0]!;
      let text: string;
      try {
        text = await io.readFile(path);
      } catch (error) {
        const code = (error as { code?: string }).code;
        throw usageError(`cannot read ${path}${code === "ENOENT" ? ": no such file" : code ? ` (${code})` : ""}`);
      }
      const loaded = loadProjectText(text);
      for (const w of loaded.warnings) io.stderr(`warning: ${w.path}: ${w.message}\n`);
      let variantId = options.get("variant");
      if (typeof variantId !== "string") {
        if (loaded.project.variants.length !== 1) {
          throw usageError(`sheet needs --variant ID; the variants are: ${loaded.project.variants.map((v) => v.id).join(", ") || "none"}`);
        }
        variantId = loaded.project.variants[0]!.id;
      }
      const run = evaluateProject(loaded, { variant: variantId });
      const result = run.variants[0]!;
      // Find the browser before any work that a missing browser would waste.
      const browser = format === "pdf" ? await findBrowser(options.get("browser") as string | undefined, deps) : null;

      const renderSheetHtml = await deps.loadRenderer();
      const revision = (options.get("revision") as string | undefined) ?? `file-${sha256Hex(utf8Bytes(text)).slice(0, 8)}`;
      const html = renderSheetHtml({
        project: loaded.project,
        variantId,
        result,
        revision,
        date: (options.get("date") as string | undefined) ?? deps.today(),
        pageSize: page,
        engineVersion: ENGINE_VERSION,
      });

      if (format === "html") {
        await deps.writeFile(out, html);
      } else {
        const dir = await deps.makeTempDir();
        try {
          const htmlPath = `${dir}/sheet.html`;
          await deps.writeFile(htmlPath, html);
          const target = deps.resolvePath(out);
          const outcome = await deps.runProcess(browser!, chromiumPrintArgs(target, fileUrl(htmlPath), `${dir}/profile`), { timeoutMs: PRINT_TIMEOUT_MS });
          const size = await deps.fileSize(target);
          if (outcome.timedOut) throw new CliError(`${browser} did not finish printing within ${PRINT_TIMEOUT_MS / 1000} s. ${NO_BROWSER_HELP}`, EXIT.failure);
          if (outcome.exitCode !== 0 || size === null || size === 0) {
            const detail = outcome.stderr.trim().split("\n").slice(-5).join("\n  ");
            throw new CliError(`${browser} could not print the sheet (exit ${outcome.exitCode ?? "by signal"})${detail ? `:\n  ${detail}` : ""}\n${NO_BROWSER_HELP}`, EXIT.failure);
          }
        } finally {
          await deps.removeDir(dir);
        }
      }
      io.stderr(`wrote ${out} (variant ${variantId}, revision ${revision})\n`);
      if (result.error) {
        io.stderr(`variant ${variantId} could not be designed: ${result.error.message} [${result.error.kind}]; the sheet says NOT DESIGNED\n`);
        return EXIT.failure;
      }
      return EXIT.ok;
    },
  };
}

/**
 * Where the sheet bundle is looked for: $LOOPWRIGHT_SHEET_BUNDLE, beside the bundled CLI
 * (dist/cli/../sheet/sheet.js), or from the sources (main/cli/../../dist/sheet/sheet.js).
 */
export function sheetBundleCandidates(moduleUrl: string, env: (name: string) => string | undefined): string[] {
  const list = [new URL("../sheet/sheet.js", moduleUrl).href, new URL("../../dist/sheet/sheet.js", moduleUrl).href];
  const fromEnv = env("LOOPWRIGHT_SHEET_BUNDLE");
  return fromEnv ? [pathToFileURL(resolve(fromEnv)).href, ...list] : list;
}

async function exists(path: string): Promise<boolean> {
  try {
    await access(path, constants.F_OK);
    return true;
  } catch {
    return false;
  }
}

/** The real outside world: Node's file system, child processes and clock. */
export function nodeSheetDeps(): SheetDeps {
  const env = (name: string): string | undefined => process.env[name];
  const isExecutable = async (path: string): Promise<boolean> => {
    try {
      await access(path, constants.X_OK);
      return (await stat(path)).isFile();
    } catch {
      return false;
    }
  };
  return {
    async loadRenderer() {
      for (const href of sheetBundleCandidates(import.meta.url, env)) {
        if (!(await exists(fileURLToPath(href)))) continue;
        // A computed path: the bundle is built from renderer/sheet and loaded only at run time.
        const module = (await import(/* @vite-ignore */ href)) as { renderSheetHtml?: RenderSheetHtml };
        if (typeof module.renderSheetHtml !== "function") throw new CliError(`the sheet bundle ${href} does not export renderSheetHtml; rebuild it with \`npm run build:node\``, EXIT.failure);
        return module.renderSheetHtml;
      }
      throw new CliError("the design-sheet renderer has not been built yet (dist/sheet/sheet.js). Run `npm install` (it builds it) or `npm run build:node`.", EXIT.failure);
    },
    writeFile: (path, text) => writeFile(path, text, "utf8"),
    makeTempDir: () => mkdtemp(join(tmpdir(), "loopwright-sheet-")),
    removeDir: (path) => rm(path, { recursive: true, force: true }),
    async fileSize(path) {
      try {
        return (await stat(path)).size;
      } catch {
        return null;
      }
    },
    async findOnPath(name) {
      for (const dir of (env("PATH") ?? "").split(delimiter)) {
        if (dir && (await isExecutable(join(dir, name)))) return join(dir, name);
      }
      return null;
    },
    isExecutable,
    runProcess(command, args, { timeoutMs }) {
      return new Promise((done) => {
        let stderr = "";
        let timedOut = false;
        const child = spawn(command, args, { stdio: ["ignore", "ignore", "pipe"] });
        const timer = setTimeout(() => {
          timedOut = true;
          child.kill("SIGKILL");
        }, timeoutMs);
        child.stderr.on("data", (chunk: Buffer) => {
          // Keep the tail only: Chromium can be chatty.
          stderr = (stderr + chunk.toString("utf8")).slice(-8000);
        });
        child.on("error", (error) => {
          clearTimeout(timer);
          done({ exitCode: null, timedOut, stderr: `${stderr}${error.message}` });
        });
        child.on("close", (code) => {
          clearTimeout(timer);
          done({ exitCode: code, timedOut, stderr });
        });
      });
    },
    env,
    today: () => new Date().toISOString().slice(0, 10),
    resolvePath: (path) => resolve(path),
  };
}

export const sheet: Command = createSheetCommand(nodeSheetDeps);
