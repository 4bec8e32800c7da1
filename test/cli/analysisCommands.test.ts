// `loopwright analyze`, `discretize` and `locus`, run in-process with captured output on a
// small project file whose plants have answers known by hand.
import { describe, expect, it } from "vitest";
import { runCli, type CliIo } from "../../main/cli/cli";

interface Captured { code: number; out: string; err: string }

const PROJECT = JSON.stringify({
  format: "loopwright-project",
  version: 1,
  name: "analysis commands test",
  plants: [
    // 1/(s(s+1)(s+2)) in controller form (hand-worked).
    { id: "type1", model: { type: "state-space", A: [[0, 1, 0], [0, 0, 1], [0, -2, -3]], B: [[0], [0], [1]], C: [[1, 0, 0]], sampleTime: null } },
    // diag(−1, 2) with B = e₁: the mode 2 is uncontrollable and unstable (hand-worked).
    { id: "stuck", model: { type: "state-space", A: [[-1, 0], [0, 2]], B: [[1], [0]], C: [[1, 1]], sampleTime: null } },
    // The double integrator, and a plant with two inputs and two outputs.
    { id: "double", model: { type: "state-space", A: [[0, 1], [0, 0]], B: [[0], [1]], C: [[1, 0]], sampleTime: null } },
    { id: "pair", model: { type: "state-space", A: [[-1, 0], [0, -2]], B: [[1, 0], [0, 1]], C: [[1, 0], [0, 1]], sampleTime: null } },
    // 2/((s+1)(s+2)) as a transfer function: DC gain 1 (hand-worked).
    { id: "lag", model: { type: "transfer-function", numerator: [2], denominator: [1, 3, 2], sampleTime: null } },
  ],
  variants: [{ id: "v", plant: "type1", stateFeedback: { method: "poles", poles: [-1, -2, -3] } }],
});

async function cli(args: string[]): Promise<Captured> {
  let out = "";
  let err = "";
  const io: CliIo = {
    stdout: (t) => { out += t; },
    stderr: (t) => { err += t; },
    readFile: async (path) => {
      if (path === "p.json") return PROJECT;
      if (path === "bad.json") return "{ not json";
      throw Object.assign(new Error("missing"), { code: "ENOENT" });
    },
  };
  const code = await runCli(args, io);
  return { code, out, err };
}

