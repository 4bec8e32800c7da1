import { createHash } from "node:crypto";
import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { canonicalJson, fingerprint, sha256Hex, utf8Bytes } from "../../../shared-engine/project/fingerprint";
import type { PlantSpec, VariantSpec } from "../../../shared-engine/project/format";
import { isEngineError } from "../../../shared-engine/errors";

const hex = (text: string): string => sha256Hex(utf8Bytes(text));

const plant: PlantSpec = {
  id: "queue",
  name: "Backlog",
  model: { type: "state-space", A: [[0, -50], [0, -0.05]], B: [[0], [0.05]], C: [[1, 0]], D: [[0]], sampleTime: null },
};
const variant: VariantSpec = {
  id: "lqr",
  plant: "queue",
  stateFeedback: { method: "lqr", Q: [[1e-6, 0], [0, 0.01]], R: [[1]] },
  margins: { at: "plant-input" },
};

/** Same data, every object's keys written in reverse order. */
function reverseKeys(value: unknown): unknown {
  if (Array.isArray(value)) return value.map(reverseKeys);
  if (value !== null && typeof value === "object") {
    return Object.fromEntries(Object.keys(value).reverse().map((k) => [k, reverseKeys((value as Record<string, unknown>)[k])]));
  }
  return value;
}

describe("SHA-256", () => {
  it("hashes the one-block message \"abc\" to the NIST example digest", () => {
    // NIST FIPS 180-4 example values (SHA-256, one-block message; also FIPS 180-2 appendix B.1).
    expect(hex("abc")).toBe("ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad");
  });

  it("hashes the 448-bit two-block message to the NIST example digest", () => {
    // NIST FIPS 180-4 example values (SHA-256, multi-block message; also FIPS 180-2 appendix B.2).
    expect(hex("abcdbcdecdefdefgefghfghighijhijkijkljklmklmnlmnomnopnopq")).toBe("248d6a61d20638b8e5c026930c3e6039a33ce45964ff2167f6ecedd419db06c1");
  });

  it("hashes the empty message to the known empty-string digest", () => {
    // SHA-256 of the empty string: common practice test vector (e.g. NIST CAVP byte-oriented vectors, Len = 0).
    expect(hex("")).toBe("e3b0c44298fc1c149afbf4c8996fb92427ae41e4649b934ca495991b7852b855");
  });

  it("agrees with the Node crypto reference on messages around the padding boundaries", () => {
    // Lengths 55, 56, 63, 64 and 65 bytes exercise the one-or-two-block padding of FIPS 180-4 §5.1.1.
    for (const length of [1, 55, 56, 57, 63, 64, 65, 119, 120, 128, 1000]) {
      const text = "a".repeat(length);
      expect(hex(text), `length ${length}`).toBe(createHash("sha256").update(text, "utf8").digest("hex"));
    }
  });

  it("agrees with the Node crypto reference on generated text including non-ASCII characters", () => {
    fc.assert(
      fc.property(fc.string({ unit: "grapheme", maxLength: 80 }), (text) => {
        expect(hex(text)).toBe(createHash("sha256").update(text, "utf8").digest("hex"));
      }),
      { seed: 180_4, numRuns: 200 },
    );
  });

  it("encodes text as UTF-8 like Node's Buffer does", () => {
    for (const text of ["x", "é", "€", "𝄞", "Δt = 1 s", "ζ ωn"]) expect(Array.from(utf8Bytes(text))).toEqual(Array.from(Buffer.from(text, "utf8")));
  });
});

