/**
 * The `loopwright` command line. It runs the same engine dispatcher as the desktop app and
 * browser mode, in-process. Every command has `--help`; `--json` prints only JSON on stdout
 * (messages go to stderr). Exit codes: 0 success, 1 a design/validation/engine failure,
 * 2 a usage error. User errors never print a stack trace.
 */
import { isEngineError } from "../../shared-engine/errors";
import { ENGINE_VERSION } from "../../shared-engine/version";
import { commands, type Command } from "./commands";
import { CliError, EXIT, type CliIo } from "./io";

export type { CliIo } from "./io";

function overview(): string {
  const width = Math.max(...commands.map((c) => c.name.length));
  return [
    "loopwright — state-feedback controller design from the command line",
    "",
    "Usage: loopwright <command> [options]",
    "",
    "Commands:",
    ...commands.map((c) => `  ${c.name.padEnd(width)}  ${c.summary}`),
    "",
    "Global options:",
    "  --help      show help (also: loopwright <command> --help)",
    "  --version   print the engine version",
    "",
    "Exit codes: 0 success, 1 a design, validation or engine failure, 2 a usage error.",
    "Caution: simulation is not validation. Keep independent safety interlocks, and follow the",
    "applicable codes and licensed engineering practice before any controller runs on equipment.",
    "",
  ].join("\n");
}

export async function runCli(args: readonly string[], io: CliIo): Promise<number> {
  const [first, ...rest] = args;
  if (first === undefined || first === "--help" || first === "-h" || first === "help") {
    const topic = first === "help" ? rest[0] : undefined;
    const command = topic ? commands.find((c) => c.name === topic) : undefined;
    if (topic && !command) {
      io.stderr(`loopwright: no command named "${topic}"\n`);
      return EXIT.usage;
    }
    io.stdout(command ? command.help() : overview());
    return EXIT.ok;
  }
  if (first === "--version") {
    io.stdout(`loopwright engine ${ENGINE_VERSION}\n`);
    return EXIT.ok;
  }
  const command: Command | undefined = commands.find((c) => c.name === first);
  if (!command) {
    io.stderr(`loopwright: unknown command "${first}". Run \`loopwright --help\` for the list.\n`);
    return EXIT.usage;
  }
  if (rest.includes("--help") || rest.includes("-h")) {
    io.stdout(command.help());
    return EXIT.ok;
  }
  try {
    return await command.run(rest, io);
  } catch (error) {
    if (error instanceof CliError) {
      io.stderr(`loopwright ${command.name}: ${error.message}\n`);
      return error.exitCode;
    }
    if (isEngineError(error)) {
      io.stderr(`loopwright ${command.name}: ${error.message} [${error.kind}]\n`);
      return EXIT.failure;
    }
    // A bug, not a user error: say so plainly, with the message but no stack trace.
    const message = error instanceof Error ? error.message : String(error);
    io.stderr(`loopwright ${command.name}: internal error: ${message}\nPlease report this with the input that caused it.\n`);
    return EXIT.failure;
  }
}
