/**
 * Frequency response G(jω) = C (jωI − A)⁻¹ B + D (continuous) or G(e^{jωT}) (sampled) of a
 * state-space model, by one Hessenberg reduction and an O(n²) complex solve per frequency
 * (Laub 1981). The evaluator object is reused by the margin routines for root refinement.
 */
import { Matrix } from "ml-matrix";
import { EngineError } from "../errors";
import type { Complex } from "../linalg/complex";
import { hessenberg } from "../linalg";
import type { StateSpace } from "../model";

export interface FrequencyResponse {
  frequencyRadPerSec: number[];
  /** values[k][i][j]: output i, input j at frequency k; null where unbounded (pole on the axis). */
  values: (Complex | null)[][][];
  /** 20·log10|G|; null where unbounded or where |G| = 0 exactly (values then holds {0, 0}). */
  magnitudeDb: (number | null)[][][];
  /**
   * Phase of G in degrees, unwrapped per channel along the grid: the first defined point lies
   * in (−180, 180], each later one on the branch nearest to the previous defined point (null
   * points are skipped, so a gap at an axis pole continues from the last value before it).
   * null wherever magnitudeDb is null.
   */
  phaseDeg: (number | null)[][][];
  /** Every (frequency, output, input) whose value is null. */
  unbounded: { frequencyRadPerSec: number; output: number; input: number }[];
}

export type ResponseChannel = { from: "input" | "disturbance" };

/**
 * Precomputed Hessenberg form of one channel of a model, for repeated evaluation of G(s)
 * (used by `frequencyResponse` and by the margin searches, which evaluate single points).
 * Buffers are private and reused, so one evaluator must not be shared between concurrent
 * callers; results are written into caller-owned arrays.
 *
 * Computes/Method/Accuracy: as `frequencyResponse` (Laub 1981), one point per call.
 * Requires: A: n×n, B: n×m, C: p×n, D: p×m finite (a validated model's matrices).
 * Cost: construction ≈ 5n³ flops; `evaluateAt` ≈ 4n² + 4n²m + 4pnm flops, no allocation.
 * Errors: construction throws what `hessenberg` throws; `evaluateAt` never throws (false = unbounded).
 * Example: new FrequencyResponseEvaluator(A, B, C, D, null).evaluateFrequency(1, re, im)
 *   fills re/im with G(j); compare with C(jI − A)⁻¹B + D to 1e-15 relative.
 */
export class FrequencyResponseEvaluator {
  readonly n: number;
  readonly inputs: number;
  readonly outputs: number;
  readonly sampleTime: number | null;
  private readonly h: Float64Array; // n×n upper Hessenberg, row-major
  private readonly bt: Float64Array; // QᵀB, n×m
  private readonly ct: Float64Array; // C Q, p×n
  private readonly d: Float64Array; // p×m
  private readonly hNorm: number; // ‖H‖_F
  private readonly ur: Float64Array;
  private readonly ui: Float64Array;
  private readonly xr: Float64Array;
  private readonly xi: Float64Array;

  constructor(A: Matrix, B: Matrix, C: Matrix, D: Matrix, sampleTime: number | null) {
    const n = A.rows;
    this.n = n;
    this.inputs = B.columns;
    this.outputs = C.rows;
    this.sampleTime = sampleTime;
    const m = this.inputs;
    const p = this.outputs;
    this.h = new Float64Array(n * n);
    this.bt = new Float64Array(n * m);
    this.ct = new Float64Array(p * n);
    this.d = new Float64Array(p * m);
    for (let i = 0; i < p; i++) for (let j = 0; j < m; j++) this.d[i * m + j] = D.get(i, j);
    let hNorm = 0;
    if (n > 0) {
      // Laub 1981, step 1: A = Q H Qᵀ once; then B̃ = QᵀB, C̃ = CQ.
      const { H, Q } = hessenberg(A);
      const Bt = Q.transpose().mmul(B);
      const Ct = C.mmul(Q);
      for (let i = 0; i < n; i++) {
        for (let j = 0; j < n; j++) {
          const v = H.get(i, j);
          this.h[i * n + j] = v;
          hNorm += v * v;
        }
        for (let j = 0; j < m; j++) this.bt[i * m + j] = Bt.get(i, j);
      }
      for (let i = 0; i < p; i++) for (let j = 0; j < n; j++) this.ct[i * n + j] = Ct.get(i, j);
    }
    this.hNorm = Math.sqrt(hNorm);
    this.ur = new Float64Array(n * n);
    this.ui = new Float64Array(n * n);
    this.xr = new Float64Array(n * m);
    this.xi = new Float64Array(n * m);
  }