describe("canonical JSON", () => {
  it("sorts object keys at every depth and prints no whitespace", () => {
    expect(canonicalJson({ b: 1, a: [2, { d: 0, c: "x" }] })).toBe('{"a":[2,{"c":"x","d":0}],"b":1}');
  });

  it("prints numbers exactly as JSON.stringify does", () => {
    expect(canonicalJson([1e-6, 0.1, -0, 1e21, 123456789.125])).toBe(JSON.stringify([1e-6, 0.1, -0, 1e21, 123456789.125]));
  });

  it("leaves out undefined members like JSON.stringify", () => {
    expect(canonicalJson({ a: 1, b: undefined })).toBe('{"a":1}');
  });

  it("refuses NaN and Infinity with a non-finite error naming the path", () => {
    for (const bad of [NaN, Infinity, -Infinity]) {
      try {
        canonicalJson({ model: { A: [[0, bad]] } });
        expect.unreachable();
      } catch (error) {
        expect(isEngineError(error) && error.kind).toBe("non-finite");
        expect((error as Error).message).toContain("value.model.A[0][1]");
      }
    }
  });

  it("refuses data that is not JSON (functions, cycles, holes)", () => {
    const cycle: Record<string, unknown> = {};
    cycle.self = cycle;
    for (const bad of [{ f: () => 1 }, cycle, [1, undefined], { n: 10n }]) {
      expect(() => canonicalJson(bad)).toThrow(/fingerprint/);
    }
  });
});

describe("design fingerprint", () => {
  it("has the lw1- prefix and 32 lowercase hex digits", () => {
    expect(fingerprint(plant, variant, "0.1.0")).toMatch(/^lw1-[0-9a-f]{32}$/);
  });

  it("is the SHA-256 prefix of the canonical JSON of plant, variant and engine version", () => {
    // Reference digest from Node's crypto module (an independent SHA-256).
    const text = canonicalJson({ plant, variant, engineVersion: "0.1.0" });
    expect(fingerprint(plant, variant, "0.1.0")).toBe("lw1-" + createHash("sha256").update(text, "utf8").digest("hex").slice(0, 32));
  });

  it("does not depend on the order of object keys", () => {
    expect(fingerprint(reverseKeys(plant) as PlantSpec, reverseKeys(variant) as VariantSpec, "0.1.0")).toBe(fingerprint(plant, variant, "0.1.0"));
  });

  it("changes when any number of the plant or the variant changes, however slightly", () => {
    const base = fingerprint(plant, variant, "0.1.0");
    fc.assert(
      fc.property(fc.integer({ min: 0, max: 7 }), fc.integer({ min: 1, max: 1000 }), fc.boolean(), (which, steps, up) => {
        const p = structuredClone(plant);
        const v = structuredClone(variant);
        const model = p.model as { A: number[][]; B: number[][]; C: number[][] };
        const sf = v.stateFeedback as { Q: number[][]; R: number[][] };
        const cells: [number[], number][] = [
          [model.A[0]!, 1], [model.A[1]!, 1], [model.A[0]!, 0], [model.B[1]!, 0], [model.C[0]!, 0], [sf.Q[0]!, 0], [sf.Q[1]!, 1], [sf.R[0]!, 0],
        ];
        const [row, col] = cells[which]!;
        // Move the number by `steps` units in the last place (one ulp is the smallest change).
        let x = row[col]!;
        for (let k = 0; k < steps; k++) x = nextAfter(x, up);
        row[col] = x;
        expect(fingerprint(p, v, "0.1.0")).not.toBe(base);
      }),
      { seed: 20240611, numRuns: 150 },
    );
  });

  it("changes with the engine version and with non-numeric fields", () => {
    const base = fingerprint(plant, variant, "0.1.0");
    expect(fingerprint(plant, variant, "0.1.1")).not.toBe(base);
    expect(fingerprint(plant, { ...variant, notes: "retuned" }, "0.1.0")).not.toBe(base);
    expect(fingerprint({ ...plant, name: "Backlog 2" }, variant, "0.1.0")).not.toBe(base);
  });

  it("refuses an empty engine version", () => {
    expect(() => fingerprint(plant, variant, "")).toThrow(/engineVersion must be a non-empty string/);
  });
});

/** The neighbouring double of x toward +∞ (up) or −∞. */
function nextAfter(x: number, up: boolean): number {
  if (x === 0) return up ? Number.MIN_VALUE : -Number.MIN_VALUE;
  const buffer = new DataView(new ArrayBuffer(8));
  buffer.setFloat64(0, x);
  const bits = buffer.getBigUint64(0);
  buffer.setBigUint64(0, (x > 0) === up ? bits + 1n : bits - 1n);
  return buffer.getFloat64(0);
}
