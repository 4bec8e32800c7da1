import { Matrix } from "ml-matrix";
import { describe, expect, it } from "vitest";
import { balance } from "../../../shared-engine/linalg/balance";
import { eigenvalues } from "../../../shared-engine/linalg/eigen";
import { generalizedEigenvalues, qz, type GeneralizedEigenvalue } from "../../../shared-engine/linalg/qz";
import { realSchur } from "../../../shared-engine/linalg/schur";
import { expectAtMost, expectRelativeClose, frobenius } from "../../helpers/assertions";
import qzFixtures from "../../fixtures/linalg/qz.json";
import eigenFixtures from "../../fixtures/linalg/eigen.json";
import {
  absoluteBound, backwardError, BACKWARD_ERROR_CONSTANT, chordalBound, chordalDistance, preciseFixture,
  preciseMatrices, precisePencils, type Pair, type PreciseMatrix, type PrecisePencil,
} from "./eigenPreciseReference";

// References: test/fixtures/linalg/eigen_precise.json, made by generate_eigen_precise.py with
// mpmath at ≥ 60 digits from the inputs of qz.json (generate_qz.py) and eigen.json
// (generate_eigen.py). Bounds: first-order perturbation bounds with backward error
// η = 300·n·ε (constant and references in eigenPreciseReference.ts).

interface QzInput { name: string; A: number[][]; E: number[][] }
interface EigenInput { name: string; A: number[][] }
const qzInputs = qzFixtures.cases as unknown as QzInput[];
const eigenInputs = eigenFixtures.cases as unknown as EigenInput[];
const toPair = (ev: GeneralizedEigenvalue): Pair | null => (ev.infinite ? null : [ev.value!.re, ev.value!.im]);
const fmt = (v: Pair | null): string => (v === null ? "∞" : `${v[0]}${v[1] >= 0 ? "+" : ""}${v[1]}i`);

/** The precise eigenvalues within the chordal bound of ∞: infinite up to the backward error. */
const infiniteWithinBackwardError = (p: PrecisePencil) =>
  p.eigenvalues.filter((ev) => ev.exactlyInfinite || ev.chordalToInfinity <= chordalBound(p, ev));

/**
 * Pairs each precise eigenvalue (largest condition first) with the nearest unused computed one
 * in the chordal metric, then checks the chordal bound for every pair and the absolute bound
 * for finite pairs; exactly infinite eigenvalues must be reported infinite, and the infinite
 * count must be admissible (expectInfiniteCountAdmissible).
 */
function expectWithinPencilBounds(p: PrecisePencil, computed: (Pair | null)[], what: string): void {
  expect(computed.length, `${what}: count`).toBe(p.n);
  const unused = [...computed];
  const order = [...p.eigenvalues].sort((a, b) => b.conditionChordal - a.conditionChordal);
  for (const ev of order) {
    let best = 0;
    for (let k = 1; k < unused.length; k++) {
      if (chordalDistance(unused[k]!, ev.value) < chordalDistance(unused[best]!, ev.value)) best = k;
    }
    const got = unused.splice(best, 1)[0]!;
    const label = `${what}: computed ${fmt(got)} for precise ${fmt(ev.value)}`;
    expectAtMost(chordalDistance(got, ev.value), chordalBound(p, ev), `${label}, chordal distance`);
    const bound = absoluteBound(p, ev);
    if (got !== null && ev.value !== null && bound !== null) {
      expectAtMost(Math.hypot(got[0] - ev.value[0], got[1] - ev.value[1]), bound, `${label}, |λ̂ − λ|`);
    }
    if (ev.exactlyInfinite) expect(got, `${label}: an exactly infinite eigenvalue is reported infinite`).toBeNull();
  }
  expectInfiniteCountAdmissible(p, computed.filter((v) => v === null).length, what);
}

/**
 * Exactly infinite eigenvalues must be reported infinite; finite ones farther from ∞ than their
 * chordal bound must be reported finite; in between (the huge eigenvalues of a rounded singular
 * E, or every eigenvalue of a pencil whose E is within the backward error of singular, as
 * "graded n=8") either report is within the bound.
 */
function expectInfiniteCountAdmissible(p: PrecisePencil, infinite: number, what: string): void {
  expect(infinite, `${what}: infinite count ≥ exactly infinite eigenvalues`).toBeGreaterThanOrEqual(p.eigenvalues.filter((ev) => ev.exactlyInfinite).length);
  expect(infinite, `${what}: infinite count ≤ eigenvalues within the backward error of ∞`).toBeLessThanOrEqual(infiniteWithinBackwardError(p).length);
}

