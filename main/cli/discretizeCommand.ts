/** `loopwright discretize FILE --plant ID --period T [--method zoh|tustin]`: the sampled plant's matrices. */
import { dispatch, type EngineResult } from "../../shared-engine/api";
import { formatComplex, formatReal } from "../../shared-engine/format";
import { describeOptions, parseArgs, type OptionSpec } from "./args";
import { EXIT, usageError } from "./io";
import { matrixLines, printJson, readProjectPlant } from "./projectPlant";
import type { Command } from "./commands";

const options: Record<string, OptionSpec> = {
  plant: { value: true, valueName: "ID", description: "the plant to sample (may be left out when the file has one plant)" },
  period: { value: true, valueName: "T", description: "sample period in seconds (required)" },
  method: { value: true, valueName: "zoh|tustin", description: "zero-order hold (default) or Tustin" },
  prewarp: { value: true, valueName: "W", description: "Tustin only: frequency in rad/s matched exactly" },
  json: { value: false, description: "print only JSON on stdout (the bridge result of model.discretize)" },
};

function positiveNumber(text: string, option: string): number {
  const v = Number(text);
  if (!Number.isFinite(v) || v <= 0 || text.trim() === "") throw usageError(`discretize: --${option} must be a positive number (got "${text}")`);
  return v;
}

export const discretizeCommand: Command = {
  name: "discretize",
  summary: "sample a continuous plant (zero-order hold or Tustin) and print its discrete matrices",
  help: () =>
    `Usage: loopwright discretize FILE [--plant ID] --period T [--method zoh|tustin] [--prewarp W] [--json]\n\nSamples one continuous plant of a Loopwright project file with period T seconds and prints\nA, B, C, D (and F, E when the plant has disturbances) of the discrete model, with its poles.\nzoh holds inputs and disturbances constant over each period; tustin uses the bilinear\nsubstitution, optionally prewarped at W rad/s. Exit code 0 on success, 1 when the file,\nplant or period is rejected by the engine, 2 for usage errors.\n\nOptions:\n${describeOptions(options)}\n`,
  async run(args, io) {
    const { options: opts, positionals } = parseArgs(args, options, "discretize");
    if (positionals.length !== 1) throw usageError("discretize needs exactly one project FILE");
    const periodText = opts.get("period");
    if (typeof periodText !== "string") throw usageError("discretize needs --period T (seconds)");
    const period = positiveNumber(periodText, "period");
    const method = opts.get("method") ?? "zoh";
    if (method !== "zoh" && method !== "tustin") throw usageError(`discretize: --method must be zoh or tustin (got "${String(method)}")`);
    const prewarpText = opts.get("prewarp");
    const prewarp = typeof prewarpText === "string" ? positiveNumber(prewarpText, "prewarp") : undefined;
    if (prewarp !== undefined && method !== "tustin") throw usageError("discretize: --prewarp applies only to --method tustin");
    const plantOption = opts.get("plant");
    const { plant, model, warnings } = await readProjectPlant(positionals[0]!, typeof plantOption === "string" ? plantOption : undefined, io, "discretize");
    for (const w of warnings) io.stderr(`warning: ${w.path}: ${w.message}\n`);
    const result = (await dispatch("model.discretize", {
      model,
      period,
      method,
      ...(prewarp !== undefined ? { prewarpRadPerSec: prewarp } : {}),
    })) as EngineResult<"model.discretize">;
    if (opts.has("json")) {
      printJson(io, { plant: plant.id, ...result });
      return EXIT.ok;
    }
    const m = result.model;
    const lines = [
      `Plant ${plant.id} sampled at T = ${formatReal(period, 10)} s (${method === "zoh" ? "zero-order hold" : `Tustin${prewarp !== undefined ? `, prewarped at ${formatReal(prewarp, 6)} rad/s` : ""}`})`,
      "",
      "A =", ...matrixLines(m.A, "  ", 10),
      "B =", ...matrixLines(m.B, "  ", 10),
      "C =", ...matrixLines(m.C, "  ", 10),
      "D =", ...matrixLines(m.D, "  ", 10),
    ];
    if (m.F.length > 0 && m.F[0]!.length > 0) lines.push("F =", ...matrixLines(m.F, "  ", 10), "E =", ...matrixLines(m.E, "  ", 10));
    lines.push("", `discrete poles:   ${result.poles.map((p) => formatComplex(p, 8)).join(", ") || "none"}`);
    lines.push(`continuous poles: ${result.continuousPoles.map((p) => formatComplex(p, 8)).join(", ") || "none"}`);
    for (const w of result.diagnostics.warnings) lines.push(`warning: ${w}`);
    io.stdout(`${lines.join("\n")}\n`);
    return EXIT.ok;
  },
};