  /** The point s of the complex plane at which ω is evaluated: jω, or e^{jωT} when sampled. */
  pointOf(omega: number): Complex {
    if (this.sampleTime === null) return { re: 0, im: omega };
    const theta = omega * this.sampleTime;
    // Exact values at DC and Nyquist, where G is real: cos/sin of π would leave a 1e-16 residue.
    if (theta === 0) return { re: 1, im: 0 };
    if (Math.abs(theta) === Math.PI) return { re: -1, im: 0 };
    return { re: Math.cos(theta), im: Math.sin(theta) };
  }

  /**
   * Writes G(s) (p×m, row-major) into outRe/outIm. Returns false, leaving the outputs
   * unspecified, when sI − H is singular to working precision (see `frequencyResponse`).
   */
  evaluateAt(sRe: number, sIm: number, outRe: Float64Array, outIm: Float64Array): boolean {
    const { n, inputs: m, outputs: p, h, ur, ui, xr, xi } = this;
    for (let i = 0; i < p * m; i++) {
      outRe[i] = this.d[i]!;
      outIm[i] = 0;
    }
    if (n === 0) return true;
    // Laub 1981, step 2: M = sI − H, same Hessenberg pattern; right-hand side X = B̃.
    for (let i = 0; i < n; i++) {
      const row = i * n;
      for (let j = i === 0 ? 0 : i - 1; j < n; j++) {
        ur[row + j] = -h[row + j]!;
        ui[row + j] = 0;
      }
      ur[row + i] += sRe;
      ui[row + i] = sIm;
    }
    xr.set(this.bt);
    xi.fill(0);
    const tol = n * Number.EPSILON * Math.hypot(this.hNorm, Math.sqrt(n) * Math.hypot(sRe, sIm));
    // Gaussian elimination of the subdiagonal with partial pivoting between rows k and k+1;
    // sizes compared in |re| + |im| (as LAPACK's cabs1: no square roots in the O(n) loop).
    for (let k = 0; k < n - 1; k++) {
      const rk = k * n;
      const rn = rk + n;
      if (Math.abs(ur[rn + k]!) + Math.abs(ui[rn + k]!) > Math.abs(ur[rk + k]!) + Math.abs(ui[rk + k]!)) {
        for (let j = k; j < n; j++) {
          let t = ur[rk + j]!; ur[rk + j] = ur[rn + j]!; ur[rn + j] = t;
          t = ui[rk + j]!; ui[rk + j] = ui[rn + j]!; ui[rn + j] = t;
        }
        for (let c = 0; c < m; c++) {
          let t = xr[k * m + c]!; xr[k * m + c] = xr[(k + 1) * m + c]!; xr[(k + 1) * m + c] = t;
          t = xi[k * m + c]!; xi[k * m + c] = xi[(k + 1) * m + c]!; xi[(k + 1) * m + c] = t;
        }
      }
      const pr = ur[rk + k]!;
      const pi = ui[rk + k]!;
      if (Math.abs(pr) + Math.abs(pi) <= tol) return false;
      const ar = ur[rn + k]!;
      const ai = ui[rn + k]!;
      if (ar === 0 && ai === 0) continue;
      // l = a / pivot (Smith's division), then row k+1 −= l·row k.
      let lr: number;
      let li: number;
      if (Math.abs(pr) >= Math.abs(pi)) {
        const r = pi / pr;
        const den = pr + pi * r;
        lr = (ar + ai * r) / den;
        li = (ai - ar * r) / den;
      } else {
        const r = pr / pi;
        const den = pr * r + pi;
        lr = (ar * r + ai) / den;
        li = (ai * r - ar) / den;
      }
      ur[rn + k] = 0;
      ui[rn + k] = 0;
      for (let j = k + 1; j < n; j++) {
        const vr = ur[rk + j]!;
        const vi = ui[rk + j]!;
        ur[rn + j] -= lr * vr - li * vi;
        ui[rn + j] -= lr * vi + li * vr;
      }
      for (let c = 0; c < m; c++) {
        const vr = xr[k * m + c]!;
        const vi = xi[k * m + c]!;
        xr[(k + 1) * m + c] -= lr * vr - li * vi;
        xi[(k + 1) * m + c] -= lr * vi + li * vr;
      }
    }
    // Back substitution U X = X, row by row for all m columns.
    for (let i = n - 1; i >= 0; i--) {
      const row = i * n;
      const dr = ur[row + i]!;
      const di = ui[row + i]!;
      if (Math.abs(dr) + Math.abs(di) <= tol) return false;
      for (let c = 0; c < m; c++) {
        let sr = xr[i * m + c]!;
        let si = xi[i * m + c]!;
        for (let j = i + 1; j < n; j++) {
          const a = ur[row + j]!;
          const b = ui[row + j]!;
          const yr = xr[j * m + c]!;
          const yi = xi[j * m + c]!;
          sr -= a * yr - b * yi;
          si -= a * yi + b * yr;
        }
        if (Math.abs(dr) >= Math.abs(di)) {
          const r = di / dr;
          const den = dr + di * r;
          xr[i * m + c] = (sr + si * r) / den;
          xi[i * m + c] = (si - sr * r) / den;
        } else {
          const r = dr / di;
          const den = dr * r + di;
          xr[i * m + c] = (sr * r + si) / den;
          xi[i * m + c] = (si * r - sr) / den;
        }
      }
    }
    // Laub 1981, step 3: G = C̃ X + D.
    for (let i = 0; i < p; i++) {
      for (let k = 0; k < n; k++) {
        const c = this.ct[i * n + k]!;
        if (c === 0) continue;
        for (let j = 0; j < m; j++) {
          outRe[i * m + j] += c * xr[k * m + j]!;
          outIm[i * m + j] += c * xi[k * m + j]!;
        }
      }
    }
    for (let i = 0; i < p * m; i++) if (!Number.isFinite(outRe[i]!) || !Number.isFinite(outIm[i]!)) return false;
    return true;
  }