describe("generalized eigenvalues against 60-digit references (generate_eigen_precise.py)", () => {
  it("covers every qz.json pencil and records its provenance", () => {
    expect(precisePencils.map((p) => p.name).sort()).toEqual(qzInputs.map((c) => c.name).sort());
    expect(preciseFixture.mpmath).toMatch(/^\d+\.\d+/);
    // The scipy values it judges are those of the qz.json the tests read.
    expect(preciseFixture.inputs["qz.json"].scipy).toBe(qzFixtures.scipy);
    expect(preciseFixture.inputs["eigen.json"].numpy).toBe(eigenFixtures.numpy);
    for (const p of precisePencils) {
      expect(p.dps, p.name).toBeGreaterThanOrEqual(60);
      // The reference agrees with its own higher-precision Rayleigh quotient and has a tiny
      // residual (both relative): it is exact for the tests' purposes.
      expectAtMost(p.referenceChange, 1e-40, `${p.name}: reference change at dps + 20`);
      expectAtMost(p.referenceResidual, 1e-40, `${p.name}: reference residual`);
    }
  });

  for (const p of precisePencils) {
    const input = qzInputs.find((c) => c.name === p.name)!;

    it(`qz and generalizedEigenvalues lie within 300·n·ε·κ of the precise eigenvalues of "${p.name}"`, () => {
      const A = new Matrix(input.A), E = new Matrix(input.E);
      // The reference was made from these very inputs (a stale fixture would change the norms).
      expectRelativeClose(frobenius(A), p.normA, 1e-14, `${p.name}: ‖A‖_F`);
      expectRelativeClose(frobenius(E), p.normE, 1e-14, `${p.name}: ‖E‖_F`);
      expectWithinPencilBounds(p, qz(A, E).eigenvalues.map(toPair), `${p.name} (qz)`);
      // generalizedEigenvalues skips Q and Z but is backward stable in the same way.
      expectWithinPencilBounds(p, generalizedEigenvalues(input.A, input.E).map(toPair), `${p.name} (generalizedEigenvalues)`);
    });

    it(`scipy's stored eigenvalues of "${p.name}" lie within the same bounds (the fixture is sound)`, () => {
      for (const ev of p.eigenvalues) {
        if (ev.scipyDeviation === null) continue;
        const what = `${p.name}: scipy ${fmt(ev.scipyValue)} vs precise ${fmt(ev.value)}`;
        expectAtMost(ev.scipyDeviation, absoluteBound(p, ev)!, `${what}, |λ_scipy − λ|`);
        expectAtMost(ev.scipyChordalDeviation!, chordalBound(p, ev), `${what}, chordal distance`);
      }
      expectInfiniteCountAdmissible(p, p.scipyInfiniteCount, `${p.name} (scipy)`);
    });
  }

  it("reports the rounded-singular E of qz.json as infinite eigenvalues even though they are finite and huge", () => {
    // E = U·diag(s)·Vᵀ with zero singular values, rounded to doubles, is not exactly singular:
    // its "infinite" eigenvalues are finite, |λ| ≈ 1e16..1e17, but within the chordal bound of ∞.
    const p = precisePencils.find((c) => c.name === "singular E n=10 rank=7")!;
    const huge = p.eigenvalues.filter((ev) => !ev.exactlyInfinite && ev.chordalToInfinity <= chordalBound(p, ev));
    expect(huge).toHaveLength(3);
    for (const ev of huge) expect(Math.hypot(...ev.value!)).toBeGreaterThan(1e15);
    const input = qzInputs.find((c) => c.name === p.name)!;
    expect(qz(new Matrix(input.A), new Matrix(input.E)).eigenvalues.filter((e) => e.infinite)).toHaveLength(3);
    // The descriptor chain's E = diag(1, 1, 2, 1, 0) is exactly singular: one exact ∞.
    expect(precisePencils.find((c) => c.name === "descriptor chain")!.eigenvalues.filter((ev) => ev.exactlyInfinite)).toHaveLength(1);
  });

  it("has informative bounds (below 1e-5·max(1, |λ|)) for every finite eigenvalue except those of \"graded n=8\"", () => {
    // Below 4e-9 relative except "graded n=5" (about 3e-6: normwise condition ~1e9).
    // graded n=8: E = D·E0·D with D = diag(10^-k) has σ_min(E) ≈ 3e-14, below the normwise
    // backward error 300·n·ε·‖E‖_F, so normwise every eigenvalue is within reach of ∞ and the
    // bound exceeds |λ|. There qz.test.ts's scipy comparison and qzGraded.test.ts's 1e-12 hold
    // our values (about 4e-14 off the precise ones; scipy's 1e-13).
    for (const p of precisePencils) {
      const relative = p.eigenvalues.filter((ev) => ev.value !== null && !infiniteWithinBackwardError(p).includes(ev))
        .map((ev) => absoluteBound(p, ev)! / Math.max(1, Math.hypot(...ev.value!)));
      if (p.name === "graded n=8") {
        expect(relative).toHaveLength(0);
        expect(p.eigenvalues.every((ev) => absoluteBound(p, ev)! > Math.hypot(...ev.value!))).toBe(true);
      } else {
        for (const r of relative) expectAtMost(r, 1e-5, `${p.name}: bound / max(1, |λ|)`);
      }
    }
  });

  it("states its backward error constant: 300·n·ε", () => {
    expect(BACKWARD_ERROR_CONSTANT).toBe(300);
    expect(backwardError(10)).toBe(3000 * Number.EPSILON);
  });
});

