import { describe, expect, it } from "vitest";
import { boxesOverlap, boxInside, type Box } from "../../../../renderer/plots/labelPlacement";
import { glyphBox, LABEL_GAP, poleZeroDomain, poleZeroModel, rayEndLabelCentre, ZETA_GUIDES, type PoleZeroModel } from "../../../../renderer/plots/poleZeroModel";
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
    }
  });

  it("labels each ζ ray at its outer end, just inside the frame, on the ray, without overlaps", () => {
    checkZetaLabels(model);
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
      expect(["", `ωn ${c.label.slice(3)}`]).toContain(c.label);
    }
    expect(circles.filter((c) => c.label !== "").length).toBeGreaterThanOrEqual(2);
  });

  it("keeps ωn labels inside the frame, clear of every ζ label, on the half opposite them", () => {
    checkAllLabelsApart(model);
    for (const c of model.guides.filter((g) => g.kind === "wn" && g.label !== "")) expect(model.y.invert(c.labelBox!.y)).toBeLessThan(0);
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

/** Plot area of a model as a box. */
const frameOf = (m: PoleZeroModel): Box => ({ x: m.plot.left, y: m.plot.top, width: m.plot.width, height: m.plot.height });

/** Kept ζ labels: inside the frame, touching its inset edge (outer end of the ray), centred on the ray, apart. */
function checkZetaLabels(m: PoleZeroModel) {
  const frame = frameOf(m);
  const kept = m.guides.filter((g) => g.kind === "zeta" && g.label !== "");
  expect(kept.length).toBeGreaterThanOrEqual(3);
  expect(kept.map((g) => g.value)).toContain(0.9);
  const ox = m.x(0), oy = m.y(0);
  for (const g of kept) {
    const b = g.labelBox!;
    expect(boxInside(b, frame), `ζ ${g.value} inside`).toBe(true);
    // Outer end: the box sits 2 units from the left or top edge of the frame.
    const fromEdge = Math.min(b.x - frame.x, b.y - frame.y);
    expectAtMost(Math.abs(fromEdge - 2), 0.01, `ζ ${g.value} box against the frame edge`);
    // The box centre lies on the ray: its damping ratio −Re/|s| is the label's ζ.
    const re = m.x.invert(b.x + b.width / 2), im = m.y.invert(b.y + b.height / 2);
    expectRelativeClose(-re / Math.hypot(re, im), g.value, 1e-6, `ζ ${g.value} label on its ray`);
    // And far from the origin, where the rays meet.
    expect(Math.hypot(b.x + b.width / 2 - ox, b.y + b.height / 2 - oy)).toBeGreaterThan(0.5 * Math.min(ox - frame.x, oy - frame.y));
  }
  for (let i = 0; i < kept.length; i++) for (let j = i + 1; j < kept.length; j++) {
    expect(boxesOverlap(kept[i]!.labelBox!, kept[j]!.labelBox!, LABEL_GAP), `ζ ${kept[i]!.value} vs ζ ${kept[j]!.value}`).toBe(false);
  }
}

/** Every drawn guide label is inside the frame, clear of every pole and zero glyph, and no two overlap. */
function checkAllLabelsApart(m: PoleZeroModel) {
  const frame = frameOf(m);
  const labelled = m.guides.filter((g) => g.label !== "");
  const glyphs = m.series.flatMap((s) => [...s.poles, ...s.zeros]).map((p) => glyphBox(p.x, p.y));
  for (const g of labelled) {
    expect(boxInside(g.labelBox!, frame), `${g.label} inside`).toBe(true);
    for (const b of glyphs) expect(boxesOverlap(g.labelBox!, b), `${g.label} over a pole or zero`).toBe(false);
  }
  for (let i = 0; i < labelled.length; i++) for (let j = i + 1; j < labelled.length; j++) {
    expect(boxesOverlap(labelled[i]!.labelBox!, labelled[j]!.labelBox!), `${labelled[i]!.label} vs ${labelled[j]!.label}`).toBe(false);
  }
}

describe("pole-zero guide labels", () => {
  it("finds the last centre on a ray where a box still fits inside the frame", () => {
    const frame = { x: 0, y: 0, width: 100, height: 100 };
    // Ray going left from (80, 50): the 20 × 10 box centre stops 2 + 10 from the left edge.
    expect(rayEndLabelCentre(80, 50, -1, 0, 20, 10, frame)).toEqual({ x: 12, y: 50 });
    // Going up-left at 45°: the wide box meets the left inset (10 + 2) before the top one (5 + 2).
    const c = rayEndLabelCentre(80, 80, -Math.SQRT1_2, -Math.SQRT1_2, 20, 10, frame)!;
    expectAtMost(Math.abs(c.x - 12), 1e-9, "left inset");
    expectAtMost(Math.abs(c.y - 12), 1e-9, "on the diagonal");
    // Steeper (mostly up): the top inset is reached first.
    const up = rayEndLabelCentre(80, 90, -0.6, -0.8, 20, 10, frame)!;
    expectAtMost(Math.abs(up.y - 7), 1e-9, "top inset");
    // A ray that leaves the frame without ever holding the box.
    expect(rayEndLabelCentre(150, 50, 1, 0, 20, 10, frame)).toBeNull();
  });

  it("keeps labels apart on the sheet's map (a pair near the origin, two plant poles)", () => {
    const m = poleZeroModel({
      series: [
        { name: "closed loop", poles: [{ re: -0.08, im: 0.06 }, { re: -0.08, im: -0.06 }] },
        { name: "plant", poles: [{ re: -0.05, im: 0 }, { re: -0.03, im: 0 }] },
      ],
      width: 640, height: 400, margins: { top: 50, right: 16, bottom: 46, left: 58 },
    });
    checkZetaLabels(m);
    checkAllLabelsApart(m);
  });

  it("drops crowded ζ labels on a small map but never overlaps", () => {
    const m = poleZeroModel({ series: [{ name: "A", poles: [{ re: -0.2, im: 5 }, { re: -0.2, im: -5 }] }], width: 220, height: 260, margins });
    const zeta = m.guides.filter((g) => g.kind === "zeta");
    expect(zeta.some((g) => g.label === "")).toBe(true);
    checkAllLabelsApart(m);
  });

  it("labels the lower half when only the lower half plane is in view", () => {
    const m = poleZeroModel({ series: [{ name: "A", poles: [{ re: -1, im: 0 }] }], width: 400, height: 300, margins, view: { x: [-3, 1], y: [-3, -0.5] } });
    const kept = m.guides.filter((g) => g.kind === "zeta" && g.label !== "");
    expect(kept.length).toBeGreaterThan(0);
    for (const g of kept) expect(m.y.invert(g.labelBox!.y + g.labelBox!.height / 2)).toBeLessThan(0);
    checkAllLabelsApart(m);
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

  it("keeps every guide label inside the frame, off the poles, and apart from the others", () => {
    checkAllLabelsApart(model);
    expect(model.guides.filter((g) => g.kind === "wn" && g.label !== "").length).toBeGreaterThanOrEqual(5);
    const crowded = poleZeroModel({ series: [{ name: "A", poles: [{ re: 0.96, im: 0.04 }, { re: 0.96, im: -0.04 }, { re: -0.95, im: 0 }] }], sampleTime: 1, width: 640, height: 300, margins });
    checkAllLabelsApart(crowded);
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
