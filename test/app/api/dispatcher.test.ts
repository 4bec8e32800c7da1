// Every model, analysis and design request of the bridge on a small case whose answer is known
// from outside the engine (hand-worked, textbook from memory, or a committed scipy fixture),
// plus the parameter checks (specific error kinds, the field named) and progress/cancellation.
import { readFileSync } from "node:fs";
import { describe, expect, it } from "vitest";
import { dispatch, type EngineMethod, type EngineResult, type RequestContext } from "../../../shared-engine/api";
import { ENGINE_METHODS } from "../../../shared-engine/api/contract";
import { requireFiniteResult } from "../../../shared-engine/api/handlerSupport";
import { EngineError } from "../../../shared-engine/errors";
import { expectAtMost, expectComplexSetsClose, expectMatrixClose, expectRelativeClose } from "../../helpers/assertions";

async function call<M extends EngineMethod>(method: M, params: unknown, context?: RequestContext): Promise<EngineResult<M>> {
  const result = (await dispatch(method, params, context)) as EngineResult<M>;
  // Results are plain JSON: a NaN or Infinity would not survive this round trip unchanged.
  expect(JSON.parse(JSON.stringify(result))).toEqual(result);
  return result;
}

async function failure(method: string, params: unknown, context?: RequestContext): Promise<EngineError> {
  try {
    await dispatch(method, params, context);
  } catch (error) {
    expect(error).toBeInstanceOf(EngineError);
    return error as EngineError;
  }
  throw new Error(`${method} was expected to fail`);
}

const re = (...values: number[]) => values.map((v) => ({ re: v, im: 0 }));
// L(s) = 1/(s(s+1)(s+2)) in controller form (hand-worked: s³ + 3s² + 2s).
const TYPE1_LOOP = { A: [[0, 1, 0], [0, 0, 1], [0, -2, -3]], B: [[0], [0], [1]], C: [[1, 0, 0]] };

