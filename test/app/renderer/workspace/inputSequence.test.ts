// The CSV input-sequence parser: separators, optional header, bad cells named by row and column,
// times that must increase, and sampled-model times that must be multiples of T.
import { describe, expect, it } from "vitest";
import fc from "fast-check";
import { exampleSequenceText, parseInputSequence, type SequenceOptions } from "../../../../renderer/state/workspace/inputSequence";

const continuous = (inputs: number): SequenceOptions => ({ inputs, sampleTime: null });

function ok(text: string, options: SequenceOptions = continuous(1)) {
  const r = parseInputSequence(text, options);
  if (!r.ok) throw new Error(`expected a sequence, got: ${r.error.message}`);
  return r.sequence;
}
function bad(text: string, options: SequenceOptions = continuous(1)) {
  const r = parseInputSequence(text, options);
  if (r.ok) throw new Error("expected an error");
  return r.error;
}

describe("parseInputSequence", () => {
  it("reads comma-separated rows without a header", () => {
    const s = ok("0,1\n0.5,2\n1,3\n");
    expect(s.times).toEqual([0, 0.5, 1]);
    expect(s.values).toEqual([[1], [2], [3]]);
    expect(s.header).toBeNull();
    expect(s.separator).toBe(",");
  });

  it("reads tab-separated spreadsheet rows with a header naming the input columns", () => {
    const s = ok("time\tu1\tu2\r\n0\t1\t-1\r\n1\t2\t−2\r\n", continuous(2));
    expect(s.header).toEqual(["u1", "u2"]);
    expect(s.separator).toBe("\t");
    expect(s.values).toEqual([[1, -1], [2, -2]]);
  });

  it("reads semicolons with decimal commas, skipping blank and # comment lines and a trailing separator", () => {
    const s = ok("# exported\nt;u\n\n0;0,5;\n0,25;1,5;\n");
    expect(s.separator).toBe(";");
    expect(s.times).toEqual([0, 0.25]);
    expect(s.values).toEqual([[0.5], [1.5]]);
  });

  it("names the row and column of a cell that is not a number, counting lines as the user sees them", () => {
    const e = bad("time,u\n0,1\n1,abc\n", continuous(1));
    expect([e.row, e.column]).toEqual([3, 2]);
    expect(e.message).toBe("Row 3, column 2 (u): “abc” is not a number.");
    const empty = bad("0,1\n1,\n2,3", continuous(1));
    // "1," loses its trailing separator, so the row is one column short.
    expect(empty.row).toBe(2);
    expect(empty.message).toMatch(/Row 2 has 1 column; expected 2/);
    const blankCell = bad("0,1,2\n1,,3", continuous(2));
    expect([blankCell.row, blankCell.column]).toEqual([2, 2]);
    expect(blankCell.message).toMatch(/the cell is empty/);
  });

  it("refuses a row with the wrong number of columns, saying what is expected", () => {
    const e = bad("0,1,2\n1,1\n", continuous(2));
    expect(e.row).toBe(2);
    expect(e.column).toBeNull();
    expect(e.message).toBe("Row 2 has 2 columns; expected 3: a time column and 2 input columns.");
  });

  it("refuses times that repeat or go back, naming the row", () => {
    const same = bad("0,0\n1,0\n1,0\n");
    expect([same.row, same.column]).toEqual([3, 1]);
    expect(same.message).toMatch(/time 1 s does not come after the previous time 1 s/);
    const back = bad("t,u\n0,0\n2,0\n1,0\n");
    expect(back.row).toBe(4);
  });

  it("requires multiples of T for a sampled model and snaps them to exactly k·T", () => {
    const options = { inputs: 1, sampleTime: 0.1 };
    const s = ok("0,1\n0.30000000000000004,1\n0.7,0\n", options);
    expect(s.times).toEqual([0, 3 * 0.1, 7 * 0.1]);
    const e = bad("0,1\n0.15,1\n", options);
    expect([e.row, e.column]).toEqual([2, 1]);
    expect(e.message).toMatch(/not a multiple of the sample period 0\.1 s/);
  });

  it("refuses empty text and a single data row", () => {
    expect(bad("  \n\n").message).toMatch(/empty/);
    expect(bad("time,u\n0,1\n").message).toMatch(/1 row of numbers; at least 2/);
  });

  it("reads back every generated sequence exactly, whatever the separator", () => {
    // Bounded generator: integer-scaled times and values (no raw doubles).
    const prop = fc.property(
      fc.integer({ min: 1, max: 3 }),
      fc.array(fc.integer({ min: 1, max: 1000 }), { minLength: 2, maxLength: 40 }),
      fc.constantFrom(",", ";", "\t"),
      fc.boolean(),
      fc.integer({ min: -10_000, max: 10_000 }),
      (inputs, gaps, sep, header, seed) => {
        let t = 0;
        const times = gaps.map((g) => (t += g / 100));
        const values = times.map((_, k) => Array.from({ length: inputs }, (_, j) => ((seed + 37 * k + 11 * j) % 2000) / 8));
        const lines = times.map((time, k) => [time, ...values[k]!].map(String).join(sep));
        const text = (header ? [["t", ...values[0]!.map((_, j) => `u${j}`)].join(sep)] : []).concat(lines).join("\n");
        const s = ok(text, continuous(inputs));
        expect(s.times).toEqual(times);
        expect(s.values).toEqual(values);
      },
    );
    fc.assert(prop, { seed: 31337, numRuns: 150 });
  });

  it("writes an example that it reads back, with a header of the input names", () => {
    const text = exampleSequenceText(["r_a", "r_b"], 0.5, 10);
    const s = ok(text, { inputs: 2, sampleTime: 0.5 });
    expect(s.header).toEqual(["r_a", "r_b"]);
    expect(s.times.at(-1)).toBe(10);
    expect(s.values.some((row) => row[0] === 1)).toBe(true);
  });
});
