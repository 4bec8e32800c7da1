/** `loopwright design` and `loopwright validate`: the project pipeline on a project file. */
import { evaluateProject, loadProjectText, type DesignRunResult, type VariantResult } from "../../shared-engine/project";
import { formatComplex, formatCount, formatReal } from "../../shared-engine/format";
import { describeOptions, parseArgs, type OptionSpec } from "./args";
import { EXIT, usageError, type CliIo } from "./io";
import type { Command } from "./commands";

const designOptions: Record<string, OptionSpec> = {
  variant: { value: true, valueName: "ID", description: "design only this variant" },
  json: { value: false, description: "print only JSON on stdout (see docs/project-format.md for the fields)" },
  strict: { value: false, description: "exit 1 also when a check or requirement fails" },
};

const validateOptions: Record<string, OptionSpec> = {
  json: { value: false, description: "print the verdict as JSON on stdout" },
};

async function readProjectFile(path: string, io: CliIo): Promise<string> {
  try {
    return await io.readFile(path);
  } catch (error) {
    const code = (error as { code?: string }).code;
    throw usageError(`cannot read ${path}${code === "ENOENT" ? ": no such file" : code ? ` (${code})` : ""}`);
  }
}

function matrixText(m: number[][], indent: string): string {
  const cells = m.map((row) => row.map((v) => formatReal(v, 6)));
  const width = Math.max(1, ...cells.flat().map((c) => c.length));
  return cells.map((row) => `${indent}[ ${row.map((c) => c.padStart(width)).join("  ")} ]`).join("\n");
}

function optional(value: number | null | undefined, unit: string, digits = 4): string {
  return value === null || value === undefined ? "none" : `${formatReal(value, digits)}${unit}`;
}

