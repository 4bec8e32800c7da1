/**
 * The design fingerprint: a short, stable identity of "this plant, this design variant, this
 * engine". A sign-off records it; the design sheet recomputes it and, when it differs, says the
 * design changed since it was signed. Pure and DOM-free, so the engine, the command line and the
 * renderer's design sheet compute exactly the same string.
 *
 * WARNING: changing the canonical form, the hash or the prefix invalidates every recorded
 * sign-off. A new scheme must get a new prefix ("lw2-") and the old one must stay readable.
 */
import { EngineError } from "../errors";
import type { PlantSpec, VariantSpec } from "./format";

/** Prefix of the current fingerprint scheme (canonical JSON, SHA-256, 32 hex digits). */
export const FINGERPRINT_PREFIX = "lw1-";
/** Number of hex digits of the digest kept in the fingerprint (128 bits). */
export const FINGERPRINT_HEX_DIGITS = 32;

/**
 * **Computes** the canonical JSON text of a plain JSON value: object keys sorted by UTF-16 code
 * unit order at every depth, no whitespace, numbers and strings exactly as `JSON.stringify`
 * prints them; `undefined` object members are left out (as `JSON.stringify` does).
 *
 * **Requires** a tree of plain objects, arrays, strings, finite numbers, booleans and null.
 *
 * **Method** recursive descent; the sorted-key form follows the idea of RFC 8785 (JSON
 * Canonicalization Scheme, Rundgren, Jordan and Erdtman, 2020) but uses ECMAScript number
 * printing only, which RFC 8785 also prescribes.
 *
 * **Cost** O(size · log keys). **Accuracy** exact (text).
 *
 * **Errors** "non-finite" for NaN or ±Infinity (named by path); "invalid-argument" for
 * functions, symbols, bigints, `undefined` inside arrays, or a cycle.
 *
 * **Example** `canonicalJson({ b: 1, a: [2, { d: 0, c: "x" }] })` →
 * `{"a":[2,{"c":"x","d":0}],"b":1}`.
 */
export function canonicalJson(value: unknown): string {
  const out: string[] = [];
  write(value, "value", out, new Set());
  return out.join("");
}

function write(value: unknown, path: string, out: string[], open: Set<object>): void {
  if (value === null || typeof value === "boolean" || typeof value === "string") {
    out.push(JSON.stringify(value));
    return;
  }
  if (typeof value === "number") {
    if (!Number.isFinite(value)) throw new EngineError("non-finite", `${path} must be a finite number to be fingerprinted (it is ${value})`, { path });
    out.push(JSON.stringify(value));
    return;
  }
  if (typeof value !== "object") {
    throw new EngineError("invalid-argument", `${path} must be plain JSON data to be fingerprinted (it is a ${typeof value})`, { path });
  }
  if (open.has(value)) throw new EngineError("invalid-argument", `${path} refers back to itself; a fingerprint needs a tree`, { path });
  open.add(value);
  if (Array.isArray(value)) {
    out.push("[");
    value.forEach((item, i) => {
      if (item === undefined) throw new EngineError("invalid-argument", `${path}[${i}] is undefined; arrays to fingerprint hold JSON values only`, { path: `${path}[${i}]` });
      if (i > 0) out.push(",");
      write(item, `${path}[${i}]`, out, open);
    });
    out.push("]");
  } else {
    const record = value as Record<string, unknown>;
    const keys = Object.keys(record).filter((k) => record[k] !== undefined).sort();
    out.push("{");
    keys.forEach((key, i) => {
      if (i > 0) out.push(",");
      out.push(JSON.stringify(key), ":");
      write(record[key], `${path}.${key}`, out, open);
    });
    out.push("}");
  }
  open.delete(value);
}

