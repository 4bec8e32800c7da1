import { readFileSync } from "node:fs";
import { describe, expect, it } from "vitest";

const css = readFileSync(new URL("../../../../renderer/styles/app.css", import.meta.url), "utf8");

/** Custom properties declared in the first block whose selector matches exactly. */
function palette(selector: string): Record<string, string> {
  const start = css.indexOf(`${selector} {`);
  expect(start, `block ${selector} exists in app.css`).toBeGreaterThanOrEqual(0);
  const body = css.slice(start, css.indexOf("}", start));
  const out: Record<string, string> = {};
  for (const m of body.matchAll(/--([a-z-]+):\s*(#[0-9a-f]{6})/gi)) out[m[1]!] = m[2]!;
  return out;
}

// Relative luminance and contrast ratio as defined in W3C WCAG 2.1, "relative luminance" and
// "contrast ratio" (Understanding SC 1.4.3).
function luminance(hex: string): number {
  const channel = (i: number) => {
    const c = parseInt(hex.slice(1 + 2 * i, 3 + 2 * i), 16) / 255;
    return c <= 0.03928 ? c / 12.92 : ((c + 0.055) / 1.055) ** 2.4;
  };
  return 0.2126 * channel(0) + 0.7152 * channel(1) + 0.0722 * channel(2);
}
function contrast(a: string, b: string): number {
  const [hi, lo] = [luminance(a), luminance(b)].sort((x, y) => y - x) as [number, number];
  return (hi + 0.05) / (lo + 0.05);
}

// [foreground, background, minimum]: 4.5 for text (WCAG AA, SC 1.4.3), 3 for focus rings and
// component boundaries that carry meaning (SC 1.4.11).
const PAIRS: [string, string, number][] = [
  ["text", "bg", 4.5],
  ["text", "surface", 4.5],
  ["text", "surface-sunk", 4.5],
  ["text", "accent-soft", 4.5],
  ["muted", "bg", 4.5],
  ["muted", "surface", 4.5],
  ["muted", "surface-sunk", 4.5],
  ["accent-text", "accent", 4.5],
  ["error", "surface", 4.5],
  ["error", "accent-soft", 4.5],
  ["danger-text", "danger-bg", 4.5],
  ["focus", "surface", 3],
  ["focus", "bg", 3],
  ["accent", "surface", 3],
];

describe.each([
  ["light", ":root"],
  ["dark", ':root[data-theme="dark"]'],
])("%s theme colours", (_name, selector) => {
  const colours = palette(selector);
  it.each(PAIRS)("%s on %s reaches a contrast of at least %d:1", (fg, bg, minimum) => {
    expect(colours[fg], `--${fg}`).toBeDefined();
    expect(colours[bg], `--${bg}`).toBeDefined();
    expect(contrast(colours[fg]!, colours[bg]!)).toBeGreaterThanOrEqual(minimum);
  });
});

describe("theme definitions", () => {
  it("declares the same dark palette for the system preference and for the explicit toggle", () => {
    const start = css.indexOf("@media (prefers-color-scheme: dark)");
    const media = css.slice(start, css.indexOf("}", css.indexOf("{", css.indexOf("{", start) + 1)));
    const fromMedia: Record<string, string> = {};
    for (const m of media.matchAll(/--([a-z-]+):\s*(#[0-9a-f]{6})/gi)) fromMedia[m[1]!] = m[2]!;
    expect(fromMedia).toEqual(palette(':root[data-theme="dark"]'));
  });

  it("loads no remote content (no url() or @import to another origin)", () => {
    expect(css).not.toMatch(/@import|url\(\s*["']?(https?:)?\/\//i);
  });
});