describe("bridge model requests", () => {
  it("realizes 1/(s²+3s+2) in controller form with poles −1 and −2", async () => {
    const r = await call("model.fromTransferFunction", { numerator: [1], denominator: [1, 3, 2], balance: false });
    // Controller canonical form (Kailath, "Linear Systems" §2.1, from memory).
    expectMatrixClose(r.model.A, [[-3, -2], [1, 0]], 0, "A");
    expectMatrixClose(r.model.B, [[1], [0]], 0, "B");
    expectMatrixClose(r.model.C, [[0, 1]], 0, "C");
    expectComplexSetsClose(r.poles, re(-1, -2), 1e-14); // roots of s²+3s+2 (hand-worked)
    expect(r.diagnostics.warnings).toEqual([]);
  });

  it("realizes a 2×1 transfer matrix whose DC gains are 1/2 and 1/3", async () => {
    const r = await call("model.fromTransferFunction", { numerator: [[[1]], [[1]]], denominator: [[[1, 2]], [[1, 3]]] });
    const g = await call("analysis.poles", { model: r.model });
    expectMatrixClose(g.dcGain.gain!, [[1 / 2], [1 / 3]], 1e-15, "G(0)"); // 1/(s+2), 1/(s+3) at s = 0 (hand-worked)
    expect(r.diagnostics.warnings.join(" ")).toMatch(/not minimal/);
  });

  it("realizes (s+3)/((s+1)(s+2)) from zeros, poles and gain with DC gain 1.5", async () => {
    const r = await call("model.fromZeroPoleGain", { zeros: [{ re: -3, im: 0 }], poles: [-1, -2], gain: 1 });
    const g = await call("analysis.poles", { model: r.model });
    expectRelativeClose(g.dcGain.gain![0]![0]!, 1.5, 1e-15, "G(0)"); // 3/2 (hand-worked)
    expectComplexSetsClose(r.poles, re(-1, -2), 1e-14);
  });

  it("samples the double integrator by zero-order hold as [[1, T], [0, 1]], [T²/2; T]", async () => {
    const T = 0.1;
    const r = await call("model.discretize", { model: { A: [[0, 1], [0, 0]], B: [[0], [1]], C: [[1, 0]] }, period: T });
    // Textbook result e^{AT} = I + AT for nilpotent A (Franklin, Powell & Workman, from memory).
    expectMatrixClose(r.model.A, [[1, T], [0, 1]], 1e-15, "A_d");
    expectMatrixClose(r.model.B, [[T * T / 2], [T]], 1e-15, "B_d");
    expect(r.model.sampleTime).toBe(T);
    expect(r.method).toBe("zoh");
    expect(r.prewarpRadPerSec).toBeNull();
  });

  it("matches the scipy Tustin fixtures with and without prewarping", async () => {
    // test/fixtures/model/discretize.json, made by generate_discretize.py (scipy.signal.cont2discrete).
    const fixture = JSON.parse(readFileSync("test/fixtures/model/discretize.json", "utf8")) as {
      tustin: { A: number[][]; B: number[][]; C: number[][]; D: number[][]; F: number[][]; E: number[][]; T: number; prewarpRadPerSec: number | null; Ad: number[][]; Bd: number[][]; Cd: number[][]; Dd: number[][]; Fd: number[][]; Ed: number[][] }[];
    };
    for (const c of fixture.tustin) {
      const r = await call("model.discretize", {
        model: { A: c.A, B: c.B, C: c.C, D: c.D, F: c.F, E: c.E },
        period: c.T,
        method: "tustin",
        ...(c.prewarpRadPerSec !== null ? { prewarpRadPerSec: c.prewarpRadPerSec } : {}),
      });
      expectMatrixClose(r.model.A, c.Ad, 1e-13, "A_d");
      expectMatrixClose(r.model.B, c.Bd, 1e-13, "B_d");
      expectMatrixClose(r.model.C, c.Cd, 1e-13, "C_d");
      expectMatrixClose(r.model.D, c.Dd, 1e-13, "D_d");
      expectMatrixClose(r.model.F, c.Fd, 1e-13, "F_d");
      expectMatrixClose(r.model.E, c.Ed, 1e-13, "E_d");
    }
  });

  it("warns when the period is long against the fastest pole", async () => {
    const r = await call("model.discretize", { model: { A: [[-100]], B: [[1]], C: [[1]] }, period: 0.1 });
    expect(r.diagnostics.warnings.join(" ")).toMatch(/shorter period/);
  });
});

