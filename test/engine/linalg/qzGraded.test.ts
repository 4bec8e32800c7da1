import { Matrix } from "ml-matrix";
import { describe, expect, it } from "vitest";
import { generalizedEigenvalues, qz, type GeneralizedEigenvalue } from "../../../shared-engine/linalg/qz";
import { reflectorEntries, reflectorH } from "../../../shared-engine/linalg/qzKernels";
import { EPS, expectAtMost } from "../../helpers/assertions";
import gradedFixtures from "../../fixtures/linalg/qz_graded.json";
import qzFixtures from "../../fixtures/linalg/qz.json";
import { precisePencils, type Pair } from "./eigenPreciseReference";

// Accuracy of qz on graded pencils A = D·A0·D, E = D·E0·D, D = diag(g^k) (large entries at the
// top left). Normwise both LAPACK and qz are backward stable, which bounds nothing here (the
// normwise condition of these eigenvalues is up to 1e13); what decides the accuracy is whether
// every transformation keeps its rounding errors in proportion to the entries it touches.
// References: eigen_precise.json (generate_eigen_precise.py, mpmath ≥ 60 digits) for the two
// graded pencils of qz.json (generate_qz.py), and qz_graded.json (generate_qz_graded.py, mpmath
// at 60 + 2·(decimal range) digits, with scipy.linalg.eigvals' error recorded beside it).

interface GradedCase {
  name: string; n: number; A: number[][]; E: number[][]; eigenvalues: Pair[];
  referenceChange: number; scipyRelativeError: number | null;
}
interface QzInput { name: string; A: number[][]; E: number[][] }
const gradedCases = gradedFixtures.cases as unknown as GradedCase[];
const qzInputs = qzFixtures.cases as unknown as QzInput[];

/** Greedy pairing (each reference in turn takes the nearest unused computed value): max |λ̂ − λ|/|λ|. */
function worstRelativeError(computed: GeneralizedEigenvalue[], reference: Pair[], what: string): number {
  expect(computed.every((ev) => !ev.infinite), `${what}: every eigenvalue finite`).toBe(true);
  expect(computed.length, `${what}: count`).toBe(reference.length);
  const unused = computed.map((ev) => [ev.value!.re, ev.value!.im] as Pair);
  let worst = 0;
  for (const [re, im] of reference) {
    let best = 0;
    for (let k = 1; k < unused.length; k++) {
      if (Math.hypot(unused[k]![0] - re, unused[k]![1] - im) < Math.hypot(unused[best]![0] - re, unused[best]![1] - im)) best = k;
    }
    const [gre, gim] = unused.splice(best, 1)[0]!;
    worst = Math.max(worst, Math.hypot(gre - re, gim - im) / Math.hypot(re, im));
  }
  return worst;
}

