import { describe, expect, it } from "vitest";
import fc from "fast-check";
import { createZeroPoleGain, realizeZeroPoleGain } from "../../../shared-engine/model";
import { eigenvalues } from "../../../shared-engine/linalg/eigen";
import { cdiv, cmul, csub, type Complex } from "../../../shared-engine/linalg/complex";
import { expectComplexSetsClose } from "../../helpers/assertions";
import { evaluateChannel, expectComplexClose, expectEngineError, TEST_POINTS } from "./modelTestUtils";

const c = (re: number, im = 0): Complex => ({ re, im });

function zpkAt(zeros: Complex[], poles: Complex[], gain: number, s: Complex): Complex {
  let v = c(gain);
  for (const z of zeros) v = cmul(v, csub(s, z));
  for (const p of poles) v = cdiv(v, csub(s, p));
  return v;
}

describe("createZeroPoleGain", () => {
  it("pairs conjugates, replacing nearly conjugate pairs by exact ones", () => {
    const zpk = createZeroPoleGain([], [c(-1, 2), c(-3), c(-1 + 1e-12, -2)], 1);
    expect(zpk.poles[0]).toEqual(c(-3));
    expect(zpk.poles[1]!.re).toBe(zpk.poles[2]!.re);
    expect(zpk.poles[1]!.im).toBe(-zpk.poles[2]!.im);
  });
  it("rejects an unpaired complex pole or zero", () => {
    expectEngineError(() => createZeroPoleGain([], [c(-1, 2)], 1), "invalid-argument", /poles\[0\] = -1\+2j has no conjugate partner/);
    expectEngineError(() => createZeroPoleGain([c(1, -1)], [c(-1), c(-2)], 1), "invalid-argument", /zeros\[0\] = 1-1j has no conjugate partner/);
    expectEngineError(() => createZeroPoleGain([], [c(-1, 2), c(-1, -2.1)], 1), "invalid-argument", /no conjugate partner/);
  });
  it("rejects improper data, NaN values and a non-finite gain", () => {
    expectEngineError(() => createZeroPoleGain([c(1), c(2)], [c(-1)], 1), "invalid-argument", /improper zero-pole-gain model \(2 zeros > 1 poles\)/);
    expectEngineError(() => createZeroPoleGain([], [c(NaN)], 1), "non-finite", /poles\[0\] is NaN/);
    expectEngineError(() => createZeroPoleGain([], [c(-1)], Infinity), "non-finite", /gain is Infinity/);
  });
});

describe("realizeZeroPoleGain", () => {
  it("realizes a model with a complex zero pair, real zero and mixed poles that matches k∏(s−z)/∏(s−p)", () => {
    const zeros = [c(-0.5, 3), c(-0.5, -3), c(2)];
    const poles = [c(-1, 1), c(-1, -1), c(-2), c(-4), c(-0.3)];
    const model = realizeZeroPoleGain(createZeroPoleGain(zeros, poles, 3.5));
    expect(model.A.rows).toBe(5);
    expectComplexSetsClose(eigenvalues(model.A), poles, 1e-13, "poles of the realization");
    for (const s of TEST_POINTS) expectComplexClose(evaluateChannel(model, s), zpkAt(zeros, poles, 3.5, s), 1e-13, "G(s)");
  });

  it("places a single real zero in an unused second-order section when there is no first-order one", () => {
    const zeros = [c(-5)];
    const poles = [c(-1, 1), c(-1, -1)];
    const model = realizeZeroPoleGain(createZeroPoleGain(zeros, poles, 2));
    for (const s of TEST_POINTS) expectComplexClose(evaluateChannel(model, s), zpkAt(zeros, poles, 2, s), 1e-14, "G(s)");
  });

  it("realizes a pure gain with no states and keeps the sample time", () => {
    const model = realizeZeroPoleGain(createZeroPoleGain([], [], -2, 0.01));
    expect(model.A.rows).toBe(0);
    expect(model.D.get(0, 0)).toBe(-2);
    expect(model.sampleTime).toBe(0.01);
  });

  it("matches k∏(s−z)/∏(s−p) for random proper data (property)", () => {
    const part = fc.integer({ min: -30, max: 30 }).map((k) => k / 10);
    const root = fc.record({ re: part, im: fc.integer({ min: 0, max: 30 }).map((k) => k / 10) });
    fc.assert(
      fc.property(fc.array(root, { minLength: 1, maxLength: 4 }), fc.array(root, { maxLength: 4 }), fc.integer({ min: 1, max: 50 }), (poleSeeds, zeroSeeds, g) => {
        const expand = (seeds: Complex[]): Complex[] => seeds.flatMap((r) => (r.im === 0 ? [c(r.re - 3.05)] : [c(r.re - 3.05, r.im), c(r.re - 3.05, -r.im)]));
        const poles = expand(poleSeeds);
        const zeros = expand(zeroSeeds).slice(0, poles.length);
        // drop an unpaired conjugate left by the slice
        const balanced = zeros.filter((z) => z.im === 0 || zeros.some((w) => w.re === z.re && w.im === -z.im));
        const model = realizeZeroPoleGain(createZeroPoleGain(balanced, poles, g / 10));
        expect(model.A.rows).toBe(poles.length);
        for (const s of TEST_POINTS) expectComplexClose(evaluateChannel(model, s), zpkAt(balanced, poles, g / 10, s), 1e-11, "G(s)");
      }),
      { seed: 9001, numRuns: 150 },
    );
  });
});