describe("bridge analysis requests", () => {
  it("reports poles, stability and DC gain of (s+1)(s+2)(s+3)", async () => {
    const r = await call("analysis.poles", { model: { A: [[0, 1, 0], [0, 0, 1], [-6, -11, -6]], B: [[0], [0], [6]], C: [[1, 0, 0]] } });
    expectComplexSetsClose(r.poles, re(-1, -2, -3), 1e-13); // roots of s³+6s²+11s+6 (textbook, from memory)
    expect(r.stability.stable).toBe(true);
    expectRelativeClose(r.dcGain.gain![0]![0]!, 1, 1e-14, "G(0)"); // 6/6 (hand-worked)
  });

  it("reports an unbounded DC gain as null with the reason", async () => {
    const r = await call("analysis.poles", { model: TYPE1_LOOP });
    expect(r.dcGain.gain).toBeNull();
    expect(r.dcGain.reason).toMatch(/s = 0/);
    expect(r.stability.marginal).toBe(true);
  });

  it("names the uncontrollable unstable mode of diag(−1, 2) with B = e₁", async () => {
    const r = await call("analysis.structure", { model: { A: [[-1, 0], [0, 2]], B: [[1], [0]], C: [[1, 1]] } });
    // Hand-worked: the second state is not reached by u, and its mode 2 is unstable.
    expect(r.controllable).toBe(false);
    expect(r.stabilizable).toBe(false);
    expect(r.observable).toBe(true);
    expectComplexSetsClose(r.uncontrollableModes, re(2), 1e-14);
    expect(r.diagnostics.warnings.join(" ")).toMatch(/not stabilizable/);
  });

  it("finds the zero at the origin of 1/(s+1) − 2/(s+2)", async () => {
    const r = await call("analysis.zeros", { model: { A: [[-1, 0], [0, -2]], B: [[1], [1]], C: [[1, -2]] } });
    // G = −s/((s+1)(s+2)) (hand-worked): one finite zero at 0 and one at infinity.
    expectComplexSetsClose(r.finite, re(0), 1e-14);
    expect(r.infiniteCount).toBe(1);
  });

  it("selects a channel for the zeros by 0-based indices", async () => {
    const model = { A: [[-1, 0], [0, -2]], B: [[1, 0], [0, 1]], C: [[1, 0], [1, 1]] };
    const r = await call("analysis.zeros", { model, inputs: [0], outputs: [1] });
    // Channel u1 → y2 is 1/(s+1) (hand-worked): no finite zero, the mode −2 is a decoupling zero.
    expect(r.finite).toEqual([]);
    expectComplexSetsClose(r.decouplingZeros, re(-2), 1e-14);
  });

  it("puts [[0, 1], [−5, −2]] in real modal form [[−1, 2], [−2, −1]] with A·T = T·Λ", async () => {
    const A = [[0, 1], [-5, -2]];
    const r = await call("analysis.modalForm", { model: { A, B: [[0], [1]], C: [[1, 0]] } });
    expectMatrixClose(r.model.A, [[-1, 2], [-2, -1]], 1e-14, "Λ"); // eigenvalues −1 ± 2j (hand-worked)
    const T = r.T;
    const AT = A.map((row) => [0, 1].map((j) => row[0]! * T[0]![j]! + row[1]! * T[1]![j]!));
    const TL = T.map((row) => [0, 1].map((j) => row[0]! * r.model.A[0]![j]! + row[1]! * r.model.A[1]![j]!));
    expectMatrixClose(AT, TL, 1e-14, "A·T − T·Λ");
    expect(r.coupling.modes).toHaveLength(1);
    expectRelativeClose(r.coupling.modes[0]!.participation.reduce((s, x) => s + x, 0), 1, 1e-14, "Σ participation");
    expect(r.diagnostics.residual).toBe(r.residual);
  });

  it("reports a defective A as a singular modal form", async () => {
    const e = await failure("analysis.modalForm", { model: { A: [[0, 1], [0, 0]], B: [[0], [1]], C: [[1, 0]] } });
    expect(e.kind).toBe("singular");
  });

  it("gives the Gramians 2 and 4.5 and Hankel value 3 for 3·2/(s+1)", async () => {
    const r = await call("analysis.gramians", { model: { A: [[-1]], B: [[2]], C: [[3]] } });
    // −2W + 4 = 0 and −2W + 9 = 0; σ = √(2·4.5) (hand-worked).
    expectRelativeClose(r.controllability[0]![0]!, 2, 1e-15, "W_c");
    expectRelativeClose(r.observability[0]![0]!, 4.5, 1e-15, "W_o");
    expectRelativeClose(r.hankelSingularValues[0]!, 3, 1e-15, "σ₁");
    expectAtMost(r.diagnostics.residual!, 1e-15, "Gramian residual");
  });

  it("evaluates 1/(s+1) at 1 rad/s as 0.5 − 0.5j, −3.01 dB, −45°", async () => {
    const r = await call("analysis.frequencyResponse", { model: { A: [[-1]], B: [[1]], C: [[1]] }, frequenciesRadPerSec: [1] });
    // 1/(1 + j) (hand-worked).
    expectRelativeClose(r.values[0]![0]![0]!.re, 0.5, 1e-15, "Re");
    expectRelativeClose(r.values[0]![0]![0]!.im, -0.5, 1e-15, "Im");
    expectRelativeClose(r.magnitudeDb[0]![0]![0]!, -10 * Math.log10(2), 1e-14, "dB");
    expectRelativeClose(r.phaseDeg[0]![0]![0]!, -45, 1e-14, "phase");
  });

  it("reports an integrator's value at ω = 0 as null and lists it as unbounded", async () => {
    const r = await call("analysis.frequencyResponse", { model: { A: [[0]], B: [[1]], C: [[1]] }, frequenciesRadPerSec: [0, 1] });
    expect(r.values[0]![0]![0]).toBeNull();
    expect(r.magnitudeDb[0]![0]![0]).toBeNull();
    expect(r.unbounded).toEqual([{ frequencyRadPerSec: 0, output: 0, input: 0 }]);
    expect(r.diagnostics.warnings.length).toBe(1);
  });

  it("builds an automatic grid when no frequencies are given", async () => {
    const r = await call("analysis.frequencyResponse", { model: { A: [[-1]], B: [[1]], C: [[1]] }, grid: { points: 50 } });
    expect(r.frequencyRadPerSec.length).toBeGreaterThanOrEqual(50);
  });

  it("gives gain margin 20·log10(3) at √2 rad/s for 2/(s(s+1)(s+2))", async () => {
    const r = await call("analysis.margins", { model: { ...TYPE1_LOOP, C: [[2, 0, 0]] } });
    // Hand-worked: ∠L = −180° at ω² = 2, where |L| = 2/(√2·√3·√6) = 1/3.
    expectRelativeClose(r.phaseCrossoverRadPerSec!, Math.SQRT2, 1e-12, "ω_pc");
    expectRelativeClose(r.gainMarginDb!, 20 * Math.log10(3), 1e-10, "GM");
    expect(r.closedLoopStable).toBe(true);
  });

  it("steps 1/(s+1) to 1 − e⁻ᵗ with rise time ln 9 and settling time ln 50", async () => {
    const r = await call("analysis.step", { model: { A: [[-1]], B: [[1]], C: [[1]] }, horizonSec: 10, points: 2001 });
    const k = r.time.indexOf(1);
    expectRelativeClose(r.outputs[0]![k]!, 1 - Math.exp(-1), 1e-14, "y(1)"); // hand-worked
    const m = r.metrics[0]!;
    // 10–90 % rise ln 9 and ±2 % settling ln 50 of a first-order lag (Ogata §5-3, from memory).
    expectRelativeClose(m.riseTimeSec!, Math.log(9), 1e-5, "rise");
    expectRelativeClose(m.settlingTimeSec!, Math.log(50), 1e-5, "settling");
    expect(m.overshootPct).toBe(0);
    expect(m.steadyStateValue).toBe(1);
    expect(r.stable).toBe(true);
  });

  it("reports an unstable step response with null metrics", async () => {
    const r = await call("analysis.step", { model: { A: [[1]], B: [[1]], C: [[1]] }, horizonSec: 2, points: 11 });
    expect(r.stable).toBe(false);
    expect(r.metrics[0]!.status).toBe("unstable");
    expect(r.metrics[0]!.settlingTimeSec).toBeNull();
  });

  it("traces the root locus of 1/(s(s+1)(s+2)) with crossings ±j√2 at k = 6, reporting progress", async () => {
    const events: number[] = [];
    const context: RequestContext = { isCancelled: () => false, reportProgress: (p) => events.push(p.fraction) };
    const r = await call("analysis.rootLocus", { model: TYPE1_LOOP }, context);
    // Routh array of s³ + 3s² + 2s + k: k = 6, ω = √2; centroid −1, angles 60/180/300°,
    // break point at the root −1 + 1/√3 of 3s² + 6s + 2 = 0 (Evans' rules; hand-worked).
    expect(r.crossings.length).toBe(2);
    for (const c of r.crossings) {
      expectRelativeClose(c.gain, 6, 1e-8, "crossing gain");
      expectRelativeClose(Math.abs(c.point.im), Math.SQRT2, 1e-7, "crossing frequency");
    }
    expectRelativeClose(r.asymptotes.centroid!, -1, 1e-14, "centroid");
    expect(r.asymptotes.anglesDeg.map((a) => Math.round(a))).toEqual([60, 180, 300]);
    const s = -1 + 1 / Math.sqrt(3);
    expect(r.breakPoints.length).toBe(1);
    expectRelativeClose(r.breakPoints[0]!.point.re, s, 1e-12, "break point");
    expectRelativeClose(r.breakPoints[0]!.gain, -s * (s + 1) * (s + 2), 1e-10, "break gain");
    expect(events[0]).toBe(0);
    expect(events[events.length - 1]).toBe(1);
  });

  it("traces one channel of a plant with several inputs when input and output are given", async () => {
    const model = { A: [[-1, 0], [0, -2]], B: [[1, 0], [0, 1]], C: [[1, 0], [0, 1]] };
    const r = await call("analysis.rootLocus", { model, input: 1, output: 1, pointsPerBranch: 20 });
    expectComplexSetsClose(r.openLoopPoles, re(-1, -2), 1e-14);
    const e = await failure("analysis.rootLocus", { model });
    expect(e.kind).toBe("invalid-argument");
  });

  it("stops a root locus that is cancelled before tracing", async () => {
    const e = await failure("analysis.rootLocus", { model: TYPE1_LOOP }, { isCancelled: () => true, reportProgress: () => undefined });
    expect(e.kind).toBe("cancelled");
  });
});