export function formatVariant(v: VariantResult): string {
  const lines: string[] = [`Variant ${v.id}${v.name !== v.id ? ` — ${v.name}` : ""}`];
  if (v.plant) {
    const d = v.plant.dimensions;
    const flags = [
      v.plant.controllable ? "controllable" : v.plant.stabilizable ? "stabilizable (not controllable)" : "NOT stabilizable",
      v.plant.observable ? "observable" : v.plant.detectable ? "detectable (not observable)" : "NOT detectable",
    ];
    lines.push(`  plant: ${formatCount(d.states, "state")}, ${formatCount(d.inputs, "input")}, ${formatCount(d.outputs, "output")}, ${formatCount(d.disturbances, "disturbance")}; ${v.plant.sampleTime === null ? "continuous" : `sampled at ${v.plant.sampleTime} s`}; ${flags.join(", ")}`);
    lines.push(`  plant poles: ${v.plant.poles.map((p) => formatComplex(p, 5)).join(", ")}`);
    const op = v.plant.operatingPoint;
    if (op) {
      const list = (values: Record<string, number>): string => Object.entries(values).map(([k, x]) => `${k} = ${formatReal(x, 6)}`).join(", ") || "none";
      lines.push(`  operating point (residual ${op.residual.toExponential(2)}, ${op.iterations} Newton iterations):`);
      lines.push(`    states: ${list(op.states)}`, `    inputs: ${list(op.inputs)}`, `    disturbances: ${list(op.disturbances)}`, `    outputs: ${list(op.outputs)}`);
    }
    const lin = v.plant.linearization;
    if (lin) {
      lines.push("  linearization at the operating point (deviations; continuous time):");
      const inline = (m: number[][]): string => `[ ${m.map((row) => row.map((x) => formatReal(x, 6)).join("  ")).join("; ")} ]`;
      for (const key of ["A", "B", "F", "C", "D", "E"] as const) {
        if (lin[key].length > 0 && lin[key][0]!.length > 0) lines.push(`    ${key} = ${inline(lin[key])}`);
      }
    }
  }
  if (v.error) {
    lines.push(`  NOT DESIGNED: ${v.error.message} [${v.error.kind}]`);
    return lines.join("\n") + "\n";
  }
  if (v.discrete) lines.push(`  discretized: ${v.discrete.method} at T = ${v.discrete.sampleTime} s`);
  if (v.design) lines.push(`  method: ${v.design.method}; ‖K‖_F = ${formatReal(v.design.gainNorm, 5)}${v.design.eigenvectorCondition !== undefined ? `; κ(V) = ${formatReal(v.design.eigenvectorCondition, 3)}` : ""}`);
  if (v.gain?.K && v.gain.K.length > 0) lines.push("  K =", matrixText(v.gain.K, "    "));
  if (v.gain?.Ki) lines.push("  Ki =", matrixText(v.gain.Ki, "    "));
  if (v.gain?.L) lines.push("  L =", matrixText(v.gain.L, "    "));
  if (v.gain?.referenceGain) lines.push("  reference gain =", matrixText(v.gain.referenceGain, "    "));
  if (v.closedLoopPoles) lines.push(`  closed-loop poles: ${v.closedLoopPoles.map((p) => formatComplex(p, 5)).join(", ")}`);
  if (v.observerPoles) lines.push(`  observer poles: ${v.observerPoles.map((p) => formatComplex(p, 5)).join(", ")}`);
  if (v.riccati) lines.push(`  Riccati residual ${v.riccati.residual.toExponential(2)}, condition indicator ${v.riccati.conditionIndicator.toExponential(2)}`);
  if (v.margins) {
    const m = v.margins;
    // A missing margin is unbounded: the loop never reaches the crossing that would define it.
    const gain = m.gainDb === null ? "gain unbounded (no phase crossover)" : `gain ${optional(m.gainDb, " dB")} at ${optional(m.phaseCrossover, " rad/s")}`;
    const phase = m.phaseDeg === null ? "phase unbounded (no gain crossover)" : `phase ${optional(m.phaseDeg, "°")} at ${optional(m.gainCrossover, " rad/s")}`;
    const delay = m.delayMargin === null ? "delay unbounded" : `delay ${optional(m.delayMargin, " s")}`;
    lines.push(`  margins (${m.loop === "plant-input" ? "loop broken at the plant input" : "unity negative feedback"}): ${gain}, ${phase}, ${delay}, Ms ${formatReal(m.sensitivityPeak, 4)}`);
    if (m.stateFeedbackLoop) lines.push(`    (state-feedback loop alone: gain ${m.stateFeedbackLoop.gainDb === null ? "unbounded" : optional(m.stateFeedbackLoop.gainDb, " dB")}, phase ${m.stateFeedbackLoop.phaseDeg === null ? "unbounded" : optional(m.stateFeedbackLoop.phaseDeg, "°")})`);
  }
  if (v.step) {
    const s = v.step;
    lines.push(`  step (${s.loop}, from ${s.input}): rise ${optional(s.riseTime, " s")}, settling ${optional(s.settlingTime, " s")}, overshoot ${formatReal(s.overshootPct, 4)} %, final ${optional(s.steadyStateValue, "")}${s.peakInput !== undefined ? `, peak input ${formatReal(s.peakInput, 4)}` : ""} [${s.status}]`);
  }
  if (v.nonlinear) {
    const nl = v.nonlinear;
    const d = nl.largestDivergence;
    lines.push(`  nonlinear check (${nl.controller === "continuous" ? "continuous controller" : `controller sampled at ${nl.controller} s`}, ${nl.time.length} times to ${formatReal(nl.time[nl.time.length - 1] ?? 0, 4)} s): largest divergence from the linear prediction ${d ? `${formatReal(d.size, 4)} (${d.output} at t = ${formatReal(d.time, 4)} s)` : "none"}, predicted excursion ${formatReal(nl.linearExcursion, 4)}; ${nl.saturated ? "an input saturated" : "no input saturated"}${nl.stoppedEarly ? `; STOPPED at t = ${formatReal(nl.stoppedEarly.time, 4)} s: ${nl.stoppedEarly.reason}` : ""}`);
  }
  if (v.robustness) {
    const r = v.robustness;
    lines.push(`  robustness (${r.parameterNames.join(", ")}; ${r.samples} samples): ${r.allStable ? "all stable" : "NOT all stable"}, ${r.failedSamples} without an operating point; ${r.sampleTime === null ? `largest pole real part ${optional(r.largestRealPart, "", 4)}` : `controller sampled at ${formatReal(r.sampleTime, 4)} s, largest pole magnitude ${optional(r.largestPoleMagnitude, "", 4)}`}; worst gain margin ${optional(r.worstGainMarginDb, " dB")}, worst phase margin ${optional(r.worstPhaseMarginDeg, "°")}`);
  }
  if (v.bode) lines.push(`  Bode (${v.bode.loop}): ${v.bode.frequency.length} frequencies from ${formatReal(v.bode.frequency[0]!, 4)} to ${formatReal(v.bode.frequency[v.bode.frequency.length - 1]!, 4)} rad/s`);
  for (const c of v.checks) lines.push(`  ${c.passed ? "pass" : "FAIL"}  ${c.name}: ${c.detail}`);
  for (const w of v.warnings) lines.push(`  warning: ${w}`);
  return lines.join("\n") + "\n";
}

