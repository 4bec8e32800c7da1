// `loopwright sheet` with a fake outside world: no Chromium, no files on disk.
import { describe, expect, it } from "vitest";
import { createSheetCommand, chromiumPrintArgs, type SheetDeps } from "../../../main/cli/sheetCommand";
import type { CliIo } from "../../../main/cli/cli";
import { renderSheetHtml } from "../../../renderer/sheet/renderSheetHtml";

const project = JSON.stringify({
  format: "loopwright-project",
  version: 1,
  name: "CLI sheet project",
  plants: [{ id: "p", model: { type: "state-space", A: [[0, 1], [0, 0]], B: [[0], [1]], C: [[1, 0]], D: [[0]], sampleTime: null } }],
  variants: [
    { id: "v1", plant: "p", stateFeedback: { method: "poles", poles: [-1, -2] } },
    { id: "v2", plant: "p", stateFeedback: { method: "poles", poles: [-3, -4] } },
  ],
});

interface World {
  deps: SheetDeps;
  written: Map<string, string>;
  runs: { command: string; args: readonly string[]; timeoutMs: number }[];
  removed: string[];
}

function world(options: { executables?: string[]; onPath?: Record<string, string>; env?: Record<string, string>; printOk?: boolean } = {}): World {
  const written = new Map<string, string>();
  const runs: World["runs"] = [];
  const removed: string[] = [];
  const sizes = new Map<string, number>();
  const deps: SheetDeps = {
    loadRenderer: async () => renderSheetHtml,
    writeFile: async (path, text) => void written.set(path, text),
    makeTempDir: async () => "/tmp/lw-test",
    removeDir: async (path) => void removed.push(path),
    fileSize: async (path) => sizes.get(path) ?? null,
    findOnPath: async (name) => options.onPath?.[name] ?? null,
    isExecutable: async (path) => (options.executables ?? []).includes(path),
    runProcess: async (command, args, { timeoutMs }) => {
      runs.push({ command, args, timeoutMs });
      const out = args.find((a) => a.startsWith("--print-to-pdf="))!.slice("--print-to-pdf=".length);
      if (options.printOk !== false) sizes.set(out, 1234);
      return options.printOk === false ? { exitCode: 1, timedOut: false, stderr: "line1\nfatal: cannot open display" } : { exitCode: 0, timedOut: false, stderr: "" };
    },
    env: (name) => options.env?.[name],
    today: () => "2025-06-01",
    resolvePath: (path) => (path.startsWith("/") ? path : `/work/${path}`),
  };
  return { deps, written, runs, removed };
}

async function run(args: string[], w: World): Promise<{ code: number; out: string; err: string }> {
  let out = "";
  let err = "";
  const io: CliIo = {
    stdout: (t) => void (out += t),
    stderr: (t) => void (err += t),
    readFile: async (path) => {
      if (path === "project.json") return project;
      throw Object.assign(new Error("missing"), { code: "ENOENT" });
    },
  };
  const code = await createSheetCommand(() => w.deps).run(args, io);
  return { code, out, err };
}