describe("loopwright analyze", () => {
  it("has help that names its options and exit codes", async () => {
    const r = await cli(["analyze", "--help"]);
    expect(r.code).toBe(0);
    expect(r.out).toMatch(/Usage: loopwright analyze FILE/);
    expect(r.out).toMatch(/--plant ID/);
    expect(r.out).toMatch(/Exit code 0/);
  });

  it("prints structure, poles, DC gain and modal coupling as readable text", async () => {
    const r = await cli(["analyze", "p.json", "--plant", "lag"]);
    expect(r.code).toBe(0);
    expect(r.out).toMatch(/controllable: yes/);
    expect(r.out).toMatch(/Poles \(stable/);
    expect(r.out).toMatch(/DC gain[^\n]*\n\s+\[ 1 \]/); // 2/2 (hand-worked)
    expect(r.out).toMatch(/Modal coupling/);
  });

  it("counts the signals in singular and plural", async () => {
    const lag = await cli(["analyze", "p.json", "--plant", "lag"]);
    expect(lag.out).toMatch(/ 2 states, 1 input, 1 output, 0 disturbances; continuous/);
    const pair = await cli(["analyze", "p.json", "--plant", "pair"]);
    expect(pair.out).toMatch(/ 2 states, 2 inputs, 2 outputs, 0 disturbances; continuous/);
  });

  it("names the unstable uncontrollable mode of a plant that is not stabilizable", async () => {
    const r = await cli(["analyze", "p.json", "--plant", "stuck"]);
    expect(r.code).toBe(0);
    expect(r.out).toMatch(/stabilizable: NO \(unstable uncontrollable modes 2\)/);
  });

  it("prints only JSON with --json, with null for an unbounded DC gain", async () => {
    const r = await cli(["analyze", "p.json", "--plant", "type1", "--json"]);
    expect(r.code).toBe(0);
    expect(r.err).toBe("");
    const j = JSON.parse(r.out) as { plant: string; poles: { poles: { re: number }[]; dcGain: { gain: null } }; structure: { controllable: boolean }; dimensions: { states: number } };
    expect(j.plant).toBe("type1");
    expect(j.dimensions.states).toBe(3);
    expect(j.structure.controllable).toBe(true);
    expect(j.poles.dcGain.gain).toBeNull(); // pole at s = 0
    expect(j.poles.poles.map((p) => Math.round(p.re)).sort((a, b) => a - b)).toEqual([-2, -1, 0]);
  });

  it("reports a defective plant's modal form as not available instead of failing", async () => {
    const r = await cli(["analyze", "p.json", "--plant", "double"]);
    expect(r.code).toBe(0);
    expect(r.out).toMatch(/Modal coupling: not available/);
  });

  it("exits 1 for an unknown plant and 2 for a missing file or a missing --plant", async () => {
    const unknown = await cli(["analyze", "p.json", "--plant", "nope"]);
    expect(unknown.code).toBe(1);
    expect(unknown.err).toMatch(/no plant "nope".*type1, stuck/);
    expect((await cli(["analyze", "missing.json", "--plant", "x"])).code).toBe(2);
    const noPlant = await cli(["analyze", "p.json"]);
    expect(noPlant.code).toBe(2);
    expect(noPlant.err).toMatch(/needs --plant ID/);
    expect((await cli(["analyze", "bad.json", "--plant", "x"])).code).toBe(1);
  });
});

describe("loopwright discretize", () => {
  it("prints the zero-order-hold matrices of the double integrator", async () => {
    const r = await cli(["discretize", "p.json", "--plant", "double", "--period", "0.5"]);
    expect(r.code).toBe(0);
    // e^{AT} = [[1, T], [0, 1]], B_d = [T²/2; T] (textbook, hand-worked).
    expect(r.out).toMatch(/A =\n\s+\[\s+1\s+0\.5 \]\n\s+\[\s+0\s+1 \]/);
    expect(r.out).toMatch(/B =\n\s+\[ 0\.125 \]\n\s+\[\s+0\.5 \]/);
  });

  it("prints only JSON with --json and uses Tustin when asked", async () => {
    const r = await cli(["discretize", "p.json", "--plant", "double", "--period", "0.5", "--method", "tustin", "--json"]);
    expect(r.code).toBe(0);
    const j = JSON.parse(r.out) as { method: string; model: { A: number[][]; sampleTime: number } };
    expect(j.method).toBe("tustin");
    expect(j.model.sampleTime).toBe(0.5);
    // Tustin of a nilpotent A: (I − AT/2)⁻¹(I + AT/2) = [[1, T], [0, 1]] (hand-worked).
    expect(j.model.A[0]![1]).toBeCloseTo(0.5, 14);
  });

  it("rejects a missing or bad period, a bad method and prewarp without Tustin with exit 2", async () => {
    for (const args of [
      ["discretize", "p.json", "--plant", "double"],
      ["discretize", "p.json", "--plant", "double", "--period", "-1"],
      ["discretize", "p.json", "--plant", "double", "--period", "abc"],
      ["discretize", "p.json", "--plant", "double", "--period", "0.1", "--method", "foh"],
      ["discretize", "p.json", "--plant", "double", "--period", "0.1", "--prewarp", "2"],
    ]) {
      const r = await cli(args);
      expect(r.code, args.join(" ")).toBe(2);
      expect(r.err).toMatch(/^loopwright discretize/);
    }
  });

  it("has help naming the methods", async () => {
    const r = await cli(["discretize", "--help"]);
    expect(r.code).toBe(0);
    expect(r.out).toMatch(/--method zoh\|tustin/);
  });
});

describe("loopwright locus", () => {
  it("prints asymptotes, the break point and the crossing gain 6 of 1/(s(s+1)(s+2))", async () => {
    const r = await cli(["locus", "p.json", "--plant", "type1"]);
    expect(r.code).toBe(0);
    // Evans' rules and the Routh array (hand-worked): centroid −1, angles 60/180/300°,
    // break point −1 + 1/√3 ≈ −0.42265, crossings ±j√2 at k = 6.
    expect(r.out).toMatch(/centroid -1, angles 60°, 180°, 300°/);
    expect(r.out).toMatch(/-0\.4226497/);
    expect(r.out).toMatch(/1\.4142136j\s+6\b/);
  });

  it("prints only JSON with --json, branches included", async () => {
    const r = await cli(["locus", "p.json", "--plant", "type1", "--json"]);
    expect(r.code).toBe(0);
    const j = JSON.parse(r.out) as { crossings: { gain: number }[]; branches: unknown[][] };
    expect(j.branches).toHaveLength(3);
    for (const c of j.crossings) expect(Math.abs(c.gain - 6)).toBeLessThan(1e-8);
  });

  it("needs --input and --output for a plant with several inputs, and accepts them 1-based", async () => {
    const r = await cli(["locus", "p.json", "--plant", "pair"]);
    expect(r.code).toBe(2);
    expect(r.err).toMatch(/--input N and --output N/);
    const ok = await cli(["locus", "p.json", "--plant", "pair", "--input", "2", "--output", "2", "--json"]);
    expect(ok.code).toBe(0);
    const j = JSON.parse(ok.out) as { openLoopPoles: { re: number }[] };
    expect(j.openLoopPoles.map((p) => p.re).sort((a, b) => a - b)).toEqual([-2, -1]);
    const bad = await cli(["locus", "p.json", "--plant", "pair", "--input", "3", "--output", "1"]);
    expect(bad.code).toBe(1);
    expect(bad.err).toMatch(/input must be a 0-based input index/);
  });

  it("is listed in the overview with the other new commands", async () => {
    const r = await cli(["--help"]);
    for (const name of ["analyze", "discretize", "locus"]) expect(r.out).toMatch(new RegExp(`\\n  ${name} `));
  });
});