export const design: Command = {
  name: "design",
  summary: "design every variant of a project file and print gains, poles, margins and checks",
  help: () =>
    `Usage: loopwright design FILE [--variant ID] [--json] [--strict]\n\nRuns the design pipeline on each variant of a Loopwright project file (format\n"loopwright-project"). A variant that cannot be designed is reported with its error;\nthe others are still designed. Exit code 0 when every variant was designed, 1 when one\nwas not (or, with --strict, when a check or requirement failed), 2 for usage errors.\n\nOptions:\n${describeOptions(designOptions)}\n`,
  async run(args, io) {
    const { options, positionals } = parseArgs(args, designOptions, "design");
    if (positionals.length !== 1) throw usageError("design needs exactly one project FILE");
    const text = await readProjectFile(positionals[0]!, io);
    const loaded = loadProjectText(text);
    const variant = options.get("variant");
    const run: DesignRunResult = evaluateProject(loaded, { variant: typeof variant === "string" ? variant : undefined });
    for (const w of loaded.warnings) io.stderr(`warning: ${w.path}: ${w.message}\n`);
    if (options.has("json")) io.stdout(`${JSON.stringify(run, null, 2)}\n`);
    else {
      io.stdout(`Project: ${run.project}  (engine ${run.engineVersion})\n\n`);
      io.stdout(run.variants.map(formatVariant).join("\n"));
      io.stdout("\nSimulation is not validation: keep independent safety interlocks and follow the applicable codes and licensed engineering practice.\n");
    }
    const failed = run.variants.some((v) => v.error !== undefined);
    const checksFailed = run.variants.some((v) => v.checks.some((c) => !c.passed));
    return failed || (options.has("strict") && checksFailed) ? EXIT.failure : EXIT.ok;
  },
};

export const validate: Command = {
  name: "validate",
  summary: "check a project file (format, shapes, references) without designing",
  help: () =>
    `Usage: loopwright validate FILE [--json]\n\nChecks a project file: JSON syntax, size and nesting limits, the format and version\n(migrating older versions), and every field, naming each problem by its JSON path.\nExit code 0 when valid, 1 when not, 2 for usage errors.\n\nOptions:\n${describeOptions(validateOptions)}\n`,
  async run(args, io) {
    const { options, positionals } = parseArgs(args, validateOptions, "validate");
    if (positionals.length !== 1) throw usageError("validate needs exactly one project FILE");
    const text = await readProjectFile(positionals[0]!, io);
    try {
      const loaded = loadProjectText(text);
      if (options.has("json")) {
        io.stdout(`${JSON.stringify({ valid: true, fromVersion: loaded.fromVersion, warnings: loaded.warnings, problems: [] }, null, 2)}\n`);
      } else {
        io.stdout(`${positionals[0]}: valid (${loaded.project.plants.length} plants, ${loaded.project.variants.length} variants)\n`);
        for (const w of loaded.warnings) io.stdout(`  warning: ${w.path}: ${w.message}\n`);
      }
      return EXIT.ok;
    } catch (error) {
      const details = (error as { details?: { problems?: { path: string; message: string }[]; path?: string; warnings?: unknown } }).details;
      const kind = (error as { kind?: string }).kind;
      if (kind !== "validation") throw error;
      const problems = details?.problems ?? [{ path: details?.path ?? "", message: (error as Error).message }];
      if (options.has("json")) {
        io.stdout(`${JSON.stringify({ valid: false, problems, warnings: details?.warnings ?? [] }, null, 2)}\n`);
      } else {
        io.stderr(`${positionals[0]}: not valid\n`);
        for (const p of problems) io.stderr(`  ${p.path ? `${p.path}: ` : ""}${p.message}\n`);
      }
      return EXIT.failure;
    }
  },
};
