/**
 * The text pieces of generated C99 source: exact double literals, ASCII comments that cannot
 * end early, and identifiers made from signal names (sanitised, shortened, collisions resolved).
 * Used by `controllerSource`; documented with it in docs/project-format.md.
 * WARNING: deployed code calls the names these rules make; changing them renames its functions.
 */
import { EngineError } from "../errors";

/**
 * A double as a C literal with 17 significant digits ("d.dddddddddddddddde±x"): enough for any
 * binary64 value to read back exactly (IEEE 754-2008 §5.12.2; D. W. Matula, "In-and-out
 * conversions", Communications of the ACM 11(1), 1968, both from memory). toExponential is
 * correctly rounded by the ECMAScript specification. On the C side, C99 Annex F (IEC 60559
 * implementations) asks for correctly rounded conversion of decimal strings of at most
 * DECIMAL_DIG (≥ 17) digits, while plain C99 §6.4.4.2 allows the nearest value or a neighbour
 * (both from memory); test/cli/controllerC.test.ts checks that the system compiler reads every
 * literal of the generated files back exactly.
 */
export function cDoubleLiteral(value: number): string {
  if (!Number.isFinite(value)) throw new EngineError("non-finite", `${value} has no C literal`, {});
  return (value === 0 ? 0 : value).toExponential(16);
}

/** Comments stay ASCII (portable to any compiler's source character set) and never close early. */
const ASCII_REPLACEMENTS: Record<string, string> = {
  "δ": "d", "Δ": "D", "·": "*", "−": "-", "–": "-", "—": "-", "×": "x", "±": "+/-", "≤": "<=", "≥": ">=",
  "≠": "!=", "≈": "~", "→": "->", "←": "<-", "λ": "lambda", "µ": "u", "μ": "u", "°": "deg", "Ω": "Ohm",
  "²": "^2", "³": "^3", "⁺": "^+", "⁻": "^-", "ᵢ": "_i", "ₖ": "_k", "…": "...", "‘": "'", "’": "'", "“": "\"", "”": "\"",
};

/** A one-line C comment holding `text` (made ASCII and safe). */
export function cComment(text: string): string {
  return `/* ${asciiComment(text)} */`;
}

/** `text` in printable ASCII, safe inside a C comment: symbols spelled out, accents dropped, others as <U+XXXX>. */
export function asciiComment(text: string): string {
  let out = "";
  for (const ch of text) {
    if (/^[\x20-\x7e]$/.test(ch)) out += ch;
    else if (ASCII_REPLACEMENTS[ch] !== undefined) out += ASCII_REPLACEMENTS[ch];
    else {
      const base = ch.normalize("NFKD").replace(/\p{M}/gu, "");
      out += /^[\x20-\x7e]+$/.test(base) ? base : `<U+${ch.codePointAt(0)!.toString(16).toUpperCase().padStart(4, "0")}>`;
    }
  }
  // "*/" would end the comment, "/*" draws -Wcomment, "??" may start a trigraph in C99.
  return out.replace(/\*\//g, "* /").replace(/\/\*/g, "/ *").replace(/\?\?/g, "? ?");
}

/**
 * A name as the letters, digits and underscores of a C identifier part: accents dropped
 * (NFKD), every other run of characters one "_", no leading or trailing "_", "x" when nothing
 * is left. The caller adds a prefix, so keywords and leading digits cannot occur.
 */
export function cIdentifierPart(name: string): string {
  const part = name.normalize("NFKD").replace(/\p{M}/gu, "").replace(/[^A-Za-z0-9]+/g, "_").replace(/^_+|_+$/g, "");
  return part === "" ? "x" : part;
}

/**
 * Unique identifiers `prefix + part` for a list of names, at most `limit` characters: parts
 * shortened to fit, and a repeated result (after sanitising, case folding when `upper`, or
 * shortening) gets "_2", "_3", ... in list order.
 */
export function uniqueIdentifiers(names: readonly string[], prefix: string, limit: number, upper: boolean): string[] {
  const taken = new Set<string>();
  return names.map((name) => {
    let part = cIdentifierPart(name);
    if (upper) part = part.toUpperCase();
    for (let k = 1; ; k++) {
      const suffix = k === 1 ? "" : `_${k}`;
      const candidate = `${prefix}${part.slice(0, Math.max(1, limit - prefix.length - suffix.length))}${suffix}`;
      if (!taken.has(candidate)) {
        taken.add(candidate);
        return candidate;
      }
    }
  });
}
