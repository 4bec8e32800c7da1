/**
 * `loopwright controller`: a variant's controller as sampled difference equations, printed for
 * a software engineer (named matrix rows and columns, the execution order per sample, the
 * cautions), as the "loopwright-controller" JSON (docs/project-format.md, "Controller export"),
 * or as one self-contained C99 source file (`--format c`, shared-engine/project/controllerSource).
 */
import { writeFile } from "node:fs/promises";
import { loadProjectText } from "../../shared-engine/project";
import { controllerExport, type ControllerExport } from "../../shared-engine/project/controllerExport";
import { CONTROLLER_CAUTIONS, controllerSource } from "../../shared-engine/project/controllerSource";
import { EngineError } from "../../shared-engine/errors";
import { formatReal } from "../../shared-engine/format";
import { describeOptions, parseArgs, type OptionSpec } from "./args";
import { CliError, EXIT, usageError } from "./io";
import type { Command } from "./commands";

const controllerOptions: Record<string, OptionSpec> = {
  variant: { value: true, valueName: "ID", description: "the variant whose controller to export (required)" },
  period: { value: true, valueName: "T", description: "sample period in seconds (required for a continuous design; a sampled design runs at its own period)" },
  format: { value: true, valueName: "text|json|c", description: "text (default): the equations for reading; json: format \"loopwright-controller\"; c: one C99 source file" },
  json: { value: false, description: "the same as --format json" },
  out: { value: true, valueName: "FILE", description: "write the output to FILE instead of stdout" },
};

/** The cautions every export carries; one list in the engine, so the C file says the same words. */
export { CONTROLLER_CAUTIONS };

const FORMATS = ["text", "json", "c"] as const;
type OutputFormat = (typeof FORMATS)[number];

export interface ControllerDeps {
  writeFile(path: string, text: string): Promise<void>;
}

function matrixTable(title: string, M: number[][], rowNames: string[], colNames: string[]): string {
  if (M.length === 0 || (M[0]?.length ?? 0) === 0) return `${title}: empty (${M.length}×${M[0]?.length ?? 0})\n`;
  const cells = M.map((row) => row.map((v) => formatReal(v, 10)));
  const left = Math.max(...rowNames.map((n) => n.length));
  const widths = colNames.map((c, j) => Math.max(c.length, ...cells.map((row) => row[j]!.length)));
  const lines = [`${title}:`, `  ${"".padEnd(left)}  ${colNames.map((c, j) => c.padStart(widths[j]!)).join("  ")}`];
  cells.forEach((row, i) => lines.push(`  ${rowNames[i]!.padEnd(left)}  ${row.map((c, j) => c.padStart(widths[j]!)).join("  ")}`));
  return `${lines.join("\n")}\n`;
}

/** The readable form of a controller export. */
export function formatController(c: ControllerExport): string {
  const refs = c.signals.references.map((s) => `δ${s.name}`);
  const meas = c.signals.measurements.map((s) => `δ${s.name}`);
  const ins = c.signals.inputs.map((s) => s.name);
  const states = c.signals.states;
  const unit = (s: { name: string; unit: string }): string => `${s.name}${s.unit ? ` [${s.unit}]` : ""}`;
  const out: string[] = [
    `Controller for variant ${c.variant} (plant ${c.plant}); fingerprint ${c.fingerprint}; engine ${c.engineVersion}`,
    `Runs every T = ${c.sampleTime} s (${c.designedIn === "discrete" ? "designed in discrete time" : "continuous design sampled by zero-order hold"}); ${states.length} controller states.`,
    "",
    "Signals:",
    `  references r:    ${c.signals.references.map(unit).join(", ") || "none"}`,
    `  measurements y:  ${c.signals.measurements.map(unit).join(", ") || "none"}`,
    `  inputs u:        ${c.signals.inputs.map(unit).join(", ") || "none"}`,
  ];
  if (c.operatingPoint) {
    const list = (names: string[], values: number[]): string => names.map((n, i) => `${n} = ${formatReal(values[i]!, 10)}`).join(", ") || "none";
    out.push("Operating point (the equations run on deviations from it):");
    out.push(`  r0: ${list(c.signals.references.map((s) => s.name), c.operatingPoint.references)}`);
    out.push(`  y0: ${list(c.signals.measurements.map((s) => s.name), c.operatingPoint.measurements)}`);
    out.push(`  u0: ${list(ins, c.operatingPoint.inputs)}`);
  }
  out.push("", "Difference equations:", "  u_unsat[k] = u0 + Cc·xc[k] + Dc·[δr; δy]", "  u[k]       = sat(u_unsat[k])", "  xc[k+1]    = Ac·xc[k] + Bc·[δr; δy] + Bsat·(u[k] − u_unsat[k])", "");
  const text = out.join("\n") + "\n";
  const tables = [
    matrixTable("Ac (rows: xc[k+1], columns: xc[k])", c.matrices.Ac, states, states),
    matrixTable("Bc (rows: xc[k+1], columns: [δr; δy])", c.matrices.Bc, states, [...refs, ...meas]),
    matrixTable("Cc (rows: u_unsat, columns: xc[k])", c.matrices.Cc, ins, states),
    matrixTable("Dc (rows: u_unsat, columns: [δr; δy])", c.matrices.Dc, ins, [...refs, ...meas]),
    matrixTable("Bsat (rows: xc[k+1], columns: u − u_unsat)", c.matrices.Bsat, states, ins),
  ].join("\n");
  const tail: string[] = ["", `Initial state xc[0]: [${c.initialState.map((v) => formatReal(v, 10)).join(", ")}]`, "Limits:"];
  for (const l of c.limits) tail.push(`  ${l.input}: min ${l.min ?? "none"}, max ${l.max ?? "none"}, rate ${l.rateLimit === null ? "none" : `${l.rateLimit} per s`}`);
  tail.push(`Anti-windup: ${c.antiWindup.method}${c.antiWindup.trackingGain !== null ? `, tracking gain Kt = ${formatReal(c.antiWindup.trackingGain, 10)} 1/s (a starting point: tune it in the nonlinear check)` : ""}`);
  tail.push("", "Execution order per sample:", ...c.executionOrder.map((s, i) => `  ${i + 1}. ${s}`));
  tail.push("", "Checks:", ...c.checks.map((k) => `  ${k.passed ? "pass" : "FAIL"}  ${k.name}: ${k.detail}`));
  for (const w of c.warnings) tail.push(`  warning: ${w}`);
  tail.push("", "Cautions:", ...CONTROLLER_CAUTIONS.map((s) => `  - ${s}`));
  return `${text}${tables}${tail.join("\n")}\n`;
}