describe("qz on graded pencils", () => {
  // scipy (LAPACK dggev) is 6.2e-12 off on "graded n=5" and 1.4e-13 on "graded n=8"
  // (eigen_precise.json); qz measured 1.3e-14 and 3.7e-14 (3.6e-10 before its right reflectors
  // were applied by their explicit entries).
  for (const name of ["graded n=5", "graded n=8"]) {
    it(`computes the eigenvalues of "${name}" (qz.json) within 1e-12 relative of the 60-digit reference`, () => {
      const p = precisePencils.find((c) => c.name === name)!;
      const input = qzInputs.find((c) => c.name === name)!;
      const reference = p.eigenvalues.map((ev) => ev.value!);
      const A = new Matrix(input.A), E = new Matrix(input.E);
      expectAtMost(worstRelativeError(qz(A, E).eigenvalues, reference, `${name} (qz)`), 1e-12, `${name}: qz relative error`);
      expectAtMost(worstRelativeError(generalizedEigenvalues(input.A, input.E), reference, `${name} (generalizedEigenvalues)`), 1e-12, `${name}: generalizedEigenvalues relative error`);
    });
  }

  it("has sound references in qz_graded.json (generate_qz_graded.py)", () => {
    expect(gradedCases).toHaveLength(12);
    for (const c of gradedCases) expectAtMost(c.referenceChange, 1e-40, `${c.name}: reference change at dps + 20`);
  });

  // Cases we do not meet, kept as known failures (STYLE §5). "graded n=8 total 1e-12": T's
  // trailing diagonal entries fall below ε·‖E‖_F, so the normwise tests of dhgeqz's structure
  // (T[j][j] ≤ ε·‖E‖_F deflated as zero, β ≤ n·ε·‖E‖_F reported infinite) report two of the
  // finite eigenvalues infinite; scipy (LAPACK) reports an infinite one too. Within the normwise
  // backward error that is admissible; a graded-aware (local) T test would be needed.
  const knownFailures: Record<string, string> = {
    "graded n=8 total 1e-12": "T's diagonal below ε·‖E‖_F: two finite eigenvalues reported infinite, as scipy reports one",
  };
  for (const c of gradedCases) {
    const known = knownFailures[c.name];
    (known ? it.fails : it)(`computes the eigenvalues of "${c.name}" within 2e-12 relative, and within 10× scipy's error${known ? ` (known failure: ${known})` : ""}`, () => {
      // Measured: 1e-14 … 1e-12 (scipy: 3e-14 … 0.7, or an infinite eigenvalue). The 1e-13 floor
      // of the scipy comparison: on mildly graded pencils scipy's single-shift sweeps (dhgeqz
      // takes one when the shifts are real) keep a little more than our double-shift ones
      // ("total 1e-4": ours up to 2.4e-13 in the generator's probe, scipy 3e-14).
      const err = worstRelativeError(qz(new Matrix(c.A), new Matrix(c.E)).eigenvalues, c.eigenvalues, c.name);
      expectAtMost(err, 2e-12, `${c.name}: qz relative error`);
      const scipyError = c.scipyRelativeError ?? Infinity;
      expectAtMost(err, 10 * Math.max(scipyError, 1e-13), `${c.name}: qz relative error against 10× scipy's (${scipyError.toExponential(1)})`);
    });
  }

  it("keeps the backward error and orthogonality bounds on the graded fixture pencils", () => {
    for (const c of gradedCases) {
      // Every case, the known failure too: its form is backward stable all the same.
      const A = new Matrix(c.A), E = new Matrix(c.E), n = c.n;
      const { S, T, Q, Z } = qz(A, E);
      const tol = 100 * n * EPS;
      expectAtMost(A.clone().sub(Q.mmul(S).mmul(Z.transpose())).norm("frobenius"), tol * A.norm("frobenius"), `${c.name}: ‖A − QSZᵀ‖_F`);
      expectAtMost(E.clone().sub(Q.mmul(T).mmul(Z.transpose())).norm("frobenius"), tol * E.norm("frobenius"), `${c.name}: ‖E − QTZᵀ‖_F`);
      expectAtMost(Q.transpose().mmul(Q).sub(Matrix.eye(n)).norm("frobenius"), tol, `${c.name}: ‖QᵀQ − I‖_F`);
      expectAtMost(Z.transpose().mmul(Z).sub(Matrix.eye(n)).norm("frobenius"), tol, `${c.name}: ‖ZᵀZ − I‖_F`);
    }
  });

  it("gives the same eigenvalues for a graded pencil scaled by 2^664 and by 2^-664 (scale safety)", () => {
    const c = gradedCases.find((g) => g.name === "graded n=8 total 1e-8")!;
    const A = new Matrix(c.A), E = new Matrix(c.E);
    for (const [sa, se] of [[2 ** 664, 2 ** 664], [2 ** -664, 2 ** -664], [2 ** 664, 1], [1, 2 ** 664]] as const) {
      // λ(sa·A, se·E) = (sa/se)·λ(A, E): powers of two, so the scaled reference is exact.
      const reference = c.eigenvalues.map(([re, im]) => [re * (sa / se), im * (sa / se)] as Pair);
      const err = worstRelativeError(qz(A.clone().mul(sa), E.clone().mul(se)).eigenvalues, reference, `scaled by ${sa}, ${se}`);
      expectAtMost(err, 2e-12, `graded n=8 scaled (2^${Math.log2(sa)}, 2^${Math.log2(se)}): relative error`);
    }
  });
});

