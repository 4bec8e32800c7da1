import { afterEach, describe, expect, it } from "vitest";
import { closedLoopMatrix, createLocusController, lqrWeightLocusParams, nearestIndex, observerSpeedLocusParams, plantOfVariant, rootLocusParams, type WorkspaceStore } from "../../../../renderer/state/workspace";
import { expectRelativeClose } from "../../../helpers/assertions";
import { inProcessBridge, openDemoStore } from "./nonlinearTestSupport";

let store: WorkspaceStore | null = null;
afterEach(() => {
  store?.dispose();
  store = null;
});

const byRe = (a: { re: number; im: number }, b: { re: number; im: number }) => a.re - b.re || a.im - b.im;

describe("locus state", () => {
  it("the designed loop broken at the plant input gives back the designed closed-loop poles at gain 1", async () => {
    const bridge = inProcessBridge();
    store = await openDemoStore(bridge, "poles-continuous");
    const s = store.getState();
    const variant = s.document!.variants.find((v) => v.id === "poles-continuous")!;
    const locus = createLocusController(bridge);
    await locus.rootLocus.run(rootLocusParams("designed", plantOfVariant(s.document!, variant), variant, s.evaluation.result));
    expect(locus.rootLocus.getState().status).toBe("done");
    expect(locus.rootLocus.getState().result!.branches.length).toBe(2);
    await locus.pickGain(1);
    const poles = [...locus.getState().gainPick!.poles].sort(byRe);
    // The variant places −0.08 ± 0.06j (the demo document).
    const wanted = [{ re: -0.08, im: -0.06 }, { re: -0.08, im: 0.06 }];
    poles.forEach((p, i) => {
      expectRelativeClose(p.re, wanted[i]!.re, 1e-7, "re", 0.1);
      expectRelativeClose(p.im, wanted[i]!.im, 1e-7, "im", 0.1);
    });
    // At gain 0 the loop is open: the plant's poles −1/30 and −1/20 (hand-derived Jacobian).
    await locus.pickGain(0);
    const open = locus.getState().gainPick!.poles.map((p) => p.re).sort((a, b) => a - b);
    expectRelativeClose(open[0]!, -1 / 20, 1e-12, "fast plant pole");
    expectRelativeClose(open[1]!, -1 / 30, 1e-12, "slow plant pole");
    locus.dispose();
  });

  it("the plant loop refuses a model that is not single-input single-output, naming the sizes", () => {
    const doc = { plants: [{ id: "p", model: { type: "state-space", A: [[-1]], B: [[1, 2]], C: [[1]], sampleTime: null } }], variants: [] } as never;
    expect(() => rootLocusParams("plant", (doc as { plants: never[] }).plants[0], { id: "v", plant: "p" }, null)).toThrow(/2 inputs and 1 outputs/);
  });

  it("closed-loop matrix of u = −k·y includes the feedthrough: A − k·B·C/(1 + k·d)", () => {
    // 1×1 case by hand: a = −1, b = 2, c = 3, d = 0.5, k = 2 → −1 − 2·2·3/(1 + 1) = −7.
    expect(closedLoopMatrix({ A: [[-1]], B: [[2]], C: [[3]], D: [[0.5]] }, 2)).toEqual([[-7]]);
    expect(() => closedLoopMatrix({ A: [[-1]], B: [[2]], C: [[3]], D: [[-0.5]] }, 2)).toThrow(/not well posed/);
  });

  it("the LQR weight locus passes ρ = 1 and picking it shows the variant's own closed-loop poles", async () => {
    const bridge = inProcessBridge();
    store = await openDemoStore(bridge, "lqr-integral-robust");
    const s = store.getState();
    const variant = structuredClone(s.document!.variants.find((v) => v.id === "lqr-integral-robust")!);
    delete variant.integralAction; // the locus is of the state-feedback part
    const locus = createLocusController(bridge);
    const params = lqrWeightLocusParams(plantOfVariant(s.document!, variant), variant, s.evaluation.result);
    await locus.lqrLocus.run({ ...params, points: 201 });
    const result = locus.lqrLocus.getState().result!;
    locus.pickRho(1);
    const pick = locus.getState().rhoPick!;
    expect(pick.status).toBe("done");
    expect(Math.abs(Math.log10(pick.value))).toBeLessThan(0.05);
    expect(pick.poles.length).toBe(2);
    expect(pick.poles.every((p) => p.re < 0)).toBe(true);
    expect(result.rho[nearestIndex(result.rho, 1)]).toBe(pick.value);
    locus.dispose();
  });

  it("the observer speed locus puts the poles at factor·(nominal poles)", async () => {
    const bridge = inProcessBridge();
    store = await openDemoStore(bridge, "poles-continuous");
    const s = store.getState();
    const variant = s.document!.variants.find((v) => v.id === "poles-continuous")!;
    const locus = createLocusController(bridge);
    const params = observerSpeedLocusParams(plantOfVariant(s.document!, variant), variant, s.evaluation.result);
    expect(params.nominalFrom).toMatch(/twice the state-feedback poles/);
    await locus.observerLocus.run(params);
    locus.pickFactor(2);
    const pick = locus.getState().factorPick!;
    const poles = [...pick.poles].sort(byRe);
    // Nominal observer poles 2·(−0.08 ± 0.06j), scaled by the picked factor (definition of the sweep).
    const f = pick.value;
    expectRelativeClose(poles[0]!.re, -0.16 * f, 1e-6, "re");
    expectRelativeClose(Math.abs(poles[0]!.im), 0.12 * f, 1e-6, "im");
    locus.dispose();
  });

  it("picking before any locus is computed says what to do instead of showing poles", async () => {
    const locus = createLocusController(inProcessBridge());
    await locus.pickGain(2);
    expect(locus.getState().gainPick!.error).toMatch(/Compute the root locus first/);
    locus.pickRho(1);
    expect(locus.getState().rhoPick!.error).toMatch(/weight locus first/);
  });
});
