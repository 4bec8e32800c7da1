/**
 * Wheel zoom, drag pan and reset for a plot area, with plain pointer events (d3 computes nothing
 * here and never touches the DOM). The view is React state: `null` means "the data's own domain".
 * Returns handlers to spread on the SVG element and a `reset` for the button, double-click and
 * the keyboard ("0" or Home while the plot has focus).
 */
import { useCallback, useEffect, useRef, useState, type RefObject } from "react";
import type { Domain } from "./plotTypes";
import { panDomain, zoomDomain, type AxisKind } from "./viewport";

export interface ZoomPanAxis {
  kind: AxisKind;
  /** The data domain to show when not zoomed. */
  base: Domain;
  /** Plot-area extent in SVG user units, [start, end] as drawn (y: [bottom, top]). */
  range: Domain;
}

export interface ZoomPanState {
  x: Domain;
  y: Domain;
  zoomed: boolean;
  reset: () => void;
  handlers: {
    onWheel: (e: React.WheelEvent<SVGSVGElement>) => void;
    onPointerDown: (e: React.PointerEvent<SVGSVGElement>) => void;
    onPointerMove: (e: React.PointerEvent<SVGSVGElement>) => void;
    onPointerUp: (e: React.PointerEvent<SVGSVGElement>) => void;
    onDoubleClick: () => void;
    onKeyDown: (e: React.KeyboardEvent<SVGSVGElement>) => void;
  };
}

/** Converts a client point to SVG user units through the element's screen matrix. */
export function clientToSvg(svg: SVGSVGElement, clientX: number, clientY: number): { x: number; y: number } {
  const m = svg.getScreenCTM();
  if (!m) return { x: clientX, y: clientY };
  const inv = m.inverse();
  return { x: inv.a * clientX + inv.c * clientY + inv.e, y: inv.b * clientX + inv.d * clientY + inv.f };
}

const fraction = (v: number, r: Domain) => (v - r[0]) / (r[1] - r[0]);

/**
 * `lockY`: zoom and pan the x axis only (Bode, responses: y re-fits to the data).
 * `enabled`: false in print mode (no interaction at all).
 */
export function useZoomPan(xAxis: ZoomPanAxis, yAxis: ZoomPanAxis, options: { lockY?: boolean; enabled?: boolean; svgRef?: RefObject<SVGSVGElement | null> } = {}): ZoomPanState {
  const [view, setView] = useState<{ x: Domain; y: Domain } | null>(null);
  const drag = useRef<{ id: number; x: number; y: number; start: { x: Domain; y: Domain } } | null>(null);
  const x = view?.x ?? xAxis.base;
  const y = options.lockY ? yAxis.base : (view?.y ?? yAxis.base);
  const enabled = options.enabled !== false;
  const reset = useCallback(() => setView(null), []);
  // React attaches wheel listeners as passive, so the page would scroll while the plot zooms; a
  // native non-passive listener stops that, only while the pointer is over the plot area.
  const area = useRef({ x: xAxis.range, y: yAxis.range });
  area.current = { x: xAxis.range, y: yAxis.range };
  useEffect(() => {
    const svg = options.svgRef?.current;
    if (!svg || !enabled) return undefined;
    const stop = (e: WheelEvent) => {
      const p = clientToSvg(svg, e.clientX, e.clientY);
      const fx = fraction(p.x, area.current.x), fy = fraction(p.y, area.current.y);
      if (fx >= 0 && fx <= 1 && fy >= 0 && fy <= 1) e.preventDefault();
    };
    svg.addEventListener("wheel", stop, { passive: false });
    return () => svg.removeEventListener("wheel", stop);
  }, [options.svgRef, enabled]);

  const onWheel = (e: React.WheelEvent<SVGSVGElement>) => {
    if (!enabled) return;
    const p = clientToSvg(e.currentTarget, e.clientX, e.clientY);
    const fx = fraction(p.x, xAxis.range);
    const fy = fraction(p.y, yAxis.range);
    if (fx < 0 || fx > 1 || fy < 0 || fy > 1) return;
    const factor = e.deltaY > 0 ? 1.2 : 1 / 1.2;
    const ax = xAxis.kind === "log" ? 10 ** (Math.log10(x[0]) + fx * (Math.log10(x[1]) - Math.log10(x[0]))) : x[0] + fx * (x[1] - x[0]);
    const ay = y[0] + fy * (y[1] - y[0]);
    setView({
      x: zoomDomain(x, ax, factor, xAxis.kind),
      y: options.lockY ? y : zoomDomain(y, ay, factor, yAxis.kind),
    });
  };
  const onPointerDown = (e: React.PointerEvent<SVGSVGElement>) => {
    if (!enabled || e.button !== 0) return;
    // Pole handles and other controls stop propagation; anything else starts a pan.
    const p = clientToSvg(e.currentTarget, e.clientX, e.clientY);
    drag.current = { id: e.pointerId, x: p.x, y: p.y, start: { x, y } };
    e.currentTarget.setPointerCapture?.(e.pointerId);
  };
  const onPointerMove = (e: React.PointerEvent<SVGSVGElement>) => {
    const d = drag.current;
    if (!d || d.id !== e.pointerId) return;
    const p = clientToSvg(e.currentTarget, e.clientX, e.clientY);
    const dx = (p.x - d.x) / (xAxis.range[1] - xAxis.range[0]);
    const dy = (p.y - d.y) / (yAxis.range[1] - yAxis.range[0]);
    if (Math.abs(p.x - d.x) + Math.abs(p.y - d.y) < 2) return;
    setView({ x: panDomain(d.start.x, -dx, xAxis.kind), y: options.lockY ? d.start.y : panDomain(d.start.y, -dy, yAxis.kind) });
  };
  const onPointerUp = (e: React.PointerEvent<SVGSVGElement>) => {
    if (drag.current?.id === e.pointerId) drag.current = null;
  };
  const onKeyDown = (e: React.KeyboardEvent<SVGSVGElement>) => {
    if (!enabled) return;
    if (e.key === "0" || e.key === "Home") { reset(); e.preventDefault(); }
    else if (e.key === "+" || e.key === "=" || e.key === "-") {
      const factor = e.key === "-" ? 1.25 : 0.8;
      const cx = xAxis.kind === "log" ? Math.sqrt(x[0] * x[1]) : (x[0] + x[1]) / 2;
      setView({ x: zoomDomain(x, cx, factor, xAxis.kind), y: options.lockY ? y : zoomDomain(y, (y[0] + y[1]) / 2, factor, yAxis.kind) });
      e.preventDefault();
    }
  };
  return {
    x, y, zoomed: view !== null, reset,
    handlers: { onWheel, onPointerDown, onPointerMove, onPointerUp, onDoubleClick: reset, onKeyDown },
  };
}
