import { describe, expect, it } from "vitest";
import { exportSvg, type ExportableNode } from "../../../../renderer/plots/exportSvg";

/** A tiny stand-in for DOM nodes: exportSvg reads only nodeType, nodeName, attributes, childNodes. */
function el(name: string, attrs: Record<string, string>, ...children: (ExportableNode | string)[]): ExportableNode {
  return {
    nodeType: 1,
    nodeName: name,
    nodeValue: null,
    attributes: Object.entries(attrs).map(([n, value]) => ({ name: n, value })),
    childNodes: children.map((c) => (typeof c === "string" ? { nodeType: 3, nodeName: "#text", nodeValue: c, childNodes: [] } : c)),
  };
}

/** Computed styles keyed by class name, as a theme stylesheet would resolve them. */
const STYLES: Record<string, Record<string, string>> = {
  "lw-series-line": { stroke: "rgb(0, 114, 178)", "stroke-width": "1.6px", fill: "none" },
  "lw-plot-title": { fill: "rgb(27, 31, 35)", "font-size": "13px", "font-family": "system-ui" },
};
const reader = (node: ExportableNode) => {
  const cls = Array.from(node.attributes ?? []).find((a) => a.name === "class")?.value ?? "";
  const style = STYLES[cls] ?? {};
  return { getPropertyValue: (p: string) => style[p] ?? "" };
};

describe("SVG export", () => {
  const svg = el("svg", { viewBox: "0 0 100 50", width: "100", height: "50", class: "lw-plot-svg", tabindex: "0", role: "img" },
    el("text", { class: "lw-plot-title", x: "4", y: "12" }, "Bode <plot> & margins"),
    el("path", { class: "lw-series-line", d: "M0,0L10,10", "stroke-dasharray": "7 4" }),
    el("line", { class: "lw-hover-line", "data-export": "omit", x1: "1", x2: "1" }),
    el("image", { href: "https://example.org/logo.png", width: "5", height: "5" }),
    el("rect", { fill: "url(https://example.org/pattern.svg#p)", width: "3", height: "3" }),
    el("use", { href: "#local-marker" }),
  );
  const text = exportSvg(svg, reader);

  it("declares the SVG namespace on the root and starts with an XML declaration", () => {
    expect(text.startsWith('<?xml version="1.0" encoding="UTF-8"?>\n<svg xmlns="http://www.w3.org/2000/svg"')).toBe(true);
    expect(text).toContain('viewBox="0 0 100 50"');
  });

  it("writes each element's resolved style inline and drops class names", () => {
    expect(text).toContain('<path d="M0,0L10,10" stroke-dasharray="7 4" style="fill:none;stroke:rgb(0, 114, 178);stroke-width:1.6px"/>');
    expect(text).toContain('style="fill:rgb(27, 31, 35);font-family:system-ui;font-size:13px"');
    expect(text).not.toContain("class=");
    expect(text).not.toContain("var(");
  });

  it("escapes text and leaves out interactive-only parts and the tab stop", () => {
    expect(text).toContain(">Bode &lt;plot&gt; &amp; margins</text>");
    expect(text).not.toContain("x1=");
    expect(text).not.toContain("tabindex");
  });

  it("drops references to anything outside the document but keeps same-document ones", () => {
    expect(text).not.toContain("example.org");
    expect(text).toContain('<use href="#local-marker"/>');
  });

  it("refuses an element that is not <svg>", () => {
    expect(() => exportSvg(el("g", {}), reader)).toThrow(/needs an <svg> element/);
  });
});
