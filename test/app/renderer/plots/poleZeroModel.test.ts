import { describe, expect, it } from "vitest";
import { MIN_LABEL_GAP, poleZeroDomain, poleZeroModel, ZETA_GUIDES } from "../../../../renderer/plots/poleZeroModel";
import { expectAtMost, expectRelativeClose } from "../../../helpers/assertions";

const margins = { top: 20, right: 10, bottom: 40, left: 50 };

/** Numbers of an SVG path's absolute M/L commands, as [x, y] pairs. */
function pathPoints(d: string): [number, number][] {
  return [...d.matchAll(/[ML](-?[\d.]+),(-?[\d.]+)/g)].map((m) => [Number(m[1]), Number(m[2])]);
}

describe("continuous-time pole-zero map", () => {
  const model = poleZeroModel({
    series: [{ name: "A", poles: [{ re: -1, im: 2 }, { re: -1, im: -2 }, { re: -4, im: 0 }], zeros: [{ re: -2, im: 0 }] }],
    width: 460, height: 360, margins,
  });

  it("uses the same scale on both axes, so circles stay round", () => {
    const ux = model.x(1) - model.x(0);
    const uy = model.y(0) - model.y(1);
    expectRelativeClose(ux, uy, 1e-12, "pixels per unit");
  });

  it("shows every pole and zero and the origin inside the plot area", () => {
    for (const p of [...model.series[0]!.poles, ...model.series[0]!.zeros]) {
      expect(p.x).toBeGreaterThanOrEqual(model.plot.left);
      expect(p.x).toBeLessThanOrEqual(model.plot.left + model.plot.width);
      expect(p.y).toBeGreaterThanOrEqual(model.plot.top);
      expect(p.y).toBeLessThanOrEqual(model.plot.top + model.plot.height);
    }
  });

  it("draws the ζ rays at angle arccos ζ from the negative real axis, through the origin", () => {
    const rays = model.guides.filter((g) => g.kind === "zeta");
    expect(rays.map((r) => r.value)).toEqual(ZETA_GUIDES);
    for (const ray of rays) {
      const [end, origin] = pathPoints(ray.path);
      expectAtMost(Math.abs(origin![0] - model.x(0)) + Math.abs(origin![1] - model.y(0)), 0.02, `ray ζ=${ray.value} passes the origin`);
      const re = model.x.invert(end![0]);
      const im = model.y.invert(end![1]);
      // Damping ratio of s = re + j im is −re/|s| (definition); paths are rounded to 0.01 px.
      expectRelativeClose(-re / Math.hypot(re, im), ray.value, 1e-3, `ζ of ray end`);
      expect(["", `ζ ${ray.value}`]).toContain(ray.label);
      // Labels lie inside the plot area, on one circle about the origin.
      expect(ray.labelX).toBeGreaterThanOrEqual(model.plot.left);
      expect(ray.labelY).toBeGreaterThanOrEqual(model.plot.top);
    }
    const radii = rays.map((r) => Math.hypot(model.x.invert(r.labelX), model.y.invert(r.labelY)));
    for (const r of radii) expectRelativeClose(r, radii[0]!, 1e-3, "label radius");
    // Kept labels keep their distance; ζ = 0.9 (the widest-spaced) is always labelled.
    const kept = rays.filter((r) => r.label !== "");
    expect(kept.at(-1)!.value).toBe(0.9);
    for (let i = 1; i < kept.length; i++) {
      expect(Math.hypot(kept[i]!.labelX - kept[i - 1]!.labelX, kept[i]!.labelY - kept[i - 1]!.labelY)).toBeGreaterThanOrEqual(MIN_LABEL_GAP);
    }
  });

  it("draws natural-frequency circles as left half circles of radius ωn, labelled with ωn", () => {
    const circles = model.guides.filter((g) => g.kind === "wn");
    expect(circles.length).toBeGreaterThanOrEqual(2);
    for (const c of circles) {
      const m = c.path.match(/^M(-?[\d.]+),(-?[\d.]+)A(-?[\d.]+),(-?[\d.]+) 0 0,0 (-?[\d.]+),(-?[\d.]+)$/);
      expect(m, c.path).not.toBeNull();
      expectRelativeClose(model.y.invert(Number(m![2])), c.value, 1e-3, "start at +jωn");
      expectRelativeClose(model.y.invert(Number(m![6])), -c.value, 1e-3, "end at −jωn");
      expectRelativeClose(Number(m![3]) / (model.x(1) - model.x(0)), c.value, 1e-3, "radius");
      expect(c.label).toMatch(/^ωn /);
    }
  });

  it("marks zeros separately from poles", () => {
    expect(model.series[0]!.poles).toHaveLength(3);
    expect(model.series[0]!.zeros).toHaveLength(1);
    expect(model.series[0]!.zeros[0]!.re).toBe(-2);
  });

  it("offers drag handles only for real poles and upper pair members, and only when asked", () => {
    expect(model.series[0]!.poles.some((p) => p.draggable)).toBe(false);
    const dragModel = poleZeroModel({ series: [{ name: "A", poles: [{ re: -1, im: 2 }, { re: -1, im: -2 }, { re: -4, im: 0 }] }], width: 460, height: 360, margins, draggable: true });
    expect(dragModel.series[0]!.poles.map((p) => p.draggable)).toEqual([true, false, true]);
  });

  it("skips non-finite poles instead of drawing them at NaN", () => {
    const m = poleZeroModel({ series: [{ name: "A", poles: [{ re: NaN, im: 0 }, { re: -1, im: 0 }] }], width: 300, height: 300, margins });
    expect(m.series[0]!.poles).toHaveLength(1);
  });
});