export function createControllerCommand(deps: ControllerDeps): Command {
  return {
    name: "controller",
    summary: "export a variant's controller as sampled difference equations (text, JSON or C source)",
    help: () =>
      `Usage: loopwright controller FILE --variant ID [--period T] [--format text|json|c] [--json] [--out FILE]\n\nPrints the controller of one variant as the difference equations that run every T seconds:\nxc[k+1] = Ac·xc[k] + Bc·[δr; δy] + Bsat·(u − u_unsat), u_unsat = u0 + Cc·xc[k] + Dc·[δr; δy],\nu = sat(u_unsat), with named matrix rows and columns, the limits, the anti-windup, the\nexecution order per sample, and checks that the equations reproduce the design.\n--format c writes the same controller as one C99 source file (plain double, no dynamic\nmemory, only <math.h>): a state struct, lw_<variant>_init and lw_<variant>_step, called every\nT seconds with the absolute references and measurements; it returns the limited commands.\nA continuous design needs --period; a sampled design runs at its own period.\nExit code 0 when exported with every check passed, 1 when the variant cannot be exported or a\ncheck failed (the output is still printed), 2 for usage errors.\n\nOptions:\n${describeOptions(controllerOptions)}\n\n${CONTROLLER_CAUTIONS.join("\n")}\n`,
    async run(args, io) {
      const { options, positionals } = parseArgs(args, controllerOptions, "controller");
      if (positionals.length !== 1) throw usageError("controller needs exactly one project FILE");
      const formatOption = options.get("format");
      if (formatOption !== undefined && !(FORMATS as readonly unknown[]).includes(formatOption)) {
        throw usageError(`--format must be text, json or c (got ${String(formatOption)})`);
      }
      if (options.has("json") && formatOption !== undefined && formatOption !== "json") {
        throw usageError(`--json means --format json; it conflicts with --format ${String(formatOption)}`);
      }
      const format: OutputFormat = options.has("json") ? "json" : ((formatOption as OutputFormat | undefined) ?? "text");
      const variantId = options.get("variant");
      if (typeof variantId !== "string") throw usageError("controller needs --variant ID (the variant whose controller to export)");
      let sampleTime: number | undefined;
      const period = options.get("period");
      if (typeof period === "string") {
        sampleTime = Number(period);
        if (!Number.isFinite(sampleTime) || sampleTime <= 0) throw usageError(`--period must be a positive number of seconds (got ${period})`);
      }
      let text: string;
      try {
        text = await io.readFile(positionals[0]!);
      } catch (error) {
        const code = (error as { code?: string }).code;
        throw usageError(`cannot read ${positionals[0]}${code === "ENOENT" ? ": no such file" : code ? ` (${code})` : ""}`);
      }
      const loaded = loadProjectText(text);
      for (const w of loaded.warnings) io.stderr(`warning: ${w.path}: ${w.message}\n`);
      const variant = loaded.project.variants.find((v) => v.id === variantId);
      if (!variant) throw new EngineError("invalid-argument", `No variant "${variantId}" in the project; variants are: ${loaded.project.variants.map((v) => v.id).join(", ") || "none"}`, {});
      const plant = loaded.project.plants.find((p) => p.id === variant.plant)!;
      const exported = controllerExport(plant, variant, sampleTime === undefined ? {} : { sampleTime });
      const output = format === "json" ? `${JSON.stringify(exported, null, 2)}\n` : format === "c" ? controllerSource(exported).text : formatController(exported);
      if (format === "c") {
        // The checks are in the file's header comment; a failed one must not pass unnoticed.
        for (const k of exported.checks) if (!k.passed) io.stderr(`warning: check ${k.name} failed: ${k.detail}\n`);
      }
      const target = options.get("out");
      if (typeof target === "string") {
        try {
          await deps.writeFile(target, output);
        } catch (error) {
          throw new CliError(`cannot write ${target}: ${(error as Error).message}`, EXIT.failure);
        }
        io.stderr(`wrote ${target}\n`);
      } else io.stdout(output);
      return exported.checks.every((c) => c.passed) ? EXIT.ok : EXIT.failure;
    },
  };
}

export const controller: Command = createControllerCommand({ writeFile: (path, text) => writeFile(path, text, "utf8") });
