/** The command table. Each command parses its own options and prints a table or JSON. */
import { dispatch, ENGINE_METHODS } from "../../shared-engine/api";
import type { EngineResult } from "../../shared-engine/api";
import { formatComplex, formatTable } from "../../shared-engine/format";
import { describeOptions, parseArgs, type OptionSpec } from "./args";
import { readJsonArgument } from "./input";
import { EXIT, usageError, type CliIo } from "./io";
import { design, validate } from "./designCommands";
import { analyze } from "./analyzeCommand";
import { discretizeCommand } from "./discretizeCommand";
import { locus } from "./locusCommand";
import { sheet } from "./sheetCommand";
import { controller } from "./controllerCommand";

export interface Command {
  name: string;
  summary: string;
  help(): string;
  run(args: readonly string[], io: CliIo): Promise<number>;
}

const jsonOption: Record<string, OptionSpec> = {
  json: { value: false, description: "print only JSON on stdout (stable field names)" },
};

function printJson(io: CliIo, value: unknown): void {
  io.stdout(`${JSON.stringify(value, null, 2)}\n`);
}

const info: Command = {
  name: "info",
  summary: "engine version and the requests it answers",
  help: () => `Usage: loopwright info [--json]\n\nPrints the engine version and the engine requests available to \`loopwright call\`.\n\nOptions:\n${describeOptions(jsonOption)}\n`,
  async run(args, io) {
    const { options, positionals } = parseArgs(args, jsonOption, "info");
    if (positionals.length > 0) throw usageError(`info takes no arguments (got ${positionals.join(" ")})`);
    const result = (await dispatch("engine.info", {})) as EngineResult<"engine.info">;
    if (options.has("json")) printJson(io, result);
    else io.stdout(`${result.name} ${result.version}\nrequests: ${result.methods.join(", ")}\n`);
    return EXIT.ok;
  },
};

const eigenvaluesCommand: Command = {
  name: "eigenvalues",
  summary: "eigenvalues of a square matrix given as JSON rows",
  help: () =>
    `Usage: loopwright eigenvalues MATRIX [--json]\n\nMATRIX is JSON rows, e.g. '[[0,1],[-2,-3]]', or @file.json.\nComputed by balancing, Hessenberg reduction and Francis double-shift QR with an iteration cap.\n\nOptions:\n${describeOptions(jsonOption)}\n`,
  async run(args, io) {
    const { options, positionals } = parseArgs(args, jsonOption, "eigenvalues");
    if (positionals.length !== 1) throw usageError("eigenvalues needs exactly one MATRIX argument (JSON rows or @file.json)");
    const matrix = await readJsonArgument(positionals[0]!, io, "MATRIX");
    const result = (await dispatch("linalg.eigenvalues", { matrix })) as EngineResult<"linalg.eigenvalues">;
    if (options.has("json")) printJson(io, result);
    else io.stdout(formatTable([["#", "eigenvalue"], ...result.eigenvalues.map((e, i) => [String(i + 1), formatComplex(e, 10)])]));
    return EXIT.ok;
  },
};

const call: Command = {
  name: "call",
  summary: "run any engine request by name with JSON parameters (prints JSON)",
  help: () =>
    `Usage: loopwright call METHOD [PARAMS]\n\nRuns one engine request, exactly as the workbench sends it, and prints the JSON result.\nPARAMS is a JSON object or @file.json (default {}).\nMethods: ${ENGINE_METHODS.join(", ")}\n`,
  async run(args, io) {
    const { positionals } = parseArgs(args, {}, "call");
    if (positionals.length < 1 || positionals.length > 2) throw usageError("call needs METHOD and optionally PARAMS");
    const params = positionals[1] === undefined ? {} : await readJsonArgument(positionals[1], io, "PARAMS");
    printJson(io, await dispatch(positionals[0], params));
    return EXIT.ok;
  },
};

export const commands: readonly Command[] = [design, validate, sheet, controller, analyze, discretizeCommand, locus, info, eigenvaluesCommand, call];