describe("sampled-time pole-zero map", () => {
  const T = 0.1;
  const model = poleZeroModel({ series: [{ name: "A", poles: [{ re: 0.5, im: 0.5 }, { re: 0.5, im: -0.5 }] }], sampleTime: T, width: 400, height: 400, margins });

  it("always shows the whole unit circle", () => {
    const d = poleZeroDomain([{ name: "A", poles: [{ re: 0.1, im: 0 }] }], true);
    expect(d.x[0]).toBeLessThanOrEqual(-1);
    expect(d.x[1]).toBeGreaterThanOrEqual(1);
    const unit = model.guides.find((g) => g.kind === "unit")!;
    for (const [px, py] of pathPoints(unit.path)) {
      expectRelativeClose(Math.hypot(model.x.invert(px), model.y.invert(py)), 1, 2e-3, "|z| on the unit circle");
    }
  });

  it("draws constant-ζ curves as the images z = e^{sT} of the ζ rays", () => {
    for (const g of model.guides.filter((g) => g.kind === "zeta")) {
      const r = g.value / Math.sqrt(1 - g.value * g.value);
      for (const [px, py] of pathPoints(g.path)) {
        const re = model.x.invert(px), im = model.y.invert(py);
        const theta = Math.abs(Math.atan2(im, re));
        // On the ray sT = θ(−ζ/√(1−ζ²) + j): |z| = exp(−ζθ/√(1−ζ²)), arg z = θ (definition of the map).
        expectAtMost(Math.abs(Math.hypot(re, im) - Math.exp(-r * theta)), 0.01, `ζ=${g.value} point (${re}, ${im})`);
      }
    }
  });

  it("labels every other constant-ζ curve (0.1, 0.3, …, 0.9) so labels near z = 1 do not overlap", () => {
    const labelled = model.guides.filter((g) => g.kind === "zeta" && g.label !== "").map((g) => g.value);
    expect(labelled).toEqual([0.1, 0.3, 0.5, 0.7, 0.9]);
  });

  it("draws constant-ωn curves for ωn·T = kπ/10, each ending on the unit circle at angle ωn·T", () => {
    const curves = model.guides.filter((g) => g.kind === "wn");
    expect(curves).toHaveLength(9);
    curves.forEach((g, i) => {
      const wT = ((i + 1) * Math.PI) / 10;
      expectRelativeClose(g.value, wT / T, 1e-12, "ωn in rad/s");
      const pts = pathPoints(g.path);
      const upperEnd = pts[40]!; // 41 samples on the upper half, φ = π/2 last
      const re = model.x.invert(upperEnd[0]), im = model.y.invert(upperEnd[1]);
      expectAtMost(Math.abs(Math.hypot(re, im) - 1), 0.01, "end on |z| = 1");
      expectAtMost(Math.abs(Math.atan2(im, re) - wT), 0.02, "end angle ωn·T");
    });
  });
});