/**
 * Condition number of λ for the balanced B = D⁻¹PᵀAPD of `balance` (exact similarity):
 * x_B[i] = x[perm[i]]/scale[i], y_B[i] = y[perm[i]]·scale[i], y_Bᴴx_B = yᴴx.
 */
function balancedCondition(right: Pair[], left: Pair[], perm: Int32Array, scale: Float64Array): number {
  let nx = 0, ny = 0, re = 0, im = 0;
  for (let i = 0; i < right.length; i++) {
    const [xr, xi] = right[perm[i]!]!.map((v) => v / scale[i]!) as Pair;
    const [yr, yi] = left[perm[i]!]!.map((v) => v * scale[i]!) as Pair;
    nx += xr * xr + xi * xi;
    ny += yr * yr + yi * yi;
    re += yr * xr + yi * xi; // conj(y)·x
    im += yr * xi - yi * xr;
  }
  return Math.sqrt(nx) * Math.sqrt(ny) / Math.hypot(re, im);
}

/** Same greedy pairing as for pencils, absolute bound per eigenvalue from `boundOf`. */
function expectWithinOrdinaryBounds(m: PreciseMatrix, computed: { re: number; im: number }[], boundOf: (k: number) => number, what: string): void {
  expect(computed.length, `${what}: count`).toBe(m.n);
  const unused = [...computed];
  const order = m.eigenvalues.map((_, k) => k).sort((a, b) => m.eigenvalues[b]!.condition - m.eigenvalues[a]!.condition);
  for (const k of order) {
    const [re, im] = m.eigenvalues[k]!.value;
    let best = 0;
    const dist = (z: { re: number; im: number }): number => Math.hypot(z.re - re, z.im - im);
    for (let j = 1; j < unused.length; j++) if (dist(unused[j]!) < dist(unused[best]!)) best = j;
    const got = unused.splice(best, 1)[0]!;
    expectAtMost(dist(got), boundOf(k), `${what}: computed ${got.re}${got.im >= 0 ? "+" : ""}${got.im}i for precise ${fmt([re, im])}`);
  }
}

describe("ordinary eigenvalues against 60-digit references (generate_eigen_precise.py)", () => {
  it("covers eigen.json except the cases the generator names as skipped, with sound references", () => {
    const covered = preciseMatrices.map((m) => m.name);
    expect([...covered, ...Object.keys(preciseFixture.skipped)].sort()).toEqual(eigenInputs.map((c) => c.name).sort());
    for (const m of preciseMatrices) {
      expectAtMost(m.referenceChange, 1e-40, `${m.name}: reference change at dps + 20`);
      expectAtMost(m.referenceResidual, 1e-40, `${m.name}: reference residual`);
      // The stored unit vectors reproduce the stored condition (yᴴx = 1/condition).
      const identity = new Int32Array(m.n).map((_, i) => i);
      m.eigenvalues.forEach((ev, k) =>
        expectRelativeClose(balancedCondition(ev.right, ev.left, identity, new Float64Array(m.n).fill(1)), ev.condition, 1e-6, `${m.name}: condition ${k}`));
    }
  });

  for (const m of preciseMatrices) {
    const input = eigenInputs.find((c) => c.name === m.name)!;

    it(`realSchur's eigenvalues of "${m.name}" lie within 300·n·ε·‖A‖_F·κ of the precise ones`, () => {
      expectRelativeClose(frobenius(input.A), m.normA, 1e-14, `${m.name}: ‖A‖_F`);
      // realSchur does not balance: its backward error is relative to ‖A‖_F.
      const form = realSchur(new Matrix(input.A));
      expectWithinOrdinaryBounds(m, form.eigenvalues, (k) => backwardError(m.n) * m.eigenvalues[k]!.conditionAbsolute, `${m.name} (realSchur)`);
    });

    it(`eigenvalues of "${m.name}" lie within 300·n·ε·‖B‖_F·κ_B of the precise ones (B the balanced matrix)`, () => {
      // eigenvalues() runs the same Hessenberg–Francis iteration on B = D⁻¹PᵀAPD from
      // `balance` (exact), so its backward error is relative to ‖B‖_F, and the condition is B's.
      const { B, perm, scale } = balance(new Matrix(input.A));
      const normB = frobenius(B);
      const bound = (k: number): number => {
        const ev = m.eigenvalues[k]!;
        return backwardError(m.n) * normB * balancedCondition(ev.right, ev.left, perm, scale);
      };
      expectWithinOrdinaryBounds(m, eigenvalues(input.A), bound, `${m.name} (eigenvalues)`);
    });

    it(`numpy's stored eigenvalues of "${m.name}" lie within 300·n·ε·‖A‖_F·κ (the fixture is sound)`, () => {
      // numpy.linalg.eigvals balances too (its guarantee is for its own balanced matrix), yet
      // every stored value also meets the unbalanced bound.
      for (const ev of m.eigenvalues) {
        expectAtMost(ev.numpyDeviation, backwardError(m.n) * ev.conditionAbsolute, `${m.name}: numpy ${fmt(ev.numpyValue)} vs precise ${fmt(ev.value)}`);
      }
    });
  }
});