describe("reflectorEntries (the explicit 3×3 reflector of the QZ sweep)", () => {
  /** H·(x1, x2, alpha) in the slot order of reflectorEntries. */
  const apply = (x: [number, number, number]): [number, number, number] => {
    const [h00, h11, h22, h01, h02, h12] = reflectorH;
    return [h00 * x[0] + h01 * x[1] + h02 * x[2], h01 * x[0] + h11 * x[1] + h12 * x[2], h02 * x[0] + h12 * x[1] + h22 * x[2]];
  };
  const betaOf = (alpha: number, x1: number, x2: number) => (alpha >= 0 ? -1 : 1) * Math.hypot(alpha, x1, x2);

  it("maps (x1, x2, alpha) to (0, 0, β) and is orthogonal, also when it is close to a permutation", () => {
    // Common practice: the defining properties of a Householder reflector, H·x = β·e and HᵀH = I.
    for (const [alpha, x1, x2] of [[0.3, -1.2, 0.7], [-2, 1e-3, 5e-4], [1e-12, 0.8, -0.6], [0, 1, 1e-20], [-1e-30, 1e-10, 3]] as const) {
      const beta = betaOf(alpha, x1, x2);
      reflectorEntries(alpha, x1, x2, beta);
      const y = apply([x1, x2, alpha]);
      const scale = Math.abs(beta);
      expectAtMost(Math.abs(y[0]) / scale, 4 * EPS, `H·x slot 0 for (${alpha}, ${x1}, ${x2})`);
      expectAtMost(Math.abs(y[1]) / scale, 4 * EPS, `H·x slot 1 for (${alpha}, ${x1}, ${x2})`);
      expectAtMost(Math.abs(y[2] - beta) / scale, 4 * EPS, `H·x slot 2 for (${alpha}, ${x1}, ${x2})`);
      const cols = [apply([1, 0, 0]), apply([0, 1, 0]), apply([0, 0, 1])];
      for (let i = 0; i < 3; i++) {
        for (let j = 0; j < 3; j++) {
          const dot = cols[i]![0] * cols[j]![0] + cols[i]![1] * cols[j]![1] + cols[i]![2] * cols[j]![2];
          expectAtMost(Math.abs(dot - (i === j ? 1 : 0)), 4 * EPS, `HᵀH − I at ${i},${j} for (${alpha}, ${x1}, ${x2})`);
        }
      }
    }
  });

  it("computes the small entries of a near-permutation to full relative accuracy", () => {
    // alpha = 1e-12, (x1, x2) = (0.6, 0.8): h22 = alpha/β = −1e-12 and h00 = a + q²/(1 + a)
    // with a = 1e-12, q = 0.8: 1 − τ·v1² would carry an absolute error of ε, i.e. 1e-4 relative
    // in h22 (exact values by hand: ν = sqrt(1 + 1e-24)).
    reflectorEntries(1e-12, 0.6, 0.8, betaOf(1e-12, 0.6, 0.8));
    const [h00, h11, h22, h01, h02, h12] = reflectorH;
    expectAtMost(Math.abs(h22 - -1e-12) / 1e-12, 2 * EPS, "h22 = alpha/β");
    expectAtMost(Math.abs(h02 - -0.6) / 0.6, 2 * EPS, "h02 = x1/β");
    expectAtMost(Math.abs(h12 - -0.8) / 0.8, 2 * EPS, "h12 = x2/β");
    expectAtMost(Math.abs(h00 - (1e-12 + 0.64 / (1 + 1e-12))) / 0.64, 4 * EPS, "h00");
    expectAtMost(Math.abs(h11 - (1e-12 + 0.36 / (1 + 1e-12))) / 0.36, 4 * EPS, "h11");
    expectAtMost(Math.abs(h01 - -0.48 / (1 + 1e-12)) / 0.48, 4 * EPS, "h01");
  });

  it("is the identity when x1 = x2 = 0 (β = alpha)", () => {
    reflectorEntries(-3, 0, 0, -3);
    expect(Array.from(reflectorH)).toEqual([1, 1, 1, 0, 0, 0]);
  });
});
