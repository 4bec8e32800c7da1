// `loopwright validate`, `design` and `analyze` on a project whose plant is a 2 × 2 grid of
// zeros, poles and gains (test/cli/room-climate-zpk.loopwright.json, invented), read through the
// same validation as every project file.
import { readFileSync } from "node:fs";
import { describe, expect, it } from "vitest";
import { runCli, type CliIo } from "../../main/cli/cli";
import type { DesignRunResult } from "../../shared-engine/project";
import { expectMatrixClose } from "../helpers/assertions";

const FILE = "test/cli/room-climate-zpk.loopwright.json";
const PROJECT = readFileSync(FILE, "utf8");

async function cli(args: string[], files: Record<string, string> = { [FILE]: PROJECT }): Promise<{ code: number; out: string; err: string }> {
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
  return { code: await runCli(args, io), out, err };
}

describe("loopwright on a zero-pole-gain plant with two inputs and two outputs", () => {
  it("validates the file", async () => {
    const r = await cli(["validate", FILE]);
    expect(r.code).toBe(0);
    expect(r.out).toBe(`${FILE}: valid (1 plants, 1 variants)\n`);
  });

  it("names the entry of a complex zero without its conjugate and of a missing pole list", async () => {
    const broken = JSON.parse(PROJECT) as { plants: { model: { zeros: unknown[][][]; poles: unknown[][][] } }[] };
    broken.plants[0]!.model.zeros[1]![0] = [{ re: -0.5, im: 1 }, -2];
    broken.plants[0]!.model.poles[0]!.pop();
    const r = await cli(["validate", "broken.json"], { "broken.json": JSON.stringify(broken) });
    expect(r.code).toBe(1);
    expect(r.err).toContain("plants[0].model.zeros[1][0][0]: -0.5+1j has no conjugate partner -0.5-1j in this list; complex zeros must come in conjugate pairs");
    expect(r.err).toContain("plants[0].model.poles[0][1]: is missing: every (output, input) pair needs its list of poles ([] for none)");
  });

  it("designs the variant, reporting the plant and the step with the file's signal names", async () => {
    const r = await cli(["design", FILE]);
    expect(r.code, r.err).toBe(0);
    expect(r.out).toContain("plant: 6 states, 2 inputs, 2 outputs, 0 disturbances; continuous");
    expect(r.out).toMatch(/step \(closed-loop, from r_heater\)/); // the reference of the first input, by its name
    const json = await cli(["design", FILE, "--json"]);
    const run = JSON.parse(json.out) as DesignRunResult;
    const v = run.variants[0]!;
    expect(v.error).toBeUndefined();
    expect(v.plant!.names.inputs).toEqual(["heater", "fan"]);
    expect(v.plant!.names.outputs).toEqual(["temperature", "humidity"]);
    expect(v.closedLoopPoles!.every((p) => p.re < 0)).toBe(true);
  });

  it("analyzes the plant with the hand-derived DC gain", async () => {
    const r = await cli(["analyze", FILE, "--json"]);
    expect(r.code, r.err).toBe(0);
    const report = JSON.parse(r.out) as { poles: { dcGain: { gain: number[][] } } };
    // Hand-derived: G11(0) = 2/1, G12(0) = 1.5·3/5 = 0.9, G21(0) = 0.5·(0.25 + 1)/(2·4·1) = 0.078125, G22 = −0.8.
    expectMatrixClose(report.poles.dcGain.gain, [[2, 0.9], [0.078125, -0.8]], 1e-12, "DC gain");
  });
});
