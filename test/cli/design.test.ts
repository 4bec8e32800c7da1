// `loopwright design` and `loopwright validate` on the example projects. The golden files in
// test/cli/golden/ are regression records of our own output (regenerate only on purpose, with
// UPDATE_GOLDEN=1 npx vitest run test/cli/design.test.ts, and review the diff); the checks
// against outside references live beside them and in test/engine/project/.
import { readdirSync, readFileSync, writeFileSync, existsSync } from "node:fs";
import { describe, expect, it } from "vitest";
import { runCli, type CliIo } from "../../main/cli/cli";
import type { DesignRunResult } from "../../shared-engine/project";

const EXAMPLES = "assets/examples";
const files = readdirSync(EXAMPLES).filter((f) => f.endsWith(".loopwright.json")).sort();

async function cli(args: string[]): Promise<{ code: number; out: string; err: string }> {
  let out = "";
  let err = "";
  const io: CliIo = {
    stdout: (t) => { out += t; },
    stderr: (t) => { err += t; },
    readFile: async (path) => readFileSync(path, "utf8"),
  };
  return { code: await runCli(args, io), out, err };
}

/** Compares numbers to 1e-9 relative (last-bit differences across platforms are not regressions). */
function expectSameJson(actual: unknown, golden: unknown, path = ""): void {
  if (typeof golden === "number") {
    expect(typeof actual, path).toBe("number");
    const a = actual as number;
    expect(Math.abs(a - golden) <= 1e-9 * Math.max(1, Math.abs(golden)), `${path}: ${a} vs golden ${golden}`).toBe(true);
  } else if (Array.isArray(golden)) {
    expect(Array.isArray(actual), path).toBe(true);
    expect((actual as unknown[]).length, `${path} length`).toBe(golden.length);
    golden.forEach((g, i) => expectSameJson((actual as unknown[])[i], g, `${path}[${i}]`));
  } else if (golden !== null && typeof golden === "object") {
    expect(Object.keys(actual as object).sort(), `${path} keys`).toEqual(Object.keys(golden).sort());
    for (const [k, g] of Object.entries(golden)) expectSameJson((actual as Record<string, unknown>)[k], g, `${path}.${k}`);
  } else if (typeof golden === "string" && typeof actual === "string") {
    // Messages quote numbers (a residual of 1.22e-16): compare their words exactly and their
    // numbers by the rule above, so rounding-level changes are not regressions.
    const numberPattern = /-?\d+(?:\.\d+)?(?:e[-+]?\d+)?/g;
    expect(actual.replace(numberPattern, "#"), path).toBe(golden.replace(numberPattern, "#"));
    const a = actual.match(numberPattern) ?? [];
    const g = golden.match(numberPattern) ?? [];
    g.forEach((text, i) => expectSameJson(Number(a[i]), Number(text), `${path} (number ${i + 1} in the text)`));
  } else {
    expect(actual, path).toEqual(golden);
  }
}

