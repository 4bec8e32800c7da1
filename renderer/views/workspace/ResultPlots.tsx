import { useRef } from "react";
import type { VariantResult, VariantSpec } from "../../../shared-engine/api/contract";
import { BodePlot, PoleZeroMap, ResponsePlot, type PlotComplex } from "../../plots";
import { polesOf, setPlacedPole, type WorkspaceStore } from "../../state/workspace";

interface Props {
  store: WorkspaceStore;
  variant: VariantSpec;
  result: VariantResult | null;
  /** Palette slot of the active variant (its position in the project), so it keeps its look everywhere. */
  styleIndex: number;
  width: number;
}

/** A drag is one undo step: moves closer than this in time belong to the same gesture. */
const GESTURE_GAP_MS = 700;

/**
 * A dragged location to 3 significant digits of its distance from the origin: a hand cannot place
 * a pole more finely than that, and the typed fields then read "−0.12", not "−0.1199241…".
 */
export function roundDragged(at: PlotComplex): PlotComplex {
  const size = Math.hypot(at.re, at.im);
  if (!(size > 0)) return { re: 0, im: 0 };
  const step = 10 ** (Math.floor(Math.log10(size)) - 2);
  const r = (x: number) => Number((Math.round(x / step) * step).toPrecision(12));
  return { re: r(at.re), im: r(at.im) };
}

/** Pole-zero map (drag the placed poles), step response with metrics, and Bode plot with margins. */
export function ResultPlots({ store, variant, result, styleIndex, width }: Props) {
  const gesture = useRef({ id: 0, last: 0 });
  const placing = variant.stateFeedback?.method === "poles";
  const designName = variant.name ?? variant.id;
  const designPoles: PlotComplex[] = placing ? polesOf(variant) : (result?.closedLoopPoles ?? []);
  const ts = result?.discrete?.sampleTime ?? result?.plant?.sampleTime ?? null;
  const half = Math.floor((width - 12) / 2);
  const onDragPole = (seriesIndex: number, poleIndex: number, at: PlotComplex) => {
    if (seriesIndex !== 0 || !placing) return;
    const t = performance.now();
    if (t - gesture.current.last > GESTURE_GAP_MS) gesture.current.id += 1;
    gesture.current.last = t;
    performance.mark?.("lw:drag");
    setPlacedPole(store, variant.id, poleIndex, roundDragged(at), { live: true, gesture: `drag${gesture.current.id}` });
  };
  const step = result?.step;
  const bode = result?.bode;
  return (
    <div className="result-plots" data-testid="result-plots">
      <div className="plot-row">
        <div className="plot-cell" data-testid="pole-zero-map" style={{ width: half }}>
          <PoleZeroMap
            title={placing ? "Pole-zero map (drag the design poles)" : "Pole-zero map"}
            series={[
              { name: placing ? `${designName}: placed poles` : `${designName}: closed loop`, poles: designPoles, styleIndex },
              { name: "Plant (open loop)", poles: result?.plant?.poles ?? [], zeros: result?.plant?.zeros ?? [], styleIndex: styleIndex + 1 },
            ]}
            sampleTime={ts}
            width={half}
            height={330}
            onDragPole={placing ? onDragPole : undefined}
            fileName={`${variant.id}-pole-zero`}
          />
        </div>
        <div className="plot-cell" data-testid="step-response" style={{ width: half }}>
          {step ? (
            <ResponsePlot
              title={`Step response (${step.loop === "closed-loop" ? "closed loop" : "open loop"}, step on ${step.input})`}
              series={[
                {
                  name: designName,
                  time: step.time,
                  output: step.output,
                  outputNames: step.outputNames,
                  control: step.control,
                  metrics: { riseTime: step.riseTime, settlingTime: step.settlingTime, overshootPct: step.overshootPct, peak: step.peak, peakTime: step.peakTime, steadyStateValue: step.steadyStateValue },
                  styleIndex,
                },
              ]}
              width={half}
              height={330}
              fileName={`${variant.id}-step`}
            />
          ) : (
            <p className="muted plot-placeholder">No step response yet.</p>
          )}
        </div>
      </div>
      <div className="plot-row">
        <div className="plot-cell wide" data-testid="bode-plot" style={{ width }}>
          {bode ? (
            <BodePlot
              title={`Bode plot (${bode.loop === "plant-input" ? "loop broken at the plant input" : "plant"}, ${bode.input} → ${bode.output})`}
              series={[
                {
                  name: designName,
                  frequency: bode.frequency,
                  magnitudeDb: bode.magnitudeDb,
                  phaseDeg: bode.phaseDeg,
                  margins: result?.margins ? { gainDb: result.margins.gainDb, phaseDeg: result.margins.phaseDeg, gainCrossover: result.margins.gainCrossover, phaseCrossover: result.margins.phaseCrossover } : null,
                  styleIndex,
                },
              ]}
              width={width}
              height={360}
              fileName={`${variant.id}-bode`}
            />
          ) : (
            <p className="muted plot-placeholder">No frequency response yet.</p>
          )}
        </div>
      </div>
    </div>
  );
}
