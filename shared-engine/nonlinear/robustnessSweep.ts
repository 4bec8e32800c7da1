/**
 * Robustness of a fixed state-feedback gain to parameter changes: re-solve the operating point
 * and re-linearize at each parameter sample, then report closed-loop poles, stability and (for
 * a single input) loop margins at the plant input. The controller is continuous, or sampled at
 * a period T with the plant seen through a zero-order hold (as the closed-loop simulation runs
 * it).
 */
import { Matrix } from "ml-matrix";
import { loopMargins } from "../analysis/margins";
import { loopAtInput } from "../analysis/loopAtInput";
import { EngineError, toErrorPayload, type ErrorPayload } from "../errors";
import { asMatrix, eigenvalues, requireFinite, type Complex, type MatrixInput } from "../linalg";
import { discretize, stateSpaceFromMatrices } from "../model";
import { linearize } from "./linearize";
import { solveOperatingPoint, type OperatingPointRequest } from "./operatingPoint";
import type { CompiledNonlinearPlant } from "./plant";

export type SweepSampling =
  | { kind: "grid"; pointsPerParameter: number }
  | { kind: "random"; samples: number; seed: number };

export interface RobustnessSweepRequest {
  plant: CompiledNonlinearPlant;
  /** How to find the operating point at each sample (its `parameters` field is overridden). */
  operatingPoint: OperatingPointRequest;
  /** m × n gain, kept fixed. */
  K: MatrixInput;
  /** Optional integral action: u = −Kδx − Ki∫(y_I − r). */
  integral?: { outputs: string[]; Ki: MatrixInput };
  /** Parameters to vary, each by ±percent of its nominal value. */
  parameters: { name: string; percent: number }[];
  sampling: SweepSampling;
  /**
   * Sample period T (s) of a sampled controller, null or absent for a continuous one. Sampled:
   * u[k] = −Kδx[k] − Ki·ξ[k], ξ[k+1] = ξ[k] + T·e[k], held over each period (zero-order hold).
   */
  sampleTime?: number | null;
  isCancelled?: () => boolean;
  onProgress?: (fraction: number) => void;
}

export interface RobustnessSample {
  /** Values of the varied parameters (same order as the request). */
  values: number[];
  /** Closed-loop poles (empty when the sample failed). */
  poles: Complex[];
  stable: boolean;
  /** Loop margins at the plant input (the worst channel, loop at a time, for several inputs); null when infinite or the sample failed. */
  gainMarginDb: number | null;
  phaseMarginDeg: number | null;
  /** Why the operating point or linearization failed at this sample. */
  error: ErrorPayload | null;
}

export interface RobustnessSweep {
  parameterNames: string[];
  /** The controller's sample period, null when continuous (poles are then s-plane). */
  sampleTime: number | null;
  samples: RobustnessSample[];
  /** Every sample solved and stable. */
  allStable: boolean;
  failedSamples: number;
  /** Smallest gain margin (dB) and phase margin (deg) over samples; null when not computed or infinite everywhere. */
  worstGainMarginDb: number | null;
  worstPhaseMarginDeg: number | null;
  /** Why margins were or were not computed. */
  marginsNote: string;
}

const MAX_SAMPLES = 10_000;

