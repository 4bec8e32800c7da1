/**
 * Locus model shared by the root locus (parameter = loop gain k) and parameter loci (any design
 * parameter): branch paths with gaps at non-finite points, open-loop poles and zeros, asymptotes
 * from the centroid, marked stability-boundary crossings, and the nearest-point query behind
 * hover and click. Pure.
 */
import { line, scaleLinear, type ScaleLinear } from "d3";
import { linearTicks, tickLabel, type AxisModel } from "./axisModel";
import type { Domain, Margins, PlotComplex } from "./plotTypes";
import { equalAspect } from "./viewport";

export interface LocusData {
  /** Parameter value at each point index, shared by every branch (gains for a root locus). */
  parameter: readonly number[];
  /** branches[b][k]: the pole of branch b at parameter[k]. */
  branches: readonly (readonly PlotComplex[])[];
  openLoopPoles?: readonly PlotComplex[];
  openLoopZeros?: readonly PlotComplex[];
  asymptotes?: { centroid: number | null; anglesDeg: readonly number[] } | null;
  /** Crossings of the stability boundary with the parameter value there. */
  crossings?: readonly { point: PlotComplex; value: number }[];
}

export interface LocusModel {
  x: ScaleLinear<number, number>;
  y: ScaleLinear<number, number>;
  xAxis: AxisModel;
  yAxis: AxisModel;
  plot: { left: number; top: number; width: number; height: number };
  branchPaths: string[];
  poles: { x: number; y: number }[];
  zeros: { x: number; y: number }[];
  asymptotes: { x1: number; y1: number; x2: number; y2: number; angleDeg: number }[];
  crossings: { x: number; y: number; label: string; value: number }[];
  /** Unit circle path when sampled, else "". */
  unitCircle: string;
}

const finite = (p: PlotComplex) => Number.isFinite(p.re) && Number.isFinite(p.im);

/** A padded domain holding every finite branch point, pole, zero and the origin (and the unit circle when sampled). */
export function locusDomain(data: LocusData, sampled: boolean): { x: Domain; y: Domain } {
  let xLo = sampled ? -1 : 0, xHi = sampled ? 1 : 0, yHi = sampled ? 1 : 0;
  const take = (p: PlotComplex) => {
    if (!finite(p)) return;
    xLo = Math.min(xLo, p.re); xHi = Math.max(xHi, p.re); yHi = Math.max(yHi, Math.abs(p.im));
  };
  data.branches.forEach((b) => b.forEach(take));
  (data.openLoopPoles ?? []).forEach(take);
  (data.openLoopZeros ?? []).forEach(take);
  if (xLo === xHi && yHi === 0) return { x: [-1, 1], y: [-1, 1] };
  const pad = 0.1 * Math.max(xHi - xLo, 2 * yHi);
  return { x: [xLo - pad, xHi + pad], y: [-yHi - pad, yHi + pad] };
}

export interface LocusModelInput {
  data: LocusData;
  sampleTime?: number | null;
  width: number;
  height: number;
  margins: Margins;
  view?: { x: Domain; y: Domain };
  /** Prefix of crossing labels: "k" for a gain, or the parameter's name. */
  parameterSymbol: string;
}

export function locusModel(input: LocusModelInput): LocusModel {
  const { data, width, height, margins: m } = input;
  const sampled = typeof input.sampleTime === "number" && input.sampleTime > 0;
  const plot = { left: m.left, top: m.top, width: width - m.left - m.right, height: height - m.top - m.bottom };
  const base = input.view ?? locusDomain(data, sampled);
  const fitted = equalAspect(base.x, base.y, plot.width, plot.height);
  const x = scaleLinear().domain(fitted.x).range([plot.left, plot.left + plot.width]);
  const y = scaleLinear().domain(fitted.y).range([plot.top + plot.height, plot.top]);
  const f = (v: number) => Number(v.toFixed(2));
  const branchPaths = data.branches.map(
    (b) => line<PlotComplex>().defined(finite).x((p) => f(x(p.re))).y((p) => f(y(p.im)))(b as PlotComplex[]) ?? "",
  );
  // Asymptotes run from the centroid to beyond the farthest corner of the view.
  const [x0, x1] = fitted.x, [y0, y1] = fitted.y;
  const asymptotes: LocusModel["asymptotes"] = [];
  const c = data.asymptotes?.centroid;
  if (typeof c === "number" && Number.isFinite(c)) {
    const reach = Math.max(Math.hypot(x0 - c, y0), Math.hypot(x1 - c, y0), Math.hypot(x0 - c, y1), Math.hypot(x1 - c, y1));
    for (const a of data.asymptotes!.anglesDeg) {
      const r = (a * Math.PI) / 180;
      asymptotes.push({ x1: f(x(c)), y1: f(y(0)), x2: f(x(c + reach * Math.cos(r))), y2: f(y(reach * Math.sin(r))), angleDeg: a });
    }
  }
  let unitCircle = "";
  if (sampled) {
    const rx = x(1) - x(0), ry = y(0) - y(1);
    unitCircle = `M${f(x(1))},${f(y(0))}A${f(rx)},${f(ry)} 0 1,0 ${f(x(-1))},${f(y(0))}A${f(rx)},${f(ry)} 0 1,0 ${f(x(1))},${f(y(0))}Z`;
  }
  const pts = (list: readonly PlotComplex[] | undefined) => (list ?? []).filter(finite).map((p) => ({ x: x(p.re), y: y(p.im) }));
  return {
    x, y, plot, branchPaths, asymptotes, unitCircle,
    poles: pts(data.openLoopPoles),
    zeros: pts(data.openLoopZeros),
    crossings: (data.crossings ?? []).filter((cr) => finite(cr.point)).map((cr) => ({ x: x(cr.point.re), y: y(cr.point.im), value: cr.value, label: `${input.parameterSymbol} = ${tickLabel(cr.value)}` })),
    xAxis: linearTicks(fitted.x, [plot.left, plot.left + plot.width], Math.max(3, Math.round(plot.width / 90))),
    yAxis: linearTicks(fitted.y, [plot.top + plot.height, plot.top], Math.max(3, Math.round(plot.height / 60))),
  };
}

export interface NearestLocusPoint {
  branch: number;
  index: number;
  point: PlotComplex;
  value: number;
  /** Distance from the query in data units. */
  distance: number;
}

/**
 * The locus point nearest to `s` (over every branch and every computed point), or null when the
 * locus is empty. Linear scan: n branches × points (a few thousand), well under a frame.
 */
export function nearestLocusPoint(data: LocusData, s: PlotComplex): NearestLocusPoint | null {
  let best: NearestLocusPoint | null = null;
  data.branches.forEach((b, bi) => {
    b.forEach((p, k) => {
      if (!finite(p) || !Number.isFinite(data.parameter[k])) return;
      const d = Math.hypot(p.re - s.re, p.im - s.im);
      if (!best || d < best.distance) best = { branch: bi, index: k, point: p, value: data.parameter[k]!, distance: d };
    });
  });
  return best;
}
