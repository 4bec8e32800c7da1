import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { parseComplexListText, parseMatrixText, parseNumberText, parseVectorText } from "../../../../renderer/state/workspace/parseMatrixText";

const rowsOf = (text: string) => {
  const r = parseMatrixText(text);
  if (!r.ok) throw new Error(r.error);
  return r.rows;
};

describe("parseMatrixText", () => {
  it("reads a spreadsheet selection with tabs and line breaks", () => {
    expect(rowsOf("1\t2\t3\r\n4\t5\t6\r\n")).toEqual([[1, 2, 3], [4, 5, 6]]);
  });
  it("reads commas, spaces, semicolons and brackets in any of the usual forms", () => {
    expect(rowsOf("[1 2; 3 4]")).toEqual([[1, 2], [3, 4]]);
    expect(rowsOf("[[1, 2], [3, 4]]")).toEqual([[1, 2], [3, 4]]);
    expect(rowsOf("1, 2\n3, 4")).toEqual([[1, 2], [3, 4]]);
    expect(rowsOf("  -0.5e-3   +2 ;\n .25 1.")).toEqual([[-0.0005, 2], [0.25, 1]]);
  });
  it("accepts the typographic minus sign that documents paste", () => {
    expect(rowsOf("−1 −2.5")).toEqual([[-1, -2.5]]);
  });
  it("names the row and column of a cell that is not a number", () => {
    const r = parseMatrixText("1 2\n3 x4");
    expect(r).toMatchObject({ ok: false, row: 2, column: 2 });
    expect(!r.ok && r.error).toContain("“x4” is not a number");
  });
  it("refuses rows of unequal length and says how many entries each has", () => {
    const r = parseMatrixText("1 2 3\n4 5");
    expect(r.ok).toBe(false);
    expect(!r.ok && r.error).toBe("Row 2 has 2 entries but row 1 has 3; every row needs the same number of entries.");
  });
  it("refuses an empty spreadsheet cell instead of reading it as zero", () => {
    expect(parseMatrixText("1\t\t3")).toMatchObject({ ok: false, row: 1, column: 2 });
  });
  it("refuses empty text, NaN and Infinity", () => {
    expect(parseMatrixText("  \n ").ok).toBe(false);
    expect(parseMatrixText("NaN 1").ok).toBe(false);
    expect(parseMatrixText("Infinity").ok).toBe(false);
    expect(parseNumberText("1e400").ok).toBe(false);
  });
  it("reads back any finite matrix written in any of the separators (property)", () => {
    const entry = fc.integer({ min: -1_000_000, max: 1_000_000 }).map((k) => k / 1000);
    const matrix = fc.integer({ min: 1, max: 6 }).chain((c) => fc.array(fc.array(entry, { minLength: c, maxLength: c }), { minLength: 1, maxLength: 6 }));
    const style = fc.constantFrom("tab", "comma", "space", "bracket", "nested");
    fc.assert(
      fc.property(matrix, style, (m, s) => {
        const text =
          s === "tab" ? m.map((r) => r.join("\t")).join("\n")
          : s === "comma" ? m.map((r) => r.join(", ")).join("\n")
          : s === "space" ? m.map((r) => r.join("  ")).join(";")
          : s === "bracket" ? `[${m.map((r) => r.join(" ")).join("; ")}]`
          : JSON.stringify(m);
        expect(rowsOf(text)).toEqual(m);
      }),
      { seed: 20261202, numRuns: 200 },
    );
  });
});

describe("parseVectorText and parseComplexListText", () => {
  it("reads coefficients given as a row or a column", () => {
    expect(parseVectorText("1 3 2")).toEqual({ ok: true, values: [1, 3, 2] });
    expect(parseVectorText("1\n3\n2")).toEqual({ ok: true, values: [1, 3, 2] });
    expect(parseVectorText("1 2\n3 4").ok).toBe(false);
  });
  it("reads real, complex, imaginary and ± pairs", () => {
    expect(parseComplexListText("−1, -2+3i, -2-3j, 4i, -5±0.5i")).toEqual({
      ok: true,
      values: [
        { re: -1, im: 0 },
        { re: -2, im: 3 },
        { re: -2, im: -3 },
        { re: 0, im: 4 },
        { re: -5, im: 0.5 },
        { re: -5, im: -0.5 },
      ],
    });
    expect(parseComplexListText("-1, abc").ok).toBe(false);
  });
});