describe("bridge design requests", () => {
  it("places poles −2 ± 4j, −10 with K = [199, 55, 8]", async () => {
    const r = await call("design.placePoles", { A: [[0, 1, 0], [0, 0, 1], [-1, -5, -6]], B: [[0], [0], [1]], poles: [{ re: -2, im: 4 }, { re: -2, im: -4 }, -10] });
    // (s² + 4s + 20)(s + 10) = s³ + 14s² + 60s + 200 against s³ + 6s² + 5s + 1 (hand-worked).
    expectMatrixClose(r.K, [[199, 55, 8]], 1e-13, "K");
    expectAtMost(r.maxPoleError, 1e-12, "pole error");
    expect(r.diagnostics.condition).toBe(r.eigenvectorCondition);
  });

  it("places observer poles −10, −11 with L = [18; 54]", async () => {
    const r = await call("design.observerPoles", { A: [[0, 1], [-2, -3]], C: [[1, 0]], poles: [-10, -11] });
    // s² + (3 + l₁)s + (2 + 3l₁ + l₂) = s² + 21s + 110 (hand-worked).
    expectMatrixClose(r.L, [[18], [54]], 1e-13, "L");
  });

  it("solves the continuous Riccati equation of Benner–Laub–Mehrmann example 1", async () => {
    const r = await call("design.riccati", { kind: "continuous", A: [[0, 1], [0, 0]], B: [[0], [1]], Q: [[1, 0], [0, 2]], R: [[1]] });
    // Benner, Laub & Mehrmann (1995) CAREX example 1: X = [[2, 1], [1, 2]].
    expectMatrixClose(r.X, [[2, 1], [1, 2]], 1e-13, "X");
    expectAtMost(r.diagnostics.residual!, 1e-13, "residual");
    expect(r.diagnostics.conditionMeaning).toMatch(/U11/);
  });

  it("solves the discrete Riccati equation of Benner–Laub–Mehrmann example 15 (n = 2)", async () => {
    const r = await call("design.riccati", { kind: "discrete", A: [[0, 1], [0, 0]], B: [[0], [1]], Q: [[1, 0], [0, 1]], R: [[1]] });
    // Benner, Laub & Mehrmann (1995) DAREX example 15 with n = 2: X = diag(1, 2).
    expectMatrixClose(r.X, [[1, 0], [0, 2]], 1e-13, "X");
  });

  it("uses the cross weight N: X = √2 − 1 for a = 0, b = 1, q = 2, r = 1, n = 1", async () => {
    const r = await call("design.riccati", { kind: "continuous", A: [[0]], B: [[1]], Q: [[2]], R: [[1]], N: [[1]] });
    // Hand-worked: −(X + 1)² + 2 = 0, stabilizing root X = √2 − 1, K = X + 1 = √2.
    expectRelativeClose(r.X[0]![0]!, Math.SQRT2 - 1, 1e-14, "X");
    expectRelativeClose(r.K[0]![0]!, Math.SQRT2, 1e-14, "K");
  });

  it("designs the LQR of the double integrator with K = [1, 2] and at least 60° phase margin", async () => {
    const r = await call("design.lqr", { A: [[0, 1], [0, 0]], B: [[0], [1]], Q: [[1, 0], [0, 2]], R: [[1]] });
    expectMatrixClose(r.K, [[1, 2]], 1e-13, "K"); // K = BᵀX with X from CAREX example 1
    expect(r.margins!.phaseMarginDeg!).toBeGreaterThanOrEqual(60); // Safonov & Athans (1977) guarantee
    expect(r.margins!.upperGainMargin).toBeNull();
    expect(r.sampleTime).toBeNull();
  });

  it("designs the Kalman filter of the double integrator with L = [√2; 1]", async () => {
    const r = await call("design.kalman", { A: [[0, 1], [0, 0]], C: [[1, 0]], G: [[0], [1]], W: [[1]], V: [[1]] });
    // Dual of the LQR with Q = e₂e₂ᵀ, R = 1: P = [[√2, 1], [1, √2]] (hand-worked).
    expectMatrixClose(r.L, [[Math.SQRT2], [1]], 1e-13, "L");
    expect(r.form).toBe("continuous");
  });

  it("designs the scalar discrete current-form filter with P = golden ratio", async () => {
    const r = await call("design.kalman", { A: [[1]], C: [[1]], W: [[1]], V: [[1]], sampleTime: 1, form: "current" });
    // P² − P − 1 = 0 (hand-worked): P = (1 + √5)/2, M = P/(P + 1).
    const P = (1 + Math.sqrt(5)) / 2;
    expectRelativeClose(r.P[0]![0]!, P, 1e-14, "P");
    expectRelativeClose(r.M![0]![0]!, P / (P + 1), 1e-14, "M");
  });

  it("builds Bryson weights Q = diag(100, 0), R = 0.04 with null for an unweighted state", async () => {
    const r = await call("design.brysonWeights", { maxState: [0.1, null], maxInput: [5] });
    // Bryson & Ho (1975) §5.4: Qii = 1/xᵢ², Rjj = 1/uⱼ² (hand-worked values).
    expectMatrixClose(r.Q, [[100, 0], [0, 0]], 1e-15, "Q");
    expectMatrixClose(r.R, [[0.04]], 1e-15, "R");
    expect(r.diagnostics.warnings.length).toBe(1);
  });

  it("sweeps ρ with closed-loop poles −√(1 + 1/ρ), reporting progress per weight", async () => {
    const fractions: number[] = [];
    const rho = [1e-4, 1, 1e4];
    const r = await call("design.lqrSweep", { A: [[1]], B: [[1]], Q: [[1]], R: [[1]], rhoValues: rho }, { isCancelled: () => false, reportProgress: (p) => fractions.push(p.fraction) });
    // Hand-worked scalar CARE 2X − X²/ρ + 1 = 0: K = 1 + √(1 + 1/ρ), pole 1 − K.
    r.points.forEach((pt, i) => expectRelativeClose(pt.closedLoopPoles[0]!.re, -Math.sqrt(1 + 1 / rho[i]!), 1e-12, `pole at ρ = ${rho[i]}`));
    expect(fractions).toEqual([1 / 3, 2 / 3, 1]);
  });

  it("stops an LQR sweep between solves when cancelled", async () => {
    let solves = 0;
    const e = await failure("design.lqrSweep", { A: [[1]], B: [[1]], Q: [[1]], R: [[1]], rhoValues: [1, 2, 3, 4] }, {
      isCancelled: () => solves >= 2,
      reportProgress: () => { solves++; },
    });
    expect(e.kind).toBe("cancelled");
    expect(e.message).toMatch(/after 2 of 4/);
  });
});

