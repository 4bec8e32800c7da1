/**
 * The Structure view's content in plain language beside the numbers: poles with damping,
 * natural frequency and time constant; transmission zeros with non-minimum-phase ones called
 * out; which modes the inputs can move and the outputs can see, with what that means; the modal
 * coupling table; Gramian measures (Hankel singular values, weakly controllable/observable
 * states); and conditioning warnings. Pure wording functions plus a small latest-wins controller
 * that asks the engine through the bridge (five analysis requests for one model).
 */
import type {
  ComplexValue,
  EngineBridge,
  GramiansResult,
  ModalFormResult,
  ModelJson,
  PlantSpec,
  PolesResult,
  StructureResult,
  VariantResult,
  ZerosResult,
} from "../../../shared-engine/api/contract";
import { formatComplex, formatReal } from "../../../shared-engine/format";

// WARNING: these thresholds decide the sentences the engineer reads; tests pin them.
/** ‖A − diag A‖_F / ‖A‖_F above this: the states "drive one another strongly" (half the energy of A off the diagonal, our convention). */
export const STRONG_COUPLING_RATIO = 0.5;
/** Below this (and above 0): "nearly decoupled" (common practice: off-diagonal terms under 10 %). */
export const WEAK_COUPLING_RATIO = 0.1;
/** A Hankel singular value (or a Gramian diagonal) below this fraction of the largest is "weak" (common practice for model reduction). */
export const WEAK_HANKEL_FRACTION = 1e-3;
/** κ(T) of the modal basis above this: participation factors are unreliable (the engine's MODAL_CONDITION_WARNING). */
export const MODAL_CONDITION_LIMIT = 1e6;

export interface ModeLine {
  eigenvalue: ComplexValue;
  /** "−0.05" or "−1 ± 2i". */
  label: string;
  stability: "stable" | "unstable" | "on the stability boundary";
  /** ζ (continuous equivalent s = ln z / T when sampled); null at s = 0. */
  damping: number | null;
  naturalFrequencyRadPerSec: number;
  /** 1/|Re s|; null on the imaginary axis. */
  timeConstantSec: number | null;
  controllable: boolean;
  observable: boolean;
  /** Plain-language remarks on this mode (movability, visibility, stability). */
  sentences: string[];
}

export interface ZeroLine {
  zero: ComplexValue;
  label: string;
  nonMinimumPhase: boolean;
}

export interface CouplingTable {
  states: string[];
  rows: { label: string; participationPct: number[]; dominantStates: string[] }[];
  offDiagonalRatio: number;
  sentence: string;
  conditionWarning: string | null;
}

export interface GramianSummary {
  hankelSingularValues: number[];
  weakCount: number;
  sentences: string[];
}

export interface StructureReport {
  summary: string;
  modes: ModeLine[];
  zeros: ZeroLine[];
  zerosSentence: string;
  coupling: CouplingTable | null;
  couplingError: string | null;
  gramians: GramianSummary | null;
  gramiansNote: string | null;
  warnings: string[];
}

/** A complex number for sentences, with true minus signs ("−0.05", "−1 ± 2j" for a pair). */
export const complexLabel = (z: ComplexValue) => formatComplex(z, 4).replace(/-/g, "−");

const near = (a: ComplexValue, b: ComplexValue) => Math.hypot(a.re - b.re, a.im - b.im) <= 1e-6 * Math.max(1, Math.hypot(a.re, a.im));
const conjugateNear = (a: ComplexValue, list: readonly ComplexValue[]) => list.some((b) => near(a, b) || near(a, { re: b.re, im: -b.im }));

/** The continuous-time equivalent s of a pole (s itself, or ln z / T when sampled); null for z = 0. */
export function continuousEquivalent(p: ComplexValue, sampleTime: number | null): ComplexValue | null {
  if (sampleTime === null) return p;
  const r = Math.hypot(p.re, p.im);
  if (r === 0) return null;
  return { re: Math.log(r) / sampleTime, im: Math.atan2(p.im, p.re) / sampleTime };
}

function stabilityOf(p: ComplexValue, sampleTime: number | null): ModeLine["stability"] {
  // Same boundary tolerance as StructurePanel: a pole within 1e-9 of |z| = 1 (1e-12 of Re s = 0) is on it.
  if (sampleTime === null) return Math.abs(p.re) < 1e-12 ? "on the stability boundary" : p.re < 0 ? "stable" : "unstable";
  const r = Math.hypot(p.re, p.im);
  return Math.abs(r - 1) < 1e-9 ? "on the stability boundary" : r < 1 ? "stable" : "unstable";
}

