// The C source generator: the structure of the text (identifiers, the header comment), that every
// 17-digit literal parses back to the exported double exactly, sanitising and collisions of
// names, and the typed errors. Compilation and the step's arithmetic are checked against the
// system C compiler in test/cli/controllerC.test.ts.
import { readFileSync } from "node:fs";
import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { controllerExport, type ControllerExport } from "../../../shared-engine/project/controllerExport";
import { asciiComment, cDoubleLiteral, cIdentifierPart, controllerSource, uniqueIdentifiers, CONTROLLER_CAUTIONS } from "../../../shared-engine/project/controllerSource";
import type { PlantSpec, ProjectFile } from "../../../shared-engine/project";
import { expectEngineError } from "../../helpers/assertions";

const rack = JSON.parse(readFileSync("assets/examples/rack-temperature.loopwright.json", "utf8")) as ProjectFile;
const rackVariant = rack.variants.find((v) => v.id === "observer-sampled")!;
const rackExport = controllerExport(rack.plants.find((p) => p.id === rackVariant.plant) as PlantSpec, rackVariant);

/** A hand-made export: one integrator with conditional integration, limits on both commands. */
function handMade(overrides: Partial<ControllerExport> = {}): ControllerExport {
  return {
    format: "loopwright-controller", version: 1, engineVersion: "0.1.0", fingerprint: "lw1-0123456789abcdef0123456789abcdef",
    variant: "hand-made", plant: "p", sampleTime: 0.1, designedIn: "discrete",
    signals: {
      references: [{ name: "r_level", unit: "m" }],
      measurements: [{ name: "level", unit: "m" }, { name: "flow", unit: "m³/s" }],
      inputs: [{ name: "valve", unit: "%" }, { name: "pump", unit: "" }],
      states: ["int_level"],
    },
    operatingPoint: { references: [2], measurements: [2, 0.5], inputs: [50, 10] },
    matrices: { Ac: [[1]], Bc: [[0.1, -0.1, 0]], Cc: [[-3], [-1 / 3]], Dc: [[0, -2, 0.25], [0, 0, -1e-300]], Bsat: [[0, 0]] },
    initialState: [0],
    limits: [{ input: "valve", min: 0, max: 100, rateLimit: 25 }, { input: "pump", min: null, max: 40, rateLimit: null }],
    antiWindup: { method: "conditional", trackingGain: null, integratorStates: [0] },
    executionOrder: ["Read y[k] and r[k].", "Compute u_unsat[k] = u0 + Cc·xc[k] + Dc·[δr; δy]."],
    checks: [{ name: "implementation-step", passed: true, detail: "largest difference 1e-16", value: 1e-16, limit: 1e-9 }],
    warnings: [],
    ...overrides,
  };
}

/** The numbers of one `static const double NAME[..] = { ... };` initializer, in order. */
function literals(text: string, name: string): string[] {
  const match = new RegExp(`static const double ${name}(?:\\[\\d+\\])+ = \\{([^;]*)\\};`).exec(text);
  expect(match, `array ${name} in the source`).not.toBeNull();
  return match![1]!.match(/-?\d\.\d{16}e[+-]\d+/g) ?? [];
}