describe("loopwright sheet", () => {
  it("writes a self-contained HTML sheet for --out *.html without any browser", async () => {
    const w = world();
    const r = await run(["project.json", "--variant", "v2", "--out", "sheet.html", "--page", "letter", "--revision", "r12"], w);
    expect(r.code).toBe(0);
    expect(w.runs).toHaveLength(0);
    const html = w.written.get("sheet.html")!;
    expect(html).toMatch(/^<!DOCTYPE html>/);
    expect(html).toContain("size: letter portrait");
    expect(html).toContain("variant v2 · revision r12 · 2025-06-01");
    expect(html).toMatch(/lw1-[0-9a-f]{32}/);
    expect(r.err).toContain("wrote sheet.html");
  });

  it("prints a PDF with headless Chromium using exactly the documented arguments", async () => {
    const w = world({ executables: ["/usr/bin/chromium"] });
    const r = await run(["project.json", "--variant", "v1", "--out", "out/sheet.pdf"], w);
    expect(r.code).toBe(0);
    expect(w.runs).toHaveLength(1);
    const { command, args, timeoutMs } = w.runs[0]!;
    expect(command).toBe("/usr/bin/chromium");
    expect(args).toEqual([
      "--headless",
      "--no-sandbox",
      "--disable-gpu",
      "--disable-background-networking",
      "--no-first-run",
      "--user-data-dir=/tmp/lw-test/profile",
      "--no-pdf-header-footer",
      "--print-to-pdf=/work/out/sheet.pdf",
      "file:///tmp/lw-test/sheet.html",
    ]);
    expect(timeoutMs).toBeGreaterThan(0);
    expect(w.written.get("/tmp/lw-test/sheet.html")).toMatch(/size: A4 portrait/);
    expect(w.removed).toEqual(["/tmp/lw-test"]);
  });

  it("prefers --browser, then $LOOPWRIGHT_BROWSER, then /usr/bin/chromium, then PATH", async () => {
    let w = world({ executables: ["/opt/c/chrome", "/usr/bin/chromium"], env: { LOOPWRIGHT_BROWSER: "/usr/bin/chromium" } });
    await run(["project.json", "--variant", "v1", "--out", "a.pdf", "--browser", "/opt/c/chrome"], w);
    expect(w.runs[0]!.command).toBe("/opt/c/chrome");
    w = world({ executables: ["/env/chromium", "/usr/bin/chromium"], env: { LOOPWRIGHT_BROWSER: "/env/chromium" } });
    await run(["project.json", "--variant", "v1", "--out", "a.pdf"], w);
    expect(w.runs[0]!.command).toBe("/env/chromium");
    w = world({ onPath: { "chromium-browser": "/snap/bin/chromium-browser", "google-chrome": "/usr/bin/google-chrome" } });
    await run(["project.json", "--variant", "v1", "--out", "a.pdf"], w);
    expect(w.runs[0]!.command).toBe("/snap/bin/chromium-browser");
  });

  it("exits 1 without a browser and says how to get a PDF", async () => {
    const w = world();
    await expect(run(["project.json", "--variant", "v1", "--out", "a.pdf"], w)).rejects.toMatchObject({ exitCode: 1 });
    try {
      await run(["project.json", "--variant", "v1", "--out", "a.pdf"], w);
    } catch (error) {
      const message = (error as Error).message;
      expect(message).toMatch(/no Chromium or Chrome browser found/);
      expect(message).toMatch(/install Chromium/);
      expect(message).toMatch(/--browser PATH/);
      expect(message).toMatch(/--out sheet\.html/);
    }
    expect(w.runs).toHaveLength(0);
  });

  it("reports a browser that fails to print, with the tail of its error output", async () => {
    const w = world({ executables: ["/usr/bin/chromium"], printOk: false });
    await expect(run(["project.json", "--variant", "v1", "--out", "a.pdf"], w)).rejects.toThrow(/could not print the sheet \(exit 1\)[\s\S]*cannot open display/);
    expect(w.removed).toEqual(["/tmp/lw-test"]);
  });

  it("refuses an output name that is neither .pdf nor .html, and a missing --variant when there are several", async () => {
    await expect(run(["project.json", "--variant", "v1", "--out", "sheet.docx"], world())).rejects.toMatchObject({ exitCode: 2, message: expect.stringMatching(/must end in \.pdf or \.html/) });
    await expect(run(["project.json", "--out", "s.html"], world())).rejects.toMatchObject({ exitCode: 2, message: expect.stringMatching(/--variant ID; the variants are: v1, v2/) });
    await expect(run(["project.json", "--variant", "v1", "--out", "s.html", "--page", "a3"], world())).rejects.toMatchObject({ exitCode: 2 });
  });

  it("builds the print command with the output path and the page URL last", () => {
    expect(chromiumPrintArgs("/o.pdf", "file:///t.html", "/p").slice(-2)).toEqual(["--print-to-pdf=/o.pdf", "file:///t.html"]);
  });
});
