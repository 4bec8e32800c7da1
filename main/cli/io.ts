/** What the command line needs from the outside world, injected so tests run it in-process. */
export interface CliIo {
  stdout(text: string): void;
  stderr(text: string): void;
  readFile(path: string): Promise<string>;
}

/** Exit codes (documented in README and `--help`). */
export const EXIT = { ok: 0, failure: 1, usage: 2 } as const;

/** A user error with a message fit to print (no stack trace) and its exit code. */
export class CliError extends Error {
  constructor(message: string, readonly exitCode: number) {
    super(message);
    this.name = "CliError";
  }
}

export const usageError = (message: string): CliError => new CliError(message, EXIT.usage);