const withoutComments = (text: string): string => text.replace(/\/\*[\s\S]*?\*\//g, "");

describe("controllerSource: the structure of the C text", () => {
  const src = controllerSource(rackExport);

  it("names the struct, init and step functions with the lw_ prefix of the variant id", () => {
    expect(src.prefix).toBe("lw_observer_sampled");
    expect(src.text).toContain("typedef struct lw_observer_sampled_state {");
    expect(src.text).toContain("void lw_observer_sampled_init(lw_observer_sampled_state *state);");
    expect(src.text).toContain("int lw_observer_sampled_step(lw_observer_sampled_state *state, const double r[1], const double y[1], double u[1]);");
    expect(src.constants).toEqual({
      references: ["LW_OBSERVER_SAMPLED_REF_R_AIR_TEMPERATURE"],
      measurements: ["LW_OBSERVER_SAMPLED_MEAS_AIR_TEMPERATURE"],
      commands: ["LW_OBSERVER_SAMPLED_CMD_FAN_SPEED"],
      states: ["LW_OBSERVER_SAMPLED_XC_EST_AIR_TEMPERATURE", "LW_OBSERVER_SAMPLED_XC_EST_EQUIPMENT_TEMPERATURE"],
    });
    expect(src.text).toContain("#define LW_OBSERVER_SAMPLED_XC_EST_EQUIPMENT_TEMPERATURE 1 /* est_equipment_temperature */");
    // Only <math.h>: no other include, no dynamic memory.
    expect(src.text.match(/#include <[^>]+>/g)).toEqual(["#include <math.h>"]);
    expect(withoutComments(src.text)).not.toMatch(/\b(malloc|calloc|realloc|free)\s*\(/);
  });

  it("carries the fingerprint, engine version, sample period, units, execution order and the three cautions in the header comment", () => {
    const header = src.text.slice(0, src.text.indexOf("*/"));
    expect(header).toContain(`Design fingerprint: ${rackExport.fingerprint}`);
    expect(header).toContain(`Loopwright engine ${rackExport.engineVersion}`);
    expect(header).toContain("T = 5 s (designed in discrete time)");
    expect(header).toContain("fan_speed [%]");
    expect(header).toContain("air_temperature [K]");
    for (const caution of CONTROLLER_CAUTIONS) expect(header).toContain(caution);
    expect(header).toMatch(/Simulation is not validation/);
    expect(header).toMatch(/independent safety interlocks/);
    expect(header).toMatch(/applicable codes and licensed engineering practice/);
    expect(header).toContain("Write u[k] to the actuators."); // the export's execution order, verbatim but ASCII
    expect(header).toContain("Dc*[dr; dy]");
    expect(src.text).toContain(`#define LW_OBSERVER_SAMPLED_FINGERPRINT "${rackExport.fingerprint}"`);
    expect(src.text).toContain("#define LW_OBSERVER_SAMPLED_SAMPLE_TIME 5.0000000000000000e+0 /* s */");
  });

  it("prints every matrix entry with 17 significant digits that parse back to the exported double exactly", () => {
    // Source of the requirement: 17 significant digits round-trip any binary64 (IEEE 754-2008 §5.12.2, from memory).
    for (const key of ["Ac", "Bc", "Cc", "Dc", "Bsat"] as const) {
      const expected = rackExport.matrices[key].flat();
      const printed = literals(src.text, `lw_observer_sampled_${key}`);
      expect(printed.length, key).toBe(expected.length);
      printed.forEach((text, i) => expect(Object.is(Number(text), expected[i]), `${key}[${i}] ${text} vs ${expected[i]}`).toBe(true));
    }
  });

  it("is printable ASCII with no comment that closes early", () => {
    expect(src.text).toMatch(/^[\x20-\x7e\n]*$/);
    const code = withoutComments(src.text);
    expect(code).not.toContain("*/");
    expect(code).not.toMatch(/Simulation is not validation/);
  });
});

describe("controllerSource: numbers", () => {
  it("writes literals that read back exactly for edge values and random doubles (property, seed 20261)", () => {
    for (const v of [0, 0.1, 1 / 3, -2 / 3, 5e-324, 2.2250738585072014e-308, 1.7976931348623157e308, 123456789012345680, 1e16, -0]) {
      const text = cDoubleLiteral(v);
      expect(text).toMatch(/^-?\d\.\d{16}e[+-]\d+$/);
      expect(Object.is(Number(text), v === 0 ? 0 : v), `${v} → ${text}`).toBe(true);
    }
    fc.assert(fc.property(fc.double({ noNaN: true, noDefaultInfinity: true }), (v) => Number(cDoubleLiteral(v)) === v), { seed: 20261, numRuns: 2000 });
  });

  it("refuses NaN and Infinity", () => {
    expectEngineError(() => cDoubleLiteral(Number.NaN), "non-finite");
    expectEngineError(() => cDoubleLiteral(Infinity), "non-finite");
  });

  it("writes the hand-made export's limits, operating point and tiny values exactly", () => {
    const src = controllerSource(handMade());
    expect(literals(src.text, "lw_hand_made_Dc").map(Number)).toEqual([0, -2, 0.25, 0, 0, -1e-300]);
    expect(literals(src.text, "lw_hand_made_Cc").map(Number)).toEqual([-3, -1 / 3]);
    expect(literals(src.text, "lw_hand_made_u0").map(Number)).toEqual([50, 10]);
    expect(src.text).toContain("if (a > 1.0000000000000000e+2) a = 1.0000000000000000e+2;");
    expect(src.text).toContain("const double change = 2.5000000000000000e+1 * LW_HAND_MADE_SAMPLE_TIME;");
    expect(src.text).toContain("static const int lw_hand_made_integrators[1] = { 0 };");
    expect(src.text).toContain("flow [m^3/s]");
  });
});

describe("controllerSource: names", () => {
  it("sanitises names to letters, digits and underscores, dropping accents", () => {
    // Expected values worked by hand from the documented rule.
    expect(cIdentifierPart("Température (°C)")).toBe("Temperature_C");
    expect(cIdentifierPart("δx")).toBe("x");
    expect(cIdentifierPart("2nd-stage flow")).toBe("2nd_stage_flow");
    expect(cIdentifierPart("***")).toBe("x");
    expect(cIdentifierPart("int")).toBe("int"); // a keyword is harmless: every identifier gets a prefix
  });

  it("resolves collisions after sanitising and case folding with _2, _3 in signal order", () => {
    expect(uniqueIdentifiers(["a-b", "a_b", "A B", "a__b_2"], "P_", 63, true)).toEqual(["P_A_B", "P_A_B_2", "P_A_B_3", "P_A_B_2_2"]);
    expect(uniqueIdentifiers(["Temp", "temp"], "p_", 63, false)).toEqual(["p_Temp", "p_temp"]);
  });

  it("shortens long names to 63 characters and keeps them distinct", () => {
    const long = "x".repeat(100);
    const ids = uniqueIdentifiers([long, `${long}y`], "LW_V_REF_", 63, true);
    expect(ids[0]!.length).toBe(63);
    expect(ids[1]!.length).toBe(63);
    expect(ids[1]).toMatch(/_2$/);
  });

  it("keeps external names within 31 characters and signal constants distinct in a generated file", () => {
    const src = controllerSource(handMade({
      variant: "a-very-long-variant-identifier-for-the-pump-station",
      signals: {
        references: [{ name: "r_level", unit: "m" }],
        measurements: [{ name: "Level", unit: "m" }, { name: "level", unit: "m" }],
        inputs: [{ name: "valve */ /* ??/", unit: "% */" }, { name: "valve", unit: "" }],
        states: ["int_level"],
      },
    }));
    expect(`${src.prefix}_init`.length).toBeLessThanOrEqual(31);
    expect(`${src.prefix}_step`.length).toBeLessThanOrEqual(31);
    expect(src.constants.measurements).toEqual([`${src.prefix.toUpperCase()}_MEAS_LEVEL`, `${src.prefix.toUpperCase()}_MEAS_LEVEL_2`]);
    expect(src.constants.commands).toEqual([`${src.prefix.toUpperCase()}_CMD_VALVE`, `${src.prefix.toUpperCase()}_CMD_VALVE_2`]);
    // A hostile name cannot end a comment early or form a trigraph.
    expect(withoutComments(src.text)).not.toMatch(/\*\/|\?\?/);
    expect(asciiComment("a */ b /* c ??/ d")).toBe("a * / b / * c ? ?/ d");
  });

  it("writes a static gain (no controller states) without zero-length arrays", () => {
    const src = controllerSource(handMade({
      signals: { references: [{ name: "r", unit: "" }], measurements: [{ name: "y", unit: "" }], inputs: [{ name: "u", unit: "" }], states: [] },
      operatingPoint: undefined,
      matrices: { Ac: [], Bc: [], Cc: [[]], Dc: [[1, -0.3]], Bsat: [] },
      initialState: [],
      limits: [{ input: "u", min: null, max: null, rateLimit: null }],
      antiWindup: { method: "none", trackingGain: null, integratorStates: [] },
    }));
    expect(withoutComments(src.text)).not.toMatch(/(double|int)\s+\w+(\[\d+\])*\[0\]/); // no zero-length array declared
    expect(src.text).not.toContain("double xc[");
    expect(literals(src.text, "lw_hand_made_Dc").map(Number)).toEqual([1, -0.3]);
    expect(src.text).toContain("OPERATING POINT (the equations run on deviations from it): none");
  });
});

describe("controllerSource: errors", () => {
  it("refuses anything but a version-1 controller export", () => {
    expectEngineError(() => controllerSource({ ...handMade(), format: "loopwright-project" } as unknown as ControllerExport), "invalid-argument", /format "loopwright-controller" and version 1/);
    expectEngineError(() => controllerSource({ ...handMade(), version: 2 } as unknown as ControllerExport), "invalid-argument");
  });

  it("refuses a controller without a sampled form", () => {
    const e = expectEngineError(() => controllerSource({ ...handMade(), sampleTime: null } as unknown as ControllerExport), "invalid-argument", /no sampled form/);
    expect(e.details.field).toBe("sampleTime");
    expectEngineError(() => controllerSource(handMade({ sampleTime: 0 })), "invalid-argument", /no sampled form/);
  });

  it("names the field of a NaN or Infinity", () => {
    const bad = handMade();
    bad.matrices.Dc[1]![2] = Number.NaN;
    expect(expectEngineError(() => controllerSource(bad), "non-finite").details.field).toBe("matrices.Dc[1][2]");
    expect(expectEngineError(() => controllerSource(handMade({ operatingPoint: { references: [2], measurements: [2, Infinity], inputs: [50, 10] } })), "non-finite").details.field).toBe("operatingPoint.measurements[1]");
    const badLimit = handMade();
    badLimit.limits[1]!.max = -Infinity;
    expect(expectEngineError(() => controllerSource(badLimit), "non-finite").details.field).toBe("limits[1].max");
  });

  it("refuses wrong shapes, crossed limits, an unknown method and a bad integrator index", () => {
    expectEngineError(() => controllerSource(handMade({ matrices: { ...handMade().matrices, Bc: [[0.1, -0.1]] } })), "shape-mismatch", /matrices\.Bc must be 1×3/);
    expectEngineError(() => controllerSource(handMade({ initialState: [0, 0] })), "shape-mismatch", /initialState must have 1 entries/);
    expectEngineError(() => controllerSource(handMade({ limits: [{ input: "valve", min: 5, max: 1, rateLimit: null }, { input: "pump", min: null, max: null, rateLimit: null }] })), "invalid-argument", /min 5 above max 1/);
    expectEngineError(() => controllerSource(handMade({ antiWindup: { method: "clamp" as "none", trackingGain: null, integratorStates: [] } })), "invalid-argument", /antiWindup\.method/);
    expectEngineError(() => controllerSource(handMade({ antiWindup: { method: "conditional", trackingGain: null, integratorStates: [3] } })), "invalid-argument", /integratorStates\[0\]/);
    expectEngineError(() => controllerSource(handMade({ signals: { ...handMade().signals, inputs: [] }, matrices: { ...handMade().matrices, Cc: [], Dc: [] }, limits: [] })), "invalid-argument", /needs references, measurements and inputs/);
  });
});
