/**
 * The margins entry of a VariantResult: gain, phase, delay and disk margins of the plant under
 * unity negative feedback, or of the state-feedback loop broken at the plant input.
 */
import { EngineError } from "../errors";
import type { StateSpace } from "../model";
import { loopMargins, type LoopMargins } from "../analysis/margins";
import { atPath } from "./buildPlant";
import { loopAtInput } from "./closedLoop";
import type { FeedbackDesign } from "./feedbackDesign";
import type { VariantSpec } from "./format";
import type { VariantResult } from "./result";

/** The loops the margins may be read from (as built by the pipeline before this step). */
export interface MarginLoops {
  /** The designed state feedback, or null when the variant has none. */
  feedback: FeedbackDesign | null;
  /** The loop broken at the first plant input (observer-based when there is a compensator). */
  inputLoop: StateSpace | null;
  /** The observer-based loop at the plant input, or null without an observer. */
  compensatorLoop: StateSpace | null;
}

/**
 * Fills `result.margins` as `variant.margins` asks: the plant `model` under unity negative
 * feedback, or the loop at the plant input (per input channel for a multi-input state feedback,
 * and the pure state-feedback loop's margins beside an observer-based one). Throws
 * "invalid-argument" when margins at the plant input are asked without a state-feedback design;
 * errors carry the path `<vpath>.margins`.
 */
export function addMarginsResult(model: StateSpace, variant: VariantSpec, loops: MarginLoops, vpath: string, result: VariantResult): void {
  const spec = variant.margins;
  if (!spec) return;
  const T = model.sampleTime;
  const { feedback, inputLoop, compensatorLoop } = loops;
  if ("feedback" in spec) {
    const lm = atPath(`${vpath}.margins`, () => loopMargins(model));
    result.margins = marginsJson(lm, "unity-negative");
    return;
  }
  if (!inputLoop || !feedback) throw new EngineError("invalid-argument", `${vpath}.margins: margins at the plant input need a state-feedback design`, {});
  const lm = atPath(`${vpath}.margins`, () => loopMargins(inputLoop));
  result.margins = marginsJson(lm, "plant-input");
  if (feedback.loopB.columns > 1 && !compensatorLoop) {
    // A multi-input loop is broken at each input in turn, the other inputs' loops closed;
    // the headline margins are those of the first input.
    result.margins.channels = model.names.inputs.map((name, j) => {
      const ch = atPath(`${vpath}.margins`, () => loopMargins(loopAtInput(feedback.loopA, feedback.loopB, feedback.loopK, j, T)));
      return { input: name, gainDb: ch.gainMarginDb, phaseDeg: ch.phaseMarginDeg, delayMargin: ch.delayMarginSec, sensitivityPeak: ch.sensitivityPeak.value };
    });
  } else if (feedback.loopB.columns > 1) {
    result.warnings.push("margins: the observer-based loop is broken at the first input with the other inputs' loops closed");
  }
  if (compensatorLoop) {
    const sf = loopMargins(loopAtInput(feedback.loopA, feedback.loopB, feedback.loopK, 0, T));
    result.margins.stateFeedbackLoop = { gainDb: sf.gainMarginDb, phaseDeg: sf.phaseMarginDeg };
  }
}

/** Loop margins as reported in `result.margins` (the disk margin only when its range is finite). */
export function marginsJson(lm: LoopMargins, loop: "unity-negative" | "plant-input"): NonNullable<VariantResult["margins"]> {
  const dm = lm.diskMargin;
  return {
    loop,
    gainDb: lm.gainMarginDb,
    phaseDeg: lm.phaseMarginDeg,
    gainCrossover: lm.gainCrossoverRadPerSec,
    phaseCrossover: lm.phaseCrossoverRadPerSec,
    delayMargin: lm.delayMarginSec,
    sensitivityPeak: lm.sensitivityPeak.value,
    complementarySensitivityPeak: lm.complementarySensitivityPeak.value,
    ...(dm.gainRangeDb[0] !== null && dm.gainRangeDb[1] !== null
      ? { diskMargin: { alpha: dm.alpha, gainRangeDb: [dm.gainRangeDb[0], dm.gainRangeDb[1]] as [number, number], phaseDeg: dm.phaseDeg } }
      : {}),
    closedLoopStable: lm.closedLoopStable,
  };
}
