// The command line, run in-process with captured output, and once as a real process through
// the `bin` entry (the bundle that `npm install` builds).
import { execFileSync, spawnSync } from "node:child_process";
import { existsSync } from "node:fs";
import { describe, expect, it } from "vitest";
import { runCli, type CliIo } from "../../main/cli/cli";

interface Captured { code: number; out: string; err: string }

async function cli(args: string[], files: Record<string, string> = {}): Promise<Captured> {
  let out = "";
  let err = "";
  const io: CliIo = {
    stdout: (t) => { out += t; },
    stderr: (t) => { err += t; },
    readFile: async (path) => {
      if (path in files) return files[path]!;
      throw Object.assign(new Error("missing"), { code: "ENOENT" });
    },
  };
  const code = await runCli(args, io);
  return { code, out, err };
}

describe("loopwright command line", () => {
  it("prints usage with every command and the exit codes for --help", async () => {
    const r = await cli(["--help"]);
    expect(r.code).toBe(0);
    expect(r.out).toMatch(/Usage: loopwright <command>/);
    for (const name of ["info", "eigenvalues", "call"]) expect(r.out).toContain(name);
    expect(r.out).toMatch(/simulation is not validation/i);
  });

  it("prints help for one command with `COMMAND --help`", async () => {
    const r = await cli(["eigenvalues", "--help"]);
    expect(r.code).toBe(0);
    expect(r.out).toMatch(/Usage: loopwright eigenvalues MATRIX/);
  });

  it("computes eigenvalues as JSON only on stdout", async () => {
    // [[0,1],[-2,-3]] has characteristic polynomial s² + 3s + 2 = (s+1)(s+2) (worked by hand).
    const r = await cli(["eigenvalues", "[[0,1],[-2,-3]]", "--json"]);
    expect(r.code).toBe(0);
    expect(r.err).toBe("");
    const parsed = JSON.parse(r.out) as { eigenvalues: { re: number; im: number }[] };
    const res = parsed.eigenvalues.map((e) => e.re).sort((a, b) => a - b);
    expect(res[0]).toBeCloseTo(-2, 12);
    expect(res[1]).toBeCloseTo(-1, 12);
    expect(parsed.eigenvalues.every((e) => Math.abs(e.im) < 1e-12)).toBe(true);
  });

  it("reads a matrix from @file and prints a readable table", async () => {
    // Rotation generator [[0,-2],[2,0]]: eigenvalues ±2j (worked by hand).
    const r = await cli(["eigenvalues", "@m.json"], { "m.json": "[[0,-2],[2,0]]" });
    expect(r.code).toBe(0);
    expect(r.out).toMatch(/eigenvalue/);
    expect(r.out).toMatch(/0 \+ 2j/);
    expect(r.out).toMatch(/0 − 2j/);
  });

  it("exits 2 with a message for usage errors and never prints a stack trace", async () => {
    for (const args of [["frobnicate"], ["eigenvalues"], ["eigenvalues", "[[1]]", "--colour"], ["eigenvalues", "not json"], ["eigenvalues", "@missing.json"]]) {
      const r = await cli(args);
      expect(r.code, args.join(" ")).toBe(2);
      expect(r.err).toMatch(/^loopwright/);
      expect(r.err).not.toMatch(/\n\s+at /);
    }
  });

  it("exits 1 with the engine's specific message for bad matrices", async () => {
    const r = await cli(["eigenvalues", "[[1,2,3],[4,5,6]]"]);
    expect(r.code).toBe(1);
    expect(r.err).toMatch(/must be square \(it is 2×3\)/);
    const nan = await cli(["call", "linalg.eigenvalues", '{"matrix": [[1, "x"]]}']);
    expect(nan.code).toBe(1);
    expect(nan.err).toMatch(/matrix\[0\]\[1\] must be a number/);
  });

  it("runs any engine request by name with `call`", async () => {
    const r = await cli(["call", "engine.info"]);
    expect(r.code).toBe(0);
    const info = JSON.parse(r.out) as { name: string; methods: string[] };
    expect(info.name).toBe("loopwright-engine");
    expect(info.methods).toContain("linalg.eigenvalues");
    const unknown = await cli(["call", "no.such.method"]);
    expect(unknown.code).toBe(1);
    expect(unknown.err).toMatch(/Unknown engine request/);
  });

  it("works as a real process through the bin entry", () => {
    if (!existsSync("dist/cli/cli.js")) execFileSync("node", ["scripts/build-node.mjs"], { stdio: "inherit" });
    const help = spawnSync("node", ["bin/loopwright.mjs", "--help"], { encoding: "utf8" });
    expect(help.status).toBe(0);
    expect(help.stdout).toMatch(/Usage: loopwright/);
    const bad = spawnSync("node", ["bin/loopwright.mjs", "eigenvalues", "[[1,2]]", "--json"], { encoding: "utf8" });
    expect(bad.status).toBe(1);
    expect(bad.stdout).toBe("");
    expect(bad.stderr).toMatch(/must be square/);
  });
});
