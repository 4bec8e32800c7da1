// `loopwright controller --format c`, checked against two things outside the generator:
// - the C compiler as an independent implementation: the file is compiled with the system `cc`
//   (-std=c99 -Wall -Wextra -Werror -pedantic), linked into a driver written here, and run on a
//   recorded reference/measurement sequence;
// - the export's own documented equations: the same sequence through a recursion written in this
//   test from the JSON export's matrices and its documented execution order
//   (docs/project-format.md, "Controller export"), not from the generator.
// Commands must agree to 1e-12 relative to each signal's largest magnitude, including the samples
// where the limits act. Every number in the file must read back (by the compiler) to the exact
// double of the JSON export.
import { spawnSync, execFileSync } from "node:child_process";
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { afterAll, describe, expect, it } from "vitest";
import { runCli, type CliIo } from "../../main/cli/cli";
import type { ControllerExport } from "../../shared-engine/project/controllerExport";
import { controllerSource } from "../../shared-engine/project/controllerSource";

const CC = (() => {
  const probe = spawnSync("cc", ["--version"], { encoding: "utf8" });
  return probe.error || probe.status !== 0 ? null : "cc";
})();
const FLAGS = ["-std=c99", "-Wall", "-Wextra", "-Werror", "-pedantic"];
const work = mkdtempSync(join(tmpdir(), "loopwright-c-"));
afterAll(() => rmSync(work, { recursive: true, force: true }));

async function cli(args: string[]): Promise<{ code: number; out: string; err: string }> {
  let out = "";
  let err = "";
  const io: CliIo = { stdout: (t) => { out += t; }, stderr: (t) => { err += t; }, readFile: async (path) => readFileSync(path, "utf8") };
  return { code: await runCli(args, io), out, err };
}

// ---- Projects: the examples as shipped, and the queue example with an observer added --------
type Json = Record<string, unknown> & { plants: Record<string, unknown>[]; variants: Record<string, unknown>[] };
const example = (name: string): Json => JSON.parse(readFileSync(`assets/examples/${name}.loopwright.json`, "utf8")) as Json;

/** The queue example's sampled LQR with integral action (limits 1..120 consumers, 2 per s), given an observer so it exports. */
function queueProject(): string {
  const p = example("queue-backlog");
  const base = p.variants.find((v) => v.id === "lqr-integral-1s")!;
  const withObserver = (id: string, antiWindup: string): Record<string, unknown> => {
    const v = structuredClone(base) as Record<string, unknown> & { integralAction: Record<string, unknown> };
    delete v.nonlinearCheck;
    delete v.baseline;
    return { ...v, id, observer: { method: "poles", poles: [0.5, 0.6] }, integralAction: { ...v.integralAction, antiWindup } };
  };
  // The same plant measuring both states, with a static gain (no controller states).
  const plant = structuredClone(p.plants.find((q) => q.id === "queue")!) as { id: string; model: { outputs: unknown[] } };
  plant.id = "queue-measured";
  plant.model.outputs = [{ name: "backlog_out", unit: "msg", equation: "backlog" }, { name: "consumers_out", unit: "consumers", equation: "consumers" }];
  const staticGain = { id: "static-gain", name: "static gain", plant: "queue-measured", discretize: base.discretize, stateFeedback: base.stateFeedback };
  p.plants.push(plant);
  p.variants.push(withObserver("observer-integral", "back-calculation"), withObserver("observer-conditional", "conditional"), staticGain);
  const path = join(work, "queue-observer.loopwright.json");
  writeFileSync(path, JSON.stringify(p));
  return path;
}

interface Case { title: string; file: string; variant: string; period?: string; yScale: number[]; rStep: number[]; limits: boolean; conditional?: boolean }
const QUEUE = queueProject();
const RACK = "assets/examples/rack-temperature.loopwright.json";
const CASES: Case[] = [
  { title: "queue with observer, integral action, back-calculation and limits (1..120, 2/s)", file: QUEUE, variant: "observer-integral", yScale: [20000], rStep: [-3000], limits: true },
  { title: "queue with observer, integral action, conditional integration and limits", file: QUEUE, variant: "observer-conditional", yScale: [20000], rStep: [-3000], limits: true, conditional: true },
  { title: "queue measuring both states, static gain with limits (no controller states)", file: QUEUE, variant: "static-gain", yScale: [150000, 150], rStep: [30], limits: true },
  { title: "rack-temperature observer-sampled (observer, reference feedforward, linear plant)", file: RACK, variant: "observer-sampled", yScale: [3], rStep: [2], limits: false },
  { title: "queue-backlog lqr-kalman, a continuous design sampled at --period 1", file: "assets/examples/queue-backlog.loopwright.json", variant: "lqr-kalman", period: "1", yScale: [4000], rStep: [-1000], limits: false },
];