/** UTF-8 bytes of a JavaScript string (unpaired surrogates become U+FFFD, as TextEncoder does). */
export function utf8Bytes(text: string): Uint8Array {
  const bytes: number[] = [];
  for (let i = 0; i < text.length; i++) {
    let c = text.charCodeAt(i);
    if (c >= 0xd800 && c <= 0xdbff && i + 1 < text.length) {
      const d = text.charCodeAt(i + 1);
      if (d >= 0xdc00 && d <= 0xdfff) {
        c = 0x10000 + ((c - 0xd800) << 10) + (d - 0xdc00);
        i++;
      } else c = 0xfffd;
    } else if (c >= 0xd800 && c <= 0xdfff) c = 0xfffd;
    if (c < 0x80) bytes.push(c);
    else if (c < 0x800) bytes.push(0xc0 | (c >> 6), 0x80 | (c & 63));
    else if (c < 0x10000) bytes.push(0xe0 | (c >> 12), 0x80 | ((c >> 6) & 63), 0x80 | (c & 63));
    else bytes.push(0xf0 | (c >> 18), 0x80 | ((c >> 12) & 63), 0x80 | ((c >> 6) & 63), 0x80 | (c & 63));
  }
  return Uint8Array.from(bytes);
}

// FIPS 180-4 §4.2.2: the first 32 bits of the fractional parts of the cube roots of the first
// 64 primes.
const K = new Uint32Array([
  0x428a2f98, 0x71374491, 0xb5c0fbcf, 0xe9b5dba5, 0x3956c25b, 0x59f111f1, 0x923f82a4, 0xab1c5ed5, 0xd807aa98, 0x12835b01, 0x243185be, 0x550c7dc3,
  0x72be5d74, 0x80deb1fe, 0x9bdc06a7, 0xc19bf174, 0xe49b69c1, 0xefbe4786, 0x0fc19dc6, 0x240ca1cc, 0x2de92c6f, 0x4a7484aa, 0x5cb0a9dc, 0x76f988da,
  0x983e5152, 0xa831c66d, 0xb00327c8, 0xbf597fc7, 0xc6e00bf3, 0xd5a79147, 0x06ca6351, 0x14292967, 0x27b70a85, 0x2e1b2138, 0x4d2c6dfc, 0x53380d13,
  0x650a7354, 0x766a0abb, 0x81c2c92e, 0x92722c85, 0xa2bfe8a1, 0xa81a664b, 0xc24b8b70, 0xc76c51a3, 0xd192e819, 0xd6990624, 0xf40e3585, 0x106aa070,
  0x19a4c116, 0x1e376c08, 0x2748774c, 0x34b0bcb5, 0x391c0cb3, 0x4ed8aa4a, 0x5b9cca4f, 0x682e6ff3, 0x748f82ee, 0x78a5636f, 0x84c87814, 0x8cc70208,
  0x90befffa, 0xa4506ceb, 0xbef9a3f7, 0xc67178f2,
]);

/**
 * **Computes** the SHA-256 digest of a byte string, as 64 lowercase hex digits.
 *
 * **Requires** fewer than 2^53 / 8 bytes (JavaScript array limits are far below that).
 *
 * **Method** the Secure Hash Standard, NIST FIPS 180-4 (2015), §5.1.1 padding, §6.2.2 hash
 * computation with the functions of §4.1.2 and the constants of §4.2.2 and §5.3.3.
 *
 * **Cost** 64 rounds per 64-byte block: O(bytes); memory O(bytes) for the padded copy.
 *
 * **Accuracy** exact (integer arithmetic modulo 2^32). **Errors** none.
 *
 * **Example** `sha256Hex(utf8Bytes("abc"))` →
 * "ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad" (FIPS 180-2 appendix B.1).
 */