describe("bridge parameter checks", () => {
  const plant = { A: [[0, 1], [0, 0]], B: [[0], [1]], C: [[1, 0]] };
  const cases: [string, string, unknown, string, string][] = [
    ["a negative period", "model.discretize", { model: plant, period: -1 }, "invalid-argument", "period"],
    ["an unknown discretization method", "model.discretize", { model: plant, period: 0.1, method: "foh" }, "invalid-argument", "method"],
    ["prewarping with zero-order hold", "model.discretize", { model: plant, period: 0.1, prewarpRadPerSec: 1 }, "invalid-argument", "prewarpRadPerSec"],
    ["an already sampled model", "model.discretize", { model: { ...plant, sampleTime: 0.1 }, period: 0.1 }, "invalid-argument", "model.sampleTime"],
    ["B with the wrong number of rows", "analysis.structure", { model: { A: plant.A, B: [[1]], C: plant.C } }, "shape-mismatch", "model.B"],
    ["a NaN entry in A", "analysis.poles", { model: { ...plant, A: [[0, Number.NaN], [0, 0]] } }, "non-finite", "model.A"],
    ["a text entry in C", "analysis.poles", { model: { ...plant, C: [[1, "0"]] } }, "invalid-argument", "model.C"],
    ["a missing model", "analysis.zeros", {}, "invalid-argument", "model"],
    ["an output index out of range", "analysis.zeros", { model: plant, outputs: [3] }, "invalid-argument", "outputs"],
    ["too many states", "analysis.poles", { model: { A: Array.from({ length: 501 }, () => new Array(501).fill(0)), B: [], C: [] } }, "invalid-argument", "model.A"],
    ["a negative frequency", "analysis.frequencyResponse", { model: plant, frequenciesRadPerSec: [-1] }, "invalid-argument", "frequenciesRadPerSec"],
    ["an unknown response source", "analysis.step", { model: plant, from: "noise" }, "invalid-argument", "from"],
    ["too many locus points", "analysis.rootLocus", { model: plant, pointsPerBranch: 1e6 }, "invalid-argument", "pointsPerBranch"],
    ["a missing Riccati kind", "design.riccati", { A: [[0]], B: [[1]], Q: [[1]], R: [[1]] }, "invalid-argument", "kind"],
    ["a non-square R", "design.lqr", { A: [[0]], B: [[1]], Q: [[1]], R: [[1, 2]] }, "shape-mismatch", "R"],
    ["a pole given as text", "design.placePoles", { A: [[0]], B: [[1]], poles: [{ re: "x", im: 0 }] }, "invalid-argument", "poles"],
    ["an empty pole list", "design.observerPoles", { A: [[0]], C: [[1]], poles: [] }, "empty", "poles"],
    ["a form for a continuous filter", "design.kalman", { A: [[0]], C: [[1]], W: [[1]], V: [[1]], form: "current" }, "invalid-argument", "form"],
    ["a zero sample time", "design.lqr", { A: [[0]], B: [[1]], Q: [[1]], R: [[1]], sampleTime: 0 }, "invalid-argument", "sampleTime"],
    ["an empty weight list", "design.lqrSweep", { A: [[1]], B: [[1]], Q: [[1]], R: [[1]], rhoValues: [] }, "empty", "rhoValues"],
    ["a negative weight", "design.lqrSweep", { A: [[1]], B: [[1]], Q: [[1]], R: [[1]], rhoValues: [-1] }, "invalid-argument", "rhoValues"],
    ["a text state limit", "design.brysonWeights", { maxState: ["big"], maxInput: [1] }, "invalid-argument", "maxState"],
    ["a text gain", "model.fromZeroPoleGain", { zeros: [], poles: [-1], gain: "2" }, "invalid-argument", "gain"],
    ["a numerator that is not a list", "model.fromTransferFunction", { numerator: 1, denominator: [1, 1] }, "invalid-argument", "numerator"],
  ];
  it.each(cases)("rejects %s (%s) with a specific kind naming the field", async (_what, method, params, kind, field) => {
    const e = await failure(method, params);
    expect(e.kind).toBe(kind);
    expect(e.details.field).toBe(field);
    expect(e.message).toContain(field.split(".").pop()!);
  });

  it("passes engine errors through with their kind (Gramians of an unstable model)", async () => {
    const e = await failure("analysis.gramians", { model: { A: [[1]], B: [[1]], C: [[1]] } });
    expect(e.kind).toBe("invalid-argument");
  });

  it("rejects params that are not an object for every method", async () => {
    for (const method of ENGINE_METHODS) {
      if (method === "engine.info") continue;
      const e = await failure(method, [1, 2]);
      expect(e.kind, method).toBe("invalid-argument");
    }
  });

  it("refuses to let a non-finite number cross the bridge, naming its path", () => {
    expect(() => requireFiniteResult({ a: [1, { b: Infinity }] }, "test.method")).toThrow(/result\.a\[1\]\.b is Infinity/);
    expect(requireFiniteResult({ a: [1, null] }, "test.method")).toEqual({ a: [1, null] });
  });
});
