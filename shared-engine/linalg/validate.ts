/**
 * Entry checks shared by every linalg routine. Each throws an EngineError naming the argument
 * and the violated property, before any computation starts.
 */
import { Matrix } from "ml-matrix";
import { EngineError } from "../errors";

export type MatrixInput = Matrix | number[][];

/** Accepts a Matrix or rows of numbers; returns a Matrix (rows are copied, never aliased). */
export function asMatrix(value: MatrixInput, name: string): Matrix {
  if (value instanceof Matrix) return value;
  if (!Array.isArray(value)) {
    throw new EngineError("invalid-argument", `${name} must be a matrix (an array of rows)`, { argument: name });
  }
  const rows = value.length;
  const cols = rows === 0 ? 0 : Array.isArray(value[0]) ? value[0].length : -1;
  for (let i = 0; i < rows; i++) {
    const row = value[i];
    if (!Array.isArray(row)) {
      throw new EngineError("invalid-argument", `${name} row ${i + 1} is not an array of numbers`, { argument: name, row: i });
    }
    if (row.length !== cols) {
      throw new EngineError(
        "shape-mismatch",
        `${name} row ${i + 1} has ${row.length} entries but row 1 has ${cols}`,
        { argument: name, row: i, entries: row.length, expected: cols },
      );
    }
    for (let j = 0; j < cols; j++) {
      if (typeof row[j] !== "number") {
        throw new EngineError("invalid-argument", `${name}[${i}][${j}] is not a number`, { argument: name, row: i, col: j });
      }
    }
  }
  return rows === 0 ? new Matrix(0, 0) : new Matrix(value);
}

export function shapeOf(m: Matrix): string {
  return `${m.rows}×${m.columns}`;
}

export function requireNonEmpty(m: Matrix, name: string): void {
  if (m.rows === 0 || m.columns === 0) {
    throw new EngineError("empty", `${name} is empty (${shapeOf(m)}); it needs at least one entry`, { argument: name });
  }
}

export function requireSquare(m: Matrix, name: string): void {
  requireNonEmpty(m, name);
  if (m.rows !== m.columns) {
    throw new EngineError("shape-mismatch", `${name} must be square (it is ${shapeOf(m)})`, {
      argument: name,
      rows: m.rows,
      columns: m.columns,
    });
  }
}

export function requireFinite(m: Matrix, name: string): void {
  // Fast path: scan ml-matrix's row arrays directly (a call to `get` per entry dominated this
  // check at n ≤ 20); any non-finite entry, or other storage, falls through to the loop below
  // that locates it and reports it.
  const data = (m as unknown as { data?: unknown }).data;
  if (Array.isArray(data) && data.length === m.rows) {
    let clean = true;
    for (let i = 0; i < m.rows && clean; i++) {
      const row = data[i] as unknown;
      if (!(row instanceof Float64Array) || row.length !== m.columns) { clean = false; break; }
      for (let j = 0; j < row.length; j++) {
        const v = row[j]!;
        if (v - v !== 0) { clean = false; break; } // NaN or ±Infinity
      }
    }
    if (clean) return;
  }
  for (let i = 0; i < m.rows; i++) {
    for (let j = 0; j < m.columns; j++) {
      const v = m.get(i, j);
      if (!Number.isFinite(v)) {
        throw new EngineError("non-finite", `${name}[${i}][${j}] is ${v}; every entry must be a finite number`, {
          argument: name,
          row: i,
          col: j,
        });
      }
    }
  }
}

/** Square, non-empty and finite: the usual precondition of a decomposition. */
export function requireSquareFinite(m: Matrix, name: string): void {
  requireSquare(m, name);
  requireFinite(m, name);
}

export function requireSameShape(a: Matrix, aName: string, b: Matrix, bName: string): void {
  if (a.rows !== b.rows || a.columns !== b.columns) {
    throw new EngineError(
      "shape-mismatch",
      `${bName} must have the same shape as ${aName} (${aName} is ${shapeOf(a)}, ${bName} is ${shapeOf(b)})`,
      { arguments: [aName, bName] },
    );
  }
}

/** Row-major Float64Array copy of a Matrix, for kernels. */
export function toFloat64(m: Matrix): Float64Array {
  const out = new Float64Array(m.rows * m.columns);
  for (let i = 0; i < m.rows; i++) for (let j = 0; j < m.columns; j++) out[i * m.columns + j] = m.get(i, j);
  return out;
}

/** Matrix from a row-major Float64Array (copied). */
export function fromFloat64(data: Float64Array, rows: number, cols: number): Matrix {
  const m = new Matrix(rows, cols);
  for (let i = 0; i < rows; i++) for (let j = 0; j < cols; j++) m.set(i, j, data[i * cols + j]!);
  return m;
}