export function sha256Hex(message: Uint8Array): string {
  // §5.1.1: append 1 bit, zeros to 448 mod 512 bits, then the 64-bit big-endian length in bits.
  const bitLength = message.length * 8;
  const padded = new Uint8Array(Math.ceil((message.length + 9) / 64) * 64);
  padded.set(message);
  padded[message.length] = 0x80;
  const view = new DataView(padded.buffer);
  view.setUint32(padded.length - 8, Math.floor(bitLength / 0x100000000));
  view.setUint32(padded.length - 4, bitLength >>> 0);
  // §5.3.3: initial hash value.
  const H = new Uint32Array([0x6a09e667, 0xbb67ae85, 0x3c6ef372, 0xa54ff53a, 0x510e527f, 0x9b05688c, 0x1f83d9ab, 0x5be0cd19]);
  const W = new Uint32Array(64);
  const rotr = (x: number, n: number): number => (x >>> n) | (x << (32 - n));
  for (let offset = 0; offset < padded.length; offset += 64) {
    // §6.2.2 step 1: the message schedule.
    for (let t = 0; t < 16; t++) W[t] = view.getUint32(offset + 4 * t);
    for (let t = 16; t < 64; t++) {
      const w15 = W[t - 15]!;
      const w2 = W[t - 2]!;
      const s0 = rotr(w15, 7) ^ rotr(w15, 18) ^ (w15 >>> 3);
      const s1 = rotr(w2, 17) ^ rotr(w2, 19) ^ (w2 >>> 10);
      W[t] = (s1 + W[t - 7]! + s0 + W[t - 16]!) | 0;
    }
    // Steps 2-3: the 64 rounds with Σ0, Σ1, Ch and Maj of §4.1.2.
    let a = H[0]!, b = H[1]!, c = H[2]!, d = H[3]!, e = H[4]!, f = H[5]!, g = H[6]!, h = H[7]!;
    for (let t = 0; t < 64; t++) {
      const S1 = rotr(e, 6) ^ rotr(e, 11) ^ rotr(e, 25);
      const ch = (e & f) ^ (~e & g);
      const T1 = (h + S1 + ch + K[t]! + W[t]!) | 0;
      const S0 = rotr(a, 2) ^ rotr(a, 13) ^ rotr(a, 22);
      const maj = (a & b) ^ (a & c) ^ (b & c);
      const T2 = (S0 + maj) | 0;
      h = g; g = f; f = e; e = (d + T1) | 0;
      d = c; c = b; b = a; a = (T1 + T2) | 0;
    }
    // Step 4: the intermediate hash value.
    H[0] = H[0]! + a; H[1] = H[1]! + b; H[2] = H[2]! + c; H[3] = H[3]! + d;
    H[4] = H[4]! + e; H[5] = H[5]! + f; H[6] = H[6]! + g; H[7] = H[7]! + h;
  }
  return Array.from(H, (word) => word.toString(16).padStart(8, "0")).join("");
}

/**
 * **Computes** the fingerprint of a design: "lw1-" followed by the first 32 hex digits of
 * SHA-256(UTF-8(canonicalJson({ plant, variant, engineVersion }))).
 *
 * **Requires** plain JSON specs (as read from a project file) with finite numbers.
 *
 * **Method** canonical JSON (`canonicalJson`) then SHA-256 (FIPS 180-4, `sha256Hex`). Any
 * change to any field of the plant or the variant (a number, a name, a note) or to the engine
 * version changes the fingerprint; the order of object keys does not.
 *
 * **Cost** O(size of the specs). **Accuracy** exact. A 128-bit prefix makes an accidental
 * collision between two designs practically impossible (about 2^-64 for 2^32 designs).
 *
 * **Errors** as `canonicalJson`: "non-finite" for NaN/Infinity, "invalid-argument" for data
 * that is not JSON; "invalid-argument" when engineVersion is not a non-empty string.
 *
 * **Example** `fingerprint(plant, variant, "0.1.0")` → "lw1-" + 32 hex digits; calling it again
 * with the keys of `variant` in another order returns the same string.
 */
export function fingerprint(plantSpec: PlantSpec, variantSpec: VariantSpec, engineVersion: string): string {
  if (typeof engineVersion !== "string" || engineVersion.length === 0) {
    throw new EngineError("invalid-argument", `engineVersion must be a non-empty string (got ${JSON.stringify(engineVersion)})`, {});
  }
  const text = canonicalJson({ plant: plantSpec, variant: variantSpec, engineVersion });
  return FINGERPRINT_PREFIX + sha256Hex(utf8Bytes(text)).slice(0, FINGERPRINT_HEX_DIGITS);
}