/** Small seeded generator (mulberry32, T. Ettinger 2017, public domain), uniform on [0, 1). */
function seededUniform(seed: number): () => number {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

/**
 * Computes: for parameter vectors p = p_nom·(1 + δ), δ_i ∈ [−percent_i, +percent_i]/100 (a grid
 *   with the end points, or seeded uniform samples), the operating point (re-solved), the
 *   linearization (A, B, C, D), the closed-loop poles eig([[A − BK, −BKi], [C_I − D_I K,
 *   −D_I Ki]]) with K (and Ki) fixed, stability (all Re λ < −10·ε·max(1, max|λ|)), and the
 *   gain and phase margins of the loop broken at the plant input, L(s) = [K Ki](sI −
 *   A_aug)⁻¹B_aug, A_aug = [[A, 0], [C_I, 0]], B_aug = [B; D_I]; with several inputs, loop at a
 *   time (each input broken in turn, the others closed) and the worst channel reported.
 *   Sampled controller (sampleTime T): the linearization is discretized by zero-order hold,
 *   Φ = e^{AT}, Γ = ∫₀ᵀe^{Aτ}dτ·B, the accumulators are ξ[k+1] = ξ[k] + T·e[k], so the poles
 *   are eig([[Φ − ΓK, −ΓKi], [T(C_I − D_I K), I − T·D_I Ki]]), stable when every |z| < 1 −
 *   10·ε·max(1, max|z|), and the margins are those of L(z) = [K Ki](zI − A_aug)⁻¹B_aug with
 *   A_aug = [[Φ, 0], [T·C_I, I]], B_aug = [Γ; T·D_I].
 * Requires: parameters declared, percent in [0, 100); grid points ≥ 2 (≤ 10,000 samples in
 *   total); K: m×n, Ki: m×r finite; sampleTime null or a positive finite number.
 * Method: `solveOperatingPoint` (damped Newton) warm-started from the nominal solution,
 *   `linearize` (exact AD Jacobians), `discretize` (zero-order hold by the Van Loan block
 *   exponential) when sampled, `eigenvalues` (Francis QR), `loopMargins`. Samples whose
 *   operating point fails are reported with their error and count as not stable.
 * Cost: per sample one Newton solve, one linearization, (sampled) one matrix exponential of
 *   size n + m, one eigenvalue problem of size n + r
 *   and m margin computations (O(n³) + O(n²) per frequency each).
 * Accuracy: poles as the eigenvalue routine (backward stable); margins as `loopMargins`.
 * Errors: "invalid-argument" (unknown parameter, bad percent or sampling, too many samples,
 *   a sample time that is not a positive finite number),
 *   "shape-mismatch" (K, Ki), "cancelled" (isCancelled() returned true, details.completed),
 *   and the nominal operating point's errors (the sweep needs a nominal solution).
 * Example:
 *   const s = robustnessSweep({ plant, operatingPoint: { unknowns: ["q"], states: { h: 4 } },
 *     K: [[1]], parameters: [{ name: "a", percent: 10 }], sampling: { kind: "grid", pointsPerParameter: 5 } });
 *   // s.samples.length === 5; s.allStable
 */
export function robustnessSweep(request: RobustnessSweepRequest): RobustnessSweep {
  const { plant } = request;
  const { n, m } = plant;
  const K = asMatrix(request.K, "K");
  requireFinite(K, "K");
  if (K.rows !== m || K.columns !== n) throw new EngineError("shape-mismatch", `K must be ${m}×${n} (it is ${K.rows}×${K.columns})`, { argument: "K" });
  const trackedNames = request.integral?.outputs ?? [];
  const tracked = trackedNames.map((name) => {
    const i = plant.names.outputs.indexOf(name);
    if (i < 0) throw new EngineError("invalid-argument", `integral.outputs: '${name}' is not a declared output`, { argument: "integral.outputs" });
    return i;
  });
  const r = tracked.length;
  const Ki = request.integral ? asMatrix(request.integral.Ki, "Ki") : new Matrix(m, 0);
  requireFinite(Ki, "Ki");
  if (Ki.rows !== m || Ki.columns !== r) throw new EngineError("shape-mismatch", `Ki must be ${m}×${r} (it is ${Ki.rows}×${Ki.columns})`, { argument: "Ki" });

  const T = request.sampleTime ?? null;
  if (T !== null && !(typeof T === "number" && Number.isFinite(T) && T > 0)) {
    throw new EngineError("invalid-argument", `sampleTime must be a positive finite number of seconds or null (it is ${String(T)})`, { argument: "sampleTime" });
  }

  const nominal = plant.parameterValues;
  const varied = request.parameters.map((v, k) => {
    const index = plant.names.parameters.indexOf(v.name);
    if (index < 0) throw new EngineError("invalid-argument", `parameters[${k}]: '${v.name}' is not a declared parameter`, { argument: `parameters[${k}].name` });
    if (typeof v.percent !== "number" || !(v.percent >= 0 && v.percent < 100)) {
      throw new EngineError("invalid-argument", `parameters[${k}].percent must be in [0, 100) (it is ${String(v.percent)})`, { argument: `parameters[${k}].percent` });
    }
    const base = request.operatingPoint.parameters?.[v.name] ?? nominal[index]!;
    return { name: v.name, base, spread: v.percent / 100 };
  });

  // Sample list of relative offsets δ ∈ [−spread, spread]^k.
  const offsets: number[][] = [];
  const sampling = request.sampling;
  if (sampling.kind === "grid") {
    const g = sampling.pointsPerParameter;
    if (!Number.isInteger(g) || g < 2) throw new EngineError("invalid-argument", `sampling.pointsPerParameter must be an integer ≥ 2 (it is ${g})`, { argument: "sampling.pointsPerParameter" });
    const total = Math.pow(g, varied.length);
    if (total > MAX_SAMPLES) throw new EngineError("invalid-argument", `the grid has ${total} samples; at most ${MAX_SAMPLES} are allowed`, { argument: "sampling" });
    for (let s = 0; s < total; s++) {
      let rest = s;
      offsets.push(varied.map((v) => { const i = rest % g; rest = Math.floor(rest / g); return v.spread * (-1 + (2 * i) / (g - 1)); }));
    }
  } else if (sampling.kind === "random") {
    const count = sampling.samples;
    if (!Number.isInteger(count) || count < 1 || count > MAX_SAMPLES) throw new EngineError("invalid-argument", `sampling.samples must be an integer in [1, ${MAX_SAMPLES}] (it is ${count})`, { argument: "sampling.samples" });
    if (!Number.isInteger(sampling.seed)) throw new EngineError("invalid-argument", `sampling.seed must be an integer (it is ${sampling.seed})`, { argument: "sampling.seed" });
    const next = seededUniform(sampling.seed);
    for (let s = 0; s < count; s++) offsets.push(varied.map((v) => v.spread * (2 * next() - 1)));
  } else {
    throw new EngineError("invalid-argument", "sampling.kind must be \"grid\" or \"random\"", { argument: "sampling.kind" });
  }

  // Nominal solution: warm start for every sample.
  const nominalPoint = solveOperatingPoint(plant, request.operatingPoint);
  const guess = (names: string[], values: number[]): Record<string, number> => Object.fromEntries(names.map((name, i) => [name, values[i]!]));
  const sampledNote = T === null ? "" : ` (controller sampled at ${T} s, plant through a zero-order hold)`;
  const marginsNote = m === 1
    ? `gain and phase margins of the single-input loop broken at the plant input${sampledNote}`
    : `loop-at-a-time gain and phase margins at the plant input: each of the ${m} inputs' loops broken in turn with the others closed, the worst channel per sample${sampledNote}; they do not bound simultaneous changes in several channels`;

  const samples: RobustnessSample[] = [];
  for (let s = 0; s < offsets.length; s++) {
    if (request.isCancelled?.()) throw new EngineError("cancelled", `robustness sweep cancelled after ${s} of ${offsets.length} samples`, { completed: s });
    const values = varied.map((v, k) => v.base * (1 + offsets[s]![k]!));
    const sample: RobustnessSample = { values, poles: [], stable: false, gainMarginDb: null, phaseMarginDeg: null, error: null };
    try {
      const point = solveOperatingPoint(plant, {
        ...request.operatingPoint,
        states: { ...request.operatingPoint.states, ...guess(nominalPoint.names.states, nominalPoint.states) },
        inputs: { ...request.operatingPoint.inputs, ...guess(nominalPoint.names.inputs, nominalPoint.inputs) },
        parameters: { ...request.operatingPoint.parameters, ...Object.fromEntries(varied.map((v, k) => [v.name, values[k]!])) },
      });
      // Fixed (non-unknown) states and inputs keep the requested values, not the nominal solution.
      const { model } = linearize(plant, point);
      // Sampled: the plant as the controller sees it, through a zero-order hold at period T.
      const seen = T === null ? model : discretize(model, T, { method: "zoh" });
      // One augmented loop (plant + integrators or accumulators) serves both the closed-loop
      // poles, eig(A_aug − B_aug·K_aug), and the loops broken at each input.
      const open = augmentedLoop(seen.A, seen.B, seen.C, seen.D, K, Ki, tracked, T);
      sample.poles = eigenvalues(open.A.clone().sub(open.B.mmul(open.C)));
      const scale = Math.max(1, ...sample.poles.map((z) => Math.hypot(z.re, z.im)));
      const band = 10 * Number.EPSILON * scale;
      sample.stable = T === null ? sample.poles.every((z) => z.re < -band) : sample.poles.every((z) => Math.hypot(z.re, z.im) < 1 - band);
      for (let j = 0; j < m; j++) {
        const loop = loopAtInput(open.A, open.B, open.C, j, T);
        const margins = loopMargins(loop);
        sample.gainMarginDb = smaller(sample.gainMarginDb, margins.gainMarginDb);
        sample.phaseMarginDeg = smaller(sample.phaseMarginDeg, margins.phaseMarginDeg);
      }
    } catch (error) {
      if (error instanceof EngineError && error.kind === "cancelled") throw error;
      if (!(error instanceof EngineError)) throw error;
      sample.error = toErrorPayload(error);
      sample.stable = false;
    }
    samples.push(sample);
    request.onProgress?.((s + 1) / offsets.length);
  }
  const worst = (pick: (s: RobustnessSample) => number | null): number | null => {
    const list = samples.map(pick).filter((v): v is number => v !== null);
    return list.length > 0 ? Math.min(...list) : null;
  };
  return {
    parameterNames: varied.map((v) => v.name),
    sampleTime: T,
    samples,
    allStable: samples.every((s) => s.stable),
    failedSamples: samples.filter((s) => s.error !== null).length,
    worstGainMarginDb: worst((s) => s.gainMarginDb),
    worstPhaseMarginDeg: worst((s) => s.phaseMarginDeg),
    marginsNote,
  };
}

/** The smaller of two margins, null standing for "none" (infinite or not computed). */
function smaller(a: number | null, b: number | null): number | null {
  if (a === null) return b;
  if (b === null) return a;
  return Math.min(a, b);
}

/**
 * The augmented loop at the plant input, all m inputs, as a state-space model (A_aug, B_aug,
 * K_aug): K_aug = [K Ki], A_aug = [[A, 0], [C_I, 0]], B_aug = [B; D_I]; sampled (T not null,
 * A and B already the zero-order-hold Φ and Γ, accumulators ξ[k+1] = ξ[k] + T·e[k]):
 * A_aug = [[Φ, 0], [T·C_I, I]], B_aug = [Γ; T·D_I]. Closing it, A_aug − B_aug·K_aug, gives the
 * closed-loop matrix of the sweep.
 */
function augmentedLoop(A: Matrix, B: Matrix, C: Matrix, D: Matrix, K: Matrix, Ki: Matrix, tracked: number[], T: number | null) {
  const n = A.rows, m = B.columns, r = tracked.length;
  const Aa = new Matrix(n + r, n + r);
  const Ba = new Matrix(n + r, m);
  const Ca = new Matrix(m, n + r);
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < n; j++) Aa.set(i, j, A.get(i, j));
    for (let j = 0; j < m; j++) Ba.set(i, j, B.get(i, j));
  }
  const h = T ?? 1;
  tracked.forEach((t, i) => {
    for (let j = 0; j < n; j++) Aa.set(n + i, j, h * C.get(t, j));
    for (let j = 0; j < m; j++) Ba.set(n + i, j, h * D.get(t, j));
    if (T !== null) Aa.set(n + i, n + i, 1);
  });
  for (let i = 0; i < m; i++) {
    for (let j = 0; j < n; j++) Ca.set(i, j, K.get(i, j));
    for (let j = 0; j < r; j++) Ca.set(i, n + j, Ki.get(i, j));
  }
  return stateSpaceFromMatrices({ A: Aa, B: Ba, C: Ca, sampleTime: T });
}
