import { memo, useCallback, useMemo, useRef } from "react";
import type { VariantResult, VariantSpec } from "../../../shared-engine/api/contract";
import { BodePlot, PoleZeroMap, ResponsePlot, type BodeSeries, type PlotComplex, type PoleZeroSeries, type ResponseSeries } from "../../plots";
import { polesOf, setPlacedPole, type WorkspaceStore } from "../../state/workspace";

interface Props {
  store: WorkspaceStore;
  variant: VariantSpec;
  result: VariantResult | null;
  /** Palette slot of the active variant (its position in the project), so it keeps its look everywhere. */
  styleIndex: number;
  width: number;
}

// While a pole is dragged, every move re-renders the workspace: a plot whose props did not change
// (same data objects, stable callbacks) is skipped, so only the plots with new data redraw.
const PoleZeroMapMemo = memo(PoleZeroMap);
const ResponsePlotMemo = memo(ResponsePlot);
const BodePlotMemo = memo(BodePlot);
const NO_POLES: PlotComplex[] = [];

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
  const stateFeedback = variant.stateFeedback;
  const closedLoopPoles = result?.closedLoopPoles;
  // Recomputed only when the feedback spec or the result's poles change (polesOf reads nothing else).
  const designPoles: PlotComplex[] = useMemo(
    () => (stateFeedback?.method === "poles" ? polesOf({ ...variant, stateFeedback }) : (closedLoopPoles ?? NO_POLES)),
    [stateFeedback, closedLoopPoles],
  );
  const ts = result?.discrete?.sampleTime ?? result?.plant?.sampleTime ?? null;
  const half = Math.floor((width - 12) / 2);
  // The latest props, read by the one stable drag callback (a new callback per render would
  // re-render the map on every move).
  const latest = useRef({ store, variantId: variant.id, placing });
  latest.current = { store, variantId: variant.id, placing };
  const onDragPole = useCallback((seriesIndex: number, poleIndex: number, at: PlotComplex) => {
    const { store: s, variantId, placing: isPlacing } = latest.current;
    if (seriesIndex !== 0 || !isPlacing) return;
    const t = performance.now();
    if (t - gesture.current.last > GESTURE_GAP_MS) gesture.current.id += 1;
    gesture.current.last = t;
    performance.mark?.("lw:drag");
    setPlacedPole(s, variantId, poleIndex, roundDragged(at), { live: true, gesture: `drag${gesture.current.id}` });
  }, []);
  const onDragEnd = useCallback(() => latest.current.store.settleLiveEdits(), []);
  const step = result?.step;
  const bode = result?.bode;
  const margins = result?.margins;
  const plantPoles = result?.plant?.poles ?? NO_POLES;
  const plantZeros = result?.plant?.zeros ?? NO_POLES;
  const poleZeroSeries: PoleZeroSeries[] = useMemo(
    () => [
      { name: placing ? `${designName}: placed poles` : `${designName}: closed loop`, poles: designPoles, styleIndex },
      { name: "Plant (open loop)", poles: plantPoles, zeros: plantZeros, styleIndex: styleIndex + 1 },
    ],
    [placing, designName, designPoles, styleIndex, plantPoles, plantZeros],
  );
  const stepSeries: ResponseSeries[] | null = useMemo(
    () =>
      step
        ? [
            {
              name: designName,
              time: step.time,
              output: step.output,
              outputNames: step.outputNames,
              control: step.control,
              metrics: { riseTime: step.riseTime, settlingTime: step.settlingTime, overshootPct: step.overshootPct, peak: step.peak, peakTime: step.peakTime, steadyStateValue: step.steadyStateValue },
              styleIndex,
              // A sampled loop: held input as stairs, outputs as markers at the sample instants.
              sampled: ts !== null ? { period: ts } : null,
            },
          ]
        : null,
    [step, designName, styleIndex, ts],
  );
  const bodeSeries: BodeSeries[] | null = useMemo(
    () =>
      bode
        ? [
            {
              name: designName,
              frequency: bode.frequency,
              magnitudeDb: bode.magnitudeDb,
              phaseDeg: bode.phaseDeg,
              margins: margins ? { gainDb: margins.gainDb, phaseDeg: margins.phaseDeg, gainCrossover: margins.gainCrossover, phaseCrossover: margins.phaseCrossover } : null,
              styleIndex,
            },
          ]
        : null,
    [bode, margins, designName, styleIndex],
  );
  return (
    <div className="result-plots" data-testid="result-plots">
      <div className="plot-row">
        <div className="plot-cell" data-testid="pole-zero-map" style={{ width: half }}>
          <PoleZeroMapMemo
            title={placing ? "Pole-zero map (drag the design poles)" : "Pole-zero map"}
            series={poleZeroSeries}
            sampleTime={ts}
            width={half}
            height={330}
            onDragPole={placing ? onDragPole : undefined}
            onDragEnd={placing ? onDragEnd : undefined}
            fileName={`${variant.id}-pole-zero`}
          />
        </div>
        <div className="plot-cell" data-testid="step-response" style={{ width: half }}>
          {step && stepSeries ? (
            <ResponsePlotMemo
              title={`Step response (${step.loop === "closed-loop" ? "closed loop" : "open loop"}, step on ${step.input})`}
              series={stepSeries}
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
          {bode && bodeSeries ? (
            <BodePlotMemo
              title={`Bode plot (${bode.loop === "plant-input" ? "loop broken at the plant input" : "plant"}, ${bode.input} → ${bode.output})`}
              series={bodeSeries}
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
