import { renderToStaticMarkup } from "react-dom/server";
import { describe, expect, it } from "vitest";
import { BodePlot } from "../../../../renderer/plots/BodePlot";
import { bodeModel, MARGIN_FONT, type BodeSeries } from "../../../../renderer/plots/bodeModel";
import { boxesOverlap, boxInside, textSize, type Box } from "../../../../renderer/plots/labelPlacement";

const freqs = Array.from({ length: 401 }, (_, k) => 10 ** (-2 + (4 * k) / 400));

/**
 * L(s) = K / (s (s + 1)²): phase −90° − 2·atan ω, so the phase crosses −180° at ω = 1 rad/s for
 * every K, where |L| = K/2 (gain margin 20·log10(2/K) dB); the gain crossover solves
 * K = ω (1 + ω²) (bisection here). Derived by hand from the transfer function.
 */
function loop(name: string, K: number): BodeSeries {
  let lo = 1e-6, hi = 1e3;
  for (let i = 0; i < 200; i++) {
    const mid = Math.sqrt(lo * hi);
    if (mid * (1 + mid * mid) < K) lo = mid; else hi = mid;
  }
  const wc = Math.sqrt(lo * hi);
  const phase = (w: number) => -90 - (2 * Math.atan(w) * 180) / Math.PI;
  return {
    name,
    frequency: freqs,
    magnitudeDb: freqs.map((w) => 20 * Math.log10(K) - 20 * Math.log10(w) - 20 * Math.log10(1 + w * w)),
    phaseDeg: freqs.map(phase),
    margins: { gainDb: 20 * Math.log10(2 / K), phaseDeg: 180 + phase(wc), gainCrossover: wc, phaseCrossover: 1 },
  };
}

const CASES: { what: string; series: BodeSeries[] }[] = [
  // The worst case: four loops drawn on top of each other, every mark at the same place.
  { what: "four identical loops", series: ["A", "B", "C", "D"].map((n) => loop(`Variant ${n}`, 0.5)) },
  // Same phase crossover (1 rad/s) for all: the gain-margin labels compete for one x.
  { what: "four gains, one phase crossover", series: [0.4, 0.6, 0.8, 1.2].map((K, i) => loop(`Variant ${i + 1}`, K)) },
];

const SIZES = [
  { width: 500, height: 440 }, // the comparison's Bode plot
  { width: 640, height: 520 }, // BodePlot's default
];

function expectClearAndInside(boxes: readonly { box: Box; panel: string }[], panels: Record<string, Box>) {
  for (let i = 0; i < boxes.length; i++) {
    expect(boxInside(boxes[i]!.box, panels[boxes[i]!.panel]!), `label ${i} inside its panel`).toBe(true);
    for (let j = i + 1; j < boxes.length; j++) {
      expect(boxesOverlap(boxes[i]!.box, boxes[j]!.box), `labels ${i} and ${j} overlap`).toBe(false);
    }
  }
}

describe("margin labels of a Bode plot with up to four series", () => {
  for (const { what, series } of CASES) {
    for (const { width, height } of SIZES) {
      it(`places all eight labels inside their panels and clear of each other: ${what}, ${width}×${height}`, () => {
        const top = 40, gap = 18, bottom = 46;
        const panelHeight = (height - top - gap - bottom) / 2;
        const model = bodeModel({ series, width, top, panelHeight, gap, left: 62, right: 16 });
        expect(model.marks).toHaveLength(8);
        expect(model.labels).toHaveLength(8);
        const panels = {
          magnitude: { x: 62, y: model.magnitude.top, width: model.width, height: model.magnitude.height },
          phase: { x: 62, y: model.phase.top, width: model.width, height: model.phase.height },
        };
        expectClearAndInside(model.labels, panels);
        // Every label keeps its text and names its series once per panel.
        for (const panel of ["magnitude", "phase"] as const) {
          expect(model.labels.filter((l) => l.panel === panel).map((l) => l.seriesIndex).sort()).toEqual([0, 1, 2, 3]);
        }
      });
    }

    it(`draws the labels of the rendered SVG where the layout put them, none intersecting: ${what}`, () => {
      const html = renderToStaticMarkup(<BodePlot series={series} width={500} height={440} />);
      const texts = [...html.matchAll(/<text class="lw-margin-label lw-margin-label-(gain|phase)" x="([^"]+)" y="([^"]+)"[^>]*>([^<]+)<\/text>/g)];
      expect(texts).toHaveLength(8);
      // Panels from the clip rectangles the plot draws its curves in.
      const rect = (key: string): Box => {
        const m = new RegExp(`<clipPath id="[^"]+-${key}"><rect x="([^"]+)" y="([^"]+)" width="([^"]+)" height="([^"]+)"`).exec(html)!;
        return { x: Number(m[1]), y: Number(m[2]), width: Number(m[3]), height: Number(m[4]) };
      };
      const panels = { magnitude: rect("magnitude"), phase: rect("phase") };
      // Text box from the drawn start and baseline, by the same font estimate the layout uses.
      const boxes = texts.map(([, kind, x, y, text]) => {
        const size = textSize(text!.replace(/&#x27;/g, "'"), MARGIN_FONT);
        return { panel: kind === "gain" ? "magnitude" : "phase", box: { x: Number(x) - 1, y: Number(y) - MARGIN_FONT * 0.9, width: size.width, height: size.height } };
      });
      expectClearAndInside(boxes, panels);
      expect(html).not.toMatch(/NaN/);
    });
  }

  it("leaves out the label of a mark outside the visible frequency range rather than pinning it to the edge", () => {
    const series = [loop("Variant A", 0.5)];
    const model = bodeModel({ series, width: 500, top: 40, panelHeight: 160, gap: 18, left: 62, right: 16, frequencyView: [2, 100] });
    // The phase crossover (1 rad/s) is left of the view; the gain crossover (about 0.4 rad/s) too.
    expect(model.marks.every((m) => m.frequency < 2)).toBe(true);
    expect(model.labels).toEqual([]);
  });
});