/** One pole in words: damping, natural frequency, time constant, and whether inputs move it and outputs see it. */
export function describeMode(p: ComplexValue, sampleTime: number | null, structure: Pick<StructureResult, "uncontrollableModes" | "unobservableModes"> | null): ModeLine {
  const label = complexLabel(p);
  const stability = stabilityOf(p, sampleTime);
  const s = continuousEquivalent(p, sampleTime);
  const wn = s ? Math.hypot(s.re, s.im) : Number.POSITIVE_INFINITY;
  const damping = s && wn > 0 ? -s.re / wn : null;
  const timeConstantSec = s && s.re !== 0 ? 1 / Math.abs(s.re) : sampleTime !== null && !s ? sampleTime : null;
  const controllable = !structure || !conjugateNear(p, structure.uncontrollableModes);
  const observable = !structure || !conjugateNear(p, structure.unobservableModes);
  const sentences: string[] = [];
  if (!controllable) {
    sentences.push(
      stability === "stable"
        ? `The mode at ${label} cannot be moved by any input: it must already be stable, and it is (it decays by itself).`
        : `The mode at ${label} cannot be moved by any input and it is ${stability}: no state feedback can stabilize this plant.`,
    );
  }
  if (!observable) {
    sentences.push(
      stability === "stable"
        ? `The outputs do not see the mode at ${label}: an observer cannot estimate it, but it decays by itself.`
        : `The outputs do not see the mode at ${label} and it is ${stability}: no observer can track it.`,
    );
  }
  if (s && damping !== null && Math.abs(s.im) > 0 && damping < 0.1 && stability === "stable") sentences.push(`The mode at ${label} is lightly damped (ζ = ${formatReal(damping, 2)}): it rings for many periods.`);
  return { eigenvalue: p, label, stability, damping, naturalFrequencyRadPerSec: Number.isFinite(wn) ? wn : 0, timeConstantSec, controllable, observable, sentences };
}

/** Non-minimum phase: a zero in the open right half plane (continuous) or outside the unit circle (sampled). */
export function isNonMinimumPhase(z: ComplexValue, sampleTime: number | null): boolean {
  return sampleTime === null ? z.re > 1e-12 : Math.hypot(z.re, z.im) > 1 + 1e-9;
}

export function zerosSentence(zeros: readonly ZeroLine[], infiniteCount: number | null, sampleTime: number | null): string {
  const where = sampleTime === null ? "in the right half plane" : "outside the unit circle";
  const nmp = zeros.filter((z) => z.nonMinimumPhase);
  if (zeros.length === 0) return `No finite transmission zeros${infiniteCount ? ` (${infiniteCount} at infinity)` : ""}.`;
  if (nmp.length === 0) return `${zeros.length} finite transmission zero(s), none ${where}: the plant is minimum phase.`;
  return `Non-minimum phase: the zero(s) ${nmp.map((z) => z.label).join(", ")} lie ${where}. The response to a step first moves the wrong way, and no feedback can move these zeros; they limit how fast the loop can be.`;
}

/**
 * Two different questions, answered separately: how much the states drive one another (the
 * off-diagonal share of A, which depends on the states' units) and whether the modes are shared
 * between states (from the participation factors, which do not). A triangular A can be "strongly
 * coupled" by the first measure while every mode still belongs to one state.
 */
export function couplingSentence(ratio: number, largestSharedParticipation?: number): string {
  const pct = `${formatReal(100 * ratio, 3)} %`;
  let first: string;
  if (ratio === 0) first = "A is diagonal: no state drives another.";
  else if (ratio > STRONG_COUPLING_RATIO) first = `The states drive one another strongly: ${pct} of A (Frobenius norm, in the states' own units) lies off its diagonal.`;
  else if (ratio < WEAK_COUPLING_RATIO) first = `The states barely drive one another: only ${pct} of A (Frobenius norm, in the states' own units) lies off its diagonal.`;
  else first = `The states drive one another moderately: ${pct} of A (Frobenius norm, in the states' own units) lies off its diagonal.`;
  if (largestSharedParticipation === undefined) return first;
  const second =
    largestSharedParticipation < SHARED_MODE_FRACTION
      ? "Each mode belongs mainly to one state (every mode has one state with most of its participation)."
      : `Some modes are shared between states (a mode's second state holds up to ${formatReal(100 * largestSharedParticipation, 3)} % of its participation), so a change in one state shows up in several modes.`;
  return `${first} ${second}`;
}