  /** G at frequency ω (rad/s) into outRe/outIm; false when unbounded there. */
  evaluateFrequency(omega: number, outRe: Float64Array, outIm: Float64Array): boolean {
    const s = this.pointOf(omega);
    return this.evaluateAt(s.re, s.im, outRe, outIm);
  }
}

/**
 * Computes: the `FrequencyResponseEvaluator` of the input channel (A, B, C, D) or the
 *   disturbance channel (A, F, C, E) of a model.
 * Requires: a validated model. Method: Hessenberg reduction once (Laub 1981).
 * Cost: ≈ 5n³ flops, O(n² + nm + pn) memory. Accuracy: as `hessenberg`.
 * Errors: "invalid-argument" for an unknown channel; errors of `hessenberg`.
 * Example: createFrequencyResponseEvaluator(model, { from: "disturbance" }).evaluateFrequency(w, re, im)
 */
export function createFrequencyResponseEvaluator(model: StateSpace, channel: ResponseChannel = { from: "input" }): FrequencyResponseEvaluator {
  const from = channel?.from;
  if (from !== "input" && from !== "disturbance") {
    throw new EngineError("invalid-argument", `channel.from must be "input" or "disturbance" (it is ${JSON.stringify(from)})`, { argument: "channel" });
  }
  const B = from === "input" ? model.B : model.F;
  const D = from === "input" ? model.D : model.E;
  return new FrequencyResponseEvaluator(model.A, B, model.C, D, model.sampleTime);
}

/**
 * Computes: G(s_k) = C (s_k I − A)⁻¹ B + D (p×m) at s_k = jω_k (continuous) or s_k = e^{jω_k T}
 *   (sampled, period T), for A: n×n, B: n×m, C: p×n, D: p×m; with channel { from:
 *   "disturbance" } the matrices F: n×q and E: p×q replace B and D. Also magnitude in dB and
 *   continuously unwrapped phase in degrees per channel (see `FrequencyResponse`).
 * Requires: a model built by createStateSpace (finite entries); frequencies finite (rad/s; any
 *   sign, any order, duplicates allowed; sampled models accept ω above π/T, where the
 *   response repeats with period 2π/T). An empty list gives empty results.
 * Method: Laub, "Efficient multivariable frequency response computations", IEEE Trans.
 *   Automatic Control 26(2):407–408, 1981: A = Q H Qᵀ once (Householder Hessenberg
 *   reduction), B̃ = QᵀB, C̃ = CQ; per frequency the Hessenberg system (sI − H)X = B̃ is solved
 *   by Gaussian elimination with partial pivoting between adjacent rows, in complex
 *   arithmetic on Float64Array real/imaginary parts, then G = C̃X + D.
 * Cost: 10/3·n³ + 4/3·n³ flops once; per frequency about 4n² (elimination) + 4n²m (back
 *   substitution) + 4pnm real flops. Memory O(n² + nm + pn) plus the results.
 * Accuracy: the elimination is backward stable (growth ≤ n for Hessenberg matrices, Wilkinson
 *   1965), so each column of X is exact for a perturbation of sI − H of relative size
 *   ≈ n·ε. A point is declared unbounded when a pivot has |Re u_kk| + |Im u_kk| ≤
 *   n·ε·‖sI − H‖_F (then σ_min(sI − H) ≤ 2|u_kk|: s is a pole to working precision) or when a result overflows;
 *   every entry at that frequency is then null (also in channels from which that mode is
 *   uncontrollable or unobservable, whose limit is not computed) and listed in `unbounded`.
 *   No NaN or Infinity is ever returned.
 * Errors: "invalid-argument" (frequencies not an array, non-number entry, bad channel),
 *   "non-finite" (NaN/±Infinity frequency), "non-finite" from the Hessenberg reduction.
 * Example:
 *   const g = createStateSpace({ A: [[-1]], B: [[1]], C: [[1]] }); // 1/(s+1)
 *   const r = frequencyResponse(g, [1]);
 *   // r.values[0][0][0] ≈ {re: 0.5, im: -0.5}; |r − 1/(1+j)| < 1e-16; r.phaseDeg[0][0][0] ≈ −45
 */