// ---- The recorded sequence ----------------------------------------------------------------------
/**
 * Deterministic r[k], y[k] around the operating point: a small wave (commands inside the limits),
 * then a large deviation of one sign and of the other (into the limits, both bounds and the rate
 * window), then the small wave again; reference steps; LCG noise (seed 12345).
 */
function sequence(c: ControllerExport, k: Case, steps: number): { r: number[][]; y: number[][] } {
  let seed = 12345;
  const noise = (): number => { seed = (seed * 1103515245 + 12345) % 2147483648; return seed / 2147483648 - 0.5; };
  const r0 = c.operatingPoint?.references ?? c.signals.references.map(() => 0);
  const y0 = c.operatingPoint?.measurements ?? c.signals.measurements.map(() => 0);
  const r: number[][] = [];
  const y: number[][] = [];
  for (let s = 0; s < steps; s++) {
    r.push(r0.map((v, i) => v + (s >= 30 && s < 150 ? k.rStep[i % k.rStep.length]! : 0)));
    const swing = s >= 40 && s < 100 ? 1 : s >= 100 && s < 160 ? -1 : 0.05 * Math.sin(0.045 * s);
    y.push(y0.map((v, i) => v + k.yScale[i % k.yScale.length]! * ((i % 2 === 0 ? swing : -swing) + 0.01 * noise())));
  }
  return { r, y };
}

// ---- The reference recursion from the JSON export (docs/project-format.md) -------------------
interface Reference { u: number[][]; limited: number[]; xc: number[]; belowMin: number; aboveMax: number; rateLimited: number; held: number }
function referenceRun(c: ControllerExport, r: number[][], y: number[][]): Reference {
  const { Ac, Bc, Cc, Dc, Bsat } = c.matrices;
  const nc = c.initialState.length;
  const r0 = c.operatingPoint?.references ?? r[0]!.map(() => 0);
  const y0 = c.operatingPoint?.measurements ?? y[0]!.map(() => 0);
  const u0 = c.operatingPoint?.inputs ?? Cc.map(() => 0);
  const m = Dc.length;
  let xc = [...c.initialState];
  let uPrev = [...u0]; // u[−1] = u0
  const out: Reference = { u: [], limited: [], xc: [], belowMin: 0, aboveMax: 0, rateLimited: 0, held: 0 };
  for (let k = 0; k < r.length; k++) {
    const v = [...r[k]!.map((x, i) => x - r0[i]!), ...y[k]!.map((x, i) => x - y0[i]!)]; // δr, δy
    const uUnsat = Array.from({ length: m }, (_, i) => {
      let s = u0[i]!;
      for (let j = 0; j < nc; j++) s += Cc[i]![j]! * xc[j]!;
      for (let j = 0; j < v.length; j++) s += Dc[i]![j]! * v[j]!;
      return s;
    });
    const u = uUnsat.map((a0, i) => {
      const { min, max, rateLimit } = c.limits[i]!;
      const bound = (a: number): number => Math.min(max ?? Infinity, Math.max(min ?? -Infinity, a));
      let a = bound(a0);
      if (min !== null && a0 < min) out.belowMin++;
      if (max !== null && a0 > max) out.aboveMax++;
      if (rateLimit !== null) {
        const change = rateLimit * c.sampleTime;
        const windowed = Math.min(uPrev[i]! + change, Math.max(uPrev[i]! - change, a));
        if (windowed !== a) out.rateLimited++;
        a = bound(windowed);
      }
      return a;
    });
    out.u.push(u);
    out.limited.push(u.filter((x, i) => x !== uUnsat[i]).length);
    const next = Array.from({ length: nc }, (_, i) => {
      let s = 0;
      for (let j = 0; j < nc; j++) s += Ac[i]![j]! * xc[j]!;
      for (let j = 0; j < v.length; j++) s += Bc[i]![j]! * v[j]!;
      for (let j = 0; j < m; j++) s += Bsat[i]![j]! * (u[j]! - uUnsat[j]!);
      return s;
    });
    if (c.antiWindup.method === "conditional") {
      // "an integrator is held while its error would push a saturated input further out"
      for (const s of c.antiWindup.integratorStates) {
        const change = next[s]! - xc[s]!;
        if (uUnsat.some((uu, i) => Math.sign(uu - u[i]!) !== 0 && Math.sign(uu - u[i]!) === Math.sign(Cc[i]![s]! * change))) {
          next[s] = xc[s]!;
          out.held++;
        }
      }
    }
    xc = next;
    uPrev = u;
  }
  out.xc = xc;
  return out;
}

