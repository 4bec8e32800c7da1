// `loopwright controller` on the example projects: readable output, --json, --out, exit codes.
import { readFileSync } from "node:fs";
import { describe, expect, it } from "vitest";
import { runCli, type CliIo } from "../../main/cli/cli";
import { createControllerCommand } from "../../main/cli/controllerCommand";

const RACK = "assets/examples/rack-temperature.loopwright.json";

async function cli(args: string[]): Promise<{ code: number; out: string; err: string }> {
  let out = "";
  let err = "";
  const io: CliIo = { stdout: (t) => { out += t; }, stderr: (t) => { err += t; }, readFile: async (path) => readFileSync(path, "utf8") };
  return { code: await runCli(args, io), out, err };
}

describe("loopwright controller", () => {
  it("prints the difference equations with named rows and columns, the execution order and the cautions", async () => {
    const { code, out } = await cli(["controller", RACK, "--variant", "observer-sampled"]);
    expect(code).toBe(0);
    expect(out).toContain("xc[k+1]    = Ac·xc[k] + Bc·[δr; δy] + Bsat·(u[k] − u_unsat[k])");
    expect(out).toMatch(/est_air_temperature\s+-?\d/);
    expect(out).toContain("δr_air_temperature");
    expect(out).toContain("Execution order per sample:");
    expect(out).toContain("Write u[k] to the actuators.");
    expect(out).toMatch(/Simulation is not validation/);
    expect(out).toMatch(/independent safety interlocks/);
    expect(out).toMatch(/licensed engineering practice/);
  });

  it("prints the loopwright-controller JSON with --json", async () => {
    const { code, out } = await cli(["controller", RACK, "--variant", "observer-sampled", "--json"]);
    expect(code).toBe(0);
    const json = JSON.parse(out) as { format: string; sampleTime: number; checks: { passed: boolean }[] };
    expect(json.format).toBe("loopwright-controller");
    expect(json.sampleTime).toBe(5);
    expect(json.checks.every((c) => c.passed)).toBe(true);
  });

  it("exits 1 with the specific reason when a variant cannot be exported", async () => {
    const { code, err } = await cli(["controller", RACK, "--variant", "lqr-integral"]);
    expect(code).toBe(1);
    expect(err).toContain("needs an observer: the plant measures 1 of 2 states");
  });

  it("exits 2 for usage errors: no --variant, a bad --period, a missing file", async () => {
    expect((await cli(["controller", RACK])).code).toBe(2);
    expect((await cli(["controller", RACK, "--variant", "observer-sampled", "--period", "-1"])).code).toBe(2);
    expect((await cli(["controller", "nope.json", "--variant", "x"])).code).toBe(2);
  });

  it("needs --period for a continuous design and accepts it", async () => {
    const queue = "assets/examples/queue-backlog.loopwright.json";
    const without = await cli(["controller", queue, "--variant", "lqr-kalman"]);
    expect(without.code).toBe(1);
    expect(without.err).toMatch(/give the sample period/);
    const withPeriod = await cli(["controller", queue, "--variant", "lqr-kalman", "--period", "1", "--json"]);
    expect(withPeriod.code).toBe(0);
    expect((JSON.parse(withPeriod.out) as { designedIn: string }).designedIn).toBe("continuous");
  });

  it("prints help with --help and lists the command in the overview", async () => {
    const help = await cli(["controller", "--help"]);
    expect(help.code).toBe(0);
    expect(help.out).toContain("Usage: loopwright controller FILE --variant ID");
    expect((await cli(["--help"])).out).toMatch(/controller\s+export a variant's controller/);
  });

  it("writes to --out through the injected file writer", async () => {
    const written: Record<string, string> = {};
    const command = createControllerCommand({ writeFile: async (path, text) => { written[path] = text; } });
    let out = "";
    let err = "";
    const code = await command.run([RACK, "--variant", "observer-sampled", "--json", "--out", "ctrl.json"], { stdout: (t) => { out += t; }, stderr: (t) => { err += t; }, readFile: async (p) => readFileSync(p, "utf8") });
    expect(code).toBe(0);
    expect(out).toBe("");
    expect(err).toContain("wrote ctrl.json");
    expect((JSON.parse(written["ctrl.json"]!) as { format: string }).format).toBe("loopwright-controller");
  });
});