describe("loopwright design on the example projects", () => {
  it("has at least three invented example projects, each labelled as invented and with two or more variants", () => {
    expect(files.length).toBeGreaterThanOrEqual(3);
    for (const f of files) {
      const project = JSON.parse(readFileSync(`${EXAMPLES}/${f}`, "utf8")) as { name: string; description: string; variants: unknown[] };
      expect(`${project.name} ${project.description}`).toMatch(/invented/i);
      expect(project.variants.length).toBeGreaterThanOrEqual(2);
    }
  });

  it("reports the queue example's nonlinear results in the readable report and in --json", async () => {
    const json = JSON.parse((await cli(["design", `${EXAMPLES}/queue-backlog.loopwright.json`, "--json"])).out) as DesignRunResult;
    const check = json.variants.find((v) => v.id === "lqr-integral-1s")!;
    expect(check.plant!.operatingPoint!.inputs.requested_consumers).toBeCloseTo(40, 10); // c = λ(K+q)/(μq) = 2000·12000/(60·10000)
    expect(check.plant!.linearization!.A[0]![1]).toBeCloseTo(-50, 10); // −μq/(K+q), hand-derived
    expect(check.nonlinear!.time.length).toBeGreaterThan(10);
    expect(check.checks.map((c) => c.name)).toContain("nonlinear-agrees");
    const robust = json.variants.find((v) => v.id === "lqr-integral-robust")!;
    expect(robust.robustness!.samples).toBe(25);
    expect(robust.checks.map((c) => c.name)).toContain("robust-stability");
    const text = (await cli(["design", `${EXAMPLES}/queue-backlog.loopwright.json`])).out;
    expect(text).toMatch(/operating point \(residual .*Newton iterations\):\n    states: backlog = 10000, consumers = 40/);
    expect(text).toMatch(/linearization at the operating point .*\n    A = \[ -0\.0333333  -50; 0  -0\.05 \]/);
    expect(text).toMatch(/nonlinear check \(controller sampled at 1 s, \d+ times to 600 s\): largest divergence/);
    expect(text).toMatch(/robustness \(mu, K; 25 samples\): all stable/);
  });

  it.each(files)("designs every variant of %s and matches its golden JSON", async (file) => {
    const r = await cli(["design", `${EXAMPLES}/${file}`, "--json"]);
    expect(r.code, r.err).toBe(0);
    const run = JSON.parse(r.out) as DesignRunResult;
    expect(run.format).toBe("loopwright-design-result");
    for (const v of run.variants) {
      expect(v.error, `${v.id}: ${v.error?.message}`).toBeUndefined();
      expect(v.gain ?? v.step ?? v.margins, `${v.id} computed something`).toBeDefined();
    }
    const golden = `test/cli/golden/${file.replace(".loopwright.json", ".design.json")}`;
    if (process.env.UPDATE_GOLDEN === "1" || !existsSync(golden)) {
      writeFileSync(golden, `${JSON.stringify(run, null, 2)}\n`);
      if (process.env.UPDATE_GOLDEN !== "1") throw new Error(`golden file ${golden} was missing and has been written; review it and run again`);
    }
    expectSameJson(run, JSON.parse(readFileSync(golden, "utf8")));
  });

  it.each(files)("prints a readable report of %s with the safety caution", async (file) => {
    const r = await cli(["design", `${EXAMPLES}/${file}`]);
    expect(r.code).toBe(0);
    expect(r.out).toMatch(/^Project: /);
    expect(r.out).toMatch(/Variant /);
    expect(r.out).toMatch(/Simulation is not validation/);
  });

  it("places the requested poles in the pole-placement example (the request itself is the reference)", async () => {
    const r = await cli(["design", `${EXAMPLES}/positioning-stage.loopwright.json`, "--variant", "robust-poles", "--json"]);
    const v = (JSON.parse(r.out) as DesignRunResult).variants[0]!;
    const requested = [{ re: -4, im: 3 }, { re: -4, im: -3 }, { re: -5, im: 2 }, { re: -5, im: -2 }];
    for (const p of requested) {
      const nearest = Math.min(...v.closedLoopPoles!.map((q) => Math.hypot(q.re - p.re, q.im - p.im)));
      expect(nearest).toBeLessThan(1e-9);
    }
  });

  it("words missing margins as unbounded: L = 1/(s + 1) under unity feedback has no phase crossover and meets |L| = 1 only at ω = 0", async () => {
    // Hand-derived: |L(jω)| = 1/√(1 + ω²) ≤ 1 with equality at ω = 0 where ∠L = 0 (phase margin
    // 180°), ∠L > −90° everywhere (no phase crossover), and a delay leaves L(0) unchanged.
    const project = JSON.stringify({
      format: "loopwright-project", version: 1, name: "unity loop (test)",
      plants: [{ id: "lag", model: { type: "transfer-function", numerator: [1], denominator: [1, 1], sampleTime: null } }],
      variants: [{ id: "v", plant: "lag", stateFeedback: { method: "poles", poles: [-2] }, margins: { feedback: "unity-negative" } }],
    });
    let out = "";
    const code = await runCli(["design", "unity.json"], { stdout: (t) => { out += t; }, stderr: () => {}, readFile: async () => project });
    expect(code).toBe(0);
    expect(out).toMatch(/margins \(unity negative feedback\): gain unbounded \(no phase crossover\), phase 180° at 0 rad\/s, delay unbounded, Ms 1\n/);
  });

  it("designs only the named variant with --variant, and exits 1 for an unknown one", async () => {
    const one = await cli(["design", `${EXAMPLES}/queue-backlog.loopwright.json`, "--variant", "lqr-kalman", "--json"]);
    expect((JSON.parse(one.out) as DesignRunResult).variants.map((v) => v.id)).toEqual(["lqr-kalman"]);
    const none = await cli(["design", `${EXAMPLES}/queue-backlog.loopwright.json`, "--variant", "nope"]);
    expect(none.code).toBe(1);
    expect(none.err).toMatch(/No variant "nope"/);
  });

  it("--strict exits 1 when a requirement fails", async () => {
    const plain = await cli(["design", `${EXAMPLES}/rack-temperature.loopwright.json`]);
    const strict = await cli(["design", `${EXAMPLES}/rack-temperature.loopwright.json`, "--strict"]);
    expect(plain.out).toMatch(/FAIL {2}requirement:gm/);
    expect(plain.code).toBe(0);
    expect(strict.code).toBe(1);
  });
});

describe("loopwright validate", () => {
  it.each(files)("accepts %s", async (file) => {
    const r = await cli(["validate", `${EXAMPLES}/${file}`]);
    expect(r.code).toBe(0);
    expect(r.out).toMatch(/valid \(\d+ plants, \d+ variants\)/);
  });

  it("names every problem by its JSON path and exits 1", async () => {
    const bad = JSON.parse(readFileSync(`${EXAMPLES}/queue-backlog.loopwright.json`, "utf8")) as {
      plants: { model: { B: number[][]; stateEquations: Record<string, string> } }[];
      variants: { plant: string }[];
    };
    bad.plants[1]!.model.B = [[0], [1], [2]];
    bad.plants[0]!.model.stateEquations.backlog = "arrival_rate - (consumers";
    bad.variants[1]!.plant = "missing";
    let out = "";
    const io: CliIo = { stdout: (t) => { out += t; }, stderr: (t) => { out += t; }, readFile: async () => JSON.stringify(bad) };
    const code = await runCli(["validate", "bad.json", "--json"], io);
    expect(code).toBe(1);
    const verdict = JSON.parse(out) as { valid: boolean; problems: { path: string; message: string }[] };
    expect(verdict.valid).toBe(false);
    expect(verdict.problems).toContainEqual({ path: "plants[1].model.B", message: "must have 2 rows like A, has 3" });
    // The nonlinear plant's equation: path, column and what the parser expected.
    expect(verdict.problems).toContainEqual({ path: "plants[0].model.stateEquations.backlog", message: "at column 26: expected ')' to close the ( at column 16, found the end of the expression" });
    expect(verdict.problems.map((p) => p.path)).toContain("variants[1].plant");
  });
});
