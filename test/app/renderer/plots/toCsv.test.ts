import { describe, expect, it } from "vitest";
import { toCsv } from "../../../../renderer/plots/toCsv";
import { bodeCsv } from "../../../../renderer/plots/BodePlot";

describe("CSV export", () => {
  it("writes a header of quantity (unit) and every digit of each number", () => {
    const text = toCsv([
      { quantity: "Frequency", unit: "rad/s", values: [0.1, 1 / 3] },
      { quantity: "Magnitude", unit: "dB", values: [-0.30000000000000004, 12] },
    ]);
    expect(text).toBe("Frequency (rad/s),Magnitude (dB)\r\n0.1,-0.30000000000000004\r\n0.3333333333333333,12\r\n");
    // Values read back exactly (shortest round-trip form).
    const cells = text.trim().split("\r\n")[2]!.split(",").map(Number);
    expect(cells).toEqual([1 / 3, 12]);
  });

  it("writes nulls and non-finite values as empty cells, never NaN or Infinity", () => {
    const text = toCsv([{ quantity: "Magnitude", unit: "dB", values: [1, null, Number.POSITIVE_INFINITY, Number.NaN, 2] }]);
    expect(text).toBe("Magnitude (dB)\r\n1\r\n\r\n\r\n\r\n2\r\n");
    expect(text).not.toMatch(/NaN|Infinity/);
  });

  it("pads shorter columns with empty cells and quotes headers that contain commas or quotes", () => {
    const text = toCsv([
      { quantity: 'Output "y", measured', unit: "m", values: [1, 2, 3] },
      { quantity: "Gain", unit: "", values: [5] },
    ]);
    expect(text.split("\r\n")).toEqual(['"Output ""y"", measured (m)",Gain', "1,5", "2,", "3,", ""]);
  });

  it("returns an empty string for no columns", () => {
    expect(toCsv([])).toBe("");
  });

  it("exports a Bode series as frequency, magnitude and phase columns with gaps kept", () => {
    const text = toCsv(bodeCsv([{ name: "A", frequency: [1, 10], magnitudeDb: [0, null], phaseDeg: [-90, -180] }]));
    expect(text).toBe("A frequency (rad/s),A magnitude (dB),A phase (deg)\r\n1,0,-90\r\n10,,-180\r\n");
  });
});
