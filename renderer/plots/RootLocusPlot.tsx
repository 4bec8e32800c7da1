/** Root locus: closed-loop poles of u = −k·y as the loop gain k varies. Click picks a gain. */
import { LocusPlot } from "./LocusPlot";
import type { PlotComplex, PlotVariant } from "./plotTypes";

/** Shaped like the engine's root-locus result. */
export interface RootLocusData {
  gains: readonly number[];
  branches: readonly (readonly PlotComplex[])[];
  asymptotes?: { centroid: number | null; anglesDeg: readonly number[] } | null;
  crossings?: readonly { point: PlotComplex; gain: number }[];
  openLoopPoles?: readonly PlotComplex[];
  openLoopZeros?: readonly PlotComplex[];
}

export interface RootLocusPlotProps {
  locus: RootLocusData;
  sampleTime?: number | null;
  /** Called with the gain at the locus point nearest to a click. */
  onPickGain?: (k: number) => void;
  /** The gain in use: its closed-loop poles are marked with ◆. */
  currentGain?: number | null;
  title?: string;
  width?: number;
  height?: number;
  variant?: PlotVariant;
  fileName?: string;
}

export function RootLocusPlot({ locus, sampleTime, onPickGain, currentGain, title = "Root locus", width = 560, height = 460, variant = "screen", fileName = "root-locus" }: RootLocusPlotProps) {
  const data = {
    parameter: locus.gains,
    branches: locus.branches,
    asymptotes: locus.asymptotes ?? null,
    crossings: (locus.crossings ?? []).map((c) => ({ point: c.point, value: c.gain })),
    openLoopPoles: locus.openLoopPoles ?? [],
    openLoopZeros: locus.openLoopZeros ?? [],
  };
  return (
    <LocusPlot data={data} parameterName="Gain k" parameterUnit="" symbol="k" sampleTime={sampleTime} title={title} width={width} height={height}
      variant={variant} fileName={fileName} onPick={onPickGain} markedValue={currentGain ?? null} />
  );
}
