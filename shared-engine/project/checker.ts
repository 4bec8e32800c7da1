/**
 * A path-aware checker for untrusted JSON: records every problem with its JSON path instead of
 * stopping at the first, and records unknown keys as warnings. Used by the project validator.
 */
import { formatPath } from "./safeJson";

export type Path = readonly (string | number)[];

export interface Finding {
  path: string;
  message: string;
}

export class Checker {
  readonly problems: Finding[] = [];
  readonly warnings: Finding[] = [];

  problem(path: Path, message: string): void {
    this.problems.push({ path: formatPath(path), message });
  }

  warn(path: Path, message: string): void {
    this.warnings.push({ path: formatPath(path), message });
  }

  /** A plain object; unknown keys are warned about and ignored. Returns null when not an object. */
  object(value: unknown, path: Path, known: readonly string[]): Record<string, unknown> | null {
    if (value === null || typeof value !== "object" || Array.isArray(value)) {
      this.problem(path, `must be an object, is ${describe(value)}`);
      return null;
    }
    for (const key of Object.keys(value)) {
      if (!known.includes(key)) this.warn([...path, key], `unknown key "${key}" is ignored`);
    }
    return value as Record<string, unknown>;
  }

  string(value: unknown, path: Path, options: { optional?: boolean; nonEmpty?: boolean; maxLength?: number } = {}): string | undefined {
    if (value === undefined && options.optional) return undefined;
    if (typeof value !== "string") {
      this.problem(path, `must be text, is ${describe(value)}`);
      return undefined;
    }
    if (options.nonEmpty && value.trim() === "") this.problem(path, "must not be empty");
    if (options.maxLength !== undefined && value.length > options.maxLength) this.problem(path, `must be at most ${options.maxLength} characters`);
    return value;
  }

  number(value: unknown, path: Path, options: { optional?: boolean; positive?: boolean; nonNegative?: boolean; integer?: boolean } = {}): number | undefined {
    if (value === undefined && options.optional) return undefined;
    if (typeof value !== "number" || !Number.isFinite(value)) {
      this.problem(path, `must be a finite number, is ${describe(value)}`);
      return undefined;
    }
    if (options.positive && !(value > 0)) this.problem(path, `must be positive, is ${value}`);
    if (options.nonNegative && !(value >= 0)) this.problem(path, `must not be negative, is ${value}`);
    if (options.integer && !Number.isInteger(value)) this.problem(path, `must be a whole number, is ${value}`);
    return value;
  }

  oneOf<T extends string>(value: unknown, path: Path, allowed: readonly T[], options: { optional?: boolean } = {}): T | undefined {
    if (value === undefined && options.optional) return undefined;
    if (typeof value !== "string" || !(allowed as readonly string[]).includes(value)) {
      this.problem(path, `must be one of ${allowed.map((a) => `"${a}"`).join(", ")}, is ${describe(value)}`);
      return undefined;
    }
    return value as T;
  }

  array(value: unknown, path: Path, options: { optional?: boolean; nonEmpty?: boolean } = {}): unknown[] | undefined {
    if (value === undefined && options.optional) return undefined;
    if (!Array.isArray(value)) {
      this.problem(path, `must be a list, is ${describe(value)}`);
      return undefined;
    }
    if (options.nonEmpty && value.length === 0) this.problem(path, "must not be empty");
    return value;
  }

  numberList(value: unknown, path: Path, options: { optional?: boolean; nonEmpty?: boolean; positive?: boolean } = {}): number[] | undefined {
    const list = this.array(value, path, options);
    if (!list) return undefined;
    let ok = true;
    list.forEach((v, i) => {
      if (this.number(v, [...path, i], { positive: options.positive }) === undefined) ok = false;
    });
    return ok ? (list as number[]) : undefined;
  }

  /** A matrix as rows of finite numbers, all rows the same length. Returns [rows, cols] or undefined. */
  matrix(value: unknown, path: Path, options: { optional?: boolean; allowEmpty?: boolean } = {}): number[][] | undefined {
    if (value === undefined && options.optional) return undefined;
    if (!Array.isArray(value)) {
      this.problem(path, `must be a matrix (a list of rows), is ${describe(value)}`);
      return undefined;
    }
    if (value.length === 0 && !options.allowEmpty) {
      this.problem(path, "must have at least one row");
      return undefined;
    }
    let cols = -1;
    let ok = true;
    value.forEach((row: unknown, i) => {
      if (!Array.isArray(row)) {
        this.problem([...path, i], `must be a row (a list of numbers), is ${describe(row)}`);
        ok = false;
        return;
      }
      if (cols === -1) cols = row.length;
      else if (row.length !== cols) {
        this.problem([...path, i], `has ${row.length} entries but row 0 has ${cols}`);
        ok = false;
      }
      row.forEach((v: unknown, j) => {
        if (typeof v !== "number" || !Number.isFinite(v)) {
          this.problem([...path, i, j], `must be a finite number, is ${describe(v)}`);
          ok = false;
        }
      });
    });
    return ok ? (value as number[][]) : undefined;
  }
}

export function describe(value: unknown): string {
  if (value === null) return "null";
  if (value === undefined) return "missing";
  if (Array.isArray(value)) return `a list of ${value.length}`;
  if (typeof value === "string") return value.length > 40 ? `the text "${value.slice(0, 37)}..."` : `the text "${value}"`;
  if (typeof value === "object") return "an object";
  return `${typeof value} ${String(value)}`;
}

export function shape(m: number[][]): string {
  return `${m.length}×${m.length === 0 ? 0 : m[0]!.length}`;
}