export function frequencyResponse(model: StateSpace, frequenciesRadPerSec: number[], channel: ResponseChannel = { from: "input" }): FrequencyResponse {
  const omegas = checkFrequencies(frequenciesRadPerSec, "frequenciesRadPerSec");
  const ev = createFrequencyResponseEvaluator(model, channel);
  const p = ev.outputs;
  const m = ev.inputs;
  const re = new Float64Array(p * m);
  const im = new Float64Array(p * m);
  const values: (Complex | null)[][][] = [];
  const magnitudeDb: (number | null)[][][] = [];
  const phaseDeg: (number | null)[][][] = [];
  const unbounded: FrequencyResponse["unbounded"] = [];
  const lastPhase = new Array<number | null>(p * m).fill(null);
  for (const omega of omegas) {
    const ok = ev.evaluateFrequency(omega, re, im);
    const vk: (Complex | null)[][] = [];
    const dk: (number | null)[][] = [];
    const pk: (number | null)[][] = [];
    for (let i = 0; i < p; i++) {
      const vrow: (Complex | null)[] = [];
      const drow: (number | null)[] = [];
      const prow: (number | null)[] = [];
      for (let j = 0; j < m; j++) {
        if (!ok) {
          vrow.push(null);
          drow.push(null);
          prow.push(null);
          unbounded.push({ frequencyRadPerSec: omega, output: i, input: j });
          continue;
        }
        const g = { re: re[i * m + j]!, im: im[i * m + j]! };
        vrow.push(g);
        const mag = Math.hypot(g.re, g.im);
        if (mag === 0) {
          drow.push(null);
          prow.push(null);
          continue;
        }
        drow.push(20 * Math.log10(mag));
        const phase = unwrapDegrees((Math.atan2(g.im, g.re) * 180) / Math.PI, lastPhase[i * m + j]!);
        lastPhase[i * m + j] = phase;
        prow.push(phase);
      }
      vk.push(vrow);
      dk.push(drow);
      pk.push(prow);
    }
    values.push(vk);
    magnitudeDb.push(dk);
    phaseDeg.push(pk);
  }
  return { frequencyRadPerSec: omegas, values, magnitudeDb, phaseDeg, unbounded };
}

/**
 * Computes: raw ∈ [−180, 180] (degrees) moved by the multiple of 360 that brings it nearest to
 *   `previous`; with no previous point, raw itself with −180 mapped to 180, so a sequence
 *   starts in (−180, 180].
 * Requires: finite raw. Method: nearest-branch rule (common practice for phase unwrapping).
 * Cost: O(1). Accuracy: exact multiples of 360 are added. Errors: none.
 * Example: unwrapDegrees(170, -175) → −190.
 */
export function unwrapDegrees(raw: number, previous: number | null): number {
  if (previous === null) return raw === -180 ? 180 : raw;
  return raw + 360 * Math.round((previous - raw) / 360);
}

/**
 * Computes: a copy of a frequency list after checking that it is an array of finite numbers.
 * Requires: nothing. Method: entry checks. Cost: O(N). Accuracy: exact.
 * Errors: "invalid-argument" (not an array, non-number entry), "non-finite" (NaN/±Infinity),
 *   naming `name` and the index.
 * Example: checkFrequencies([1, 2], "grid") → [1, 2] (a new array).
 */
export function checkFrequencies(list: unknown, name: string): number[] {
  if (!Array.isArray(list)) {
    throw new EngineError("invalid-argument", `${name} must be an array of frequencies in rad/s`, { argument: name });
  }
  return list.map((w, k) => {
    if (typeof w !== "number") {
      throw new EngineError("invalid-argument", `${name}[${k}] is not a number`, { argument: name, index: k });
    }
    if (!Number.isFinite(w)) {
      throw new EngineError("non-finite", `${name}[${k}] is ${w}; every frequency must be a finite number of rad/s`, { argument: name, index: k });
    }
    return w;
  });
}