// ---- The driver, compiled with the generated file ----------------------------------------------
function driverSource(prefix: string): string {
  const P = prefix.toUpperCase();
  return `#include <stdio.h>
#include "controller.c"
static void print_values(const char *name, const double *a, int n)
{
    int i;
    printf("%s", name);
    for (i = 0; i < n; ++i) printf(" %.17g", a[i]);
    printf("\\n");
}
int main(int argc, char **argv)
{
    FILE *f;
    int n, k, i, ret;
    ${prefix}_state s;
    double r[${P}_NUM_REFERENCES], y[${P}_NUM_MEASUREMENTS], u[${P}_NUM_COMMANDS];
    if (argc != 2 || (f = fopen(argv[1], "r")) == NULL || fscanf(f, "%d", &n) != 1) return 2;
    ${prefix}_init(&s);
    for (k = 0; k < n; ++k) {
        for (i = 0; i < ${P}_NUM_REFERENCES; ++i) if (fscanf(f, "%lf", &r[i]) != 1) return 2;
        for (i = 0; i < ${P}_NUM_MEASUREMENTS; ++i) if (fscanf(f, "%lf", &y[i]) != 1) return 2;
        ret = ${prefix}_step(&s, r, y, u);
        printf("step %d", ret);
        for (i = 0; i < ${P}_NUM_COMMANDS; ++i) printf(" %.17g", u[i]);
        printf("\\n");
    }
    fclose(f);
#if ${P}_NUM_STATES > 0
    print_values("xc", s.xc, ${P}_NUM_STATES);
#endif
    y[0] = NAN;
    ret = ${prefix}_step(&s, r, y, u);
    printf("nan %d", ret);
    for (i = 0; i < ${P}_NUM_COMMANDS; ++i) printf(" %.17g", u[i]);
    printf("\\n");
#if ${P}_NUM_STATES > 0
    print_values("xc", s.xc, ${P}_NUM_STATES);
    print_values("Ac", &${prefix}_Ac[0][0], ${P}_NUM_STATES * ${P}_NUM_STATES);
    print_values("Bc", &${prefix}_Bc[0][0], ${P}_NUM_STATES * (${P}_NUM_REFERENCES + ${P}_NUM_MEASUREMENTS));
    print_values("Cc", &${prefix}_Cc[0][0], ${P}_NUM_COMMANDS * ${P}_NUM_STATES);
    print_values("Bsat", &${prefix}_Bsat[0][0], ${P}_NUM_STATES * ${P}_NUM_COMMANDS);
#endif
    print_values("Dc", &${prefix}_Dc[0][0], ${P}_NUM_COMMANDS * (${P}_NUM_REFERENCES + ${P}_NUM_MEASUREMENTS));
    print_values("u0", ${prefix}_u0, ${P}_NUM_COMMANDS);
    print_values("r0", ${prefix}_r0, ${P}_NUM_REFERENCES);
    print_values("y0", ${prefix}_y0, ${P}_NUM_MEASUREMENTS);
    return 0;
}
`;
}

const STEPS = 240;

