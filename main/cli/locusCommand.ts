/** `loopwright locus FILE --plant ID`: root-locus summary (asymptotes, break points, crossings with gains). */
import { dispatch, type EngineResult } from "../../shared-engine/api";
import { formatComplex, formatReal, formatTable } from "../../shared-engine/format";
import { describeOptions, parseArgs, type OptionSpec } from "./args";
import { EXIT, usageError } from "./io";
import { printJson, readProjectPlant } from "./projectPlant";
import type { Command } from "./commands";

const options: Record<string, OptionSpec> = {
  plant: { value: true, valueName: "ID", description: "the plant whose loop is traced (may be left out when the file has one plant)" },
  input: { value: true, valueName: "N", description: "input used as the loop input (1-based; for plants with several inputs)" },
  output: { value: true, valueName: "N", description: "output fed back (1-based; for plants with several outputs)" },
  negative: { value: false, description: "trace the negative-gain locus (k ≤ 0)" },
  "max-gain": { value: true, valueName: "K", description: "largest |k| traced (default: chosen from the model)" },
  json: { value: false, description: "print only JSON on stdout (the bridge result of analysis.rootLocus, branches included)" },
};

function channelIndex(text: string | true | undefined, option: string): number | undefined {
  if (text === undefined) return undefined;
  const v = Number(text);
  if (typeof text !== "string" || !Number.isInteger(v) || v < 1) throw usageError(`locus: --${option} must be a 1-based index (got "${String(text)}")`);
  return v - 1;
}

export const locus: Command = {
  name: "locus",
  summary: "root-locus summary of a plant's loop: asymptotes, break points, stability crossings with gains",
  help: () =>
    `Usage: loopwright locus FILE [--plant ID] [--input N --output N] [--negative] [--max-gain K] [--json]\n\nTraces the closed-loop poles of u = −k·y around one plant of a Loopwright project file as\nk runs from 0 (the plant's poles) towards infinity (its zeros and asymptotes), and prints\nthe open-loop poles and zeros, the asymptotes, the break points and the gains where a branch\ncrosses the stability boundary. Exit code 0 on success, 1 when the engine rejects the loop\n(for example a loop with no poles), 2 for usage errors (including a plant with several\ninputs or outputs and no --input/--output).\n\nOptions:\n${describeOptions(options)}\n`,
  async run(args, io) {
    const { options: opts, positionals } = parseArgs(args, options, "locus");
    if (positionals.length !== 1) throw usageError("locus needs exactly one project FILE");
    const input = channelIndex(opts.get("input"), "input");
    const output = channelIndex(opts.get("output"), "output");
    const maxGainText = opts.get("max-gain");
    let maxGain: number | undefined;
    if (typeof maxGainText === "string") {
      maxGain = Number(maxGainText);
      if (!Number.isFinite(maxGain) || maxGain <= 0) throw usageError(`locus: --max-gain must be a positive number (got "${maxGainText}")`);
    }
    const plantOption = opts.get("plant");
    const { plant, model, warnings } = await readProjectPlant(positionals[0]!, typeof plantOption === "string" ? plantOption : undefined, io, "locus");
    for (const w of warnings) io.stderr(`warning: ${w.path}: ${w.message}\n`);
    const inputs = model.names.inputs.length;
    const outputs = model.names.outputs.length;
    if ((inputs > 1 && input === undefined) || (outputs > 1 && output === undefined)) {
      throw usageError(`locus: plant ${plant.id} has ${inputs} inputs and ${outputs} outputs; choose the loop with --input N and --output N (1-based)`);
    }
    const r = (await dispatch("analysis.rootLocus", {
      model,
      ...(input !== undefined ? { input } : {}),
      ...(output !== undefined ? { output } : {}),
      ...(opts.has("negative") ? { negativeGain: true } : {}),
      ...(maxGain !== undefined ? { maxGain } : {}),
    })) as EngineResult<"analysis.rootLocus">;
    if (opts.has("json")) {
      printJson(io, { plant: plant.id, ...r });
      return EXIT.ok;
    }
    const list = (v: { re: number; im: number }[]): string => (v.length === 0 ? "none" : v.map((z) => formatComplex(z, 6)).join(", "));
    const lines = [
      `Root locus of plant ${plant.id} (${r.negativeGain ? "k ≤ 0" : "k ≥ 0"}, u = −k·y; ${model.sampleTime === null ? "continuous" : `sampled at ${model.sampleTime} s`})`,
      `  open-loop poles: ${list(r.openLoopPoles)}`,
      `  open-loop zeros: ${list(r.openLoopZeros)}`,
      r.asymptotes.centroid === null
        ? "  asymptotes: none (every branch ends at a finite zero)"
        : `  asymptotes: centroid ${formatReal(r.asymptotes.centroid, 6)}, angles ${r.asymptotes.anglesDeg.map((a) => `${formatReal(a, 6)}°`).join(", ")}`,
      `  gains traced: 0 to ${formatReal(r.gains[r.gains.length - 1]!, 6)} (${r.gains.length} points per branch)`,
      "",
    ];
    if (r.breakPoints.length === 0) lines.push("Break points: none");
    else lines.push("Break points:", ...formatTable([["point", "gain k"], ...r.breakPoints.map((b) => [formatComplex(b.point, 8), formatReal(b.gain, 8)])]).trimEnd().split("\n").map((l) => `  ${l}`));
    lines.push("");
    const boundary = model.sampleTime === null ? "imaginary axis" : "unit circle";
    if (r.crossings.length === 0) lines.push(`Crossings of the ${boundary}: none in the traced range`);
    else lines.push(`Crossings of the ${boundary}:`, ...formatTable([["point", "gain k"], ...r.crossings.map((c) => [formatComplex(c.point, 8), formatReal(c.gain, 8)])]).trimEnd().split("\n").map((l) => `  ${l}`));
    for (const w of r.diagnostics.warnings) lines.push(`note: ${w}`);
    io.stdout(`${lines.join("\n")}\n`);
    return EXIT.ok;
  },
};
