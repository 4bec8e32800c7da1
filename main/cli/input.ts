/** Reading JSON arguments: inline text, or `@path` for a file (`@-` is not supported: no stdin in CI). */
import { usageError, type CliIo } from "./io";

/** Largest JSON input the command line reads (bytes), before parsing anything. */
export const MAX_INPUT_BYTES = 8 * 1024 * 1024;

export async function readJsonArgument(text: string, io: CliIo, what: string): Promise<unknown> {
  let source = text;
  let origin = "the command line";
  if (text.startsWith("@")) {
    const path = text.slice(1);
    try {
      source = await io.readFile(path);
    } catch (error) {
      const code = (error as { code?: string }).code;
      throw usageError(`cannot read ${what} from ${path}${code === "ENOENT" ? ": no such file" : code ? ` (${code})` : ""}`);
    }
    origin = path;
  }
  if (source.length > MAX_INPUT_BYTES) throw usageError(`${what} from ${origin} is larger than ${MAX_INPUT_BYTES} bytes`);
  try {
    return JSON.parse(source) as unknown;
  } catch (error) {
    throw usageError(`${what} from ${origin} is not valid JSON: ${(error as Error).message}`);
  }
}