/** A mode counts as shared when its second-largest participation exceeds this fraction. */
export const SHARED_MODE_FRACTION = 0.2;

export function couplingTable(modal: ModalFormResult): CouplingTable {
  const c = modal.coupling;
  return {
    states: [...c.states],
    rows: c.modes.map((m) => ({ label: complexLabel(m.eigenvalue).replace(/ [+−] /, " ± "), participationPct: m.participation.map((p) => 100 * p), dominantStates: [...m.dominantStates] })),
    offDiagonalRatio: c.offDiagonalRatio,
    sentence: couplingSentence(
      c.offDiagonalRatio,
      Math.max(0, ...c.modes.map((m) => [...m.participation].sort((a, b) => b - a)[1] ?? 0)),
    ),
    conditionWarning:
      modal.condition > MODAL_CONDITION_LIMIT
        ? `κ(T) = ${formatReal(modal.condition, 3)}: the modal basis is nearly singular (modes close together), so the participation factors are unreliable.`
        : null,
  };
}

export function gramianSummary(g: GramiansResult, stateNames: readonly string[]): GramianSummary {
  const hsv = g.hankelSingularValues;
  const largest = hsv[0] ?? 0;
  const weak = hsv.filter((s) => s < WEAK_HANKEL_FRACTION * largest);
  const sentences: string[] = [];
  if (largest === 0) sentences.push("Every Hankel singular value is 0: no input reaches any output.");
  else if (weak.length === 0) sentences.push(`Every Hankel singular value is above ${WEAK_HANKEL_FRACTION} of the largest (${formatReal(largest, 4)}): every state combination matters to the input-output behaviour.`);
  else {
    sentences.push(
      `${weak.length} of ${hsv.length} Hankel singular values are below ${WEAK_HANKEL_FRACTION} of the largest (${formatReal(largest, 4)}): those state combinations are weakly controllable and observable together; a model of order ${hsv.length - weak.length} keeps almost the same input-output behaviour.`,
    );
  }
  const weakDiag = (W: number[][], what: string) => {
    const d = W.map((row, i) => row[i] ?? 0);
    const top = Math.max(0, ...d);
    const names = d.map((v, i) => ({ v, name: stateNames[i] ?? `x${i + 1}` })).filter((e) => top > 0 && e.v < WEAK_HANKEL_FRACTION * top).map((e) => e.name);
    if (names.length) sentences.push(`Weakly ${what}: ${names.join(", ")} (Gramian diagonal below ${WEAK_HANKEL_FRACTION} of the largest).`);
  };
  weakDiag(g.controllability, "controllable");
  weakDiag(g.observability, "observable");
  return { hankelSingularValues: [...hsv], weakCount: weak.length, sentences };
}

export interface StructureAnswers {
  poles: PolesResult;
  structure: StructureResult | null;
  zeros: ZerosResult | null;
  modal: ModalFormResult | { error: string } | null;
  gramians: GramiansResult | { error: string } | null;
}

export function buildStructureReport(a: StructureAnswers, sampleTime: number | null, stateNames: readonly string[]): StructureReport {
  const modes = a.poles.poles.map((p) => describeMode(p, sampleTime, a.structure));
  const zeros = (a.zeros?.finite ?? []).map((z) => ({ zero: z, label: complexLabel(z), nonMinimumPhase: isNonMinimumPhase(z, sampleTime) }));
  const unstable = modes.filter((m) => m.stability !== "stable").length;
  const s = a.structure;
  const summary = [
    `${modes.length} mode(s), ${unstable === 0 ? "all stable" : `${unstable} not stable`}.`,
    s ? (s.controllable ? "The inputs can move every mode." : `The inputs cannot move ${s.uncontrollableModes.length} mode(s)${s.stabilizable ? ", all of which decay by themselves" : ""}.`) : "",
    s ? (s.observable ? "The outputs see every mode." : `The outputs miss ${s.unobservableModes.length} mode(s)${s.detectable ? ", all of which decay by themselves" : ""}.`) : "",
  ].filter(Boolean).join(" ");
  const modal = a.modal && !("error" in a.modal) ? a.modal : null;
  const gram = a.gramians && !("error" in a.gramians) ? a.gramians : null;
  const warnings = [...a.poles.diagnostics.warnings, ...(s?.diagnostics.warnings ?? []), ...(a.zeros?.diagnostics.warnings ?? [])];
  return {
    summary,
    modes,
    zeros,
    zerosSentence: zerosSentence(zeros, a.zeros?.infiniteCount ?? null, sampleTime),
    coupling: modal ? couplingTable(modal) : null,
    couplingError: a.modal && "error" in a.modal ? a.modal.error : null,
    gramians: gram ? gramianSummary(gram, stateNames) : null,
    gramiansNote: a.gramians && "error" in a.gramians ? a.gramians.error : null,
    warnings: [...new Set(warnings)],
  };
}