/** A hand-made export with hostile names and units, one-sided limits and conditional integration. */
function hostileExport(states: boolean): ControllerExport {
  return {
    format: "loopwright-controller", version: 1, engineVersion: "0.1.0", fingerprint: "lw1-0123456789abcdef0123456789abcdef",
    variant: "2nd stage */ ??/", plant: "p", sampleTime: 0.01, designedIn: "continuous",
    signals: {
      references: [{ name: "r_niveau (m)", unit: "m */" }],
      measurements: [{ name: "Niveau", unit: "m" }, { name: "niveau", unit: "°C ??/" }],
      inputs: [{ name: "int", unit: "%" }, { name: "double", unit: "" }],
      states: states ? ["est_x/*", "int_niveau"] : [],
    },
    matrices: states
      ? { Ac: [[0.5, 0], [0, 1]], Bc: [[0, 1, 0], [0.01, -0.01, 0]], Cc: [[-1, -3], [0, -0.5]], Dc: [[0, 0, 0], [0, 0, 1e-300]], Bsat: [[0.1, 0], [0, 0]] }
      : { Ac: [], Bc: [], Cc: [[], []], Dc: [[1, -0.5, 0], [0, 0, -2]], Bsat: [] },
    initialState: states ? [0, 0] : [],
    limits: [{ input: "int", min: null, max: 100, rateLimit: 5 }, { input: "double", min: -1, max: null, rateLimit: null }],
    antiWindup: states ? { method: "conditional", trackingGain: null, integratorStates: [1] } : { method: "none", trackingGain: null, integratorStates: [] },
    executionOrder: ["Compute u_unsat[k] = u0 + Cc·xc[k] + Dc·[δr; δy] /* ??/"],
    checks: [], warnings: ["a warning with */ inside"],
  };
}

