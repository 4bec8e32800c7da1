/**
 * Standalone SVG from a rendered plot: every element's relevant computed style is written into a
 * `style` attribute (CSS variables and theme rules resolved), interactive-only parts are left
 * out (elements marked data-export="omit"), references to anything outside the document are
 * dropped, and the XML namespace is declared, so the file opens alike in any viewer.
 */

/** The properties that decide how SVG looks; everything else is layout noise. */
export const EXPORTED_STYLE_PROPERTIES = [
  "fill", "fill-opacity", "stroke", "stroke-width", "stroke-dasharray", "stroke-opacity", "stroke-linecap",
  "stroke-linejoin", "opacity", "font-family", "font-size", "font-weight", "font-style", "text-anchor",
  "dominant-baseline", "visibility", "display", "paint-order",
] as const;

/** The minimal node shape the exporter reads; DOM nodes satisfy it (tests pass plain objects). */
export interface ExportableNode {
  nodeType: number;
  nodeName: string;
  nodeValue: string | null;
  attributes?: ArrayLike<{ name: string; value: string }>;
  childNodes: ArrayLike<ExportableNode>;
}

/** Reads one element's computed style; the default uses the element's window getComputedStyle. */
export type StyleReader = (element: ExportableNode) => { getPropertyValue(name: string): string };

const ELEMENT = 1;
const TEXT = 3;
const SVG_NS = "http://www.w3.org/2000/svg";

function escapeText(s: string): string {
  return s.replace(/&/g, "&amp;").replace(/</g, "&lt;").replace(/>/g, "&gt;");
}
function escapeAttribute(s: string): string {
  return escapeText(s).replace(/"/g, "&quot;");
}

/** True for a URL that leaves the document (anything but a same-document #fragment). */
function isExternalReference(value: string): boolean {
  const v = value.trim();
  if (v.startsWith("#")) return false;
  return true;
}

function attributeList(node: ExportableNode): { name: string; value: string }[] {
  const out: { name: string; value: string }[] = [];
  const attrs = node.attributes;
  if (!attrs) return out;
  for (let i = 0; i < attrs.length; i++) out.push({ name: attrs[i]!.name, value: attrs[i]!.value });
  return out;
}

function defaultReader(): StyleReader {
  return (el) => {
    const element = el as unknown as Element;
    const view = element.ownerDocument?.defaultView;
    if (!view) return { getPropertyValue: () => "" };
    return view.getComputedStyle(element);
  };
}

function serialize(node: ExportableNode, read: StyleReader, root: boolean): string {
  if (node.nodeType === TEXT) return escapeText(node.nodeValue ?? "");
  if (node.nodeType !== ELEMENT) return "";
  const attrs = attributeList(node);
  if (attrs.some((a) => a.name === "data-export" && a.value === "omit")) return "";
  const name = node.nodeName.toLowerCase() === "foreignobject" ? "" : node.nodeName;
  if (!name) return ""; // HTML inside SVG would not render in standalone viewers.
  const kept: string[] = [];
  const style = read(node);
  const inline: string[] = [];
  for (const p of EXPORTED_STYLE_PROPERTIES) {
    const v = style.getPropertyValue(p).trim();
    if (v) inline.push(`${p}:${v}`);
  }
  for (const a of attrs) {
    const n = a.name;
    if (n === "style" || n === "class" || n === "tabindex" || n.startsWith("on") || n.startsWith("data-")) continue;
    if ((n === "href" || n === "xlink:href" || n === "src") && isExternalReference(a.value)) continue;
    if (/url\(/i.test(a.value) && !/url\(\s*["']?#/i.test(a.value)) continue;
    if (root && (n === "xmlns" || n === "xmlns:xlink")) continue;
    kept.push(`${n}="${escapeAttribute(a.value)}"`);
  }
  if (root) kept.unshift(`xmlns="${SVG_NS}"`);
  if (inline.length) kept.push(`style="${escapeAttribute(inline.join(";"))}"`);
  let inner = "";
  for (let i = 0; i < node.childNodes.length; i++) inner += serialize(node.childNodes[i]!, read, false);
  const open = `<${name}${kept.length ? " " + kept.join(" ") : ""}`;
  return inner ? `${open}>${inner}</${name}>` : `${open}/>`;
}

/**
 * The SVG element as a standalone document string (with an XML declaration). `readStyle`
 * defaults to the live computed style; tests and the print path may pass their own.
 */
export function exportSvg(svgElement: ExportableNode | SVGSVGElement, readStyle?: StyleReader): string {
  const node = svgElement as ExportableNode;
  if (node.nodeType !== ELEMENT || node.nodeName.toLowerCase() !== "svg") {
    throw new Error(`exportSvg needs an <svg> element (got <${node.nodeName}>)`);
  }
  return `<?xml version="1.0" encoding="UTF-8"?>\n${serialize(node, readStyle ?? defaultReader(), true)}\n`;
}
