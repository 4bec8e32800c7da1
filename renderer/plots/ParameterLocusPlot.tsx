/** Parameter locus: eigenvalues of the closed loop as one design or plant parameter varies. Click picks a value. */
import { LocusPlot } from "./LocusPlot";
import type { PlotComplex, PlotVariant } from "./plotTypes";

/** Shaped like the engine's parameter-locus result. */
export interface ParameterLocusData {
  values: readonly number[];
  branches: readonly (readonly PlotComplex[])[];
  crossings?: readonly { point: PlotComplex; value: number }[];
}

export interface ParameterLocusPlotProps {
  locus: ParameterLocusData;
  /** The parameter's name and unit, e.g. "Mass m", "kg". */
  parameterName: string;
  parameterUnit?: string;
  /** Short symbol for crossing labels (default "p"). */
  symbol?: string;
  sampleTime?: number | null;
  onPickValue?: (value: number) => void;
  currentValue?: number | null;
  title?: string;
  width?: number;
  height?: number;
  variant?: PlotVariant;
  fileName?: string;
}

export function ParameterLocusPlot(props: ParameterLocusPlotProps) {
  const { locus, parameterName, parameterUnit = "", symbol = "p", sampleTime, onPickValue, currentValue, title = `Poles as ${parameterName} varies`, width = 560, height = 460, variant = "screen", fileName = "parameter-locus" } = props;
  return (
    <LocusPlot data={{ parameter: locus.values, branches: locus.branches, crossings: locus.crossings ?? [] }} parameterName={parameterName} parameterUnit={parameterUnit}
      symbol={symbol} sampleTime={sampleTime} title={title} width={width} height={height} variant={variant} fileName={fileName}
      onPick={onPickValue} markedValue={currentValue ?? null} showEnds />
  );
}