describe.skipIf(CC === null)(CC === null ? "C export: skipped because no C compiler `cc` was found on PATH" : "C export compiled with the system C compiler", () => {
  it("compiles a hand-made export with hostile names, keywords as names, one-sided limits, with and without controller states", () => {
    for (const states of [true, false]) {
      const dir = mkdtempSync(join(work, "hostile-"));
      writeFileSync(join(dir, "controller.c"), controllerSource(hostileExport(states)).text);
      execFileSync(CC!, [...FLAGS, "-c", join(dir, "controller.c"), "-o", join(dir, "controller.o")], { cwd: dir });
    }
  });

  for (const k of CASES) {
    it(`${k.title}: compiles cleanly and the compiled step reproduces the export's equations to 1e-12`, async () => {
      const dir = mkdtempSync(join(work, `${k.variant}-`));
      const cFile = join(dir, "controller.c");
      const period = k.period ? ["--period", k.period] : [];
      const written = await cli(["controller", k.file, "--variant", k.variant, ...period, "--format", "c", "--out", cFile]);
      expect(written.code, written.err).toBe(0);
      const json = await cli(["controller", k.file, "--variant", k.variant, ...period, "--format", "json"]);
      expect(json.code, json.err).toBe(0);
      const exported = JSON.parse(json.out) as ControllerExport;
      const prefix = /^int (lw_\w+)_step\(/m.exec(readFileSync(cFile, "utf8"))![1]!;

      // The generated file alone is a clean C99 translation unit; the driver includes it.
      execFileSync(CC!, [...FLAGS, "-c", cFile, "-o", join(dir, "controller.o")], { cwd: dir });
      writeFileSync(join(dir, "driver.c"), driverSource(prefix));
      execFileSync(CC!, [...FLAGS, "-o", join(dir, "driver"), join(dir, "driver.c"), "-lm"], { cwd: dir });

      const { r, y } = sequence(exported, k, STEPS);
      const lines = [String(STEPS), ...r.map((rk, i) => [...rk, ...y[i]!].map((v) => v.toExponential(16)).join(" "))];
      writeFileSync(join(dir, "sequence.txt"), `${lines.join("\n")}\n`);
      const output = execFileSync(join(dir, "driver"), [join(dir, "sequence.txt")], { encoding: "utf8" }).trim().split("\n");
      const ref = referenceRun(exported, r, y);

      // Commands per sample, to 1e-12 of each command's largest magnitude; limited counts exactly.
      const stepLines = output.filter((l) => l.startsWith("step "));
      expect(stepLines.length).toBe(STEPS);
      const m = exported.signals.inputs.length;
      const scale = Array.from({ length: m }, (_, j) => Math.max(...ref.u.map((u) => Math.abs(u[j]!)), Number.MIN_VALUE));
      let worst = 0;
      stepLines.forEach((line, s) => {
        const [, limited, ...values] = line.split(" ");
        expect(Number(limited), `sample ${s}: limited commands`).toBe(ref.limited[s]);
        values.forEach((text, j) => { worst = Math.max(worst, Math.abs(Number(text) - ref.u[s]![j]!) / scale[j]!); });
      });
      expect(worst, `largest relative difference of the commands ${worst.toExponential(2)} (allowed 1e-12)`).toBeLessThanOrEqual(1e-12);
      if (k.limits) {
        // The sequence must drive the commands into the limits, or the comparison proves little.
        // (both bounds, the rate window, and enough samples inside the limits too).
        expect(ref.belowMin).toBeGreaterThan(0);
        expect(ref.aboveMax).toBeGreaterThan(0);
        expect(ref.rateLimited).toBeGreaterThan(0);
        expect(ref.limited.filter((n) => n > 0).length).toBeGreaterThan(20);
        expect(ref.limited.filter((n) => n === 0).length).toBeGreaterThan(20);
      }
      if (k.conditional) expect(ref.held).toBeGreaterThan(0);

      // The final state, the NaN guard (state untouched, last commands held), and the literals.
      const rows = output.filter((l) => !l.startsWith("step ") && !l.startsWith("nan "));
      const values = (name: string, at = 0): number[] => rows.filter((l) => l.split(" ")[0] === name)[at]!.split(" ").slice(1).map(Number);
      const nc = exported.initialState.length;
      if (nc > 0) {
        const xcScale = Math.max(...ref.xc.map(Math.abs), Number.MIN_VALUE);
        values("xc").forEach((v, i) => expect(Math.abs(v - ref.xc[i]!) / xcScale).toBeLessThanOrEqual(1e-12));
        expect(values("xc", 1)).toEqual(values("xc", 0));
      }
      const nan = output.find((l) => l.startsWith("nan "))!.split(" ").slice(1).map(Number);
      expect(nan[0]).toBe(-1);
      expect(nan.slice(1)).toEqual(stepLines[STEPS - 1]!.split(" ").slice(2).map(Number));
      const exact = (name: string, expected: number[]): void => {
        const got = values(name);
        expect(got.length, name).toBe(expected.length);
        got.forEach((v, i) => expect(Object.is(v, expected[i]), `${name}[${i}]: C read ${v}, export has ${expected[i]}`).toBe(true));
      };
      const mx = exported.matrices;
      if (nc > 0) for (const key of ["Ac", "Bc", "Cc", "Bsat"] as const) exact(key, mx[key].flat());
      exact("Dc", mx.Dc.flat());
      if (exported.operatingPoint) {
        exact("u0", exported.operatingPoint.inputs);
        exact("r0", exported.operatingPoint.references);
        exact("y0", exported.operatingPoint.measurements);
      }
    });
  }
});

describe("loopwright controller --format", () => {
  it("takes text, json or c; --json is --format json; anything else or a conflict is a usage error", async () => {
    const json = await cli(["controller", RACK, "--variant", "observer-sampled", "--format", "json"]);
    const alias = await cli(["controller", RACK, "--variant", "observer-sampled", "--json"]);
    expect(json.code).toBe(0);
    expect(json.out).toBe(alias.out);
    const c = await cli(["controller", RACK, "--variant", "observer-sampled", "--format", "c"]);
    expect(c.code).toBe(0);
    expect(c.out.startsWith("/*\n * Controller of variant \"observer-sampled\"")).toBe(true);
    expect(c.out).toContain("int lw_observer_sampled_step(");
    const text = await cli(["controller", RACK, "--variant", "observer-sampled", "--format", "text"]);
    expect(text.out).toContain("Execution order per sample:");
    const bad = await cli(["controller", RACK, "--variant", "observer-sampled", "--format", "pdf"]);
    expect(bad.code).toBe(2);
    expect(bad.err).toContain("--format must be text, json or c (got pdf)");
    const conflict = await cli(["controller", RACK, "--variant", "observer-sampled", "--format", "c", "--json"]);
    expect(conflict.code).toBe(2);
    expect(conflict.err).toContain("conflicts with --format c");
    expect((await cli(["controller", "--help"])).out).toContain("--format text|json|c");
  });

  it("exits 1 with the specific reason when the variant has no exportable controller, in C as in JSON", async () => {
    const { code, err, out } = await cli(["controller", RACK, "--variant", "lqr-integral", "--format", "c"]);
    expect(code).toBe(1);
    expect(out).toBe("");
    expect(err).toContain("needs an observer: the plant measures 1 of 2 states");
  });
});
