/**
 * A small, strict argument parser: `--flag`, `--option value`, `--option=value` and positionals.
 * Unknown options are usage errors, so a typo never silently changes a result.
 */
import { usageError } from "./io";

export interface OptionSpec {
  /** true when the option takes a value. */
  value: boolean;
  description: string;
  valueName?: string;
}

export interface ParsedArgs {
  positionals: string[];
  options: Map<string, string | true>;
}

export function parseArgs(args: readonly string[], specs: Record<string, OptionSpec>, command: string): ParsedArgs {
  const positionals: string[] = [];
  const options = new Map<string, string | true>();
  for (let i = 0; i < args.length; i++) {
    const arg = args[i]!;
    if (arg === "--") {
      positionals.push(...args.slice(i + 1));
      break;
    }
    if (!arg.startsWith("--") || arg === "-") {
      if (arg.startsWith("-") && arg !== "-" && !/^-\d/.test(arg)) {
        throw usageError(`${command}: unknown option ${arg} (options are written with two dashes; see \`loopwright ${command} --help\`)`);
      }
      positionals.push(arg);
      continue;
    }
    const eq = arg.indexOf("=");
    const name = eq >= 0 ? arg.slice(2, eq) : arg.slice(2);
    const spec = specs[name];
    if (!spec) throw usageError(`${command}: unknown option --${name} (see \`loopwright ${command} --help\`)`);
    if (spec.value) {
      const value = eq >= 0 ? arg.slice(eq + 1) : args[++i];
      if (value === undefined || value === "") throw usageError(`${command}: --${name} needs a value`);
      options.set(name, value);
    } else {
      if (eq >= 0) throw usageError(`${command}: --${name} takes no value`);
      options.set(name, true);
    }
  }
  return { positionals, options };
}

export function describeOptions(specs: Record<string, OptionSpec>): string {
  const rows = Object.entries(specs).map(([name, spec]) => [`--${name}${spec.value ? ` ${spec.valueName ?? "VALUE"}` : ""}`, spec.description] as const);
  const width = Math.max(0, ...rows.map(([left]) => left.length));
  return rows.map(([left, right]) => `  ${left.padEnd(width)}  ${right}`).join("\n");
}
