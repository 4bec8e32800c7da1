/**
 * PNG of a rendered plot: the standalone SVG (exportSvg) drawn into an offscreen canvas at
 * `scale` × its size. Browser-only (Image, canvas); the SVG step is what the unit tests cover.
 */
import { exportSvg } from "./exportSvg";

export async function exportPng(svgElement: SVGSVGElement, scale = 2): Promise<Blob> {
  if (!(scale > 0 && scale <= 8)) throw new Error(`PNG scale must be in (0, 8] (got ${scale})`);
  const text = exportSvg(svgElement);
  const box = svgElement.viewBox.baseVal;
  const width = Math.round((box?.width || svgElement.clientWidth) * scale);
  const height = Math.round((box?.height || svgElement.clientHeight) * scale);
  const url = URL.createObjectURL(new Blob([text], { type: "image/svg+xml" }));
  try {
    const image = new Image(width, height);
    await new Promise<void>((resolve, reject) => {
      image.onload = () => resolve();
      image.onerror = () => reject(new Error("the exported SVG could not be drawn as an image"));
      image.src = url;
    });
    const canvas = typeof OffscreenCanvas !== "undefined" ? new OffscreenCanvas(width, height) : Object.assign(document.createElement("canvas"), { width, height });
    const context = canvas.getContext("2d") as CanvasRenderingContext2D | OffscreenCanvasRenderingContext2D | null;
    if (!context) throw new Error("no 2-D canvas context is available for the PNG export");
    context.drawImage(image, 0, 0, width, height);
    if (canvas instanceof HTMLCanvasElement) {
      return await new Promise<Blob>((resolve, reject) => canvas.toBlob((b) => (b ? resolve(b) : reject(new Error("the canvas produced no PNG"))), "image/png"));
    }
    return await (canvas as OffscreenCanvas).convertToBlob({ type: "image/png" });
  } finally {
    URL.revokeObjectURL(url);
  }
}