/** The plant model analysed in the Structure view: linearization, else the state-space spec; null for transfer-function entry (with the reason). */
export function structureModelOf(plant: PlantSpec | undefined, result: VariantResult | null): { model: ModelJson } | { reason: string } {
  const names = result?.plant?.names;
  const lin = result?.plant?.linearization;
  if (lin) return { model: { A: lin.A, B: lin.B, C: lin.C, D: lin.D, F: lin.F, E: lin.E, sampleTime: null, ...(names ? { names } : {}) } };
  if (plant?.model.type === "state-space") {
    const m = plant.model;
    return { model: { A: m.A, B: m.B, C: m.C, ...(m.D ? { D: m.D } : {}), ...(m.F ? { F: m.F } : {}), ...(m.E ? { E: m.E } : {}), sampleTime: m.sampleTime ?? null, ...(m.names ? { names: m.names } : {}) } };
  }
  if (plant?.model.type === "nonlinear") return { reason: "The structure of an equation-based plant appears once it has been linearized (wait for the design to finish)." };
  return { reason: "The detailed structure needs a state-space plant; the summary above comes from the design run." };
}

export interface StructureViewState {
  status: "idle" | "working" | "done" | "failed";
  report: StructureReport | null;
  error: string | null;
}

export interface StructureController {
  getState(): StructureViewState;
  subscribe(listener: () => void): () => void;
  /** Analyses `model` (latest wins: an older answer arriving later is dropped). */
  load(model: ModelJson): Promise<void>;
  dispose(): void;
}

const messageOf = (e: unknown) => (e instanceof Error ? e.message : String(e));

export function createStructureController(bridge: EngineBridge): StructureController {
  let state: StructureViewState = { status: "idle", report: null, error: null };
  const listeners = new Set<() => void>();
  let seq = 0;
  let controller: AbortController | null = null;
  const update = (patch: Partial<StructureViewState>) => {
    state = { ...state, ...patch };
    for (const l of [...listeners]) l();
  };
  return {
    getState: () => state,
    subscribe(listener) {
      listeners.add(listener);
      return () => listeners.delete(listener);
    },
    async load(model) {
      const mine = ++seq;
      controller?.abort();
      controller = new AbortController();
      const options = { signal: controller.signal };
      update({ status: "working", error: null });
      const soft = <T>(p: Promise<T>): Promise<T | { error: string }> => p.catch((e: unknown) => ({ error: messageOf(e) }));
      try {
        const [poles, structure, zeros, modal] = await Promise.all([
          bridge.request("analysis.poles", { model }, options),
          soft(bridge.request("analysis.structure", { model }, options)),
          soft(bridge.request("analysis.zeros", { model }, options)),
          soft(bridge.request("analysis.modalForm", { model }, options)),
        ]);
        const gramians = poles.stability.stable
          ? await soft(bridge.request("analysis.gramians", { model }, options))
          : { error: "The Gramians (and Hankel singular values) are defined for stable models only; this plant has a pole that does not decay." };
        if (mine !== seq) return;
        const sampleTime = model.sampleTime ?? null;
        const stateNames = model.names?.states ?? poles.poles.map((_, i) => `x${i + 1}`);
        update({
          status: "done",
          report: buildStructureReport(
            { poles, structure: "error" in structure ? null : structure, zeros: "error" in zeros ? null : zeros, modal, gramians },
            sampleTime,
            stateNames,
          ),
          error: null,
        });
      } catch (error) {
        if (mine !== seq) return;
        update({ status: "failed", error: messageOf(error) });
      }
    },
    dispose() {
      seq++;
      controller?.abort();
      listeners.clear();
    },
  };
}
